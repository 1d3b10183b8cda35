//! Bindings of parametric (symbolic) models: the plain format in and out, nothing else.
//!
//! The plain format (the Python layer converts sympy expressions to and from it, never by
//! parsing strings): a polynomial in the parameters p_0 .. p_{v−1} is a list of terms
//! `(exponents, numerator, denominator)`, `exponents[i]` the power of p_i (a sequence of
//! non-negative ints, trailing zeros optional) and the coefficient the rational
//! `numerator / denominator` of two Python ints; an entry is a pair
//! `(numerator polynomial, denominator polynomial)`; a matrix is `(rows, cols, entries)`
//! with the entries row-major. Results come back in the same format, every coefficient an
//! integer (denominator 1) and every entry in lowest terms.

use super::errors::{run, to_py};
use super::realize::parse_form;
use crate::error::ModelError as CoreError;
use crate::matrix::Matrix;
use crate::parametric::{self, RationalFunction};
use crate::state_space::StateSpace;
use pyo3::prelude::*;

type Terms = Vec<parametric::Term>;
type EntryPlain = (Terms, Terms);
type MatrixPlain = (usize, usize, Vec<EntryPlain>);

fn matrix_in(
    arg: &'static str,
    (rows, cols, entries): MatrixPlain,
) -> PyResult<Matrix<RationalFunction>> {
    if rows.checked_mul(cols) != Some(entries.len()) {
        return Err(to_py(CoreError::Shape {
            arg,
            expected: format!("{rows} x {cols} = {} entries", rows.saturating_mul(cols)),
            found: format!("{} entries", entries.len()),
        }));
    }
    let data = entries
        .iter()
        .enumerate()
        .map(|(k, (num, den))| {
            let at = format!("entry ({}, {})", k / cols.max(1), k % cols.max(1));
            parametric::entry_from_terms(arg, &at, num, den).map_err(to_py)
        })
        .collect::<PyResult<Vec<_>>>()?;
    Ok(Matrix::from_row_major(rows, cols, data).expect("count checked"))
}

fn entry_out(q: &RationalFunction) -> EntryPlain {
    (
        parametric::terms_of(q.numerator()),
        parametric::terms_of(q.denominator()),
    )
}

fn matrix_out(m: &Matrix<RationalFunction>) -> MatrixPlain {
    (
        m.rows(),
        m.cols(),
        m.as_slice().iter().map(entry_out).collect(),
    )
}

/// `(num, den)`: num the p·m·(n+1) entries row-major (entry (i, j), power s^n first), den
/// the n+1 coefficients of the monic denominator.
#[pyfunction]
pub(crate) fn parametric_transfer_function(
    py: Python<'_>,
    a: MatrixPlain,
    b: MatrixPlain,
    c: MatrixPlain,
    d: MatrixPlain,
) -> PyResult<(Vec<EntryPlain>, Vec<EntryPlain>)> {
    let ss = StateSpace::new(
        matrix_in("a", a)?,
        matrix_in("b", b)?,
        matrix_in("c", c)?,
        matrix_in("d", d)?,
    )
    .map_err(to_py)?;
    let (num, den) = run(py, move || parametric::parametric_transfer_function(&ss))?;
    Ok((
        num.iter().map(entry_out).collect(),
        den.iter().map(entry_out).collect(),
    ))
}

/// `(A, B, C, D)` of `num / den` (coefficient entries, highest power first) in `form`.
#[pyfunction]
pub(crate) fn realize_parametric(
    py: Python<'_>,
    num: Vec<EntryPlain>,
    den: Vec<EntryPlain>,
    form: &str,
) -> PyResult<(MatrixPlain, MatrixPlain, MatrixPlain, MatrixPlain)> {
    let form = parse_form(form)?;
    let convert = |entries: Vec<EntryPlain>| {
        let count = entries.len();
        matrix_in("expr", (1, count, entries)).map(|m| m.into_vec())
    };
    let (num, den) = (convert(num)?, convert(den)?);
    let ss = run(py, move || parametric::realize_parametric(&num, &den, form))?;
    Ok((
        matrix_out(&ss.a),
        matrix_out(&ss.b),
        matrix_out(&ss.c),
        matrix_out(&ss.d),
    ))
}
