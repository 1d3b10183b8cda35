//! The principal matrix logarithm: the unique real L with `exp(L) = A` whose eigenvalues
//! have imaginary parts in (−π, π), for a real A with no eigenvalue on the closed negative
//! real axis.
//!
//! # Purpose
//! The inverse of the matrix exponential, behind every conversion from discrete to
//! continuous time that passes through `exp(A T)` (zero-order and first-order hold,
//! impulse invariance).
//!
//! # Method
//! Inverse scaling and squaring (Kenney & Laub 1989; Cheng, Higham, Kenney & Laub 2001):
//! k square roots `A^(1/2^k)` until `‖A^(1/2^k) − I‖₁ ≤ 1/4`, each by the product form of
//! the Denman–Beavers iteration with determinant scaling (Higham 2008, eq. 6.29–6.30),
//! then `log A = 2^k r₈(A^(1/2^k) − I)` with `r₈` the [8/8] Padé approximant of
//! `log(1 + x)`, evaluated in partial fractions
//! `r₈(X) = Σ_j w_j X (I + x_j X)⁻¹` (x_j, w_j the 8-point Gauss–Legendre nodes and
//! weights on [0, 1]; Higham 2001).
//!
//! # Numerical aspects
//! The truncation error of r₈ at `‖X‖₁ ≤ 1/4` is below `|r₈(−1/4) − log(3/4)|` ≈ 1e-19
//! (Kenney & Laub 1989), far below rounding. The refusal test is on the eigenvalues of
//! the real Schur form: an eigenvalue with zero imaginary part and real part ≤ 0 is
//! refused, by name (there is no real logarithm, or no logarithm at all at 0). Eigenvalues
//! close to the negative real axis or to 0 make the logarithm ill-conditioned; the square
//! roots then converge slowly (the iteration is capped at 100 steps per root and 64
//! roots). Callers verify `exp(L) ≈ A` and report the residual. Cost: k (≈ log2 ‖A − I‖
//! + 3) square roots of about 6–10 inverses each, and 8 linear solves.
//!
//! # References
//! C. S. Kenney and A. J. Laub, "Condition estimates for matrix functions", SIAM J.
//! Matrix Anal. Appl. 10 (1989). S. H. Cheng, N. J. Higham, C. S. Kenney and A. J. Laub,
//! "Approximating the logarithm of a matrix to specified accuracy", SIAM J. Matrix Anal.
//! Appl. 22 (2001). N. J. Higham, "Evaluating Padé approximants of the matrix logarithm",
//! SIAM J. Matrix Anal. Appl. 22 (2001). N. J. Higham, *Functions of Matrices*, SIAM 2008,
//! ch. 6 and 11.
//!
//! # Errors
//! `BadValue` on `a` naming an eigenvalue on the closed negative real axis;
//! `NoConvergence` when a square root does not converge; `NonFinite` for bad entries.

use super::dense::{eigenvalues, norm1};
use crate::error::{ModelError, Result};
use nalgebra::DMatrix;

/// Degree of the Padé approximant and the bound on `‖X‖₁` it is used within.
const PADE_DEGREE: usize = 8;
const THETA: f64 = 0.25;
const MAX_ROOTS: usize = 64;
const MAX_ROOT_STEPS: usize = 100;

/// The logarithm and how it was reached.
#[derive(Debug, Clone)]
pub struct Logarithm {
    pub value: DMatrix<f64>,
    pub square_roots: usize,
}

/// Refuses a matrix with an eigenvalue on the closed negative real axis, naming it and
/// calling the matrix `arg` (`what` says which model it belongs to).
pub fn check_principal_logarithm(a: &DMatrix<f64>, arg: &'static str, what: &str) -> Result<()> {
    for (re, im) in eigenvalues(a)? {
        if im == 0.0 && re <= 0.0 {
            return Err(ModelError::BadValue {
                arg,
                detail: format!(
                    "eigenvalue {re:.6e}+0j {what} lies on the closed negative real axis: it has no real \
                     principal logarithm, so there is no real continuous-time equivalent"
                ),
            });
        }
    }
    Ok(())
}

/// The principal logarithm of `a` (see the module documentation).
pub fn logarithm(a: &DMatrix<f64>) -> Result<Logarithm> {
    let n = a.nrows();
    if !a.iter().all(|v| v.is_finite()) {
        return Err(ModelError::NonFinite { arg: "a" });
    }
    if n == 0 {
        return Ok(Logarithm {
            value: DMatrix::zeros(0, 0),
            square_roots: 0,
        });
    }
    check_principal_logarithm(a, "a", "of the matrix")?;
    principal_logarithm(a)
}

/// [`logarithm`] without the eigenvalue check, for callers that checked a smaller matrix
/// with the same eigenvalues off 1 (a block triangular one whose other block is I).
pub(crate) fn principal_logarithm(a: &DMatrix<f64>) -> Result<Logarithm> {
    let n = a.nrows();
    let ident = DMatrix::<f64>::identity(n, n);
    let mut root = a.clone();
    let mut k = 0;
    while norm1(&(&root - &ident)) > THETA {
        if k == MAX_ROOTS {
            return Err(ModelError::NoConvergence {
                routine: "the inverse scaling and squaring of the matrix logarithm",
            });
        }
        root = square_root(&root)?;
        k += 1;
    }
    let x = &root - &ident;
    let mut value = pade_logarithm(&x)?;
    value *= crate::matrix::pow2(k as i32);
    if !value.iter().all(|v| v.is_finite()) {
        return Err(ModelError::Overflow {
            what: "the matrix logarithm".into(),
        });
    }
    Ok(Logarithm {
        value,
        square_roots: k,
    })
}

/// The principal square root by the scaled product-form Denman–Beavers iteration:
/// `M₀ = X₀ = A`, `X ← ½ μ X (I + μ⁻² M⁻¹)`, `M ← ½ (I + (μ² M + μ⁻² M⁻¹)/2)`,
/// `μ = |det M|^(−1/(2n))` while `‖M − I‖₁ > 10⁻²`, else 1; X → A^(1/2), M → I.
fn square_root(a: &DMatrix<f64>) -> Result<DMatrix<f64>> {
    let n = a.nrows();
    let ident = DMatrix::<f64>::identity(n, n);
    let fail = || ModelError::NoConvergence {
        routine: "the matrix square root of the inverse scaling and squaring",
    };
    let mut m = a.clone();
    let mut x = a.clone();
    let mut previous = f64::INFINITY;
    for _ in 0..MAX_ROOT_STEPS {
        let distance = norm1(&(&m - &ident));
        let tol = (n as f64) * f64::EPSILON;
        if distance <= tol || (distance < 1e-6 && distance >= previous) {
            return Ok(x);
        }
        previous = distance;
        let lu = m.clone().lu();
        let mu = if distance > 1e-2 {
            let log_det: f64 = (0..n).map(|i| lu.u()[(i, i)].abs().ln()).sum();
            (-log_det / (2.0 * n as f64)).exp()
        } else {
            1.0
        };
        let inv = lu.try_inverse().ok_or_else(fail)?;
        if !mu.is_finite() || mu == 0.0 || !inv.iter().all(|v| v.is_finite()) {
            return Err(fail());
        }
        let inv_scaled = &inv / (mu * mu);
        x = (&x * (&ident + &inv_scaled)) * (0.5 * mu);
        m = (&ident + (&m * (mu * mu) + &inv_scaled) * 0.5) * 0.5;
    }
    Err(fail())
}

/// `r₈(X) = Σ_j w_j X (I + x_j X)⁻¹`, the [8/8] Padé approximant of `log(I + X)`.
fn pade_logarithm(x: &DMatrix<f64>) -> Result<DMatrix<f64>> {
    let n = x.nrows();
    let ident = DMatrix::<f64>::identity(n, n);
    let (nodes, weights) = gauss_legendre(PADE_DEGREE);
    let mut sum = DMatrix::<f64>::zeros(n, n);
    for (node, weight) in nodes.iter().zip(&weights) {
        let lhs = &ident + x * *node;
        // X (I + x_j X)⁻¹ = (I + x_j X)⁻¹ X: X commutes with I + x_j X.
        let term = lhs.lu().solve(x).ok_or(ModelError::NoConvergence {
            routine: "the Padé approximant of the matrix logarithm (singular term)",
        })?;
        sum += term * *weight;
    }
    Ok(sum)
}

/// Gauss–Legendre nodes and weights on [0, 1] (Newton's method on the Legendre polynomial).
pub(crate) fn gauss_legendre(m: usize) -> (Vec<f64>, Vec<f64>) {
    let mut nodes = Vec::with_capacity(m);
    let mut weights = Vec::with_capacity(m);
    for i in 0..m {
        let mut t = (std::f64::consts::PI * (i as f64 + 0.75) / (m as f64 + 0.5)).cos();
        let mut derivative = 1.0;
        for _ in 0..100 {
            // P_m(t) and P_m'(t) by the three-term recurrence.
            let (mut p0, mut p1) = (1.0, t);
            for k in 2..=m {
                let p2 = ((2 * k - 1) as f64 * t * p1 - (k - 1) as f64 * p0) / k as f64;
                p0 = p1;
                p1 = p2;
            }
            derivative = m as f64 * (t * p1 - p0) / (t * t - 1.0);
            let step = p1 / derivative;
            t -= step;
            if step.abs() < 1e-16 {
                break;
            }
        }
        nodes.push(0.5 * (1.0 + t));
        weights.push(1.0 / ((1.0 - t * t) * derivative * derivative));
    }
    (nodes, weights)
}

#[cfg(test)]
mod tests {
    use super::super::exponential::exponential;
    use super::*;

    #[test]
    fn gauss_legendre_integrates_polynomials_exactly() {
        // ∫₀¹ t^k dt = 1/(k+1) for k ≤ 2m − 1 (identity).
        let (x, w) = gauss_legendre(PADE_DEGREE);
        assert!((w.iter().sum::<f64>() - 1.0).abs() < 1e-15);
        for k in 0..(2 * PADE_DEGREE) {
            let q: f64 = x.iter().zip(&w).map(|(t, w)| w * t.powi(k as i32)).sum();
            assert!((q - 1.0 / (k as f64 + 1.0)).abs() < 1e-14, "k={k}");
        }
    }

    #[test]
    fn scalar_pade_is_accurate_at_the_bound() {
        // log(1 + x) at |x| = 1/4 (identity against the libm logarithm).
        for x in [-0.25, -0.1, 0.1, 0.25] {
            let m = DMatrix::from_row_slice(1, 1, &[x]);
            let r = pade_logarithm(&m).unwrap()[(0, 0)];
            assert!((r - f64::ln_1p(x)).abs() < 4e-16, "x={x}");
        }
    }

    #[test]
    fn logarithm_inverts_the_exponential() {
        // log(exp(L)) = L for L with eigenvalues of imaginary part in (−π, π) (identity).
        let l = DMatrix::from_row_slice(3, 3, &[-0.5, 2.0, 0.1, -2.0, -0.5, 0.3, 0.0, 0.4, -3.0]);
        let e = exponential(&l).unwrap().value;
        let back = logarithm(&e).unwrap();
        let err = (&back.value - &l).abs().max();
        assert!(err < 1e-12, "err={err}");
    }

    #[test]
    fn negative_real_eigenvalue_is_named() {
        let a = DMatrix::from_row_slice(2, 2, &[-0.5, 0.0, 0.0, 2.0]);
        let msg = logarithm(&a).unwrap_err().to_string();
        assert!(msg.contains("-5.000000e-1"), "{msg}");
        let a = DMatrix::from_row_slice(1, 1, &[0.0]);
        assert!(logarithm(&a).is_err());
    }
}
