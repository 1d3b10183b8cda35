//! Bindings of the time base: conversions between continuous and discrete time and
//! frequency responses, for single models and batches.

use super::convert::{
    array_nd, copied_array, exact_model_from, exact_quad, model_from, model_from_arrays, quad,
    ExactIn, ExactOut, ModelArrays, ModelIn, Quad,
};
use super::errors::{run, run_small, to_py, ModelError, SMALL_ORDER};
use crate::error::ModelError as CoreError;
use crate::time::batch::{self as time_batch, BatchShape, ModelStack};
use crate::time::conversion::{self, DiscretizationMethod};
use crate::time::frequency_response as response;
use crate::time::zero_order_hold::{self as hold, SMALL_HOLD};
use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::Zero;
use numpy::{
    ndarray, Complex64, PyArray, PyArray2, PyArrayMethods, PyReadonlyArray1, PyReadonlyArray3,
};
use pyo3::intern;
use pyo3::prelude::*;
use pyo3::types::{PyDict, PyFloat, PyString};

fn parse_method(method: &str) -> PyResult<DiscretizationMethod> {
    method.parse().map_err(to_py)
}

fn complex_array<'py>(
    py: Python<'py>,
    data: Vec<Complex64>,
    shape: &[usize],
) -> PyResult<Bound<'py, PyAny>> {
    let owned = ndarray::ArrayD::from_shape_vec(ndarray::IxDyn(shape), data)
        .map_err(|e| ModelError::new_err(format!("internal error: result shape ({e})")))?;
    Ok(PyArray::from_owned_array(py, owned).into_any())
}

type Converted<'py> = (Quad<'py>, Bound<'py, PyDict>);

#[pyfunction]
#[pyo3(signature = (model, sample_time, method, prewarp_frequency, forward))]
pub(crate) fn convert_time_base<'py>(
    py: Python<'py>,
    model: ModelArrays<'py>,
    sample_time: f64,
    method: &str,
    prewarp_frequency: Option<f64>,
    forward: bool,
) -> PyResult<Converted<'py>> {
    let name = method;
    let method = parse_method(method)?;
    let ss = model_from_arrays(&model)?;
    let small = ss.n_states() < SMALL_ORDER;
    let convert = move || {
        if forward {
            conversion::to_discrete(&ss, sample_time, method, prewarp_frequency)
        } else {
            conversion::to_continuous(&ss, sample_time, method, prewarp_frequency)
        }
    };
    let r = if small {
        run_small(convert)?
    } else {
        run(py, convert)?
    };
    // The whole `.info` of the result, in its documented order: method, sample time, the
    // figures (counts as ints), the prewarp frequency when given.
    let info = PyDict::new(py);
    info.set_item(intern!(py, "method"), name)?;
    info.set_item(intern!(py, "sample_time"), sample_time)?;
    for (k, v) in &r.info {
        match *k {
            "pade_degree" => info.set_item(intern!(py, "pade_degree"), *v as i64)?,
            "squarings" => info.set_item(intern!(py, "squarings"), *v as i64)?,
            "square_roots" => info.set_item(intern!(py, "square_roots"), *v as i64)?,
            _ => info.set_item(*k, *v)?,
        }
    }
    if let Some(w) = prewarp_frequency {
        info.set_item(intern!(py, "prewarp_frequency"), w)?;
    }
    Ok((quad(py, r.realization, true)?, info))
}

/// The arrays and info dict of a plain zero-order hold: `(A_d, B_d, C_d, D_d, info)`.
type PlainHold<'py> = (
    Bound<'py, PyAny>,
    Bound<'py, PyAny>,
    Bound<'py, PyAny>,
    Bound<'py, PyAny>,
    Bound<'py, PyDict>,
);

/// A float64 2-D array of numpy's own type (no subclass, native byte order), or None.
fn plain_array<'a, 'py>(x: &'a Bound<'py, PyAny>) -> Option<&'a Bound<'py, PyArray2<f64>>> {
    if !x.is_exact_instance_of::<PyArray2<f64>>() {
        return None;
    }
    x.cast::<PyArray2<f64>>().ok()
}

/// A frozen copy of a 2-D input array (any strides).
fn frozen_copy<'py>(py: Python<'py>, x: &Bound<'py, PyArray2<f64>>) -> PyResult<Bound<'py, PyAny>> {
    // SAFETY: only read, and copied at once while this thread holds the GIL (as in
    // `model_from_arrays`).
    let view = unsafe { x.as_array() };
    let shape = [view.nrows(), view.ncols()];
    let arr = match view.as_slice() {
        Some(values) => copied_array(py, values, &shape, true)?,
        None => copied_array(py, &view.iter().copied().collect::<Vec<_>>(), &shape, true)?,
    };
    Ok(arr.into_any())
}

/// `to_discrete`'s fast path for its commonest call: the zero-order hold of a small
/// model (n + m ≤ 10) given as four finite float64 arrays with a float sample time.
/// Returns None for any other call (the general path then validates and converts as
/// always); the core routine is the general path's own, so the results and errors are
/// the same bits and messages.
#[pyfunction]
#[pyo3(signature = (a, b, c, d, sample_time, method))]
pub(crate) fn zero_order_hold_plain<'py>(
    py: Python<'py>,
    a: &Bound<'py, PyAny>,
    b: &Bound<'py, PyAny>,
    c: &Bound<'py, PyAny>,
    d: &Bound<'py, PyAny>,
    sample_time: &Bound<'py, PyAny>,
    method: &Bound<'py, PyAny>,
) -> PyResult<Option<PlainHold<'py>>> {
    let plain_method = method
        .cast_exact::<PyString>()
        .is_ok_and(|s| s.to_cow().is_ok_and(|s| s == "zero_order_hold"));
    let t = match sample_time.cast_exact::<PyFloat>() {
        Ok(f) => f.value(),
        Err(_) => return Ok(None),
    };
    if !(plain_method && t > 0.0 && t.is_finite()) {
        return Ok(None);
    }
    let (Some(a), Some(b), Some(c), Some(d)) = (
        plain_array(a),
        plain_array(b),
        plain_array(c),
        plain_array(d),
    ) else {
        return Ok(None);
    };
    // SAFETY: only read while this thread holds the GIL (as in `model_from_arrays`).
    let (va, vb, vc, vd) = unsafe { (a.as_array(), b.as_array(), c.as_array(), d.as_array()) };
    let ((n, n2), (nb, m), (p, nc)) = (va.dim(), vb.dim(), vc.dim());
    if n != n2 || nb != n || nc != n || vd.dim() != (p, m) || !hold::fits_small(n, m) {
        return Ok(None);
    }
    let finite = |v: &ndarray::ArrayView2<'_, f64>| v.iter().all(|x| x.is_finite());
    if !(finite(&va) && finite(&vb) && finite(&vc) && finite(&vd)) {
        return Ok(None); // the general path names the argument
    }
    const K: usize = SMALL_HOLD;
    let (mut sa, mut sb) = ([0.0; K * K], [0.0; K * K]);
    let (sa, sb) = (&mut sa[..n * n], &mut sb[..n * m]);
    sa.iter_mut().zip(va.iter()).for_each(|(x, y)| *x = *y);
    sb.iter_mut().zip(vb.iter()).for_each(|(x, y)| *x = *y);
    let (mut ad, mut bd) = ([0.0; K * K], [0.0; K * K]);
    let (ad, bd) = (&mut ad[..n * n], &mut bd[..n * m]);
    let (degree, squarings) = run_small(|| hold::hold_small_into(sa, sb, (n, m), t, ad, bd))?;
    let info = PyDict::new(py);
    info.set_item(intern!(py, "method"), intern!(py, "zero_order_hold"))?;
    info.set_item(intern!(py, "sample_time"), t)?;
    info.set_item(intern!(py, "pade_degree"), degree as i64)?;
    info.set_item(intern!(py, "squarings"), squarings as i64)?;
    Ok(Some((
        copied_array(py, ad, &[n, n], true)?.into_any(),
        copied_array(py, bd, &[n, m], true)?.into_any(),
        frozen_copy(py, c)?,
        frozen_copy(py, d)?,
        info,
    )))
}

fn exact_time(t: (BigInt, BigInt)) -> PyResult<BigRational> {
    if t.1.is_zero() {
        return Err(to_py(CoreError::BadValue {
            arg: "sample_time",
            detail: "a fraction has a zero denominator".into(),
        }));
    }
    Ok(BigRational::new(t.0, t.1))
}

type ExactQuad = (ExactOut, ExactOut, ExactOut, ExactOut);

#[pyfunction]
#[pyo3(signature = (model, sample_time, method, forward))]
pub(crate) fn convert_time_base_exact(
    py: Python<'_>,
    model: (ExactIn, ExactIn, ExactIn, ExactIn),
    sample_time: (BigInt, BigInt),
    method: &str,
    forward: bool,
) -> PyResult<ExactQuad> {
    let method = parse_method(method)?;
    let (ss, t) = (exact_model_from(model)?, exact_time(sample_time)?);
    let r = run(py, move || {
        if forward {
            conversion::to_discrete_exact(&ss, &t, method)
        } else {
            conversion::to_continuous_exact(&ss, &t, method)
        }
    })?;
    Ok(exact_quad(r))
}

#[pyfunction]
#[pyo3(signature = (model, frequencies, sample_time))]
pub(crate) fn frequency_response<'py>(
    py: Python<'py>,
    model: ModelIn<'py>,
    frequencies: PyReadonlyArray1<'py, f64>,
    sample_time: Option<f64>,
) -> PyResult<Bound<'py, PyAny>> {
    let ss = model_from(&model)?;
    let (p, m) = (ss.n_outputs(), ss.n_inputs());
    let w: Vec<f64> = frequencies.as_array().iter().copied().collect();
    let k = w.len();
    let g = run(py, move || {
        response::frequency_response(&ss, &w, sample_time, true)
    })?;
    complex_array(py, g, &[k, p, m])
}

type StackIn<'py> = (
    PyReadonlyArray3<'py, f64>,
    PyReadonlyArray3<'py, f64>,
    PyReadonlyArray3<'py, f64>,
    PyReadonlyArray3<'py, f64>,
);

/// The shapes and flat copies of a stack of models (shapes checked by the core).
fn stack_from(models: &StackIn<'_>) -> (BatchShape, [Vec<f64>; 4]) {
    let (a, b, c, _) = models;
    let (count, n, _) = a.as_array().dim();
    let m = b.as_array().dim().2;
    let p = c.as_array().dim().1;
    let flat = |x: &PyReadonlyArray3<'_, f64>| x.as_array().iter().copied().collect::<Vec<f64>>();
    (
        BatchShape { count, n, m, p },
        [
            flat(&models.0),
            flat(&models.1),
            flat(&models.2),
            flat(&models.3),
        ],
    )
}

#[pyfunction]
#[pyo3(signature = (models, frequencies, sample_time))]
pub(crate) fn frequency_response_batch<'py>(
    py: Python<'py>,
    models: StackIn<'py>,
    frequencies: PyReadonlyArray1<'py, f64>,
    sample_time: Option<f64>,
) -> PyResult<Bound<'py, PyAny>> {
    let (shape, [a, b, c, d]) = stack_from(&models);
    let w: Vec<f64> = frequencies.as_array().iter().copied().collect();
    let k = w.len();
    let g = run(py, move || {
        let stack = ModelStack {
            shape,
            a: &a,
            b: &b,
            c: &c,
            d: &d,
        };
        time_batch::frequency_response_batch(&stack, &w, sample_time)
    })?;
    complex_array(py, g, &[shape.count, k, shape.p, shape.m])
}

#[pyfunction]
#[pyo3(signature = (models, sample_time, method, prewarp_frequency))]
pub(crate) fn to_continuous_batch<'py>(
    py: Python<'py>,
    models: StackIn<'py>,
    sample_time: f64,
    method: &str,
    prewarp_frequency: Option<f64>,
) -> PyResult<(Quad<'py>, Bound<'py, PyAny>)> {
    let method = parse_method(method)?;
    let (shape, [a, b, c, d]) = stack_from(&models);
    let r = run(py, move || {
        let stack = ModelStack {
            shape,
            a: &a,
            b: &b,
            c: &c,
            d: &d,
        };
        time_batch::to_continuous_batch(&stack, sample_time, method, prewarp_frequency)
    })?;
    let BatchShape { count, n, m, p } = shape;
    Ok((
        (
            array_nd(py, r.a, &[count, n, n])?,
            array_nd(py, r.b, &[count, n, m])?,
            array_nd(py, r.c, &[count, p, n])?,
            array_nd(py, r.d, &[count, p, m])?,
        ),
        array_nd(py, r.residuals, &[count])?,
    ))
}
