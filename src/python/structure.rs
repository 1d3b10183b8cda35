//! Bindings of the structure routines: controllability / observability matrices (display
//! only), staircase forms, minimal realization, Kalman decomposition, similarity.

use super::convert::{
    array2, array_nd, exact_matrix, exact_out, matrix_from, model_from, quad, ExactIn, ExactOut,
    ModelIn, Quad,
};
use super::errors::{run, to_py};
use crate::error::ModelError as CoreError;
use crate::krylov;
use crate::matrix::Matrix;
use crate::structure::{kalman, minimal, similarity, staircase};
use numpy::PyReadonlyArray2;
use pyo3::prelude::*;

#[pyfunction]
pub(crate) fn controllability_matrix_float<'py>(
    py: Python<'py>,
    a: PyReadonlyArray2<'py, f64>,
    b: PyReadonlyArray2<'py, f64>,
) -> PyResult<Bound<'py, PyAny>> {
    let (a, b) = (matrix_from(&a), matrix_from(&b));
    check_krylov_shapes(&a, &b)?;
    let m = run(py, move || {
        let k = krylov::controllability_matrix(&a, &b);
        if k.as_slice().iter().all(|v| v.is_finite()) {
            Ok(k)
        } else {
            Err(CoreError::Overflow {
                what: "controllability matrix".into(),
            })
        }
    })?;
    array2(py, m)
}

#[pyfunction]
pub(crate) fn controllability_matrix_exact(
    py: Python<'_>,
    a: ExactIn,
    b: ExactIn,
) -> PyResult<ExactOut> {
    let (a, b) = (exact_matrix("a", a)?, exact_matrix("b", b)?);
    check_krylov_shapes(&a, &b)?;
    let k = run(py, move || Ok(krylov::controllability_matrix(&a, &b)))?;
    Ok(exact_out(k))
}

/// A square, and b with one row per state.
fn check_krylov_shapes<T: crate::scalar::Scalar>(a: &Matrix<T>, b: &Matrix<T>) -> PyResult<()> {
    if a.rows() != a.cols() {
        return Err(to_py(CoreError::Shape {
            arg: "a",
            expected: "a square matrix".into(),
            found: format!("shape ({}, {})", a.rows(), a.cols()),
        }));
    }
    if b.rows() != a.rows() {
        return Err(to_py(CoreError::Shape {
            arg: "b",
            expected: format!("{} rows (one per state)", a.rows()),
            found: format!("shape ({}, {})", b.rows(), b.cols()),
        }));
    }
    Ok(())
}

/// (A, B, C or None, Q, blocks, rank, singular values per step, kept per step, tol,
/// threshold per step, backward error per step, split residual [A, B])
type StaircaseOut<'py> = (
    Bound<'py, PyAny>,
    Bound<'py, PyAny>,
    Option<Bound<'py, PyAny>>,
    Bound<'py, PyAny>,
    Vec<usize>,
    usize,
    Vec<Bound<'py, PyAny>>,
    Vec<usize>,
    f64,
    Vec<f64>,
    Vec<f64>,
    [f64; 2],
);

fn staircase_out<'py>(py: Python<'py>, s: staircase::Staircase) -> PyResult<StaircaseOut<'py>> {
    let c = match s.c {
        Some(c) => Some(array2(py, c)?),
        None => None,
    };
    let mut sv = Vec::with_capacity(s.steps.len());
    let mut kept = Vec::with_capacity(s.steps.len());
    let mut thresholds = Vec::with_capacity(s.steps.len());
    let mut backward = Vec::with_capacity(s.steps.len());
    for step in s.steps {
        let k = step.singular_values.len();
        sv.push(array_nd(py, step.singular_values, &[k])?);
        kept.push(step.kept);
        thresholds.push(step.threshold);
        backward.push(step.backward_error);
    }
    Ok((
        array2(py, s.a)?,
        array2(py, s.b)?,
        c,
        array2(py, s.q)?,
        s.blocks,
        s.rank,
        sv,
        kept,
        s.tol,
        thresholds,
        backward,
        s.split_residual,
    ))
}

#[pyfunction]
#[pyo3(signature = (a, b, c, tol))]
pub(crate) fn controllability_staircase<'py>(
    py: Python<'py>,
    a: PyReadonlyArray2<'py, f64>,
    b: PyReadonlyArray2<'py, f64>,
    c: Option<PyReadonlyArray2<'py, f64>>,
    tol: Option<f64>,
) -> PyResult<StaircaseOut<'py>> {
    let (a, b, c) = (
        matrix_from(&a),
        matrix_from(&b),
        c.as_ref().map(matrix_from),
    );
    let s = run(py, move || {
        staircase::controllability_staircase(&a, &b, c.as_ref(), tol)
    })?;
    staircase_out(py, s)
}

#[pyfunction]
#[pyo3(signature = (a, b, c, tol))]
pub(crate) fn observability_staircase<'py>(
    py: Python<'py>,
    a: PyReadonlyArray2<'py, f64>,
    b: Option<PyReadonlyArray2<'py, f64>>,
    c: PyReadonlyArray2<'py, f64>,
    tol: Option<f64>,
) -> PyResult<StaircaseOut<'py>> {
    let (a, b, c) = (
        matrix_from(&a),
        b.as_ref().map(matrix_from),
        matrix_from(&c),
    );
    let s = run(py, move || {
        staircase::observability_staircase(&a, b.as_ref(), &c, tol)
    })?;
    staircase_out(py, s)
}

#[pyfunction]
#[pyo3(signature = (model, tol))]
pub(crate) fn minimal_realization<'py>(
    py: Python<'py>,
    model: ModelIn<'py>,
    tol: Option<f64>,
) -> PyResult<(Quad<'py>, StaircaseOut<'py>, StaircaseOut<'py>, [f64; 3])> {
    let ss = model_from(&model)?;
    let m = run(py, move || minimal::minimal_realization(&ss, tol))?;
    Ok((
        quad(py, m.realization, false)?,
        staircase_out(py, m.controllability)?,
        staircase_out(py, m.observability)?,
        [m.markov_residual, m.markov_tolerance, m.factor],
    ))
}

/// (A, B, C, D), T, sizes, condition of T, pattern residual, [zeroed B, zeroed C, Markov
/// residual, factor], the three staircases
type KalmanOut<'py> = (
    Quad<'py>,
    Bound<'py, PyAny>,
    [usize; 4],
    f64,
    f64,
    [f64; 4],
    Vec<StaircaseOut<'py>>,
);

#[pyfunction]
#[pyo3(signature = (model, tol))]
pub(crate) fn kalman_decomposition<'py>(
    py: Python<'py>,
    model: ModelIn<'py>,
    tol: Option<f64>,
) -> PyResult<KalmanOut<'py>> {
    let ss = model_from(&model)?;
    let k = run(py, move || kalman::kalman_decomposition(&ss, tol))?;
    Ok((
        quad(py, k.realization, false)?,
        array2(py, k.t)?,
        k.sizes,
        k.condition,
        k.pattern_residual,
        [k.zeroed_b, k.zeroed_c, k.markov_residual, k.factor],
        k.staircases
            .into_iter()
            .map(|s| staircase_out(py, s))
            .collect::<PyResult<Vec<_>>>()?,
    ))
}

#[pyfunction]
#[pyo3(signature = (r1, r2, tol))]
pub(crate) fn similarity_transform<'py>(
    py: Python<'py>,
    r1: ModelIn<'py>,
    r2: ModelIn<'py>,
    tol: Option<f64>,
) -> PyResult<(Bound<'py, PyAny>, [f64; 4], f64)> {
    let (s1, s2) = (model_from(&r1)?, model_from(&r2)?);
    let s = run(py, move || similarity::similarity(&s1, &s2, tol))?;
    Ok((array2(py, s.t)?, s.residuals, s.tol))
}
