//! The PyO3 binding layer: conversions, GIL release, error mapping — nothing else.
//!
//! Inputs arrive already converted to float64 (or to pairs of Python ints for exact data)
//! by the Python package's single validation module; here they are copied into owned core
//! matrices (so results never alias and the GIL can be released), the core runs under
//! `py.detach`, and a `ModelError` from the core becomes the Python `ModelError`. A panic
//! in the core is a bug; the last-resort guard reports it as `ModelError` rather than
//! letting it abort the caller's kernel.
//!
//! One file per area, each thin: `realize`, `recover`, `hessenberg`, `structure`, `identify`, `batch`, `time`;
//! the shared conversions (`convert`: the one `(a, b, c, d)` model argument, result arrays,
//! exact data) and the error mapping and GIL release (`errors`).

mod batch;
mod convert;
mod errors;
mod forms;
mod hessenberg;
mod identify;
mod parametric;
mod realize;
mod recover;
mod structure;
mod time;
mod zeros;

use pyo3::prelude::*;

#[pymodule]
fn _core(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add("ModelError", m.py().get_type::<errors::ModelError>())?;
    m.add("CERTIFIED_TOLERANCE", crate::recover::CERTIFIED_TOLERANCE)?;
    // realize
    m.add_function(wrap_pyfunction!(realize::realize_float, m)?)?;
    m.add_function(wrap_pyfunction!(realize::realize_exact, m)?)?;
    m.add_function(wrap_pyfunction!(realize::realize_transfer_matrix_float, m)?)?;
    m.add_function(wrap_pyfunction!(realize::realize_transfer_matrix_exact, m)?)?;
    m.add_function(wrap_pyfunction!(forms::realize_jordan_float, m)?)?;
    m.add_function(wrap_pyfunction!(forms::realize_jordan_exact, m)?)?;
    m.add_function(wrap_pyfunction!(forms::multivariable_form_float, m)?)?;
    m.add_function(wrap_pyfunction!(forms::multivariable_form_exact, m)?)?;
    // recover
    m.add_function(wrap_pyfunction!(recover::faddeev_leverrier_float, m)?)?;
    m.add_function(wrap_pyfunction!(recover::faddeev_leverrier_exact, m)?)?;
    m.add_function(wrap_pyfunction!(recover::transfer_function_float, m)?)?;
    m.add_function(wrap_pyfunction!(recover::transfer_function_exact, m)?)?;
    // structure
    m.add_function(wrap_pyfunction!(
        structure::controllability_matrix_float,
        m
    )?)?;
    m.add_function(wrap_pyfunction!(
        structure::controllability_matrix_exact,
        m
    )?)?;
    m.add_function(wrap_pyfunction!(structure::controllability_staircase, m)?)?;
    m.add_function(wrap_pyfunction!(structure::observability_staircase, m)?)?;
    m.add_function(wrap_pyfunction!(structure::minimal_realization, m)?)?;
    m.add_function(wrap_pyfunction!(structure::kalman_decomposition, m)?)?;
    m.add_function(wrap_pyfunction!(structure::similarity_transform, m)?)?;
    // identify
    m.add_function(wrap_pyfunction!(identify::realize_markov, m)?)?;
    m.add_function(wrap_pyfunction!(identify::gramians, m)?)?;
    m.add_function(wrap_pyfunction!(identify::hankel_singular_values, m)?)?;
    m.add_function(wrap_pyfunction!(identify::balanced_realization, m)?)?;
    // parametric
    m.add_function(wrap_pyfunction!(
        parametric::parametric_transfer_function,
        m
    )?)?;
    m.add_function(wrap_pyfunction!(parametric::realize_parametric, m)?)?;
    // batch
    m.add_function(wrap_pyfunction!(batch::realize_batch, m)?)?;
    m.add_function(wrap_pyfunction!(batch::transfer_function_batch, m)?)?;
    // hessenberg route, batch methods
    m.add_function(wrap_pyfunction!(
        hessenberg::characteristic_polynomial_hessenberg,
        m
    )?)?;
    m.add_function(wrap_pyfunction!(
        hessenberg::transfer_function_hessenberg,
        m
    )?)?;
    m.add_function(wrap_pyfunction!(
        hessenberg::transfer_function_batch_method,
        m
    )?)?;
    m.add_function(wrap_pyfunction!(
        hessenberg::transfer_function_batch_hessenberg,
        m
    )?)?;
    // time base
    m.add_function(wrap_pyfunction!(time::convert_time_base, m)?)?;
    m.add_function(wrap_pyfunction!(time::zero_order_hold_plain, m)?)?;
    m.add_function(wrap_pyfunction!(time::convert_time_base_exact, m)?)?;
    m.add_function(wrap_pyfunction!(time::frequency_response, m)?)?;
    m.add_function(wrap_pyfunction!(time::frequency_response_batch, m)?)?;
    m.add_function(wrap_pyfunction!(time::to_continuous_batch, m)?)?;
    // zeros and gains
    m.add_function(wrap_pyfunction!(zeros::invariant_zeros, m)?)?;
    m.add_function(wrap_pyfunction!(zeros::normal_rank, m)?)?;
    m.add_function(wrap_pyfunction!(zeros::dc_gain, m)?)?;
    m.add_function(wrap_pyfunction!(zeros::zeros_poles_gain, m)?)?;
    m.add_function(wrap_pyfunction!(zeros::realize_zeros_poles_gain, m)?)?;
    m.add_function(wrap_pyfunction!(zeros::invariant_zeros_batch, m)?)?;
    Ok(())
}
