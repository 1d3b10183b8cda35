//! Conversions between numpy arrays (or Python ints, for exact data) and the core's owned
//! matrices. Inputs are copied, so results never alias and the GIL can be released.

use super::errors::{to_py, ModelError};
use crate::error::ModelError as CoreError;
use crate::matrix::Matrix;
use crate::state_space::StateSpace;
use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::Zero;
use numpy::{
    ndarray, PyArray, PyArray2, PyArrayMethods, PyReadonlyArray, PyReadonlyArray1,
    PyReadonlyArray2, PyReadonlyArray3, PyUntypedArrayMethods,
};
use pyo3::prelude::*;

/// The four arrays of a model, passed from Python as one tuple `(a, b, c, d)`: the one
/// argument shape of every binding that takes a model.
pub(crate) type ModelIn<'py> = (
    PyReadonlyArray2<'py, f64>,
    PyReadonlyArray2<'py, f64>,
    PyReadonlyArray2<'py, f64>,
    PyReadonlyArray2<'py, f64>,
);

/// The four arrays of a model without numpy's borrow tracking, for the small per-call
/// bindings where that tracking is a visible share of the cost; read by
/// [`model_from_arrays`], which copies them at once under the GIL.
pub(crate) type ModelArrays<'py> = (
    Bound<'py, PyArray2<f64>>,
    Bound<'py, PyArray2<f64>>,
    Bound<'py, PyArray2<f64>>,
    Bound<'py, PyArray2<f64>>,
);

/// Four arrays handed back to Python: `(A, B, C, D)`.
pub(crate) type Quad<'py> = (
    Bound<'py, PyAny>,
    Bound<'py, PyAny>,
    Bound<'py, PyAny>,
    Bound<'py, PyAny>,
);

pub(crate) fn matrix_from(x: &PyReadonlyArray2<'_, f64>) -> Matrix<f64> {
    let view = x.as_array();
    let (r, c) = view.dim();
    Matrix::from_row_major(r, c, view.iter().copied().collect()).expect("shape from the array")
}

pub(crate) fn vector_from(x: &PyReadonlyArray1<'_, f64>) -> Vec<f64> {
    x.as_array().iter().copied().collect()
}

/// An owned core model from the four arrays, shapes checked by the core.
pub(crate) fn model_from(model: &ModelIn<'_>) -> PyResult<StateSpace<f64>> {
    let (a, b, c, d) = model;
    StateSpace::new(
        matrix_from(a),
        matrix_from(b),
        matrix_from(c),
        matrix_from(d),
    )
    .map_err(to_py)
}

/// An owned core model from [`ModelArrays`], shapes checked by the core.
pub(crate) fn model_from_arrays(model: &ModelArrays<'_>) -> PyResult<StateSpace<f64>> {
    let copy = |x: &Bound<'_, PyArray2<f64>>| {
        // SAFETY: the array is only read, and copied at once while this thread holds the
        // GIL, so no Python code runs meanwhile; this extension never takes a mutable
        // borrow of an input array, so no Rust reference to it can be writing either.
        let view = unsafe { x.as_array() };
        let (r, c) = view.dim();
        Matrix::from_row_major(r, c, view.iter().copied().collect()).expect("shape from the array")
    };
    let (a, b, c, d) = model;
    StateSpace::new(copy(a), copy(b), copy(c), copy(d)).map_err(to_py)
}

pub(crate) fn array2<'py>(py: Python<'py>, m: Matrix<f64>) -> PyResult<Bound<'py, PyAny>> {
    let shape = [m.rows(), m.cols()];
    array_nd(py, m.into_vec(), &shape)
}

/// Results up to this many values are copied into an array numpy allocates itself (one
/// Python object); larger ones are handed over without a copy (an array plus the object
/// that owns the Rust buffer, whose creation costs more than copying a few kilobytes).
const COPY_BELOW: usize = 1024;

/// A new C-contiguous array holding `data` (no Python-level reshape).
pub(crate) fn array_nd<'py>(
    py: Python<'py>,
    data: Vec<f64>,
    shape: &[usize],
) -> PyResult<Bound<'py, PyAny>> {
    Ok(typed_array(py, data, shape)?.into_any())
}

/// A new numpy-allocated C-contiguous array with a copy of `data`, read-only when `frozen`.
///
/// # Errors
/// An internal error if `shape` does not hold `data.len()` values.
pub(crate) fn copied_array<'py>(
    py: Python<'py>,
    data: &[f64],
    shape: &[usize],
    frozen: bool,
) -> PyResult<Bound<'py, PyArray<f64, ndarray::IxDyn>>> {
    if shape.iter().product::<usize>() != data.len() {
        return Err(ModelError::new_err("internal error: result shape"));
    }
    // SAFETY: `new` returns an uninitialised C-contiguous array of exactly `data.len()`
    // float64 values (the product of `shape`, checked just above), not yet shared with
    // Python; every value is written before it is returned.
    let arr = unsafe {
        let arr = PyArray::<f64, _>::new(py, ndarray::IxDyn(shape), false);
        std::ptr::copy_nonoverlapping(data.as_ptr(), arr.data(), data.len());
        arr
    };
    if frozen {
        freeze(&arr);
    }
    Ok(arr)
}

/// Marks a fresh array read-only.
fn freeze(arr: &Bound<'_, PyArray<f64, ndarray::IxDyn>>) {
    // SAFETY: the caller created the array and has not shared it yet; clearing the
    // WRITEABLE flag is what numpy's own `setflags(write=False)` does.
    unsafe {
        (*arr.as_array_ptr()).fields.flags &= !numpy::npyffi::NPY_ARRAY_WRITEABLE;
    }
}

fn typed_array<'py>(
    py: Python<'py>,
    data: Vec<f64>,
    shape: &[usize],
) -> PyResult<Bound<'py, PyArray<f64, ndarray::IxDyn>>> {
    if data.len() <= COPY_BELOW {
        return copied_array(py, &data, shape, false);
    }
    let owned = ndarray::ArrayD::from_shape_vec(ndarray::IxDyn(shape), data)
        .map_err(|e| ModelError::new_err(format!("internal error: result shape ({e})")))?;
    Ok(PyArray::from_owned_array(py, owned))
}

/// As [`array2`], marked read-only (the arrays of a frozen Realization).
pub(crate) fn frozen2<'py>(py: Python<'py>, m: Matrix<f64>) -> PyResult<Bound<'py, PyAny>> {
    let shape = [m.rows(), m.cols()];
    let arr = typed_array(py, m.into_vec(), &shape)?;
    freeze(&arr);
    Ok(arr.into_any())
}

/// A model's four matrices as arrays (read-only when `frozen`, for a Realization).
pub(crate) fn quad<'py>(py: Python<'py>, ss: StateSpace<f64>, frozen: bool) -> PyResult<Quad<'py>> {
    let out = if frozen { frozen2 } else { array2 };
    Ok((
        out(py, ss.a)?,
        out(py, ss.b)?,
        out(py, ss.c)?,
        out(py, ss.d)?,
    ))
}

// ---- exact data: matrices travel as (rows, cols, numerators, denominators) of Python ints.

pub(crate) type ExactIn = (usize, usize, Vec<BigInt>, Vec<BigInt>);
pub(crate) type ExactOut = (usize, usize, Vec<BigInt>, Vec<BigInt>);

pub(crate) fn exact_matrix(arg: &'static str, x: ExactIn) -> PyResult<Matrix<BigRational>> {
    let (r, c, nums, dens) = x;
    if nums.len() != r * c || dens.len() != r * c {
        return Err(to_py(CoreError::Shape {
            arg,
            expected: format!("{} entries", r * c),
            found: format!("{}", nums.len()),
        }));
    }
    let mut data = Vec::with_capacity(r * c);
    for (p, q) in nums.into_iter().zip(dens) {
        if q.is_zero() {
            return Err(to_py(CoreError::BadValue {
                arg,
                detail: "a fraction has a zero denominator".into(),
            }));
        }
        data.push(BigRational::new(p, q));
    }
    Ok(Matrix::from_row_major(r, c, data).expect("checked length"))
}

pub(crate) fn exact_vector(arg: &'static str, x: ExactIn) -> PyResult<Vec<BigRational>> {
    Ok(exact_matrix(arg, x)?.into_vec())
}

/// An owned exact model from four exact matrices, shapes checked by the core.
pub(crate) fn exact_model_from(
    model: (ExactIn, ExactIn, ExactIn, ExactIn),
) -> PyResult<StateSpace<BigRational>> {
    let (a, b, c, d) = model;
    StateSpace::new(
        exact_matrix("a", a)?,
        exact_matrix("b", b)?,
        exact_matrix("c", c)?,
        exact_matrix("d", d)?,
    )
    .map_err(to_py)
}

pub(crate) fn exact_out(m: Matrix<BigRational>) -> ExactOut {
    let (r, c) = (m.rows(), m.cols());
    let (nums, dens) = m
        .into_vec()
        .into_iter()
        .map(|q| (q.numer().clone(), q.denom().clone()))
        .unzip();
    (r, c, nums, dens)
}

pub(crate) fn exact_out_vec(v: Vec<BigRational>) -> ExactOut {
    let n = v.len();
    exact_out(Matrix::from_row_major(1, n, v).expect("1 x n"))
}

/// An exact model's four matrices for Python.
pub(crate) fn exact_quad(ss: StateSpace<BigRational>) -> (ExactOut, ExactOut, ExactOut, ExactOut) {
    (
        exact_out(ss.a),
        exact_out(ss.b),
        exact_out(ss.c),
        exact_out(ss.d),
    )
}

// ---- stacks of models (the batch functions)

/// `(count, n, m, p)` of a stack of models `a` (N, n, n), `b` (N, n, m), `c` (N, p, n),
/// `d` (N, p, m), or the `Shape` error naming the first array that does not fit.
pub(crate) fn batch_dims(
    a: &PyReadonlyArray3<'_, f64>,
    b: &PyReadonlyArray3<'_, f64>,
    c: &PyReadonlyArray3<'_, f64>,
    d: &PyReadonlyArray3<'_, f64>,
) -> PyResult<(usize, usize, usize, usize)> {
    let (count, n, n2) = a.as_array().dim();
    let (cb, nb, m) = b.as_array().dim();
    let (cc, p, nc) = c.as_array().dim();
    let (cd, pd, md) = d.as_array().dim();
    let fail = |arg: &'static str, expected: String, found: (usize, usize, usize)| {
        Err(to_py(CoreError::Shape {
            arg,
            expected,
            found: format!("shape {found:?}"),
        }))
    };
    if n2 != n {
        return fail("a", "shape (N, n, n)".to_string(), (count, n, n2));
    }
    if (cb, nb) != (count, n) {
        return fail("b", format!("shape ({count}, {n}, m)"), (cb, nb, m));
    }
    if (cc, nc) != (count, n) {
        return fail("c", format!("shape ({count}, p, {n})"), (cc, p, nc));
    }
    if (cd, pd, md) != (count, p, m) {
        return fail("d", format!("shape ({count}, {p}, {m})"), (cd, pd, md));
    }
    Ok((count, n, m, p))
}

/// An owned row-major copy of an array of any dimension (one memcpy when it is contiguous).
pub(crate) fn owned<D: ndarray::Dimension>(x: &PyReadonlyArray<'_, f64, D>) -> Vec<f64> {
    match x.as_slice() {
        Ok(s) => s.to_vec(),
        Err(_) => x.as_array().iter().copied().collect(),
    }
}

/// The data of a float64 batch input for the GIL-free core, without a copy when the
/// array is C-contiguous (a copy otherwise).
///
/// Why: a batch of 100,000 order-8 models is 65 MB of input, and copying it into fresh
/// memory (its page faults included) cost about a fifth of a whole round trip. The view
/// is sound because the caller keeps the `PyReadonlyArray` it came from alive until the
/// core returns (the array cannot be freed) and rust-numpy's read borrow keeps Rust code
/// from writing it; as with numpy's own GIL-free loops, a Python thread writing into the
/// same array meanwhile races with the read (it can change the numbers read, never the
/// memory safety of f64 loads).
pub(crate) enum BatchInput {
    Shared { ptr: *const f64, len: usize },
    Owned(Vec<f64>),
}

// SAFETY: see the type's doc; the pointer is only read, while its array is kept alive.
unsafe impl Send for BatchInput {}
unsafe impl Sync for BatchInput {}

impl BatchInput {
    pub(crate) fn of<D: ndarray::Dimension>(x: &PyReadonlyArray<'_, f64, D>) -> Self {
        match x.as_slice() {
            Ok(s) if !s.is_empty() => BatchInput::Shared {
                ptr: s.as_ptr(),
                len: s.len(),
            },
            _ => BatchInput::Owned(owned(x)),
        }
    }

    pub(crate) fn data(&self) -> &[f64] {
        match self {
            // SAFETY: ptr and len come from a live, C-contiguous numpy array that the
            // caller keeps alive for as long as this value is used (see the type's doc).
            BatchInput::Shared { ptr, len } => unsafe { std::slice::from_raw_parts(*ptr, *len) },
            BatchInput::Owned(v) => v,
        }
    }
}
