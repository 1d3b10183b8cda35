//! Bindings of identification from Markov parameters (Ho–Kalman), Gramians and balancing.

use super::convert::{array2, array_nd, matrix_from, model_from, quad, ModelIn, Quad};
use super::errors::run;
use crate::gramian::{balance as gramian_balance, lyapunov};
use crate::identify::ho_kalman;
use numpy::{PyReadonlyArray2, PyReadonlyArray3};
use pyo3::prelude::*;

/// (A, B, C, D), Hankel singular values, order, tol, (block rows, block columns)
type MarkovOut<'py> = (Quad<'py>, Bound<'py, PyAny>, usize, f64, (usize, usize));

#[pyfunction]
#[pyo3(signature = (markov, order, tol))]
pub(crate) fn realize_markov<'py>(
    py: Python<'py>,
    markov: PyReadonlyArray3<'py, f64>,
    order: Option<usize>,
    tol: Option<f64>,
) -> PyResult<MarkovOut<'py>> {
    let (k, p, m) = markov.as_array().dim();
    let data: Vec<f64> = markov.as_array().iter().copied().collect();
    let r = run(py, move || {
        ho_kalman::realize_markov(&data, k, p, m, order, tol)
    })?;
    let count = r.singular_values.len();
    Ok((
        quad(py, r.realization, false)?,
        array_nd(py, r.singular_values, &[count])?,
        r.order,
        r.tol,
        (r.block_rows, r.block_cols),
    ))
}

#[pyfunction]
#[pyo3(signature = (a, b, c, discrete))]
pub(crate) fn gramians<'py>(
    py: Python<'py>,
    a: PyReadonlyArray2<'py, f64>,
    b: PyReadonlyArray2<'py, f64>,
    c: PyReadonlyArray2<'py, f64>,
    discrete: bool,
) -> PyResult<(Bound<'py, PyAny>, Bound<'py, PyAny>, [f64; 2])> {
    let (a, b, c) = (matrix_from(&a), matrix_from(&b), matrix_from(&c));
    let g = run(py, move || lyapunov::gramians(&a, &b, &c, discrete))?;
    Ok((
        array2(py, lyapunov::from_na(&g.wc))?,
        array2(py, lyapunov::from_na(&g.wo))?,
        g.residuals,
    ))
}

#[pyfunction]
#[pyo3(signature = (a, b, c, discrete))]
pub(crate) fn hankel_singular_values<'py>(
    py: Python<'py>,
    a: PyReadonlyArray2<'py, f64>,
    b: PyReadonlyArray2<'py, f64>,
    c: PyReadonlyArray2<'py, f64>,
    discrete: bool,
) -> PyResult<Bound<'py, PyAny>> {
    let (a, b, c) = (matrix_from(&a), matrix_from(&b), matrix_from(&c));
    let s = run(py, move || {
        gramian_balance::hankel_singular_values(&a, &b, &c, discrete)
    })?;
    let n = s.len();
    array_nd(py, s, &[n])
}

#[pyfunction]
#[pyo3(signature = (model, order, discrete))]
pub(crate) fn balanced_realization<'py>(
    py: Python<'py>,
    model: ModelIn<'py>,
    order: Option<usize>,
    discrete: bool,
) -> PyResult<(Quad<'py>, Bound<'py, PyAny>, f64, [f64; 2])> {
    let ss = model_from(&model)?;
    let r = run(py, move || {
        gramian_balance::balanced_realization(&ss, order, discrete)
    })?;
    let n = r.hankel_singular_values.len();
    Ok((
        quad(py, r.realization, false)?,
        array_nd(py, r.hankel_singular_values, &[n])?,
        r.error_bound,
        r.residuals,
    ))
}
