//! Minimal realization: the controllable and observable part.
//!
//! # Purpose
//! `(A_m, B_m, C_m, D)` with the same transfer function as `(A, B, C, D)` and no state
//! fewer than needed (controllable and observable), reached by an exact diagonal scaling
//! and orthogonal transformations.
//!
//! # Method
//! The model is first balanced by a diagonal power-of-two similarity S (Parlett & Reinsch
//! 1969; exact, and it shrinks the rounding errors of badly scaled models such as companion
//! forms, by orders of magnitude). The controllability staircase then keeps the controllable part `(A_c, B_c, C_c)`; the
//! observability staircase of that part keeps its observable part. Both are orthogonal
//! similarities, so `C_m (sI − A_m)⁻¹ B_m = C (sI − A)⁻¹ B` up to the discarded blocks of
//! norm at most tol (Kalman 1963; Van Dooren 1981).
//!
//! # Numerical aspects
//! Default tol (scale invariant, API version 2): each staircase step is judged against the
//! norm of its own data block of the balanced model: the first controllability step keeps
//! the singular values of `B̂` above `n² eps ‖B̂‖_F` (`B̂` = B with its columns scaled by
//! powers of two to one exponent), later steps those above `n² eps ‖A‖_F`; the
//! observability pass is the dual (rows of C). n is the order of the full model. So the
//! decisions are unchanged when inputs, outputs or states are scaled (states: the
//! power-of-two balancing absorbs a diagonal scaling), and under orthogonal coordinates up
//! to rounding.
//!
//! Verification: the result's Markov parameters are compared with the model's
//! ([`super::verify::markov_residual`], threshold [`super::verify::markov_tolerance`]
//! `= 200 n² eps`). Under the default, a rounding-level singular value that the reduction
//! amplified above `n² eps` (an exact cancellation hidden in dense coordinates) is found by
//! trying the relative factors of the kept singular values between `n² eps` and `sqrt(eps)`
//! (largest first, at most four per result, eight in all; the kept singular values of a
//! passing candidate give the next candidates): the smallest model found that passes is
//! returned.
//! If the default result fails it, the reduction by exact zeros only (tol 0) is tried, and
//! if that fails too the call is refused with `Unverified`. With an explicit tol (absolute,
//! on the balanced model, every step) the result is refused when its residual exceeds
//! `max(200 n² eps, min(1/2, 100 tol / min(‖A‖_F, ‖B‖_F, ‖C‖_F)))` (the balanced norms):
//! removing states whose effect is far above what tol allows (or more than half of the
//! response) is not a reduction at that tol.
//!
//! # References
//! R. E. Kalman, "Mathematical description of linear dynamical systems", SIAM J. Control 1
//! (1963). P. Van Dooren, IEEE Trans. Automat. Control 26 (1981).

use super::staircase::{
    check_tol, default_factor, frobenius, leading_part, observability_with, staircase_with,
    Staircase, Tolerance,
};
use super::verify::{markov_residual, markov_tolerance};
use crate::balance::balance_model;
use crate::error::{require_finite, ModelError, Result};
use crate::state_space::StateSpace;

/// The minimal part, the two staircases it came from and the verification figures.
pub struct Minimal {
    pub realization: StateSpace<f64>,
    pub controllability: Staircase,
    pub observability: Staircase,
    /// The Markov-parameter residual of the result against the model.
    pub markov_residual: f64,
    /// The threshold it was accepted against.
    pub markov_tolerance: f64,
    /// The relative factor the decisions were made with (`n² eps` by default, larger
    /// when a candidate split passed the check, 0 for the reduction by exact zeros); NaN
    /// for an explicit tol.
    pub factor: f64,
}

pub(crate) fn check_model(ss: &StateSpace<f64>) -> Result<()> {
    for (arg, m) in [("a", &ss.a), ("b", &ss.b), ("c", &ss.c), ("d", &ss.d)] {
        require_finite(arg, m.as_slice())?;
    }
    Ok(())
}

/// Largest candidate relative factor tried under the default tol.
pub(crate) const CANDIDATE_CEILING: f64 = 1.4901161193847656e-8; // sqrt(eps)
/// At most this many candidate factors are taken from one result.
pub(crate) const MAX_CANDIDATES: usize = 4;
/// At most this many candidate reductions are tried in all.
pub(crate) const MAX_TRIES: usize = 8;

/// The relative factors of kept singular values in `(f0, CANDIDATE_CEILING]`, largest first
/// (`f0` the factor the staircases were judged with).
pub(crate) fn candidate_factors(staircases: &[&Staircase], f0: f64) -> Vec<f64> {
    let mut out: Vec<f64> = Vec::new();
    for st in staircases {
        for step in &st.steps {
            if step.threshold <= 0.0 {
                continue;
            }
            let scale = step.threshold / f0;
            for &s in &step.singular_values[..step.kept] {
                // a hair above the value, so that the value itself is discarded
                let r = s / scale * (1.0 + 1e-12);
                if r > f0 && r <= CANDIDATE_CEILING {
                    out.push(r);
                }
            }
        }
    }
    out.sort_by(|x, y| y.total_cmp(x));
    out.dedup();
    out.truncate(MAX_CANDIDATES);
    out
}

/// The two staircase passes on the balanced model with decisions judged by `t`.
fn passes(bal: &StateSpace<f64>, t: Tolerance) -> Result<Minimal> {
    let sc = staircase_with(&bal.a, &bal.b, Some(&bal.c), t, None)?;
    // the eigenvector-guided split of the default (PBH test, verified; see the staircase)
    let sc = super::staircase::with_eigenvector_split(&bal.a, &bal.b, Some(&bal.c), t, sc)?;
    let (a1, b1, c1) = leading_part(&sc.a, &sc.b, sc.c.as_ref().expect("carried"), sc.rank);
    let so = observability_with(&a1, Some(&b1), &c1, t, Some((&bal.a, &bal.c)))?;
    let (a2, b2, c2) = leading_part(&so.a, &so.b, so.c.as_ref().expect("carried"), so.rank);
    let realization = StateSpace {
        a: a2,
        b: b2,
        c: c2,
        d: bal.d.clone(),
    };
    let markov = markov_residual(bal, &realization);
    Ok(Minimal {
        realization,
        controllability: sc,
        observability: so,
        markov_residual: markov,
        markov_tolerance: markov_tolerance(bal.n_states()),
        factor: match t {
            Tolerance::Relative(f) => f,
            Tolerance::Absolute(_) => f64::NAN,
        },
    })
}

/// What the default minimal realization computed on the balanced model that the Kalman
/// decomposition of the same model needs as well (the same balancing, the same calls): passed
/// down instead of recomputed.
#[derive(Default)]
pub(crate) struct Shared {
    /// The controllability staircase and the observability staircase of its controllable
    /// part at the default factor `n² eps` (what [`passes`] computed there).
    pub at_default: Option<(Staircase, Staircase)>,
    /// The rank of the default observability staircase of the whole balanced model (the
    /// guard of [`within_the_ranks`]): `None` when not computed, `Some(None)` when it failed.
    pub observable: Option<Option<usize>>,
}

impl Shared {
    /// The default observability rank of the whole balanced model, computed once.
    pub fn observable_rank(&mut self, bal: &StateSpace<f64>) -> Option<usize> {
        *self.observable.get_or_insert_with(|| {
            super::staircase::observability_staircase(&bal.a, None, &bal.c, None)
                .map(|o| o.rank)
                .ok()
        })
    }
}

/// The default result must not keep more states than the default observability staircase
/// of the whole (balanced) model finds observable: the reduction of the controllable part can miss
/// unobservable states there, and the Markov check cannot see kept states.
fn within_the_ranks(bal: &StateSpace<f64>, m: Minimal, shared: &mut Shared) -> Result<Minimal> {
    let order = m.realization.n_states();
    if let Some(rank) = shared.observable_rank(bal) {
        if order > rank {
            return Err(ModelError::Unverified {
                what: "the minimal realization",
                detail: format!(
                    "the reduction kept {order} states where the observability staircase of the \
                     whole model finds only {rank} observable: the default decisions on the \
                     controllable part missed unobservable states; pass an explicit tol"
                ),
            });
        }
    }
    Ok(m)
}

pub fn minimal_realization(ss: &StateSpace<f64>, tol: Option<f64>) -> Result<Minimal> {
    super::staircase::with_eigen_cache(|| minimal_realization_in(ss, tol))
}

fn minimal_realization_in(ss: &StateSpace<f64>, tol: Option<f64>) -> Result<Minimal> {
    check_model(ss)?;
    check_tol(tol)?;
    // Decide and reduce on the balanced model: its rounding errors are the smallest.
    let (bal, _) = balance_model(ss);
    let n = ss.n_states();
    let vt = markov_tolerance(n);
    if let Some(x) = tol {
        let m = passes(&bal, Tolerance::Absolute(x))?;
        let norm = [&bal.a, &bal.b, &bal.c]
            .iter()
            .map(|m| frobenius(m))
            .filter(|v| *v > 0.0)
            .fold(f64::INFINITY, f64::min);
        let allowed = vt.max((100.0 * x / norm).min(0.5));
        if m.markov_residual > allowed {
            return Err(ModelError::Unverified {
                what: "the minimal realization",
                detail: format!(
                    "at tol={x:.3e} the reduced model's Markov parameters differ from the model's by \
                     {:.3e} relative (allowed {allowed:.3e}): tol removes states that matter; pass a \
                     smaller tol or none (the scale-invariant default)",
                    m.markov_residual
                ),
            });
        }
        return Ok(m);
    }
    minimal_default(&bal).0
}

/// The default (scale-invariant, verified) minimal realization of the balanced model `bal`,
/// and what it computed that the Kalman decomposition of the same model reuses.
pub(crate) fn minimal_default(bal: &StateSpace<f64>) -> (Result<Minimal>, Shared) {
    let mut shared = Shared::default();
    let result = minimal_default_with(bal, &mut shared);
    (result, shared)
}

fn minimal_default_with(bal: &StateSpace<f64>, shared: &mut Shared) -> Result<Minimal> {
    let n = bal.n_states();
    let vt = markov_tolerance(n);
    let f0 = default_factor(n);
    let m0 = passes(bal, Tolerance::Relative(f0))?;
    shared.at_default = Some((m0.controllability.clone(), m0.observability.clone()));
    // Search: each passing candidate gives the next candidates (its own kept singular
    // values above its factor); the smallest passing model found is returned.
    let mut frontier = candidate_factors(&[&m0.controllability, &m0.observability], f0);
    let m0_residual = m0.markov_residual;
    let mut best = (m0.markov_residual <= vt).then_some(m0);
    let mut tries = 0;
    while !frontier.is_empty() && tries < MAX_TRIES {
        let f = frontier.remove(0);
        tries += 1;
        let m = passes(bal, Tolerance::Relative(f))?;
        if m.markov_residual <= vt {
            frontier = candidate_factors(&[&m.controllability, &m.observability], f);
            if best
                .as_ref()
                .is_none_or(|b| m.realization.n_states() < b.realization.n_states())
            {
                best = Some(m);
            }
        }
    }
    if let Some(b) = best {
        return within_the_ranks(bal, b, shared);
    }
    let keep = passes(bal, Tolerance::Relative(0.0))?;
    if keep.markov_residual <= vt {
        return within_the_ranks(bal, keep, shared);
    }
    Err(ModelError::Unverified {
        what: "the minimal realization",
        detail: format!(
            "the reduced model's Markov parameters differ from the model's by {:.3e} relative at \
             the default tol and by {:.3e} with exact zeros only (threshold {vt:.3e}); the model is \
             too ill-conditioned to reduce reliably: pass an explicit tol",
            m0_residual, keep.markov_residual
        ),
    })
}
