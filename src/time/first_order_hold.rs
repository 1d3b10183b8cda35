//! The first-order (triangle) hold: with
//! `exp([[A T, B T, 0], [0, 0, I], [0, 0, 0]]) = [[Φ, Γ₁, Γ₂], [0, I, I], [0, 0, I]]`,
//! `A_d = Φ`, `B_d = Γ₁ − Γ₂ + Φ Γ₂`, `C_d = C`, `D_d = D + C Γ₂`.
//!
//! # Purpose
//! The exact discrete-time model of a continuous plant whose input is interpolated
//! linearly between samples (the non-causal triangle hold), and its inverse.
//!
//! # Method
//! Forward: one exponential of an (n+2m)×(n+2m) block matrix (Van Loan 1978; the blocks
//! Γ₁ = ∫₀ᵀ e^{Aτ} dτ B and Γ₂ = (1/T) ∫₀ᵀ e^{Aτ} (T − τ) dτ B). B is first scaled by a
//! power of two to the size of A (an exact diagonal similarity, undone afterwards).
//! Backward: `A = log(A_d) / T` by the principal logarithm; the blocks of the same
//! exponential with B replaced by I give `F₁, F₂` with `Γ_i = F_i B`, so
//! `B = (F₁ − F₂ + A_d F₂)⁻¹ B_d`, `C = C_d`, `D = D_d − C F₂ B`.
//!
//! # Numerical aspects
//! As for the zero-order hold ([`super::zero_order_hold`]): refusal of an eigenvalue of
//! A_d on the closed negative real axis, and verification of the inverse by discretizing
//! again (relative residual over all four matrices, limit 1e-8). The matrix
//! `F₁ − F₂ + A_d F₂` is refused when singular to working precision (κ₁ > 1/(n eps)).
//!
//! # References
//! G. F. Franklin, J. D. Powell and M. L. Workman, *Digital Control of Dynamic Systems*,
//! 3rd ed., 1998, sec. 6.3 (the triangle hold). C. F. Van Loan, IEEE Trans. Automat.
//! Control 23 (1978) (integrals of the exponential as blocks of one exponential).
//!
//! # Errors
//! As [`super::zero_order_hold`].

use super::dense::{
    checked_inverse, exponent_towards, from_na, norm1, require_finite_result, scale_pow2, to_na,
};
use super::exponential::exponential;
use super::logarithm::{check_principal_logarithm, principal_logarithm};
use super::zero_order_hold::{refuse_residual, relative_residual, Converted};
use crate::error::Result;
use crate::state_space::StateSpace;
use nalgebra::DMatrix;

/// `(Φ, Γ₁, Γ₂)` and the number of squarings.
type TriangleBlocks = (DMatrix<f64>, DMatrix<f64>, DMatrix<f64>, u32);

/// `(Φ, Γ₁, Γ₂)` for the input matrix b.
fn triangle_blocks(a: &DMatrix<f64>, b: &DMatrix<f64>, t: f64) -> Result<TriangleBlocks> {
    let (n, m) = (a.nrows(), b.ncols());
    let at = a * t;
    let mut bt = b * t;
    require_finite_result("a * sample_time", &at)?;
    require_finite_result("b * sample_time", &bt)?;
    let e = exponent_towards(norm1(&bt), norm1(&at).max(f64::MIN_POSITIVE));
    scale_pow2(&mut bt, e);
    let size = n + 2 * m;
    let mut block = DMatrix::<f64>::zeros(size, size);
    block.view_mut((0, 0), (n, n)).copy_from(&at);
    block.view_mut((0, n), (n, m)).copy_from(&bt);
    block
        .view_mut((n, n + m), (m, m))
        .copy_from(&DMatrix::<f64>::identity(m, m));
    let exp = exponential(&block)?;
    let phi = exp.value.view((0, 0), (n, n)).into_owned();
    let mut g1 = exp.value.view((0, n), (n, m)).into_owned();
    let mut g2 = exp.value.view((0, n + m), (n, m)).into_owned();
    scale_pow2(&mut g1, -e);
    scale_pow2(&mut g2, -e);
    require_finite_result("the first-order-hold input matrix", &g1)?;
    require_finite_result("the first-order-hold input matrix", &g2)?;
    Ok((phi, g1, g2, exp.squarings))
}

fn discretize(
    a: &DMatrix<f64>,
    b: &DMatrix<f64>,
    c: &DMatrix<f64>,
    d: &DMatrix<f64>,
    t: f64,
) -> Result<([DMatrix<f64>; 4], u32)> {
    let (phi, g1, g2, squarings) = triangle_blocks(a, b, t)?;
    let bd = &g1 - &g2 + &phi * &g2;
    let dd = d + c * &g2;
    require_finite_result("the first-order-hold model", &bd)?;
    require_finite_result("the first-order-hold model", &dd)?;
    Ok(([phi, bd, c.clone(), dd], squarings))
}

/// The first-order-hold discretization with sample time `t`.
pub fn to_discrete(ss: &StateSpace<f64>, t: f64) -> Result<Converted> {
    let [a, b, c, d] = [&ss.a, &ss.b, &ss.c, &ss.d].map(to_na);
    let ([ad, bd, _, dd], squarings) = discretize(&a, &b, &c, &d, t)?;
    Ok(Converted {
        realization: StateSpace {
            a: from_na(&ad),
            b: from_na(&bd),
            c: ss.c.clone(),
            d: from_na(&dd),
        },
        info: vec![("squarings", squarings as f64)],
    })
}

/// The continuous model whose first-order hold with sample time `t` is `ss`.
pub fn to_continuous(ss: &StateSpace<f64>, t: f64) -> Result<Converted> {
    let [ad, bd, cd, dd] = [&ss.a, &ss.b, &ss.c, &ss.d].map(to_na);
    let n = ad.nrows();
    check_principal_logarithm(&ad, "a", "of the discrete model")?;
    let log = principal_logarithm(&ad)?;
    let a = &log.value * (1.0 / t);
    require_finite_result("the continuous-time model", &a)?;
    let (_, f1, f2, _) = triangle_blocks(&a, &DMatrix::identity(n, n), t)?;
    let k = &f1 - &f2 + &ad * &f2;
    let (k_inv, condition) = checked_inverse(&k, "the first-order-hold input map F1 - F2 + A F2")?;
    let b = &k_inv * &bd;
    let d = &dd - &cd * (&f2 * &b);
    require_finite_result("the continuous-time model", &b)?;
    require_finite_result("the continuous-time model", &d)?;
    let ([ad2, bd2, _, dd2], _) = discretize(&a, &b, &cd, &d, t)?;
    let residual = relative_residual(&ad2, &ad)
        .max(relative_residual(&bd2, &bd))
        .max(relative_residual(&dd2, &dd));
    refuse_residual(residual)?;
    Ok(Converted {
        realization: StateSpace {
            a: from_na(&a),
            b: from_na(&b),
            c: ss.c.clone(),
            d: from_na(&d),
        },
        info: vec![
            ("square_roots", log.square_roots as f64),
            ("condition", condition),
            ("residual", residual),
        ],
    })
}
