//! DC gain: the steady-state gain of a stable or unstable model without a pole at s = 0
//! (continuous time) or z = 1 (discrete time).
//!
//! `G(0) = D − C A⁻¹ B` (continuous time), `G(1) = D + C (I − A)⁻¹ B` (discrete time).
//!
//! # Purpose
//! The p × m matrix `G(0)` (or `G(1)`), refused when the model has a pole there that the
//! inputs steer and the outputs see (then the gain is infinite).
//!
//! # Method
//! `M = −A` (or `I − A`) of the model balanced by powers of two (exact, Parlett & Reinsch
//! 1969). When M is numerically singular (`σ_min(M) ≤ n eps ‖M‖_F`, from its SVD), the
//! pole at 0 (or 1) may be uncontrollable or unobservable and so absent from G: the model
//! is replaced by its minimal realization (orthogonal staircases) and M is tested again;
//! a minimal realization that removed nothing, or whose M is singular within sqrt(eps)
//! (the reduction's rounding moves a pole at 0 or 1 by more than n eps), has a true pole
//! there and the gain is refused. Otherwise `X = M⁻¹ B` is
//! obtained by an LU solve with partial pivoting (never an explicit inverse) and
//! `G = D + C X`.
//!
//! # Numerical aspects
//! The LU solve is backward stable for M of moderate condition; the relative residual
//! `‖M X − B‖_F / (‖M‖_F ‖X‖_F + ‖B‖_F)` and the condition number of M are returned in
//! [`DcGainInfo`]. A pole close to, but not at, 0 gives a large but finite gain.
//!
//! # References
//! G. H. Golub and C. F. Van Loan, *Matrix Computations*, 4th ed., §3.4 (LU with partial
//! pivoting); the minimal realization as in [`crate::structure::minimal`].
//!
//! # Errors
//! `Shape` / `NonFinite` for bad input; `BadValue { arg: "a" }` naming the pole at s = 0
//! (z = 1) when the gain is infinite; `Overflow` when the finite gain is beyond the float64
//! range; `NoConvergence` if an SVD fails.

use crate::error::{ModelError, Result};
use crate::matrix::{frobenius_norm, Matrix};
use crate::state_space::StateSpace;
use crate::structure::minimal::minimal_realization;
use crate::structure::{from_faer, to_faer};
use faer::prelude::*;

/// What the gain was computed on.
#[derive(Debug, Clone, PartialEq)]
pub struct DcGainInfo {
    /// 2-norm condition number of M (1 for a model without states).
    pub condition: f64,
    /// Relative residual of the solve.
    pub residual: f64,
    /// True when the minimal realization was needed (a cancelled pole at 0 or 1).
    pub reduced: bool,
}

pub fn dc_gain(ss: &StateSpace<f64>, discrete: bool) -> Result<(Matrix<f64>, DcGainInfo)> {
    super::pencil::check_input(ss)?;
    let (bal, _) = crate::balance::balance_model(ss);
    if let Some(out) = try_gain(&bal, discrete)? {
        return Ok((
            out.0,
            DcGainInfo {
                condition: out.1,
                residual: out.2,
                reduced: false,
            },
        ));
    }
    let minimal = minimal_realization(ss, None)?.realization;
    // Nothing removed: the pole that made M singular is steered and seen, so G has it.
    // Something removed: a pole left at 0 (or 1) is perturbed by the reduction's
    // rounding, so the reduced M is judged singular within sqrt(eps), not n eps (a model
    // with a pole exactly at 1 came back with a "gain" of 3e15 under the tighter test).
    let reduced_singular = if minimal.n_states() == ss.n_states() {
        None
    } else {
        let (bal, _) = crate::balance::balance_model(&minimal);
        try_gain_within(&bal, discrete, REDUCED_SINGULARITY)?
    };
    match reduced_singular {
        Some(out) => Ok((
            out.0,
            DcGainInfo {
                condition: out.1,
                residual: out.2,
                reduced: true,
            },
        )),
        None => Err(ModelError::BadValue {
            arg: "a",
            detail: if discrete {
                "the model has a pole at z = 1 (a discrete integrator) that the inputs steer and the \
                 outputs see, so the DC gain G(1) is infinite"
                    .into()
            } else {
                "the model has a pole at s = 0 (an integrator) that the inputs steer and the outputs \
                 see, so the DC gain G(0) is infinite"
                    .into()
            },
        }),
    }
}

/// Relative distance from singularity below which the reduced model's M is singular:
/// sqrt(eps), for the rounding the reduction adds to a pole at 0 or 1.
const REDUCED_SINGULARITY: f64 = 1.4901161193847656e-8;

/// `Some((G, condition, residual))`, or `None` when M is numerically singular
/// (`σ_min(M) ≤ n eps ‖M‖_F`).
fn try_gain(ss: &StateSpace<f64>, discrete: bool) -> Result<Option<(Matrix<f64>, f64, f64)>> {
    try_gain_within(ss, discrete, ss.n_states() as f64 * f64::EPSILON)
}

/// As [`try_gain`], with M singular when `σ_min(M) ≤ relative ‖M‖_F`.
fn try_gain_within(
    ss: &StateSpace<f64>,
    discrete: bool,
    relative: f64,
) -> Result<Option<(Matrix<f64>, f64, f64)>> {
    let n = ss.n_states();
    if n == 0 {
        return Ok(Some((ss.d.clone(), 1.0, 0.0)));
    }
    let m = Mat::<f64>::from_fn(n, n, |i, j| {
        let a = *ss.a.get(i, j);
        if discrete {
            f64::from(u8::from(i == j)) - a
        } else {
            -a
        }
    });
    let s = m.singular_values().map_err(|_| ModelError::NoConvergence {
        routine: "the SVD of the DC-gain matrix",
    })?;
    let (top, low) = (s[0], s[n - 1]);
    let m_norm = frobenius_norm(&(0..n * n).map(|x| m[(x / n, x % n)]).collect::<Vec<_>>());
    if low.is_nan() || low <= relative * m_norm {
        return Ok(None);
    }
    let b = to_faer(&ss.b);
    let x = m.partial_piv_lu().solve(&b);
    let resid = &m * &x - &b;
    let flat = |z: &Mat<f64>| {
        (0..z.nrows() * z.ncols())
            .map(|k| z[(k / z.ncols(), k % z.ncols())])
            .collect::<Vec<_>>()
    };
    let (xn, bn, rn) = (
        frobenius_norm(&flat(&x)),
        frobenius_norm(&flat(&b)),
        frobenius_norm(&flat(&resid)),
    );
    let scale = m_norm * xn + bn;
    let residual = if scale > 0.0 { rn / scale } else { 0.0 };
    let g = &to_faer(&ss.d) + &to_faer(&ss.c) * &x;
    let g = from_faer(g.as_ref());
    if !g.as_slice().iter().all(|v| v.is_finite()) {
        return Err(ModelError::Overflow {
            what: "the DC gain".into(),
        });
    }
    Ok(Some((g, top / low, residual)))
}
