//! Parametric (symbolic) models: transfer functions and canonical forms whose entries are
//! rational functions of named parameters.
//!
//! `C (sI − A)⁻¹ B + D = num(s) / den(s)` with every coefficient in `Q(p_0, ..., p_{v−1})`,
//! and realizations `(A, B, C, D)` over `Q(p_0, ...)` of a given `num / den`.
//!
//! # Purpose
//! Hand derivations carry symbols (inertias, a shaft stiffness, resistances); checking one
//! needs the transfer matrix of a state-space model whose entries are expressions in them,
//! or the canonical forms of a transfer function whose coefficients are.
//!
//! # Method
//! | concern | module |
//! | --- | --- |
//! | integer polynomials in the parameters (sparse, lexicographic) | [`polynomial`] |
//! | polynomial GCD and LCM (primitive pseudo-remainder sequences) | [`gcd`] |
//! | rational functions in lowest terms | [`rational_function`] |
//! | the transfer matrix (Faddeev–LeVerrier over `Z[p]` after clearing denominators) | [`transfer`] |
//! | companion forms of a parametric transfer function | [`realize`] |
//!
//! The input format, shared with the binding layer, is plain: a polynomial is a list of
//! terms `(exponents, numerator, denominator)` with `exponents[i]` the power of parameter
//! i and the coefficient the rational `numerator / denominator`; an entry is a pair
//! (numerator polynomial, denominator polynomial). [`entry_from_terms`] checks and converts.
//!
//! # Numerical aspects
//! Exact. Results are generic in the parameters (valid where no denominator vanishes).
//!
//! # References
//! See the modules.
//!
//! # Errors
//! `BadValue` for a zero denominator (integer or polynomial) and for exponents above
//! [`MAX_INPUT_EXPONENT`] or more than [`MAX_PARAMETERS`] parameters; `TooLarge` from the
//! budgets of [`transfer`] and [`realize`].

pub mod gcd;
pub mod polynomial;
pub mod rational_function;
pub mod realize;
pub mod transfer;

pub use polynomial::Polynomial;
pub use rational_function::RationalFunction;
pub use realize::realize_parametric;
pub use transfer::parametric_transfer_function;

use crate::error::{ModelError, Result};
use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{One, Signed, Zero};

/// Largest power of a parameter accepted in an input term (keeps every product's exponents
/// far inside `u32` at the largest order).
pub const MAX_INPUT_EXPONENT: u32 = 1 << 16;

/// Largest number of distinct parameters.
pub const MAX_PARAMETERS: usize = 256;

/// One term of the plain format: exponents, coefficient numerator, coefficient denominator.
pub type Term = (Vec<u32>, BigInt, BigInt);

/// An integer polynomial and the positive integer it is to be divided by.
fn polynomial_from_terms(
    arg: &'static str,
    at: &str,
    terms: &[Term],
) -> Result<(Polynomial, BigInt)> {
    let mut common = BigInt::one();
    for (exponents, _, q) in terms {
        if q.is_zero() {
            return Err(ModelError::BadValue {
                arg,
                detail: format!("{at} has a coefficient with denominator 0"),
            });
        }
        if exponents.len() > MAX_PARAMETERS {
            return Err(ModelError::BadValue {
                arg,
                detail: format!(
                    "{at} names {} parameters; at most {MAX_PARAMETERS} are supported",
                    exponents.len()
                ),
            });
        }
        if let Some(e) = exponents.iter().find(|&&e| e > MAX_INPUT_EXPONENT) {
            return Err(ModelError::BadValue {
                arg,
                detail: format!("{at} has a parameter to the power {e}; at most {MAX_INPUT_EXPONENT} is supported"),
            });
        }
        common = common.lcm(q);
    }
    // p / q · common = p · (common / q), the sign of q included
    let poly = Polynomial::from_terms(terms.iter().map(|(e, p, q)| (e.clone(), p * (&common / q))));
    Ok((poly, common.abs()))
}

/// The rational function `numerator / denominator` of two polynomials in the plain format,
/// in lowest terms. `at` says where the entry is (for messages).
pub fn entry_from_terms(
    arg: &'static str,
    at: &str,
    numerator: &[Term],
    denominator: &[Term],
) -> Result<RationalFunction> {
    let (n, ln) = polynomial_from_terms(arg, at, numerator)?;
    let (d, ld) = polynomial_from_terms(arg, at, denominator)?;
    // (n / ln) / (d / ld) = (n · ld) / (d · ln)
    RationalFunction::new(n.scale(&ld), d.scale(&ln)).ok_or_else(|| ModelError::BadValue {
        arg,
        detail: format!("{at} has a zero denominator"),
    })
}

/// A polynomial in the plain format (integer coefficients over the denominator 1).
pub fn terms_of(p: &Polynomial) -> Vec<Term> {
    p.terms()
        .iter()
        .map(|(e, c)| (e.clone(), c.clone(), BigInt::one()))
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn t(e: &[u32], p: i64, q: i64) -> Term {
        (e.to_vec(), BigInt::from(p), BigInt::from(q))
    }

    #[test]
    fn plain_format_round_trip_and_refusals() {
        // (3/2 x − 1/3) / (−1/6 y) = (−9x + 2) / y after clearing and sign normalisation
        let q = entry_from_terms(
            "a",
            "entry (0, 0)",
            &[t(&[1], 3, 2), t(&[], -1, 3)],
            &[t(&[0, 1], 1, -6)],
        )
        .unwrap();
        assert_eq!(terms_of(q.numerator()), vec![t(&[1], -9, 1), t(&[], 2, 1)]);
        assert_eq!(terms_of(q.denominator()), vec![t(&[0, 1], 1, 1)]);
        for (num, den) in [
            (vec![t(&[1], 1, 1)], vec![]),
            (vec![t(&[1], 1, 0)], vec![t(&[], 1, 1)]),
            (vec![t(&[1 << 20], 1, 1)], vec![t(&[], 1, 1)]),
        ] {
            assert!(matches!(
                entry_from_terms("b", "entry (1, 0)", &num, &den),
                Err(ModelError::BadValue { arg: "b", .. })
            ));
        }
    }
}
