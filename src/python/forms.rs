//! Bindings of the Jordan (parallel) form and the Luenberger multivariable forms, float and exact.

use super::convert::{
    array2, exact_model_from, exact_out_vec, exact_quad, exact_vector, model_from, quad,
    vector_from, ExactIn, ExactOut, ModelIn, Quad,
};
use super::errors::{run, to_py};
use crate::realize;
use crate::realize::multivariable::{self, LuenbergerForm, MultivariableInfo};
use numpy::PyReadonlyArray1;
use pyo3::prelude::*;
use pyo3::types::PyDict;

/// Each exact factor as (monic factor, multiplicity, numerators of orders 1..m).
type ExactFactorOut = (ExactOut, usize, Vec<ExactOut>);
/// An exact model's four matrices.
type ExactQuadOut = (ExactOut, ExactOut, ExactOut, ExactOut);

#[pyfunction]
#[pyo3(signature = (num, den, tol))]
pub(crate) fn realize_jordan_float<'py>(
    py: Python<'py>,
    num: PyReadonlyArray1<'py, f64>,
    den: PyReadonlyArray1<'py, f64>,
    tol: Option<f64>,
) -> PyResult<(Quad<'py>, Bound<'py, PyDict>)> {
    let (num, den) = (vector_from(&num), vector_from(&den));
    let (ss, info) = run(py, move || realize::realize_jordan_f64(&num, &den, tol))?;
    let d = PyDict::new(py);
    let poles: Vec<(f64, f64)> = info.clusters.iter().map(|c| c.pole).collect();
    let mult: Vec<usize> = info.clusters.iter().map(|c| c.multiplicity).collect();
    let spread: Vec<f64> = info.clusters.iter().map(|c| c.spread).collect();
    let residues: Vec<Vec<(f64, f64)>> = info.clusters.iter().map(|c| c.residues.clone()).collect();
    d.set_item("poles", poles)?;
    d.set_item("multiplicities", mult)?;
    d.set_item("cluster_spread", spread)?;
    d.set_item("residues", residues)?;
    d.set_item("tol", info.tol)?;
    // ∞ for a basis singular in float64 (poles far apart in magnitude): None, as for the
    // multivariable forms; a float result is finite.
    d.set_item(
        "condition",
        info.condition.is_finite().then_some(info.condition),
    )?;
    d.set_item("transfer_error", info.transfer_error)?;
    Ok((quad(py, ss, true)?, d))
}

#[pyfunction]
pub(crate) fn realize_jordan_exact(
    py: Python<'_>,
    num: ExactIn,
    den: ExactIn,
) -> PyResult<(ExactQuadOut, Vec<ExactFactorOut>)> {
    let (num, den) = (exact_vector("num", num)?, exact_vector("den", den)?);
    let (ss, factors) = run(py, move || realize::realize_jordan_exact(&num, &den))?;
    let out = factors
        .into_iter()
        .map(|f| {
            (
                exact_out_vec(f.factor),
                f.multiplicity,
                f.numerators.into_iter().map(exact_out_vec).collect(),
            )
        })
        .collect();
    Ok((exact_quad(ss), out))
}

fn luenberger(form: &str) -> PyResult<LuenbergerForm> {
    match form {
        "controller" => Ok(LuenbergerForm::Controller),
        "observer" => Ok(LuenbergerForm::Observer),
        other => Err(to_py(crate::error::ModelError::BadOption {
            arg: "form",
            found: other.to_string(),
            allowed: "'controller', 'observer'",
        })),
    }
}

fn multivariable_info<'py>(
    py: Python<'py>,
    info: MultivariableInfo,
) -> PyResult<Bound<'py, PyDict>> {
    let d = PyDict::new(py);
    d.set_item("indices", info.indices)?;
    // ∞ only in exact mode, for a T too wide for float64 even after scaling: None.
    d.set_item(
        "condition",
        info.condition.is_finite().then_some(info.condition),
    )?;
    d.set_item("residual", info.residual)?;
    d.set_item("markov_error", info.markov_error)?;
    d.set_item("tol", info.tol)?;
    Ok(d)
}

#[pyfunction]
#[pyo3(signature = (model, form, tol))]
pub(crate) fn multivariable_form_float<'py>(
    py: Python<'py>,
    model: ModelIn<'py>,
    form: &str,
    tol: Option<f64>,
) -> PyResult<(Quad<'py>, Bound<'py, PyDict>)> {
    let which = luenberger(form)?;
    let ss = model_from(&model)?;
    let (out, info) = run(py, move || {
        multivariable::multivariable_f64(&ss, which, tol)
    })?;
    let transform = array2(py, info.transform.clone())?;
    let d = multivariable_info(py, info)?;
    d.set_item("transform", transform)?;
    Ok((quad(py, out, true)?, d))
}

#[pyfunction]
pub(crate) fn multivariable_form_exact<'py>(
    py: Python<'py>,
    model: (ExactIn, ExactIn, ExactIn, ExactIn),
    form: &str,
) -> PyResult<(ExactQuadOut, Bound<'py, PyDict>)> {
    let which = luenberger(form)?;
    let ss = exact_model_from(model)?;
    let (out, info) = run(py, move || multivariable::multivariable_exact(&ss, which))?;
    Ok((exact_quad(out), multivariable_info(py, info)?))
}
