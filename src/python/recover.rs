//! Bindings of transfer-function recovery (Faddeev–LeVerrier: certified, exact, plain).

use super::convert::{
    array_nd, exact_matrix, exact_model_from, exact_out, exact_out_vec, matrix_from, model_from,
    ExactIn, ExactOut, ModelIn,
};
use super::errors::{run, to_py};
use crate::error::ModelError as CoreError;
use crate::recover::{self, Accuracy, Method};
use pyo3::prelude::*;
use pyo3::types::PyDict;

fn accuracy_dict<'py>(py: Python<'py>, acc: &Accuracy) -> PyResult<Bound<'py, PyDict>> {
    let d = PyDict::new(py);
    d.set_item("method", acc.method)?;
    d.set_item("relative_error_bound", acc.relative_error_bound)?;
    Ok(d)
}

fn parse_method(method: &str) -> PyResult<Method> {
    method.parse().map_err(to_py)
}

#[pyfunction]
#[pyo3(signature = (a, method, with_adjugates))]
pub(crate) fn faddeev_leverrier_float<'py>(
    py: Python<'py>,
    a: numpy::PyReadonlyArray2<'py, f64>,
    method: &str,
    with_adjugates: bool,
) -> PyResult<(Bound<'py, PyAny>, Bound<'py, PyAny>, Bound<'py, PyDict>)> {
    let method = parse_method(method)?;
    let a = matrix_from(&a);
    let n = a.rows();
    let (coeffs, adj, acc) = run(py, move || {
        recover::faddeev_leverrier_f64(&a, method, with_adjugates)
    })?;
    let flat: Vec<f64> = adj.into_iter().flat_map(|m| m.into_vec()).collect();
    let shape = if with_adjugates { [n, n, n] } else { [0, n, n] };
    Ok((
        array_nd(py, coeffs, &[n + 1])?,
        array_nd(py, flat, &shape)?,
        accuracy_dict(py, &acc)?,
    ))
}

#[pyfunction]
pub(crate) fn transfer_function_float<'py>(
    py: Python<'py>,
    model: ModelIn<'py>,
    method: &str,
) -> PyResult<(Bound<'py, PyAny>, Bound<'py, PyAny>, Bound<'py, PyDict>)> {
    let method = parse_method(method)?;
    let ss = model_from(&model)?;
    let (n, p, m) = (ss.n_states(), ss.n_outputs(), ss.n_inputs());
    let (num, den, acc) = run(py, move || recover::transfer_function_f64(&ss, method))?;
    Ok((
        array_nd(py, num, &[p, m, n + 1])?,
        array_nd(py, den, &[n + 1])?,
        accuracy_dict(py, &acc)?,
    ))
}

/// Largest order of the exact rational recursion when adjugates are returned (n⁴
/// big-number operations); coefficients and transfer matrices (the multi-modular route) go
/// up to the recursion's order limit. Both also answer to the core's time budget.
const MAX_EXACT_ADJUGATE_ORDER: usize = 64;

fn check_exact_order(n: usize, with_adjugates: bool) -> PyResult<()> {
    let (limit, what) = if with_adjugates {
        (MAX_EXACT_ADJUGATE_ORDER, "the exact adjugate sequence")
    } else {
        (recover::MAX_RECURSION_ORDER, "exact rational arithmetic")
    };
    if n > limit {
        return Err(to_py(CoreError::TooLarge {
            arg: "a",
            detail: format!("order {n} exceeds the limit {limit} of {what}"),
        }));
    }
    Ok(())
}

#[pyfunction]
pub(crate) fn faddeev_leverrier_exact(
    py: Python<'_>,
    a: ExactIn,
    with_adjugates: bool,
) -> PyResult<(ExactOut, Vec<ExactOut>)> {
    check_exact_order(a.0, with_adjugates)?;
    let a = exact_matrix("a", a)?;
    if a.rows() != a.cols() {
        return Err(to_py(CoreError::Shape {
            arg: "a",
            expected: "a square matrix".into(),
            found: format!("shape ({}, {})", a.rows(), a.cols()),
        }));
    }
    let (coeffs, adj) = run(py, move || {
        recover::rational::faddeev_leverrier_rational(&a, with_adjugates)
    })?;
    Ok((
        exact_out_vec(coeffs),
        adj.into_iter().map(exact_out).collect(),
    ))
}

#[pyfunction]
pub(crate) fn transfer_function_exact(
    py: Python<'_>,
    model: (ExactIn, ExactIn, ExactIn, ExactIn),
) -> PyResult<(ExactOut, ExactOut)> {
    check_exact_order(model.0 .0, false)?;
    let ss = exact_model_from(model)?;
    let (num, den) = run(py, move || {
        recover::rational::transfer_function_rational(&ss)
    })?;
    Ok((exact_out_vec(num), exact_out_vec(den)))
}
