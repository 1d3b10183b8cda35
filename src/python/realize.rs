//! Bindings of the realizations: SISO canonical forms and block forms of transfer matrices.

use super::convert::{
    copied_array, exact_matrix, exact_quad, exact_vector, quad, vector_from, ExactIn, ExactOut,
    Quad,
};
use super::errors::{run, run_small, to_py, SMALL_ORDER};
use crate::error::ModelError as CoreError;
use crate::matrix::Matrix;
use crate::realize::transfer_matrix::{self, BlockForm};
use crate::realize::{self, Form};
use num_rational::BigRational;
use numpy::{ndarray, PyArray1, PyArrayMethods, PyReadonlyArray1, PyReadonlyArray3};
use pyo3::prelude::*;
use pyo3::types::{PyDict, PyList};

pub(crate) fn parse_form(form: &str) -> PyResult<Form> {
    form.parse().map_err(to_py)
}

/// A float coefficient argument: a float64 array, or a plain list of numbers read without
/// building an array first (the per-call fast path of small single calls; the Python layer
/// sends a list only when it is non-empty and falls back to full validation on a TypeError).
pub(crate) enum FloatCoefficients<'py> {
    Array(PyReadonlyArray1<'py, f64>),
    List(Vec<f64>),
}

impl<'py> FloatCoefficients<'py> {
    /// A list is checked for first and read item by item (a failed array conversion would
    /// cost an exception object per call); anything else must be a float64 array.
    fn read(x: &Bound<'py, PyAny>) -> PyResult<Self> {
        if let Ok(list) = x.cast::<PyList>() {
            let mut values = Vec::with_capacity(list.len());
            for item in list.iter() {
                values.push(item.extract::<f64>()?);
            }
            return Ok(Self::List(values));
        }
        Ok(Self::Array(x.extract()?))
    }

    fn as_slice(&self) -> Option<&[f64]> {
        match self {
            Self::Array(a) => a.as_slice().ok(),
            Self::List(v) => Some(v),
        }
    }

    fn to_vec(&self) -> Vec<f64> {
        match self {
            Self::Array(a) => vector_from(a),
            Self::List(v) => v.clone(),
        }
    }
}

/// Reads a short coefficient argument (fewer than [`SMALL_ORDER`] values) into `buf`: a
/// plain list item by item (its TypeError as [`FloatCoefficients::read`] raises it), or a
/// C-contiguous float64 1-D array, copied at once while the GIL is held. `None` for
/// anything else (the general route reads it then).
fn read_small<'a>(
    x: &Bound<'_, PyAny>,
    buf: &'a mut [f64; SMALL_ORDER],
) -> PyResult<Option<&'a [f64]>> {
    if let Ok(list) = x.cast::<PyList>() {
        let len = list.len();
        if len == 0 || len >= SMALL_ORDER {
            return Ok(None);
        }
        for (slot, item) in buf.iter_mut().zip(list.iter()) {
            *slot = item.extract::<f64>()?;
        }
        return Ok(Some(&buf[..len]));
    }
    let Ok(arr) = x.cast::<PyArray1<f64>>() else {
        return Ok(None);
    };
    // SAFETY: the GIL is held and no Python code runs until the copy below is done; the
    // slice is not kept (`as_slice` refuses a non-contiguous array).
    let Ok(values) = (unsafe { arr.as_slice() }) else {
        return Ok(None);
    };
    if values.is_empty() || values.len() >= SMALL_ORDER {
        return Ok(None);
    }
    buf[..values.len()].copy_from_slice(values);
    Ok(Some(&buf[..values.len()]))
}

/// The controllable canonical form of a short num/den, built in place on the stack by
/// [`realize::controllable::controllable_canonical_into`] (the same bits and errors as
/// `realize_f64`) and copied into four read-only arrays: the fast path of single calls in
/// the default form. `None` where that route does not apply (long or unusual arguments, a
/// zero leading denominator coefficient, a numerator longer than the denominator).
fn small_controllable<'py>(
    py: Python<'py>,
    num: &Bound<'py, PyAny>,
    den: &Bound<'py, PyAny>,
) -> PyResult<Option<Quad<'py>>> {
    let (mut num_buf, mut den_buf) = ([0.0; SMALL_ORDER], [0.0; SMALL_ORDER]);
    let Some(num) = read_small(num, &mut num_buf)? else {
        return Ok(None);
    };
    let Some(den) = read_small(den, &mut den_buf)? else {
        return Ok(None);
    };
    if den[0] == 0.0 || num.len() > den.len() {
        return Ok(None);
    }
    let n = den.len() - 1;
    let mut a = [0.0; SMALL_ORDER * SMALL_ORDER];
    let (mut b, mut c) = ([0.0; SMALL_ORDER], [0.0; SMALL_ORDER]);
    let (a, b, c) = (&mut a[..n * n], &mut b[..n], &mut c[..n]);
    let d = run_small(|| {
        realize::controllable::controllable_canonical_into(num, den, &mut *a, &mut *b, &mut *c)
    })?;
    Ok(Some((
        copied_array(py, a, &[n, n], true)?.into_any(),
        copied_array(py, b, &[n, 1], true)?.into_any(),
        copied_array(py, c, &[1, n], true)?.into_any(),
        copied_array(py, &[d], &[1, 1], true)?.into_any(),
    )))
}

#[pyfunction]
pub(crate) fn realize_float<'py>(
    py: Python<'py>,
    num: &Bound<'py, PyAny>,
    den: &Bound<'py, PyAny>,
    form: &str,
) -> PyResult<(Quad<'py>, Option<Bound<'py, PyDict>>)> {
    let form = parse_form(form)?;
    if form == Form::ControllableCanonical {
        if let Some(out) = small_controllable(py, num, den)? {
            return Ok((out, None));
        }
    }
    let (num, den) = (FloatCoefficients::read(num)?, FloatCoefficients::read(den)?);
    let small = match (num.as_slice(), den.as_slice()) {
        (Some(n), Some(d)) if d.len() < SMALL_ORDER => Some((n, d)),
        _ => None,
    };
    let (ss, modal) = if let Some((num, den)) = small {
        run_small(|| realize::realize_f64(num, den, form))?
    } else {
        let (num, den) = (num.to_vec(), den.to_vec());
        run(py, move || realize::realize_f64(&num, &den, form))?
    };
    let info = match modal {
        Some(m) => {
            let info = PyDict::new(py);
            // ∞ for a basis singular in float64: None (a float result is finite)
            info.set_item(
                "eigenvector_condition",
                m.eigenvector_condition
                    .is_finite()
                    .then_some(m.eigenvector_condition),
            )?;
            info.set_item("condition_limit", m.condition_limit)?;
            info.set_item("pole_separation", m.pole_separation)?;
            info.set_item("separation_limit", m.separation_limit)?;
            info.set_item("pole_error", m.pole_error)?;
            Some(info)
        }
        None => None,
    };
    Ok((quad(py, ss, true)?, info))
}

#[pyfunction]
pub(crate) fn realize_exact(
    py: Python<'_>,
    num: ExactIn,
    den: ExactIn,
    form: &str,
) -> PyResult<(ExactOut, ExactOut, ExactOut, ExactOut)> {
    let form = parse_form(form)?;
    if form == Form::Modal {
        return Err(to_py(CoreError::BadOption {
            arg: "form",
            found: "modal".into(),
            allowed: "a companion form when exact=True (the modal form needs the poles, which are not rational in general)",
        }));
    }
    let (num, den) = (exact_vector("num", num)?, exact_vector("den", den)?);
    let ss = run(py, move || realize::realize_companion(&num, &den, form))?;
    Ok(exact_quad(ss))
}

fn parse_block_form(form: &str) -> PyResult<BlockForm> {
    form.parse().map_err(to_py)
}

/// Entries of a (p, m, k) array as p·m coefficient vectors, row-major.
fn entries_from(x: &PyReadonlyArray3<'_, f64>) -> Vec<Vec<f64>> {
    let view = x.as_array();
    let (p, m, _) = view.dim();
    let mut out = Vec::with_capacity(p * m);
    for i in 0..p {
        for j in 0..m {
            out.push(view.slice(ndarray::s![i, j, ..]).iter().copied().collect());
        }
    }
    out
}

#[pyfunction]
#[pyo3(signature = (num, den, form, tol))]
pub(crate) fn realize_transfer_matrix_float<'py>(
    py: Python<'py>,
    num: PyReadonlyArray3<'py, f64>,
    den: PyReadonlyArray3<'py, f64>,
    form: &str,
    tol: Option<f64>,
) -> PyResult<(Quad<'py>, Bound<'py, PyDict>)> {
    let form = parse_block_form(form)?;
    let (p, m, _) = num.as_array().dim();
    let (pd, md, _) = den.as_array().dim();
    if (pd, md) != (p, m) {
        return Err(to_py(CoreError::Shape {
            arg: "den",
            expected: format!("shape ({p}, {m}, k) (one denominator per entry of num)"),
            found: format!("shape ({pd}, {md}, k)"),
        }));
    }
    let (num, den) = (entries_from(&num), entries_from(&den));
    let (ss, info) = run(py, move || {
        transfer_matrix::realize_transfer_matrix_f64(p, m, &num, &den, form, tol)
    })?;
    let d = PyDict::new(py);
    d.set_item("block_orders", info.block_orders)?;
    d.set_item("merge_tol", info.merge_tol)?;
    d.set_item("denominator_residual", info.denominator_residual)?;
    Ok((quad(py, ss, true)?, d))
}

/// `num` and `den` hold one entry per row (p·m rows, row-major over (i, j)).
#[pyfunction]
#[pyo3(signature = (num, den, p, m, form))]
pub(crate) fn realize_transfer_matrix_exact(
    py: Python<'_>,
    num: ExactIn,
    den: ExactIn,
    p: usize,
    m: usize,
    form: &str,
) -> PyResult<(ExactOut, ExactOut, ExactOut, ExactOut)> {
    let form = parse_block_form(form)?;
    let rows = |x: Matrix<BigRational>| -> Vec<Vec<BigRational>> {
        let c = x.cols();
        x.into_vec().chunks(c.max(1)).map(|r| r.to_vec()).collect()
    };
    let (num, den) = (exact_matrix("num", num)?, exact_matrix("den", den)?);
    if num.rows() != p * m || den.rows() != p * m || num.cols() == 0 || den.cols() == 0 {
        return Err(to_py(CoreError::Shape {
            arg: "den",
            expected: format!("{} nonempty entries in num and den", p * m),
            found: format!("{} and {}", num.rows(), den.rows()),
        }));
    }
    let (num, den) = (rows(num), rows(den));
    let ss = run(py, move || {
        transfer_matrix::realize_transfer_matrix_exact(p, m, &num, &den, form)
    })?;
    Ok(exact_quad(ss))
}
