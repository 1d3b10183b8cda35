//! Bindings of the zeros and gains: invariant / transmission zeros, normal rank, DC gain,
//! zeros-poles-gain in and out, and the zeros batch.

use super::convert::{
    array2, array_nd, batch_dims, model_from, quad, vector_from, BatchInput, ModelIn, Quad,
};
use super::errors::run;
use super::realize::parse_form;
use crate::zeros::batch::{invariant_zeros_batch as core_batch, BatchShape};
use crate::zeros::{dc_gain as core_dc, pencil, zeros_poles_gain as zpk};
use numpy::{PyReadonlyArray1, PyReadonlyArray3};
use pyo3::prelude::*;
use pyo3::types::PyDict;

fn split(values: &[(f64, f64)]) -> (Vec<f64>, Vec<f64>) {
    values.iter().copied().unzip()
}

fn zeros_out<'py>(
    py: Python<'py>,
    z: pencil::Zeros,
) -> PyResult<(Vec<f64>, Vec<f64>, Bound<'py, PyDict>)> {
    let (re, im) = split(&z.zeros);
    let info = PyDict::new(py);
    info.set_item("tol", z.info.tol)?;
    info.set_item("norm", z.info.norm)?;
    info.set_item("normal_rank", z.info.normal_rank)?;
    info.set_item("regular_order", z.info.regular_order)?;
    info.set_item("residual", z.info.residual)?;
    info.set_item("verified", z.info.verified)?;
    info.set_item("refined", z.info.refined)?;
    info.set_item("refinement_move", z.info.refinement_move)?;
    info.set_item("candidate_tol", z.info.candidate_tol)?;
    let decisions: Vec<(&str, u8, Vec<f64>, usize)> = z
        .info
        .decisions
        .into_iter()
        .map(|d| (d.block, d.pass, d.singular_values, d.kept))
        .collect();
    info.set_item("decisions", decisions)?;
    Ok((re, im, info))
}

/// `(re, im, info)` of the invariant zeros, or of the transmission zeros when `transmission`.
#[pyfunction]
pub(crate) fn invariant_zeros<'py>(
    py: Python<'py>,
    model: ModelIn<'py>,
    tol: Option<f64>,
    transmission: bool,
) -> PyResult<(Vec<f64>, Vec<f64>, Bound<'py, PyDict>)> {
    let ss = model_from(&model)?;
    let z = run(py, move || {
        if transmission {
            pencil::transmission_zeros(&ss, tol)
        } else {
            pencil::invariant_zeros(&ss, tol)
        }
    })?;
    zeros_out(py, z)
}

#[pyfunction]
pub(crate) fn normal_rank(py: Python<'_>, model: ModelIn<'_>, tol: Option<f64>) -> PyResult<usize> {
    let ss = model_from(&model)?;
    run(py, move || pencil::normal_rank(&ss, tol))
}

/// `(G, condition, residual, reduced)`.
#[pyfunction]
pub(crate) fn dc_gain<'py>(
    py: Python<'py>,
    model: ModelIn<'py>,
    discrete: bool,
) -> PyResult<(Bound<'py, PyAny>, f64, f64, bool)> {
    let ss = model_from(&model)?;
    let (g, info) = run(py, move || core_dc::dc_gain(&ss, discrete))?;
    Ok((array2(py, g)?, info.condition, info.residual, info.reduced))
}

/// `(zeros re, zeros im, poles re, poles im, gain)`.
#[pyfunction]
#[allow(clippy::type_complexity)]
pub(crate) fn zeros_poles_gain(
    py: Python<'_>,
    num: PyReadonlyArray1<'_, f64>,
    den: PyReadonlyArray1<'_, f64>,
) -> PyResult<(Vec<f64>, Vec<f64>, Vec<f64>, Vec<f64>, f64)> {
    let (num, den) = (vector_from(&num), vector_from(&den));
    let z = run(py, move || zpk::zeros_poles_gain(&num, &den))?;
    let (zr, zi) = split(&z.zeros);
    let (pr, pi) = split(&z.poles);
    Ok((zr, zi, pr, pi, z.gain))
}

#[pyfunction]
#[allow(clippy::too_many_arguments)]
pub(crate) fn realize_zeros_poles_gain<'py>(
    py: Python<'py>,
    zeros_re: PyReadonlyArray1<'py, f64>,
    zeros_im: PyReadonlyArray1<'py, f64>,
    poles_re: PyReadonlyArray1<'py, f64>,
    poles_im: PyReadonlyArray1<'py, f64>,
    gain: f64,
    form: &str,
) -> PyResult<Quad<'py>> {
    let form = parse_form(form)?;
    let (zr, zi) = (vector_from(&zeros_re), vector_from(&zeros_im));
    let (pr, pi) = (vector_from(&poles_re), vector_from(&poles_im));
    let ss = run(py, move || {
        zpk::realize_zeros_poles_gain((&zr, &zi), (&pr, &pi), gain, form)
    })?;
    quad(py, ss, true)
}

/// `(re (N, width), im (N, width), counts)` with width = max(n, 1).
#[pyfunction]
#[allow(clippy::type_complexity)]
pub(crate) fn invariant_zeros_batch<'py>(
    py: Python<'py>,
    a: PyReadonlyArray3<'py, f64>,
    b: PyReadonlyArray3<'py, f64>,
    c: PyReadonlyArray3<'py, f64>,
    d: PyReadonlyArray3<'py, f64>,
    tol: Option<f64>,
) -> PyResult<(Bound<'py, PyAny>, Bound<'py, PyAny>, Vec<usize>)> {
    let (count, n, m, p) = batch_dims(&a, &b, &c, &d)?;
    // The arrays stay alive (borrowed here) until the core returns: no copy needed.
    let inputs = [&a, &b, &c, &d].map(BatchInput::of);
    let shape = BatchShape { count, n, m, p };
    let z = run(py, move || {
        let [av, bv, cv, dv] = &inputs;
        core_batch(av.data(), bv.data(), cv.data(), dv.data(), shape, tol)
    })?;
    let width = n.max(1);
    Ok((
        array_nd(py, z.re, &[count, width])?,
        array_nd(py, z.im, &[count, width])?,
        z.counts,
    ))
}
