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
//! Default tol as the staircase (of the balanced pairs): `n² eps max(‖A‖_F, ‖B‖_F)` for the
//! controllability step and `n² eps max(‖A‖_F, ‖C‖_F)` for the observability step (n of the
//! full model). States that are uncontrollable or unobservable in the given coordinates
//! (exact zeros in the data) are always removed. An exact pole–zero cancellation hidden in
//! dense coordinates (e.g. a companion form) leaves a rounding-level singular value, which
//! the reduction can amplify above the default tol when the model is ill conditioned; the
//! singular values of both passes are returned, and a tol inside their gap decides it.
//! Near-cancellations are the caller's tol.
//!
//! # References
//! R. E. Kalman, "Mathematical description of linear dynamical systems", SIAM J. Control 1
//! (1963). P. Van Dooren, IEEE Trans. Automat. Control 26 (1981).

use super::staircase::{
    check_tol, controllability_staircase, default_tol, leading_part, observability_staircase,
    Staircase,
};
use crate::balance::balance_model;
use crate::error::{require_finite, Result};
use crate::state_space::StateSpace;

/// The minimal part and the two staircases it came from.
pub struct Minimal {
    pub realization: StateSpace<f64>,
    pub controllability: Staircase,
    pub observability: Staircase,
}

pub(crate) fn check_model(ss: &StateSpace<f64>) -> Result<()> {
    for (arg, m) in [("a", &ss.a), ("b", &ss.b), ("c", &ss.c), ("d", &ss.d)] {
        require_finite(arg, m.as_slice())?;
    }
    Ok(())
}

pub fn minimal_realization(ss: &StateSpace<f64>, tol: Option<f64>) -> Result<Minimal> {
    check_model(ss)?;
    check_tol(tol)?;
    // Decide and reduce on the balanced model: its rounding errors are the smallest.
    let (bal, _) = balance_model(ss);
    let tol_c = tol.unwrap_or_else(|| default_tol(&bal.a, &bal.b));
    let tol_o = tol.unwrap_or_else(|| default_tol(&bal.a, &bal.c));
    let sc = controllability_staircase(&bal.a, &bal.b, Some(&bal.c), Some(tol_c))?;
    let (a1, b1, c1) = leading_part(&sc.a, &sc.b, sc.c.as_ref().expect("carried"), sc.rank);
    let so = observability_staircase(&a1, Some(&b1), &c1, Some(tol_o))?;
    let (a2, b2, c2) = leading_part(&so.a, &so.b, so.c.as_ref().expect("carried"), so.rank);
    Ok(Minimal {
        realization: StateSpace {
            a: a2,
            b: b2,
            c: c2,
            d: ss.d.clone(),
        },
        controllability: sc,
        observability: so,
    })
}
