//! The PyO3 binding layer: conversions, GIL release, error mapping — nothing else.
//!
//! Inputs arrive already converted to float64 (or to pairs of Python ints for exact data)
//! by the Python package's single validation module; here they are copied into owned core
//! matrices (so results never alias and the GIL can be released), the core runs under
//! `py.detach`, and a `ModelError` from the core becomes the Python `ModelError`. A panic
//! in the core is a bug; the last-resort guard reports it as `ModelError` rather than
//! letting it abort the caller's kernel.

use crate::batch;
use crate::error::ModelError as CoreError;
use crate::gramian::{balance as gramian_balance, lyapunov};
use crate::identify::ho_kalman;
use crate::krylov;
use crate::matrix::Matrix;
use crate::realize::transfer_matrix::{self, BlockForm};
use crate::realize::{self, Form};
use crate::recover::{self, Accuracy, Method};
use crate::state_space::StateSpace;
use crate::structure::{kalman, minimal, similarity, staircase};
use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::Zero;
use numpy::PyReadonlyArray3;
use numpy::{ndarray, PyArray, PyReadonlyArray1, PyReadonlyArray2, PyUntypedArrayMethods};
use pyo3::exceptions::PyValueError;
use pyo3::prelude::*;
use pyo3::types::PyDict;
use std::panic::{catch_unwind, AssertUnwindSafe};

pyo3::create_exception!(
    statewright,
    ModelError,
    PyValueError,
    "Bad input to a statewright routine, or a documented failure; the message names the argument."
);

fn to_py(err: CoreError) -> PyErr {
    ModelError::new_err(err.to_string())
}

/// Runs `f` without the GIL, mapping core errors and (as a last resort) panics.
fn run<T: Send>(py: Python<'_>, f: impl FnOnce() -> Result<T, CoreError> + Send) -> PyResult<T> {
    finish(py.detach(|| catch_unwind(AssertUnwindSafe(f))))
}

/// Like [`run`] but keeps the GIL: for work of a microsecond or two, releasing and
/// re-acquiring the GIL would cost more than it frees.
fn run_small<T>(f: impl FnOnce() -> Result<T, CoreError>) -> PyResult<T> {
    finish(catch_unwind(AssertUnwindSafe(f)))
}

/// States whose square below this count as small work (see [`run_small`]).
const SMALL_ORDER: usize = 24;

fn finish<T>(outcome: std::thread::Result<Result<T, CoreError>>) -> PyResult<T> {
    match outcome {
        Ok(Ok(v)) => Ok(v),
        Ok(Err(e)) => Err(to_py(e)),
        Err(_) => Err(ModelError::new_err(
            "internal error: the core panicked on this input (a bug; please report it with the input)",
        )),
    }
}

fn matrix_from(x: &PyReadonlyArray2<'_, f64>) -> Matrix<f64> {
    let view = x.as_array();
    let (r, c) = view.dim();
    Matrix::from_row_major(r, c, view.iter().copied().collect()).expect("shape from the array")
}

fn vector_from(x: &PyReadonlyArray1<'_, f64>) -> Vec<f64> {
    x.as_array().iter().copied().collect()
}

fn array2<'py>(py: Python<'py>, m: Matrix<f64>) -> PyResult<Bound<'py, PyAny>> {
    let shape = [m.rows(), m.cols()];
    array_nd(py, m.into_vec(), &shape)
}

/// A new C-contiguous array owning `data` (no copy, no Python-level reshape).
fn array_nd<'py>(py: Python<'py>, data: Vec<f64>, shape: &[usize]) -> PyResult<Bound<'py, PyAny>> {
    let owned = ndarray::ArrayD::from_shape_vec(ndarray::IxDyn(shape), data)
        .map_err(|e| ModelError::new_err(format!("internal error: result shape ({e})")))?;
    Ok(PyArray::from_owned_array(py, owned).into_any())
}

/// As [`array2`], marked read-only (the arrays of a frozen Realization).
fn frozen2<'py>(py: Python<'py>, m: Matrix<f64>) -> PyResult<Bound<'py, PyAny>> {
    let shape = [m.rows(), m.cols()];
    let owned = ndarray::ArrayD::from_shape_vec(ndarray::IxDyn(&shape), m.into_vec())
        .map_err(|e| ModelError::new_err(format!("internal error: result shape ({e})")))?;
    let arr = PyArray::from_owned_array(py, owned);
    // SAFETY: the array was created just above and is not shared yet; clearing the
    // WRITEABLE flag is what numpy's own `setflags(write=False)` does.
    unsafe {
        (*arr.as_array_ptr()).fields.flags &= !numpy::npyffi::NPY_ARRAY_WRITEABLE;
    }
    Ok(arr.into_any())
}

fn accuracy_dict<'py>(py: Python<'py>, acc: &Accuracy) -> PyResult<Bound<'py, PyDict>> {
    let d = PyDict::new(py);
    d.set_item("method", acc.method)?;
    d.set_item("relative_error_bound", acc.relative_error_bound)?;
    Ok(d)
}

fn parse_form(form: &str) -> PyResult<Form> {
    form.parse().map_err(to_py)
}

fn parse_method(method: &str) -> PyResult<Method> {
    method.parse().map_err(to_py)
}

fn model_from(
    a: &PyReadonlyArray2<'_, f64>,
    b: &PyReadonlyArray2<'_, f64>,
    c: &PyReadonlyArray2<'_, f64>,
    d: &PyReadonlyArray2<'_, f64>,
) -> PyResult<StateSpace<f64>> {
    StateSpace::new(
        matrix_from(a),
        matrix_from(b),
        matrix_from(c),
        matrix_from(d),
    )
    .map_err(to_py)
}

type Quad<'py> = (
    Bound<'py, PyAny>,
    Bound<'py, PyAny>,
    Bound<'py, PyAny>,
    Bound<'py, PyAny>,
);

#[pyfunction]
fn realize_float<'py>(
    py: Python<'py>,
    num: PyReadonlyArray1<'py, f64>,
    den: PyReadonlyArray1<'py, f64>,
    form: &str,
) -> PyResult<(Quad<'py>, Option<Bound<'py, PyDict>>)> {
    let form = parse_form(form)?;
    let small = match (num.as_slice(), den.as_slice()) {
        (Ok(n), Ok(d)) if d.len() < SMALL_ORDER => Some((n, d)),
        _ => None,
    };
    let (ss, modal) = if let Some((num, den)) = small {
        run_small(|| realize::realize_f64(num, den, form))?
    } else {
        let (num, den) = (vector_from(&num), vector_from(&den));
        run(py, move || realize::realize_f64(&num, &den, form))?
    };
    let info = match modal {
        Some(m) => {
            let info = PyDict::new(py);
            info.set_item("eigenvector_condition", m.eigenvector_condition)?;
            info.set_item("condition_limit", m.condition_limit)?;
            Some(info)
        }
        None => None,
    };
    Ok((
        (
            frozen2(py, ss.a)?,
            frozen2(py, ss.b)?,
            frozen2(py, ss.c)?,
            frozen2(py, ss.d)?,
        ),
        info,
    ))
}

#[pyfunction]
#[pyo3(signature = (a, method, with_adjugates))]
fn faddeev_leverrier_float<'py>(
    py: Python<'py>,
    a: PyReadonlyArray2<'py, f64>,
    method: &str,
    with_adjugates: bool,
) -> PyResult<(Bound<'py, PyAny>, Bound<'py, PyAny>, Bound<'py, PyDict>)> {
    let method = parse_method(method)?;
    let a = matrix_from(&a);
    let n = a.rows();
    let (coeffs, adj, acc) = run(py, move || {
        recover::faddeev_leverrier_f64(&a, method, with_adjugates)
    })?;
    let flat: Vec<f64> = adj.into_iter().flat_map(|m| m.into_vec()).collect();
    let shape = if with_adjugates { [n, n, n] } else { [0, n, n] };
    Ok((
        array_nd(py, coeffs, &[n + 1])?,
        array_nd(py, flat, &shape)?,
        accuracy_dict(py, &acc)?,
    ))
}

#[pyfunction]
fn transfer_function_float<'py>(
    py: Python<'py>,
    a: PyReadonlyArray2<'py, f64>,
    b: PyReadonlyArray2<'py, f64>,
    c: PyReadonlyArray2<'py, f64>,
    d: PyReadonlyArray2<'py, f64>,
    method: &str,
) -> PyResult<(Bound<'py, PyAny>, Bound<'py, PyAny>, Bound<'py, PyDict>)> {
    let method = parse_method(method)?;
    let ss = model_from(&a, &b, &c, &d)?;
    let (n, p, m) = (ss.n_states(), ss.n_outputs(), ss.n_inputs());
    let (num, den, acc) = run(py, move || recover::transfer_function_f64(&ss, method))?;
    Ok((
        array_nd(py, num, &[p, m, n + 1])?,
        array_nd(py, den, &[n + 1])?,
        accuracy_dict(py, &acc)?,
    ))
}

#[pyfunction]
fn controllability_matrix_float<'py>(
    py: Python<'py>,
    a: PyReadonlyArray2<'py, f64>,
    b: PyReadonlyArray2<'py, f64>,
) -> PyResult<Bound<'py, PyAny>> {
    let (a, b) = (matrix_from(&a), matrix_from(&b));
    check_krylov_shapes(&a, &b, "b", "rows")?;
    let m = run(py, move || {
        let k = krylov::controllability_matrix(&a, &b);
        if k.as_slice().iter().all(|v| v.is_finite()) {
            Ok(k)
        } else {
            Err(CoreError::Overflow {
                what: "controllability matrix".into(),
            })
        }
    })?;
    array2(py, m)
}

fn check_krylov_shapes<T: crate::scalar::Scalar>(
    a: &Matrix<T>,
    x: &Matrix<T>,
    arg: &'static str,
    side: &str,
) -> PyResult<()> {
    if a.rows() != a.cols() {
        return Err(to_py(CoreError::Shape {
            arg: "a",
            expected: "a square matrix".into(),
            found: format!("shape ({}, {})", a.rows(), a.cols()),
        }));
    }
    let found = if side == "rows" { x.rows() } else { x.cols() };
    if found != a.rows() {
        return Err(to_py(CoreError::Shape {
            arg,
            expected: format!("{} {side} (one per state)", a.rows()),
            found: format!("shape ({}, {})", x.rows(), x.cols()),
        }));
    }
    Ok(())
}

// ---- exact data: matrices travel as (rows, cols, numerators, denominators) of Python ints.

type ExactIn = (usize, usize, Vec<BigInt>, Vec<BigInt>);
type ExactOut = (usize, usize, Vec<BigInt>, Vec<BigInt>);

fn exact_matrix(arg: &'static str, x: ExactIn) -> PyResult<Matrix<BigRational>> {
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

fn exact_vector(arg: &'static str, x: ExactIn) -> PyResult<Vec<BigRational>> {
    Ok(exact_matrix(arg, x)?.into_vec())
}

fn exact_out(m: Matrix<BigRational>) -> ExactOut {
    let (r, c) = (m.rows(), m.cols());
    let (nums, dens) = m
        .into_vec()
        .into_iter()
        .map(|q| (q.numer().clone(), q.denom().clone()))
        .unzip();
    (r, c, nums, dens)
}

fn exact_out_vec(v: Vec<BigRational>) -> ExactOut {
    let n = v.len();
    exact_out(Matrix::from_row_major(1, n, v).expect("1 x n"))
}

#[pyfunction]
fn realize_exact(
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
    Ok((
        exact_out(ss.a),
        exact_out(ss.b),
        exact_out(ss.c),
        exact_out(ss.d),
    ))
}

/// Largest order of the exact rational recursion when adjugates are returned (n⁴
/// big-number operations); coefficients and transfer matrices (the multi-modular route) go
/// up to the recursion's order limit. Both also answer to the core's time budget.
const MAX_EXACT_ADJUGATE_ORDER: usize = 64;

fn check_exact_order(n: usize, with_adjugates: bool) -> PyResult<()> {
    let (limit, what) = if with_adjugates {
        (MAX_EXACT_ADJUGATE_ORDER, "the exact adjugate sequence")
    } else {
        (recover::MAX_RECURSION_ORDER, "exact rational arithmetic")
    };
    if n > limit {
        return Err(to_py(CoreError::TooLarge {
            arg: "a",
            detail: format!("order {n} exceeds the limit {limit} of {what}"),
        }));
    }
    Ok(())
}

#[pyfunction]
fn faddeev_leverrier_exact(
    py: Python<'_>,
    a: ExactIn,
    with_adjugates: bool,
) -> PyResult<(ExactOut, Vec<ExactOut>)> {
    check_exact_order(a.0, with_adjugates)?;
    let a = exact_matrix("a", a)?;
    if a.rows() != a.cols() {
        return Err(to_py(CoreError::Shape {
            arg: "a",
            expected: "a square matrix".into(),
            found: format!("shape ({}, {})", a.rows(), a.cols()),
        }));
    }
    let (coeffs, adj) = run(py, move || {
        recover::rational::faddeev_leverrier_rational(&a, with_adjugates)
    })?;
    Ok((
        exact_out_vec(coeffs),
        adj.into_iter().map(exact_out).collect(),
    ))
}

#[pyfunction]
fn transfer_function_exact(
    py: Python<'_>,
    a: ExactIn,
    b: ExactIn,
    c: ExactIn,
    d: ExactIn,
) -> PyResult<(ExactOut, ExactOut)> {
    check_exact_order(a.0, false)?;
    let ss = StateSpace::new(
        exact_matrix("a", a)?,
        exact_matrix("b", b)?,
        exact_matrix("c", c)?,
        exact_matrix("d", d)?,
    )
    .map_err(to_py)?;
    let (num, den) = run(py, move || {
        recover::rational::transfer_function_rational(&ss)
    })?;
    Ok((exact_out_vec(num), exact_out_vec(den)))
}

#[pyfunction]
fn controllability_matrix_exact(py: Python<'_>, a: ExactIn, b: ExactIn) -> PyResult<ExactOut> {
    let (a, b) = (exact_matrix("a", a)?, exact_matrix("b", b)?);
    check_krylov_shapes(&a, &b, "b", "rows")?;
    let k = run(py, move || Ok(krylov::controllability_matrix(&a, &b)))?;
    Ok(exact_out(k))
}

// ---- transfer matrices (block companion forms)

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
fn realize_transfer_matrix_float<'py>(
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
    Ok((
        (
            frozen2(py, ss.a)?,
            frozen2(py, ss.b)?,
            frozen2(py, ss.c)?,
            frozen2(py, ss.d)?,
        ),
        d,
    ))
}

/// `num` and `den` hold one entry per row (p·m rows, row-major over (i, j)).
#[pyfunction]
#[pyo3(signature = (num, den, p, m, form))]
fn realize_transfer_matrix_exact(
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
    Ok((
        exact_out(ss.a),
        exact_out(ss.b),
        exact_out(ss.c),
        exact_out(ss.d),
    ))
}

// ---- batches

#[pyfunction]
fn realize_batch<'py>(
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
    let num: Vec<f64> = num.as_array().iter().copied().collect();
    let den: Vec<f64> = den.as_array().iter().copied().collect();
    let r = run(py, move || {
        batch::realize_batch(&num, k, &den, n1, count, form)
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
fn transfer_function_batch<'py>(
    py: Python<'py>,
    a: PyReadonlyArray3<'py, f64>,
    b: PyReadonlyArray3<'py, f64>,
    c: PyReadonlyArray3<'py, f64>,
    d: PyReadonlyArray3<'py, f64>,
) -> PyResult<(Bound<'py, PyAny>, Bound<'py, PyAny>)> {
    let (count, n, n2) = a.as_array().dim();
    let (cb, nb, m) = b.as_array().dim();
    let (cc, p, nc) = c.as_array().dim();
    let (cd, pd, md) = d.as_array().dim();
    let shape_err = |arg: &'static str, expected: String, found: (usize, usize, usize)| {
        Err(to_py(CoreError::Shape {
            arg,
            expected,
            found: format!("shape {found:?}"),
        }))
    };
    if n2 != n {
        return shape_err("a", format!("shape (N, n, n)"), (count, n, n2));
    }
    if (cb, nb) != (count, n) {
        return shape_err("b", format!("shape ({count}, {n}, m)"), (cb, nb, m));
    }
    if (cc, nc) != (count, n) {
        return shape_err("c", format!("shape ({count}, p, {n})"), (cc, p, nc));
    }
    if (cd, pd, md) != (count, p, m) {
        return shape_err("d", format!("shape ({count}, {p}, {m})"), (cd, pd, md));
    }
    let own =
        |x: &PyReadonlyArray3<'py, f64>| -> Vec<f64> { x.as_array().iter().copied().collect() };
    let (av, bv, cv, dv) = (own(&a), own(&b), own(&c), own(&d));
    let t = run(py, move || {
        batch::transfer_function_batch(&av, &bv, &cv, &dv, count, n, m, p)
    })?;
    Ok((
        array_nd(py, t.num, &[count, p, m, n + 1])?,
        array_nd(py, t.den, &[count, n + 1])?,
    ))
}

// ---- structure

type StaircaseOut<'py> = (
    Bound<'py, PyAny>,
    Bound<'py, PyAny>,
    Option<Bound<'py, PyAny>>,
    Bound<'py, PyAny>,
    Vec<usize>,
    usize,
    Vec<Bound<'py, PyAny>>,
    Vec<usize>,
    f64,
);

fn staircase_out<'py>(py: Python<'py>, s: staircase::Staircase) -> PyResult<StaircaseOut<'py>> {
    let c = match s.c {
        Some(c) => Some(array2(py, c)?),
        None => None,
    };
    let mut sv = Vec::with_capacity(s.steps.len());
    let mut kept = Vec::with_capacity(s.steps.len());
    for step in s.steps {
        let k = step.singular_values.len();
        sv.push(array_nd(py, step.singular_values, &[k])?);
        kept.push(step.kept);
    }
    Ok((
        array2(py, s.a)?,
        array2(py, s.b)?,
        c,
        array2(py, s.q)?,
        s.blocks,
        s.rank,
        sv,
        kept,
        s.tol,
    ))
}

#[pyfunction]
#[pyo3(signature = (a, b, c, tol))]
fn controllability_staircase<'py>(
    py: Python<'py>,
    a: PyReadonlyArray2<'py, f64>,
    b: PyReadonlyArray2<'py, f64>,
    c: Option<PyReadonlyArray2<'py, f64>>,
    tol: Option<f64>,
) -> PyResult<StaircaseOut<'py>> {
    let (a, b, c) = (
        matrix_from(&a),
        matrix_from(&b),
        c.as_ref().map(matrix_from),
    );
    let s = run(py, move || {
        staircase::controllability_staircase(&a, &b, c.as_ref(), tol)
    })?;
    staircase_out(py, s)
}

#[pyfunction]
#[pyo3(signature = (a, b, c, tol))]
fn observability_staircase<'py>(
    py: Python<'py>,
    a: PyReadonlyArray2<'py, f64>,
    b: Option<PyReadonlyArray2<'py, f64>>,
    c: PyReadonlyArray2<'py, f64>,
    tol: Option<f64>,
) -> PyResult<StaircaseOut<'py>> {
    let (a, b, c) = (
        matrix_from(&a),
        b.as_ref().map(matrix_from),
        matrix_from(&c),
    );
    let s = run(py, move || {
        staircase::observability_staircase(&a, b.as_ref(), &c, tol)
    })?;
    staircase_out(py, s)
}

#[pyfunction]
#[pyo3(signature = (a, b, c, d, tol))]
fn minimal_realization<'py>(
    py: Python<'py>,
    a: PyReadonlyArray2<'py, f64>,
    b: PyReadonlyArray2<'py, f64>,
    c: PyReadonlyArray2<'py, f64>,
    d: PyReadonlyArray2<'py, f64>,
    tol: Option<f64>,
) -> PyResult<(Quad<'py>, StaircaseOut<'py>, StaircaseOut<'py>)> {
    let ss = model_from(&a, &b, &c, &d)?;
    let m = run(py, move || minimal::minimal_realization(&ss, tol))?;
    let r = m.realization;
    Ok((
        (
            array2(py, r.a)?,
            array2(py, r.b)?,
            array2(py, r.c)?,
            array2(py, r.d)?,
        ),
        staircase_out(py, m.controllability)?,
        staircase_out(py, m.observability)?,
    ))
}

#[pyfunction]
#[pyo3(signature = (a, b, c, d, tol))]
fn kalman_decomposition<'py>(
    py: Python<'py>,
    a: PyReadonlyArray2<'py, f64>,
    b: PyReadonlyArray2<'py, f64>,
    c: PyReadonlyArray2<'py, f64>,
    d: PyReadonlyArray2<'py, f64>,
    tol: Option<f64>,
) -> PyResult<(Quad<'py>, Bound<'py, PyAny>, [usize; 4], f64, f64)> {
    let ss = model_from(&a, &b, &c, &d)?;
    let k = run(py, move || kalman::kalman_decomposition(&ss, tol))?;
    let r = k.realization;
    Ok((
        (
            array2(py, r.a)?,
            array2(py, r.b)?,
            array2(py, r.c)?,
            array2(py, r.d)?,
        ),
        array2(py, k.t)?,
        k.sizes,
        k.condition,
        k.pattern_residual,
    ))
}

#[pyfunction]
#[pyo3(signature = (r1, r2, tol))]
fn similarity_transform<'py>(
    py: Python<'py>,
    r1: (
        PyReadonlyArray2<'py, f64>,
        PyReadonlyArray2<'py, f64>,
        PyReadonlyArray2<'py, f64>,
        PyReadonlyArray2<'py, f64>,
    ),
    r2: (
        PyReadonlyArray2<'py, f64>,
        PyReadonlyArray2<'py, f64>,
        PyReadonlyArray2<'py, f64>,
        PyReadonlyArray2<'py, f64>,
    ),
    tol: Option<f64>,
) -> PyResult<(Bound<'py, PyAny>, [f64; 4], f64)> {
    let s1 = model_from(&r1.0, &r1.1, &r1.2, &r1.3)?;
    let s2 = model_from(&r2.0, &r2.1, &r2.2, &r2.3)?;
    let s = run(py, move || similarity::similarity(&s1, &s2, tol))?;
    Ok((array2(py, s.t)?, s.residuals, s.tol))
}

// ---- identification, Gramians and balancing

#[pyfunction]
#[pyo3(signature = (markov, order, tol))]
fn realize_markov<'py>(
    py: Python<'py>,
    markov: PyReadonlyArray3<'py, f64>,
    order: Option<usize>,
    tol: Option<f64>,
) -> PyResult<(Quad<'py>, Bound<'py, PyAny>, usize, f64, (usize, usize))> {
    let (k, p, m) = markov.as_array().dim();
    let data: Vec<f64> = markov.as_array().iter().copied().collect();
    let r = run(py, move || {
        ho_kalman::realize_markov(&data, k, p, m, order, tol)
    })?;
    let s = r.realization;
    let count = r.singular_values.len();
    Ok((
        (
            array2(py, s.a)?,
            array2(py, s.b)?,
            array2(py, s.c)?,
            array2(py, s.d)?,
        ),
        array_nd(py, r.singular_values, &[count])?,
        r.order,
        r.tol,
        (r.block_rows, r.block_cols),
    ))
}

#[pyfunction]
#[pyo3(signature = (a, b, c, discrete))]
fn gramians<'py>(
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
fn hankel_singular_values<'py>(
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
#[pyo3(signature = (a, b, c, d, order, discrete))]
fn balanced_realization<'py>(
    py: Python<'py>,
    a: PyReadonlyArray2<'py, f64>,
    b: PyReadonlyArray2<'py, f64>,
    c: PyReadonlyArray2<'py, f64>,
    d: PyReadonlyArray2<'py, f64>,
    order: Option<usize>,
    discrete: bool,
) -> PyResult<(Quad<'py>, Bound<'py, PyAny>, f64, [f64; 2])> {
    let ss = model_from(&a, &b, &c, &d)?;
    let r = run(py, move || {
        gramian_balance::balanced_realization(&ss, order, discrete)
    })?;
    let s = r.realization;
    let n = r.hankel_singular_values.len();
    Ok((
        (
            array2(py, s.a)?,
            array2(py, s.b)?,
            array2(py, s.c)?,
            array2(py, s.d)?,
        ),
        array_nd(py, r.hankel_singular_values, &[n])?,
        r.error_bound,
        r.residuals,
    ))
}

#[pymodule]
fn _core(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add("ModelError", m.py().get_type::<ModelError>())?;
    m.add_function(wrap_pyfunction!(realize_float, m)?)?;
    m.add_function(wrap_pyfunction!(realize_exact, m)?)?;
    m.add_function(wrap_pyfunction!(faddeev_leverrier_float, m)?)?;
    m.add_function(wrap_pyfunction!(faddeev_leverrier_exact, m)?)?;
    m.add_function(wrap_pyfunction!(transfer_function_float, m)?)?;
    m.add_function(wrap_pyfunction!(transfer_function_exact, m)?)?;
    m.add_function(wrap_pyfunction!(controllability_matrix_float, m)?)?;
    m.add_function(wrap_pyfunction!(controllability_matrix_exact, m)?)?;
    m.add_function(wrap_pyfunction!(realize_batch, m)?)?;
    m.add_function(wrap_pyfunction!(transfer_function_batch, m)?)?;
    m.add_function(wrap_pyfunction!(controllability_staircase, m)?)?;
    m.add_function(wrap_pyfunction!(observability_staircase, m)?)?;
    m.add_function(wrap_pyfunction!(minimal_realization, m)?)?;
    m.add_function(wrap_pyfunction!(kalman_decomposition, m)?)?;
    m.add_function(wrap_pyfunction!(similarity_transform, m)?)?;
    m.add_function(wrap_pyfunction!(realize_markov, m)?)?;
    m.add_function(wrap_pyfunction!(gramians, m)?)?;
    m.add_function(wrap_pyfunction!(hankel_singular_values, m)?)?;
    m.add_function(wrap_pyfunction!(balanced_realization, m)?)?;
    m.add_function(wrap_pyfunction!(realize_transfer_matrix_float, m)?)?;
    m.add_function(wrap_pyfunction!(realize_transfer_matrix_exact, m)?)?;
    m.add("CERTIFIED_TOLERANCE", recover::CERTIFIED_TOLERANCE)?;
    Ok(())
}
