//! Bindings of the batch functions (rayon in the core, the GIL released for the whole batch).

use super::convert::{array_nd, batch_dims, BatchInput, Quad};
use super::errors::{run, to_py};
use super::realize::parse_form;
use crate::batch;
use crate::error::ModelError as CoreError;
use numpy::{PyReadonlyArray2, PyReadonlyArray3};
use pyo3::prelude::*;

#[pyfunction]
pub(crate) fn realize_batch<'py>(
    py: Python<'py>,
    num: PyReadonlyArray2<'py, f64>,
    den: PyReadonlyArray2<'py, f64>,
    form: &str,
) -> PyResult<Quad<'py>> {
    let form = parse_form(form)?;
    let (count, k) = num.as_array().dim();
    let (count_den, n1) = den.as_array().dim();
    if count != count_den {
        return Err(to_py(CoreError::Shape {
            arg: "den",
            expected: format!("{count} rows (one per model, as num)"),
            found: format!("{count_den} rows"),
        }));
    }
    // The arrays stay alive (borrowed here) until the core returns: no copy needed.
    let (num_data, den_data) = (BatchInput::of(&num), BatchInput::of(&den));
    let r = run(py, move || {
        batch::realize_batch(num_data.data(), k, den_data.data(), n1, count, form)
    })?;
    let n = r.n;
    Ok((
        array_nd(py, r.a, &[count, n, n])?,
        array_nd(py, r.b, &[count, n, 1])?,
        array_nd(py, r.c, &[count, 1, n])?,
        array_nd(py, r.d, &[count, 1, 1])?,
    ))
}

#[pyfunction]
pub(crate) fn transfer_function_batch<'py>(
    py: Python<'py>,
    a: PyReadonlyArray3<'py, f64>,
    b: PyReadonlyArray3<'py, f64>,
    c: PyReadonlyArray3<'py, f64>,
    d: PyReadonlyArray3<'py, f64>,
) -> PyResult<(Bound<'py, PyAny>, Bound<'py, PyAny>)> {
    let (count, n, m, p) = batch_dims(&a, &b, &c, &d)?;
    // The arrays stay alive (borrowed here) until the core returns: no copy needed.
    let inputs = [&a, &b, &c, &d].map(BatchInput::of);
    let t = run(py, move || {
        let [av, bv, cv, dv] = &inputs;
        batch::transfer_function_batch(av.data(), bv.data(), cv.data(), dv.data(), count, n, m, p)
    })?;
    Ok((
        array_nd(py, t.num, &[count, p, m, n + 1])?,
        array_nd(py, t.den, &[count, n + 1])?,
    ))
}
