//! Transfer-function recovery: characteristic polynomial, adjugate sequence and transfer
//! matrix of a state-space model by the Faddeev–LeVerrier recursion.
//!
//! Exact data use the generic recursion ([`faddeev_leverrier`]) over the integers, after
//! clearing denominators ([`rational`]). Float data choose between
//! two evaluations of the same recursion ([`Method`]):
//!
//! * the recursion in double-double arithmetic (about 106 bits) with a running error bound
//!   ([`certified`]), accepted when the bound certifies every result to [`CERTIFIED_TOLERANCE`]
//!   relative before the final rounding to float64 (so the float64 result is within
//!   `0.5 + 1/8` units in the last place: correctly rounded except within 1/8 ulp of a tie);
//!   not accepted when a result is below 2⁻⁹⁶⁹ in magnitude (near the subnormal range the
//!   double-double bound does not hold), so subnormal results are exact, rounded once;
//! * the exact characteristic polynomial and transfer matrix of the float data, rounded once
//!   ([`dyadic`], by the multi-modular Hessenberg method of [`modular`]; the adjugates by the
//!   exact recursion): correctly rounded results whatever the conditioning, refused only
//!   beyond the exact-arithmetic time budget.
//!
//! `Method::Auto` tries the first and falls back to the second. The plain float recursion
//! without a check is on offer as `Method::Recursion` for studies of its accuracy.

pub mod certified;
pub mod certified_lanes;
pub mod double_double;
pub mod dyadic;
pub mod faddeev_leverrier;
pub mod hessenberg;
pub mod modular;
pub mod rational;

use crate::error::{require_finite, ModelError, Result};
use crate::matrix::Matrix;
use crate::state_space::StateSpace;
use std::str::FromStr;

/// Relative accuracy (per coefficient, before rounding to float64) the double-double path
/// must certify to be accepted: 2⁻⁵⁶ ≈ 1.4e-17, an eighth of float64's unit roundoff.
pub const CERTIFIED_TOLERANCE: f64 = 1.0 / 72_057_594_037_927_936.0;

/// Smallest magnitude the certified double-double result is accepted at: 2⁻⁹⁶⁹ = 2⁻¹⁰²² · 2⁵³
/// (below it the low word of a double-double leaves the normal range).
const DOUBLE_DOUBLE_NORMAL_FLOOR: f64 = 2.2250738585072014e-308 * 9007199254740992.0;

/// Largest order the recursion accepts (it costs about n⁴ operations: a few seconds in
/// double-double at this size).
pub const MAX_RECURSION_ORDER: usize = 256;
/// Largest order for which `Method::Auto` falls back to the exact big-integer recursion when
/// the adjugates are asked for (cost grows like n⁵·bits). The coefficients and transfer
/// matrices alone fall back to the multi-modular method at any order up to
/// [`MAX_RECURSION_ORDER`], within the exact-arithmetic time budget.
pub const MAX_EXACT_ADJUGATE_ORDER: usize = 64;

fn check_recursion_order(n: usize) -> Result<()> {
    if n > MAX_RECURSION_ORDER {
        return Err(ModelError::TooLarge {
            arg: "a",
            detail: format!("order {n} exceeds the limit {MAX_RECURSION_ORDER} of the Faddeev–LeVerrier recursion (n⁴ cost)"),
        });
    }
    Ok(())
}

/// The order limit of the single calls, for the batch routes.
pub fn check_order_for_batch(n: usize) -> Result<()> {
    check_recursion_order(n)
}

/// A square, finite `a` (the check of the float entry points).
pub fn check_square_finite(a: &Matrix<f64>) -> Result<()> {
    check_square(a)
}

/// `Method::Auto` asked for adjugates when the double-double bound does not certify and the
/// exact fallback would take too long: refuse rather than return an uncertified value silently.
fn uncertified(n: usize) -> ModelError {
    ModelError::BadValue {
        arg: "method",
        detail: format!(
            "the certified double-double recursion could not certify the adjugates of this order-{n} model \
             and their exact fallback is limited to order {MAX_EXACT_ADJUGATE_ORDER}; method='exact' forces it \
             (slow), method='recursion' returns the unchecked float64 result"
        ),
    }
}

/// float64's unit roundoff, the error of the final rounding.
const FLOAT_UNIT: f64 = f64::EPSILON / 2.0;

/// How float results are computed.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Method {
    /// Certified double-double recursion if its bound allows, else exact-then-rounded.
    Auto,
    /// The plain float64 recursion, unchecked.
    Recursion,
    /// Exact recursion on the float data, each result correctly rounded.
    Exact,
    /// Orthogonal Hessenberg reduction and La Budde's recurrence ([`hessenberg`]): backward
    /// stable, O(n³), with an a-posteriori error estimate (not a bound); no adjugates.
    Hessenberg,
}

pub const METHOD_NAMES: &str = "'auto', 'recursion', 'exact', 'hessenberg'";

impl FromStr for Method {
    type Err = ModelError;
    fn from_str(s: &str) -> Result<Self> {
        match s {
            "auto" => Ok(Method::Auto),
            "recursion" => Ok(Method::Recursion),
            "exact" => Ok(Method::Exact),
            "hessenberg" => Ok(Method::Hessenberg),
            other => Err(ModelError::BadOption {
                arg: "method",
                found: other.into(),
                allowed: METHOD_NAMES,
            }),
        }
    }
}

/// Which evaluation produced a float result, and how accurate it is.
#[derive(Debug, Clone, PartialEq)]
pub struct Accuracy {
    /// "certified double-double recursion", "exact, rounded once" or "float64 recursion (unchecked)".
    pub method: &'static str,
    /// Bound on the error of every returned coefficient relative to its exact value (first
    /// order in the unit roundoff for the recursions; ∞ where nothing can be certified).
    /// For `Method::Hessenberg` the largest relative a-posteriori estimate (not a bound).
    pub relative_error_bound: f64,
}

const EXACT: Accuracy = Accuracy {
    method: "exact, rounded once",
    relative_error_bound: f64::EPSILON / 2.0,
};

fn unchecked(bound: f64) -> Accuracy {
    Accuracy {
        method: "float64 recursion (unchecked)",
        relative_error_bound: bound,
    }
}

/// The name under which the Hessenberg route reports itself.
pub const HESSENBERG_METHOD: &str = "hessenberg reduction, La Budde recurrence (estimate)";

fn hessenberg_accuracy(worst_estimate: f64) -> Accuracy {
    Accuracy {
        method: HESSENBERG_METHOD,
        relative_error_bound: worst_estimate,
    }
}

fn check_square(a: &Matrix<f64>) -> Result<()> {
    if a.rows() != a.cols() {
        return Err(ModelError::Shape {
            arg: "a",
            expected: "a square matrix".into(),
            found: format!("shape ({}, {})", a.rows(), a.cols()),
        });
    }
    require_finite("a", a.as_slice())
}

fn split_adjugates(flat: Vec<f64>, n: usize) -> Vec<Matrix<f64>> {
    if n == 0 {
        return Vec::new();
    }
    flat.chunks(n * n)
        .map(|c| Matrix::from_row_major(n, n, c.to_vec()).expect("n x n"))
        .collect()
}

/// The fast evaluations: plain float64 for `Recursion`, certified double-double for `Auto`
/// (`None` when the bound does not certify it). `Exact` never comes here.
fn fast_path(
    a: &Matrix<f64>,
    method: Method,
    with_adjugates: bool,
    model: Option<&StateSpace<f64>>,
) -> Result<Option<(certified::CertifiedSequence, Accuracy)>> {
    let n = a.rows();
    if method == Method::Recursion {
        let seq = certified::certified_recursion::<f64>(a.as_slice(), n, with_adjugates, model);
        if !seq.is_finite() {
            return Err(ModelError::Overflow {
                what: "the float64 recursion".into(),
            });
        }
        let bound = seq.worst_relative_bound();
        return Ok(Some((seq, unchecked(bound))));
    }
    let seq = certified::certified_double_double(a.as_slice(), n, with_adjugates, model);
    let parts = [&seq.coeffs[..], &seq.adjugates, &seq.numerator];
    let bounds = [
        &seq.coeff_bounds[..],
        &seq.adjugate_bounds,
        &seq.numerator_bounds,
    ];
    if let Some(acc) = certified_accuracy(parts, bounds) {
        return Ok(Some((seq, acc)));
    }
    Ok(None)
}

/// The acceptance test of the certified double-double results (values and their bounds,
/// part by part): every value and bound finite, every value certified to
/// [`CERTIFIED_TOLERANCE`] relative, and none in the near-subnormal range; the accuracy
/// reported then. One function for the scalar recursion and the batch lanes, so both
/// accept exactly the same models.
pub fn certified_accuracy<const P: usize>(
    values: [&[f64]; P],
    bounds: [&[f64]; P],
) -> Option<Accuracy> {
    let worst = certified::worst_relative_bound_of(values, bounds);
    // Below 2^-969 the low word of a double-double is subnormal or lost: the relative bound
    // does not hold there, and the rounding to float64 would not be correct. Such results
    // go to the exact evaluation, which rounds them once to the subnormal grid.
    let near_subnormal = values
        .iter()
        .flat_map(|vs| vs.iter())
        .any(|v| *v != 0.0 && v.abs() < DOUBLE_DOUBLE_NORMAL_FLOOR);
    if certified::all_finite(values, bounds) && worst <= CERTIFIED_TOLERANCE && !near_subnormal {
        return Some(Accuracy {
            method: "certified double-double recursion",
            relative_error_bound: worst + FLOAT_UNIT,
        });
    }
    None
}

/// Characteristic polynomial `[1, c_1, ..., c_n]` and adjugates `N_0 .. N_{n−1}` of float `a`.
pub fn faddeev_leverrier_f64(
    a: &Matrix<f64>,
    method: Method,
    with_adjugates: bool,
) -> Result<(Vec<f64>, Vec<Matrix<f64>>, Accuracy)> {
    check_square(a)?;
    let n = a.rows();
    check_recursion_order(n)?;
    if method == Method::Hessenberg {
        if with_adjugates {
            return Err(ModelError::BadValue {
                arg: "method",
                detail: "the 'hessenberg' method gives no adjugates; use 'auto' or 'exact'".into(),
            });
        }
        let (coeffs, est) = hessenberg::characteristic_polynomial(a.as_slice(), n)?;
        let worst = hessenberg::worst_relative_estimate(&coeffs, &est);
        return Ok((coeffs, Vec::new(), hessenberg_accuracy(worst)));
    }
    if method != Method::Exact {
        if let Some((seq, acc)) = fast_path(a, method, with_adjugates, None)? {
            return Ok((seq.coeffs, split_adjugates(seq.adjugates, n), acc));
        }
        if with_adjugates && n > MAX_EXACT_ADJUGATE_ORDER {
            return Err(uncertified(n));
        }
    }
    let (coeffs, adj) = dyadic::faddeev_leverrier_dyadic(a, with_adjugates)?;
    Ok((coeffs, adj, EXACT))
}

/// Transfer matrix `(num (p·m·(n+1)), den (n+1))` of a float model.
pub fn transfer_function_f64(
    ss: &StateSpace<f64>,
    method: Method,
) -> Result<(Vec<f64>, Vec<f64>, Accuracy)> {
    for (arg, m) in [("a", &ss.a), ("b", &ss.b), ("c", &ss.c), ("d", &ss.d)] {
        require_finite(arg, m.as_slice())?;
    }
    let n = ss.n_states();
    check_recursion_order(n)?;
    if method == Method::Hessenberg {
        let r = hessenberg::transfer_function(ss)?;
        let acc = hessenberg_accuracy(r.worst_relative_estimate());
        return Ok((r.num, r.den, acc));
    }
    if method != Method::Exact {
        if let Some((seq, acc)) = fast_path(&ss.a, method, false, Some(ss))? {
            return Ok((seq.numerator, seq.coeffs, acc));
        }
    }
    let (num, den) = dyadic::transfer_function_dyadic(ss)?;
    Ok((num, den, EXACT))
}
