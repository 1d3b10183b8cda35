//! Bindings of the Jordan (parallel) form, float and exact.

use super::convert::{
    exact_out_vec, exact_quad, exact_vector, quad, vector_from, ExactIn, ExactOut, Quad,
};
use super::errors::run;
use crate::realize;
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
    d.set_item("condition", info.condition)?;
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
