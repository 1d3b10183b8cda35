//! Error mapping and the GIL: a core `ModelError` becomes the Python `ModelError`, and a
//! panic in the core (a bug) is reported as one instead of aborting the caller's kernel.

use crate::error::ModelError as CoreError;
use pyo3::exceptions::PyValueError;
use pyo3::prelude::*;
use std::panic::{catch_unwind, AssertUnwindSafe};

pyo3::create_exception!(
    statewright,
    ModelError,
    PyValueError,
    "Bad input to a statewright routine, or a documented failure; the message names the argument."
);

pub(crate) fn to_py(err: CoreError) -> PyErr {
    ModelError::new_err(err.to_string())
}

/// Runs `f` without the GIL, mapping core errors and (as a last resort) panics.
pub(crate) fn run<T: Send>(
    py: Python<'_>,
    f: impl FnOnce() -> Result<T, CoreError> + Send,
) -> PyResult<T> {
    finish(py.detach(|| catch_unwind(AssertUnwindSafe(f))))
}

/// Like [`run`] but keeps the GIL: for work of a microsecond or two, releasing and
/// re-acquiring the GIL would cost more than it frees.
pub(crate) fn run_small<T>(f: impl FnOnce() -> Result<T, CoreError>) -> PyResult<T> {
    finish(catch_unwind(AssertUnwindSafe(f)))
}

/// States whose square below this count as small work (see [`run_small`]).
pub(crate) const SMALL_ORDER: usize = 24;

fn finish<T>(outcome: std::thread::Result<Result<T, CoreError>>) -> PyResult<T> {
    match outcome {
        Ok(Ok(v)) => Ok(v),
        Ok(Err(e)) => Err(to_py(e)),
        Err(_) => Err(ModelError::new_err(
            "internal error: the core panicked on this input (a bug; please report it with the input)",
        )),
    }
}
