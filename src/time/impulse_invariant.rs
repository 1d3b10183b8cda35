//! Impulse invariance: the discrete impulse response equals T times the samples of the
//! continuous one, `h_d[k] = T h_c(kT)`: `A_d = exp(A T)`, `B_d = A_d B T`, `C_d = C`,
//! `D_d = C B T`, for a strictly proper model (D = 0).
//!
//! # Purpose
//! A discretization that keeps the impulse response at the sampling instants (scaled by
//! T so that the DC level of a low-pass model is roughly kept), and its inverse.
//!
//! # Method
//! Forward: one exponential ([`super::exponential`]). Backward: `A = log(A_d) / T` by the
//! principal logarithm, `B = A_d⁻¹ B_d / T`, `C = C_d`, `D = 0`, after checking that
//! `D_d = C_d B T` (the feedthrough of an impulse-invariant model).
//!
//! # Numerical aspects
//! As for the zero-order hold (refusal on the closed negative real axis, verification by
//! discretizing again, relative residual limit 1e-8). The feedthrough check uses the same
//! relative limit against `‖D_d‖_F + ‖C_d‖_F ‖B‖_F T`. A_d is invertible whenever its
//! logarithm exists.
//!
//! # References
//! A. V. Oppenheim and R. W. Schafer, *Discrete-Time Signal Processing*, 3rd ed., 2010,
//! sec. 7.2 (impulse invariance); the state-space form as in scipy.signal.cont2discrete's
//! "impulse" method.
//!
//! # Errors
//! `BadValue` on `d` when D ≠ 0 going forward, or when `D_d ≠ C_d B T` going back; as
//! [`super::zero_order_hold`] otherwise.

use super::dense::{checked_inverse, from_na, norm_fro, require_finite_result, to_na};
use super::exponential::exponential;
use super::logarithm::{check_principal_logarithm, principal_logarithm};
use super::zero_order_hold::{refuse_residual, relative_residual, Converted, RESIDUAL_LIMIT};
use crate::error::{ModelError, Result};
use crate::state_space::StateSpace;
use nalgebra::DMatrix;

fn discretize(
    a: &DMatrix<f64>,
    b: &DMatrix<f64>,
    c: &DMatrix<f64>,
    t: f64,
) -> Result<([DMatrix<f64>; 3], u32)> {
    let at = a * t;
    require_finite_result("a * sample_time", &at)?;
    let exp = exponential(&at)?;
    let bd = &exp.value * b * t;
    let dd = c * b * t;
    require_finite_result("the impulse-invariant model", &bd)?;
    require_finite_result("the impulse-invariant model", &dd)?;
    Ok(([exp.value, bd, dd], exp.squarings))
}

/// The impulse-invariant discretization with sample time `t`; D must be zero.
pub fn to_discrete(ss: &StateSpace<f64>, t: f64) -> Result<Converted> {
    if ss.d.as_slice().iter().any(|&v| v != 0.0) {
        return Err(ModelError::BadValue {
            arg: "d",
            detail: "impulse invariance needs a strictly proper model (D = 0): a direct feedthrough is an impulse \
                     at t = 0, which has no samples"
                .into(),
        });
    }
    let [a, b, c] = [&ss.a, &ss.b, &ss.c].map(to_na);
    let ([ad, bd, dd], squarings) = discretize(&a, &b, &c, t)?;
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

/// The continuous model whose impulse-invariant discretization with sample time `t` is `ss`.
pub fn to_continuous(ss: &StateSpace<f64>, t: f64) -> Result<Converted> {
    let [ad, bd, cd, dd] = [&ss.a, &ss.b, &ss.c, &ss.d].map(to_na);
    check_principal_logarithm(&ad, "a", "of the discrete model")?;
    let log = principal_logarithm(&ad)?;
    let a = &log.value * (1.0 / t);
    let (ad_inv, _) = checked_inverse(&ad, "the discrete state matrix")?;
    let b = &ad_inv * &bd * (1.0 / t);
    require_finite_result("the continuous-time model", &a)?;
    require_finite_result("the continuous-time model", &b)?;
    let feedthrough = &cd * &b * t;
    let scale = norm_fro(&dd) + norm_fro(&cd) * norm_fro(&b) * t;
    let mismatch = norm_fro(&(&dd - &feedthrough));
    if mismatch > RESIDUAL_LIMIT * scale.max(f64::MIN_POSITIVE) {
        return Err(ModelError::BadValue {
            arg: "d",
            detail: format!(
                "an impulse-invariant discrete model has D = C B T; this one differs from it by {mismatch:.3e} \
                 (Frobenius norm), so it is no impulse-invariant image of a continuous model"
            ),
        });
    }
    let ([ad2, bd2, _], _) = discretize(&a, &b, &cd, t)?;
    let residual = relative_residual(&ad2, &ad).max(relative_residual(&bd2, &bd));
    refuse_residual(residual)?;
    let (p, m) = (cd.nrows(), bd.ncols());
    Ok(Converted {
        realization: StateSpace {
            a: from_na(&a),
            b: from_na(&b),
            c: ss.c.clone(),
            d: crate::matrix::Matrix::zeros(p, m),
        },
        info: vec![
            ("square_roots", log.square_roots as f64),
            ("residual", residual),
        ],
    })
}
