//! Polynomial normalisation and division: the proper split of a SISO transfer function.
//!
//! For `G(s) = num(s) / den(s)` with `deg num <= deg den = n`, after stripping leading zeros
//! and dividing by the leading denominator coefficient,
//!
//! `G(s) = d + (c_{n-1} s^{n-1} + ... + c_0) / (s^n + a_{n-1} s^{n-1} + ... + a_0)`,
//!
//! where `d = b_n` and `c_i = b_i - a_i b_n` (polynomial division by a monic divisor of the
//! same degree). Coefficient arrays are highest power first throughout.

use crate::error::{ModelError, Result};
use crate::scalar::Scalar;

/// A transfer function split into its direct term and strictly proper part.
#[derive(Debug, Clone, PartialEq)]
pub struct ProperSplit<T> {
    /// Monic denominator `[1, a_{n-1}, ..., a_0]` (length n + 1).
    pub den: Vec<T>,
    /// Strictly proper numerator `[c_{n-1}, ..., c_0]` (length n).
    pub strict_num: Vec<T>,
    /// The direct term `d = b_n`.
    pub direct: T,
}

impl<T: Scalar> ProperSplit<T> {
    pub fn order(&self) -> usize {
        self.strict_num.len()
    }

    /// `a_k`, the coefficient of `s^k` in the monic denominator (k < n).
    pub fn a(&self, k: usize) -> &T {
        &self.den[self.order() - k]
    }

    /// `c_k`, the coefficient of `s^k` in the strictly proper numerator (k < n).
    pub fn c(&self, k: usize) -> &T {
        &self.strict_num[self.order() - 1 - k]
    }

    /// Markov parameters `h_1 .. h_n` of the strictly proper part, from
    /// `c(s) = den(s) * sum_k h_k s^-k`: `h_k = c_{n-k} - sum_{i<k} a_{n-i} h_{k-i}`.
    pub fn markov_parameters(&self) -> Vec<T> {
        let n = self.order();
        let mut h: Vec<T> = Vec::with_capacity(n);
        for k in 1..=n {
            let mut hk = self.c(n - k).clone();
            for i in 1..k {
                hk = hk.sub(&self.a(n - i).mul(&h[k - i - 1]));
            }
            h.push(hk);
        }
        h
    }
}

/// The coefficients after the leading zeros; empty when all are zero.
pub fn strip_leading_zeros<T: Scalar>(coeffs: &[T]) -> &[T] {
    let first = coeffs
        .iter()
        .position(|c| !c.is_zero())
        .unwrap_or(coeffs.len());
    &coeffs[first..]
}

/// Normalise `num / den` and split off the direct term.
///
/// # Errors
/// `ZeroPolynomial` when `num` is empty or `den` is empty or zero; `Improper` when
/// `deg num > deg den`. A zero numerator is valid (the zero transfer function).
pub fn split_proper<T: Scalar>(num: &[T], den: &[T]) -> Result<ProperSplit<T>> {
    if num.is_empty() {
        return Err(ModelError::ZeroPolynomial { arg: "num" });
    }
    let den = strip_leading_zeros(den);
    if den.is_empty() {
        return Err(ModelError::ZeroPolynomial { arg: "den" });
    }
    let num = strip_leading_zeros(num);
    let n = den.len() - 1;
    if num.len() > den.len() {
        return Err(ModelError::Improper {
            num_degree: num.len() - 1,
            den_degree: n,
        });
    }
    let lead = den[0].clone();
    let monic: Vec<T> = den.iter().map(|c| c.div_exact(&lead)).collect();
    // Numerator padded to the denominator's power grid and scaled by the same leading coefficient.
    let mut b = vec![T::zero(); n + 1 - num.len()];
    b.extend(num.iter().map(|c| c.div_exact(&lead)));
    let direct = b[0].clone();
    let strict_num = (1..=n).map(|i| b[i].sub(&monic[i].mul(&direct))).collect();
    Ok(ProperSplit {
        den: monic,
        strict_num,
        direct,
    })
}
