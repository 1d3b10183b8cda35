//! The rational maps between s and z: `s = (z − 1) / (T (α z + 1 − α))`, i.e.
//! `z = (1 + (1 − α) T s) / (1 − α T s)`, with α = 1/2 (bilinear), α = 0 (forward
//! difference) and α = 1 (backward difference); in state space
//! `A_d = (I − αTA)⁻¹ (I + (1 − α) T A)`, `B_d = (I − αTA)⁻¹ T B`, `C_d = C (I − αTA)⁻¹`,
//! `D_d = D + α C B_d`.
//!
//! # Purpose
//! Discretization by a substitution of s, which maps transfer functions to transfer
//! functions exactly: `G_d(z) = G_c(s(z))`. The bilinear map takes the stable half-plane
//! onto the unit disc; with a prewarp frequency ω₀ it matches the frequency responses at
//! ω₀ exactly (`G_d(exp(jω₀T)) = G_c(jω₀)`).
//!
//! # Method
//! The formulas above with one inverse of `I − αTA`. The inverse map uses
//! `N = αA_d + (1 − α) I`, which equals `(I − αTA)⁻¹`:
//! `A = N⁻¹ (A_d − I) / T`, `B = N⁻¹ B_d / T`, `C = C_d N⁻¹`, `D = D_d − α C B_d`.
//! Prewarping replaces T by the effective step `T' = 2 tan(ω₀ T / 2) / ω₀` (bilinear only;
//! 0 < ω₀ < π/T). The inverses are by Gauss–Jordan elimination with partial pivoting in
//! float64, or with the first nonzero pivot in exact rational arithmetic, where every step
//! is exact (no prewarping: tan is not rational).
//!
//! # Numerical aspects
//! In float64 the result carries the rounding error of one inverse: relative error of order
//! `κ₁(I − αTA) eps`, with κ₁ reported; the map is refused when the matrix to invert is
//! singular to working precision (κ₁ > 1/(n eps)): for the bilinear map an eigenvalue
//! `2/T` of A (or −1 of A_d going back), for the backward difference `1/T` (or 0 of A_d).
//!
//! # References
//! G. F. Franklin, J. D. Powell and M. L. Workman, *Digital Control of Dynamic Systems*,
//! 3rd ed., 1998, ch. 6 (the substitutions and prewarping). Zhang, Chen and Sheng, the
//! generalized bilinear transformation, as in scipy.signal.cont2discrete's "gbt" method
//! (the state-space formulas).
//!
//! # Errors
//! `BadValue` on `a` when the map is singular at A, on `prewarp_frequency` outside
//! (0, π/T); shape and finiteness errors from the checks at entry.

use crate::error::{ModelError, Result};
use crate::matrix::Matrix;
use crate::scalar::Scalar;
use crate::state_space::StateSpace;
use num_rational::BigRational;
use num_traits::{Signed, Zero};

/// Which rational map.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Substitution {
    Bilinear,
    ForwardDifference,
    BackwardDifference,
}

impl Substitution {
    /// α of the generalized map, as a ratio (numerator, denominator).
    fn alpha(self) -> (i64, i64) {
        match self {
            Substitution::Bilinear => (1, 2),
            Substitution::ForwardDifference => (0, 1),
            Substitution::BackwardDifference => (1, 1),
        }
    }

    pub fn singular_detail(self, forward: bool) -> &'static str {
        match (self, forward) {
            (Substitution::Bilinear, true) => {
                "I - (T/2) A is singular: A has the eigenvalue 2/T, which the bilinear map sends to infinity"
            }
            (Substitution::Bilinear, false) => {
                "A + I is singular: the discrete model has the eigenvalue -1, which the bilinear map sends to infinity"
            }
            (Substitution::BackwardDifference, true) => {
                "I - T A is singular: A has the eigenvalue 1/T, which the backward difference sends to infinity"
            }
            (Substitution::BackwardDifference, false) => {
                "A is singular: the discrete model has the eigenvalue 0, which the backward difference sends to infinity"
            }
            (Substitution::ForwardDifference, _) => "unreachable: the forward difference inverts nothing",
        }
    }
}

/// The arithmetic the maps need beyond [`Scalar`]: a pivot choice.
pub trait Field: Scalar {
    /// Larger is a better pivot; 0 means unusable.
    fn pivot_weight(&self) -> f64;
    fn from_ratio(p: i64, q: i64) -> Self {
        Self::from_i64(p).div_exact(&Self::from_i64(q))
    }
}

impl Field for f64 {
    fn pivot_weight(&self) -> f64 {
        self.abs()
    }
}

impl Field for BigRational {
    fn pivot_weight(&self) -> f64 {
        // Any nonzero pivot is exact; prefer the first one found.
        if Zero::is_zero(self) {
            0.0
        } else {
            1.0
        }
    }
}

/// `M⁻¹` by Gauss–Jordan elimination with the heaviest pivot in each column; `None` when
/// M is singular (a zero pivot column).
pub fn inverse<T: Field>(m: &Matrix<T>) -> Option<Matrix<T>> {
    let n = m.rows();
    let mut work = m.clone();
    let mut inv = Matrix::<T>::identity(n);
    for col in 0..n {
        let mut best = col;
        let mut weight = 0.0;
        for row in col..n {
            let w = work.get(row, col).pivot_weight();
            if w > weight {
                weight = w;
                best = row;
            }
        }
        if weight == 0.0 {
            return None;
        }
        swap_rows(&mut work, col, best);
        swap_rows(&mut inv, col, best);
        let pivot = work.get(col, col).clone();
        for j in 0..n {
            let w = work.get(col, j).div_exact(&pivot);
            work.set(col, j, w);
            let v = inv.get(col, j).div_exact(&pivot);
            inv.set(col, j, v);
        }
        for row in 0..n {
            if row == col || work.get(row, col).is_zero() {
                continue;
            }
            let factor = work.get(row, col).clone();
            for j in 0..n {
                let w = work.get(row, j).sub(&factor.mul(work.get(col, j)));
                work.set(row, j, w);
                let v = inv.get(row, j).sub(&factor.mul(inv.get(col, j)));
                inv.set(row, j, v);
            }
        }
    }
    Some(inv)
}

fn swap_rows<T: Scalar>(m: &mut Matrix<T>, i: usize, j: usize) {
    if i == j {
        return;
    }
    let cols = m.cols();
    let data = m.as_mut_slice();
    for k in 0..cols {
        data.swap(i * cols + k, j * cols + k);
    }
}

fn scaled<T: Scalar>(m: &Matrix<T>, f: &T) -> Matrix<T> {
    m.map(|x| x.mul(f))
}

fn plus<T: Scalar>(x: &Matrix<T>, y: &Matrix<T>) -> Matrix<T> {
    let data = x
        .as_slice()
        .iter()
        .zip(y.as_slice())
        .map(|(a, b)| a.add(b))
        .collect();
    Matrix::from_row_major(x.rows(), x.cols(), data).expect("same shape")
}

fn minus<T: Scalar>(x: &Matrix<T>, y: &Matrix<T>) -> Matrix<T> {
    plus(x, &y.map(|v| v.neg()))
}

/// The discrete model of `ss` under the map, with step `t` (the effective step when
/// prewarped). Returns the model and the inverted matrix (for condition figures).
pub fn to_discrete<T: Field>(
    ss: &StateSpace<T>,
    t: &T,
    map: Substitution,
) -> Result<(StateSpace<T>, Matrix<T>, Matrix<T>)> {
    let n = ss.n_states();
    let (p, q) = map.alpha();
    let alpha = T::from_ratio(p, q);
    let one_minus = T::from_ratio(q - p, q);
    let ident = Matrix::<T>::identity(n);
    let ta = scaled(&ss.a, t);
    let lhs = minus(&ident, &scaled(&ta, &alpha));
    let inv = if p == 0 {
        ident.clone()
    } else {
        inverse(&lhs).ok_or(ModelError::BadValue {
            arg: "a",
            detail: map.singular_detail(true).into(),
        })?
    };
    let a = inv.matmul(&plus(&ident, &scaled(&ta, &one_minus)));
    let b = inv.matmul(&scaled(&ss.b, t));
    let c = ss.c.matmul(&inv);
    let d = plus(&ss.d, &scaled(&ss.c.matmul(&b), &alpha));
    Ok((StateSpace { a, b, c, d }, lhs, inv))
}

/// The continuous model whose discretization under the map is `ss` (see the module
/// documentation). Returns the model and the inverted matrix N and its inverse.
pub fn to_continuous<T: Field>(
    ss: &StateSpace<T>,
    t: &T,
    map: Substitution,
) -> Result<(StateSpace<T>, Matrix<T>, Matrix<T>)> {
    let n = ss.n_states();
    let (p, q) = map.alpha();
    let alpha = T::from_ratio(p, q);
    let one_minus = T::from_ratio(q - p, q);
    let ident = Matrix::<T>::identity(n);
    let inv_t = T::one().div_exact(t);
    let big_n = plus(&scaled(&ss.a, &alpha), &scaled(&ident, &one_minus));
    let n_inv = if p == 0 {
        ident.clone()
    } else {
        inverse(&big_n).ok_or(ModelError::BadValue {
            arg: "a",
            detail: map.singular_detail(false).into(),
        })?
    };
    let a = scaled(&n_inv.matmul(&minus(&ss.a, &ident)), &inv_t);
    let b = scaled(&n_inv.matmul(&ss.b), &inv_t);
    let c = ss.c.matmul(&n_inv);
    let d = minus(&ss.d, &scaled(&c.matmul(&ss.b), &alpha));
    Ok((StateSpace { a, b, c, d }, big_n, n_inv))
}

/// The effective step `2 tan(ω₀ T / 2) / ω₀` of the prewarped bilinear map.
pub fn prewarped_step(sample_time: f64, prewarp_frequency: f64) -> Result<f64> {
    let half = 0.5 * prewarp_frequency * sample_time;
    if !(prewarp_frequency.is_finite()
        && prewarp_frequency > 0.0
        && half < std::f64::consts::FRAC_PI_2)
    {
        return Err(ModelError::BadValue {
            arg: "prewarp_frequency",
            detail: format!(
                "must lie strictly between 0 and the Nyquist frequency pi/sample_time = {:.6e} rad/s, found {}",
                std::f64::consts::PI / sample_time,
                prewarp_frequency
            ),
        });
    }
    Ok(2.0 * half.tan() / prewarp_frequency)
}

/// An exact sample time must be a positive rational.
pub fn check_exact_sample_time(t: &BigRational) -> Result<()> {
    if t.is_positive() {
        Ok(())
    } else {
        Err(ModelError::BadValue {
            arg: "sample_time",
            detail: format!("must be a positive number of seconds, found {t}"),
        })
    }
}
