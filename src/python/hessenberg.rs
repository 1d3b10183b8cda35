//! Bindings of the Hessenberg route (orthogonal reduction, La Budde's recurrence) and of
//! the batch transfer functions with a recovery method.

use super::convert::{array_nd, batch_dims, matrix_from, model_from, BatchInput, ModelIn};
use super::errors::{run, to_py};
use crate::batch;
use crate::recover::{self, hessenberg, Method};
use numpy::{PyReadonlyArray2, PyReadonlyArray3};
use pyo3::prelude::*;

type Four<'py> = (
    Bound<'py, PyAny>,
    Bound<'py, PyAny>,
    Bound<'py, PyAny>,
    Bound<'py, PyAny>,
);

/// `(coeffs, estimates)` of det(sI − A).
#[pyfunction]
pub(crate) fn characteristic_polynomial_hessenberg<'py>(
    py: Python<'py>,
    a: PyReadonlyArray2<'py, f64>,
) -> PyResult<(Bound<'py, PyAny>, Bound<'py, PyAny>)> {
    let a = matrix_from(&a);
    let n = a.rows();
    let (coeffs, est) = run(py, move || {
        recover::check_square_finite(&a)?;
        recover::check_order_for_batch(n)?;
        hessenberg::characteristic_polynomial(a.as_slice(), n)
    })?;
    Ok((
        array_nd(py, coeffs, &[n + 1])?,
        array_nd(py, est, &[n + 1])?,
    ))
}

/// `(num, den, num_estimate, den_estimate)` of one model.
#[pyfunction]
pub(crate) fn transfer_function_hessenberg<'py>(
    py: Python<'py>,
    model: ModelIn<'py>,
) -> PyResult<Four<'py>> {
    let ss = model_from(&model)?;
    let (n, p, m) = (ss.n_states(), ss.n_outputs(), ss.n_inputs());
    let r = run(py, move || {
        for (arg, x) in [("a", &ss.a), ("b", &ss.b), ("c", &ss.c), ("d", &ss.d)] {
            crate::error::require_finite(arg, x.as_slice())?;
        }
        recover::check_order_for_batch(n)?;
        hessenberg::transfer_function(&ss)
    })?;
    Ok((
        array_nd(py, r.num, &[p, m, n + 1])?,
        array_nd(py, r.den, &[n + 1])?,
        array_nd(py, r.num_estimate, &[p, m, n + 1])?,
        array_nd(py, r.den_estimate, &[n + 1])?,
    ))
}

/// `(num, den)` of a batch by any float method.
#[pyfunction]
pub(crate) fn transfer_function_batch_method<'py>(
    py: Python<'py>,
    a: PyReadonlyArray3<'py, f64>,
    b: PyReadonlyArray3<'py, f64>,
    c: PyReadonlyArray3<'py, f64>,
    d: PyReadonlyArray3<'py, f64>,
    method: &str,
) -> PyResult<(Bound<'py, PyAny>, Bound<'py, PyAny>)> {
    let method: Method = method.parse().map_err(to_py)?;
    let (count, n, m, p) = batch_dims(&a, &b, &c, &d)?;
    // The arrays stay alive (borrowed here) until the core returns: no copy needed.
    let inputs = [&a, &b, &c, &d].map(BatchInput::of);
    let t = run(py, move || {
        let [av, bv, cv, dv] = &inputs;
        batch::transfer_function_batch_with(
            av.data(),
            bv.data(),
            cv.data(),
            dv.data(),
            count,
            (n, m, p),
            method,
        )
    })?;
    Ok((
        array_nd(py, t.num, &[count, p, m, n + 1])?,
        array_nd(py, t.den, &[count, n + 1])?,
    ))
}

/// `(num, den, num_estimate, den_estimate)` of a batch by the Hessenberg route.
#[pyfunction]
pub(crate) fn transfer_function_batch_hessenberg<'py>(
    py: Python<'py>,
    a: PyReadonlyArray3<'py, f64>,
    b: PyReadonlyArray3<'py, f64>,
    c: PyReadonlyArray3<'py, f64>,
    d: PyReadonlyArray3<'py, f64>,
) -> PyResult<Four<'py>> {
    let (count, n, m, p) = batch_dims(&a, &b, &c, &d)?;
    // The arrays stay alive (borrowed here) until the core returns: no copy needed.
    let inputs = [&a, &b, &c, &d].map(BatchInput::of);
    let r = run(py, move || {
        let [av, bv, cv, dv] = &inputs;
        batch::hessenberg_batch(av.data(), bv.data(), cv.data(), dv.data(), count, (n, m, p))
    })?;
    Ok((
        array_nd(py, r.transfer.num, &[count, p, m, n + 1])?,
        array_nd(py, r.transfer.den, &[count, n + 1])?,
        array_nd(py, r.num_estimate, &[count, p, m, n + 1])?,
        array_nd(py, r.den_estimate, &[count, n + 1])?,
    ))
}
