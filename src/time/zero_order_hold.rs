//! The zero-order hold: `exp([[A, B], [0, 0]] T) = [[A_d, B_d], [0, I]]`, i.e.
//! `A_d = exp(A T)`, `B_d = ∫₀ᵀ exp(A τ) dτ B`, `C_d = C`, `D_d = D`.
//!
//! # Purpose
//! The exact discrete-time model of a continuous plant whose input is held constant over
//! each sampling interval of T seconds, and its inverse: the continuous model behind a
//! discrete one (for example one identified from sampled data), whose poles are time
//! constants in seconds.
//!
//! # Method
//! Forward: the exponential of the one (n+m)×(n+m) block matrix (Van Loan 1978), by
//! [`super::exponential`]; no inverse of A is needed, so integrators and singular A are
//! ordinary cases. Backward: the principal logarithm of `[[A_d, B_d], [0, I]]` by
//! [`super::logarithm`], whose blocks are `[[A T, B T], [0, 0]]`. Before either, B (or
//! B_d) is scaled by a power of two to the size of A: an exact diagonal similarity of the
//! block matrix, undone exactly afterwards, that keeps a large or small B from driving the
//! number of squarings (or square roots).
//!
//! # Numerical aspects
//! Forward: the accuracy of the exponential (backward error of order eps ‖AT‖). Backward:
//! the principal logarithm exists and is real exactly when no eigenvalue of A_d lies on
//! the closed negative real axis; such an eigenvalue is refused by name (a pole at 0 or a
//! negative real pole of a discrete model has no zero-order-hold continuous equivalent).
//! Eigenvalues of A_d near 0 (continuous poles much faster than 1/T) make the logarithm
//! ill-conditioned. The result is verified by discretizing it again: the relative
//! residual `max(‖A_d' − A_d‖_F / ‖A_d‖_F, ‖B_d' − B_d‖_F / ‖B_d‖_F)` is reported and the
//! result refused when it exceeds [`RESIDUAL_LIMIT`] = 1e-8.
//! A continuous model with eigenvalues whose imaginary parts exceed π/T (beyond the
//! Nyquist frequency) discretizes fine, but going back returns the principal (aliased)
//! model, not the original: the round trip is the identity only below the Nyquist frequency.
//!
//! # References
//! C. F. Van Loan, "Computing integrals involving the matrix exponential", IEEE Trans.
//! Automat. Control 23 (1978) 395–404. G. F. Franklin, J. D. Powell and M. L. Workman,
//! *Digital Control of Dynamic Systems*, 3rd ed., 1998, ch. 4 and 6.
//!
//! # Errors
//! As [`super::exponential`] and [`super::logarithm`]; `BadValue` on `a` naming the
//! eigenvalue on the closed negative real axis; `NoConvergence` when the verification
//! residual is above the limit.

use super::dense::{
    exponent_towards, from_na, norm1, norm_fro, require_finite_result, scale_pow2, to_na,
};
use super::exponential::{exponential, exponential_small, with_small_order, Small, SMALL};
use super::logarithm::{check_principal_logarithm, principal_logarithm};
use crate::error::{ModelError, Result};
use crate::matrix::Matrix;
use crate::state_space::StateSpace;
use nalgebra::DMatrix;

/// Largest accepted relative residual of the verification of an inverse conversion.
pub const RESIDUAL_LIMIT: f64 = 1e-8;

/// A converted model and the figures of the computation, by name.
#[derive(Debug, Clone)]
pub struct Converted {
    pub realization: StateSpace<f64>,
    pub info: Vec<(&'static str, f64)>,
}

/// `(A_d, B_d)` of the zero-order hold and the figures of the exponential.
pub(crate) fn hold_matrices(
    a: &DMatrix<f64>,
    b: &DMatrix<f64>,
    t: f64,
) -> Result<(DMatrix<f64>, DMatrix<f64>, usize, u32)> {
    let (n, m) = (a.nrows(), b.ncols());
    let at = a * t;
    let mut bt = b * t;
    require_finite_result("a * sample_time", &at)?;
    require_finite_result("b * sample_time", &bt)?;
    let e = exponent_towards(norm1(&bt), norm1(&at).max(f64::MIN_POSITIVE));
    scale_pow2(&mut bt, e);
    let mut block = DMatrix::<f64>::zeros(n + m, n + m);
    block.view_mut((0, 0), (n, n)).copy_from(&at);
    block.view_mut((0, n), (n, m)).copy_from(&bt);
    let exp = exponential(&block)?;
    let ad = exp.value.view((0, 0), (n, n)).into_owned();
    let mut bd = exp.value.view((0, n), (n, m)).into_owned();
    scale_pow2(&mut bd, -e);
    require_finite_result("the zero-order-hold input matrix", &bd)?;
    Ok((ad, bd, exp.pade_degree, exp.squarings))
}

/// Whether a model with `n` states and `m` inputs takes [`hold_small_into`] (the block
/// matrix fits the stack exponential).
pub fn fits_small(n: usize, m: usize) -> bool {
    n + m <= SMALL_HOLD
}

/// Largest `n + m` of the stack route (the stack exponential's largest order).
pub const SMALL_HOLD: usize = SMALL;

/// The zero-order hold of a small model (`n + m ≤` [`SMALL`]) without heap allocation:
/// `A_d` (n×n) and `B_d` (n×m), row-major, written into `ad` and `bd` from the row-major
/// `a` and `b`; returns the Padé degree and the number of squarings. The steps and errors
/// of the general route (power-of-two state balancing, then [`hold_matrices`], then the
/// result scaled back to the given coordinates) on fixed-size arrays. `C_d = C` and
/// `D_d = D` are the caller's (copied, never scaled). `a` and `b` must be finite.
pub fn hold_small_into(
    a: &[f64],
    b: &[f64],
    (n, m): (usize, usize),
    t: f64,
    ad: &mut [f64],
    bd: &mut [f64],
) -> Result<(usize, u32)> {
    debug_assert!(a.len() == n * n && b.len() == n * m && ad.len() == n * n && bd.len() == n * m);
    let k = n + m;
    with_small_order!(k, hold_small(a, b, (n, m), t, ad, bd))
}

fn hold_small<const K: usize>(
    a: &[f64],
    b: &[f64],
    (n, m): (usize, usize),
    t: f64,
    ad: &mut [f64],
    bd: &mut [f64],
) -> Result<(usize, u32)> {
    let overflow = |what: &str| ModelError::Overflow { what: what.into() };
    // Balanced states (S⁻¹ A S, S⁻¹ B), as the general route; the given model where the
    // scaling would overflow.
    let mut balanced = [0.0; SMALL * SMALL];
    let mut scale = [1.0; SMALL];
    let (sa, scale) = (&mut balanced[..n * n], &mut scale[..n]);
    sa.copy_from_slice(a);
    crate::balance::balance_in_place(sa, n, scale);
    let mut sb = [0.0; SMALL * SMALL];
    let sb = &mut sb[..n * m];
    sb.copy_from_slice(b);
    crate::balance::scale_ports_in_place(sb, &mut [], scale);
    if !sa.iter().chain(sb.iter()).all(|v| v.is_finite()) {
        sa.copy_from_slice(a);
        sb.copy_from_slice(b);
        scale.fill(1.0);
    }
    let mut block = Small::<K>::zeros();
    let column_sums = |block: &Small<K>, cols: std::ops::Range<usize>| {
        cols.map(|j| (0..n).map(|i| block.v[i][j].abs()).sum::<f64>())
            .fold(0.0, f64::max)
    };
    for (i, row) in block.v.iter_mut().take(n).enumerate() {
        for (x, y) in row[..n].iter_mut().zip(&sa[i * n..(i + 1) * n]) {
            *x = y * t;
        }
    }
    if !block.v[..n]
        .iter()
        .all(|r| r[..n].iter().all(|v| v.is_finite()))
    {
        return Err(overflow("a * sample_time"));
    }
    for (i, row) in block.v.iter_mut().take(n).enumerate() {
        for (x, y) in row[n..].iter_mut().zip(&sb[i * m..(i + 1) * m]) {
            *x = y * t;
        }
    }
    if !block.v[..n]
        .iter()
        .all(|r| r[n..].iter().all(|v| v.is_finite()))
    {
        return Err(overflow("b * sample_time"));
    }
    let e = exponent_towards(
        column_sums(&block, n..K),
        column_sums(&block, 0..n).max(f64::MIN_POSITIVE),
    );
    if e != 0 {
        let f = crate::matrix::pow2(e);
        for row in block.v.iter_mut().take(n) {
            row[n..].iter_mut().for_each(|v| *v *= f);
        }
    }
    let (value, degree, squarings) = exponential_small(&block)?;
    let back = crate::matrix::pow2(-e);
    for (i, row) in value.v[..n].iter().enumerate() {
        for j in 0..m {
            let v = row[n + j];
            bd[i * m + j] = if e != 0 { v * back } else { v };
        }
    }
    if !bd.iter().all(|v| v.is_finite()) {
        return Err(overflow("the zero-order-hold input matrix"));
    }
    // Back to the given state coordinates: S A_d S⁻¹ and S B_d (exact powers of two).
    for (i, row) in ad.chunks_mut(n.max(1)).enumerate() {
        row.copy_from_slice(&value.v[i][..n]);
    }
    crate::balance::unbalance_in_place(ad, bd, &mut [], scale)?;
    Ok((degree, squarings))
}

/// The zero-order hold of a small model, balanced and scaled back by [`hold_small_into`]
/// (the caller skips the general balancing step for it).
pub fn to_discrete_small(ss: &StateSpace<f64>, t: f64) -> Result<Converted> {
    let (n, m) = (ss.n_states(), ss.n_inputs());
    let (mut ad, mut bd) = (vec![0.0; n * n], vec![0.0; n * m]);
    let (degree, squarings) = hold_small_into(
        ss.a.as_slice(),
        ss.b.as_slice(),
        (n, m),
        t,
        &mut ad,
        &mut bd,
    )?;
    Ok(Converted {
        realization: StateSpace {
            a: Matrix::from_row_major(n, n, ad).expect("shape"),
            b: Matrix::from_row_major(n, m, bd).expect("shape"),
            c: ss.c.clone(),
            d: ss.d.clone(),
        },
        info: vec![
            ("pade_degree", degree as f64),
            ("squarings", squarings as f64),
        ],
    })
}

/// The zero-order-hold discretization with sample time `t` (the general route, on a
/// model the caller has balanced; small models take [`to_discrete_small`]).
pub fn to_discrete(ss: &StateSpace<f64>, t: f64) -> Result<Converted> {
    let (a, b) = (to_na(&ss.a), to_na(&ss.b));
    let (ad, bd, degree, squarings) = hold_matrices(&a, &b, t)?;
    Ok(Converted {
        realization: StateSpace {
            a: from_na(&ad),
            b: from_na(&bd),
            c: ss.c.clone(),
            d: ss.d.clone(),
        },
        info: vec![
            ("pade_degree", degree as f64),
            ("squarings", squarings as f64),
        ],
    })
}

/// Relative distance of `x` from `reference` in the Frobenius norm (absolute when the
/// reference is zero).
pub(crate) fn relative_residual(x: &DMatrix<f64>, reference: &DMatrix<f64>) -> f64 {
    let scale = norm_fro(reference);
    let diff = norm_fro(&(x - reference));
    if scale > 0.0 {
        diff / scale
    } else {
        diff
    }
}

pub(crate) fn refuse_residual(residual: f64) -> Result<()> {
    if residual.is_finite() && residual <= RESIDUAL_LIMIT {
        Ok(())
    } else {
        Err(ModelError::NoConvergence {
            routine: "the continuous-time model (its discretization does not reproduce the given model to 1e-8; \
                      the logarithm is too ill-conditioned here)",
        })
    }
}

/// The continuous model whose zero-order hold with sample time `t` is `ss`.
pub fn to_continuous(ss: &StateSpace<f64>, t: f64) -> Result<Converted> {
    let (ad, bd) = (to_na(&ss.a), to_na(&ss.b));
    let (n, m) = (ad.nrows(), bd.ncols());
    check_principal_logarithm(&ad, "a", "of the discrete model")?;
    let mut bs = bd.clone();
    let e = exponent_towards(norm1(&bs), norm1(&ad).max(f64::MIN_POSITIVE));
    scale_pow2(&mut bs, e);
    let mut block = DMatrix::<f64>::identity(n + m, n + m);
    block.view_mut((0, 0), (n, n)).copy_from(&ad);
    block.view_mut((0, n), (n, m)).copy_from(&bs);
    let log = principal_logarithm(&block)?;
    let inv_t = 1.0 / t;
    let a = log.value.view((0, 0), (n, n)) * inv_t;
    let mut b = log.value.view((0, n), (n, m)) * inv_t;
    scale_pow2(&mut b, -e);
    require_finite_result("the continuous-time model", &a)?;
    require_finite_result("the continuous-time model", &b)?;
    let (ad2, bd2, _, _) = hold_matrices(&a, &b, t)?;
    let residual = relative_residual(&ad2, &ad).max(relative_residual(&bd2, &bd));
    refuse_residual(residual)?;
    Ok(Converted {
        realization: StateSpace {
            a: from_na(&a),
            b: from_na(&b),
            c: ss.c.clone(),
            d: ss.d.clone(),
        },
        info: vec![
            ("square_roots", log.square_roots as f64),
            ("residual", residual),
        ],
    })
}
