//! Invariant zeros, transmission zeros and normal rank by reduction of the system pencil.
//!
//! The finite invariant zeros of `(A, B, C, D)` are the complex `z` at which the system
//! pencil `P(z) = [[A − zI, B], [C, D]]` ((n+p) × (n+m)) loses rank below its normal rank
//! `n + r`, where `r` is the normal rank of the transfer matrix `G(s) = C (sI − A)⁻¹ B + D`
//! (`P(s)` is equivalent to `diag(A − sI, G(s))` wherever `A − sI` is invertible).
//!
//! # Purpose
//! The finite zeros for square and non-square models alike, sorted by ascending real part,
//! then imaginary part; the normal rank `r`; the transmission zeros (invariant zeros of a
//! minimal realization, i.e. the zeros of `G` itself).
//!
//! # Method
//! Emami-Naeini & Van Dooren (1982). A reduction step on `(A, B, C, D)` (n states, p
//! outputs): an orthogonal `U` compresses the rows of D, `Uᵀ [C, D] = [[C₁, D₁], [C₂, 0]]`
//! with `D₁` of full row rank τ; the numerical rank ρ of `C₂` is taken from its SVD, and ρ
//! Householder reflections `V` map its row space onto the first ρ states, so
//! `C₂ V = [C̃, 0]` with `C̃` of full column rank ρ. In the pencil, the rows `[C̃, 0, 0]`
//! fix the first ρ states, which are eliminated together with those rows by unimodular row
//! operations; what is left is the pencil of the smaller system
//! `A' = A₂₂`, `B' = B₂`, `C' = [A₁₂; C₁₂]`, `D' = [B₁; D₁]` (blocks of `Vᵀ A V`, `Vᵀ B`,
//! `C₁ V` split after the first ρ states), with the same finite zeros and the normal rank
//! lowered by ρ. Rows of `C₂` beyond its rank are zero rows of the pencil and are dropped.
//! The steps repeat until ρ = 0; then D has full row rank. The same reduction of the dual
//! `(Aᵀ, Cᵀ, Bᵀ, Dᵀ)` leaves a system `(A_f, B_f, C_f, D_f)` with `D_f` square and
//! invertible. A QR factorization gives an orthogonal W with `[C_f, D_f] W = [0, D̃]`, and
//! the zeros are the generalized eigenvalues of `A_z − z B_z` with
//! `[A_z | ·] = [A_f, B_f] W`, `[B_z | ·] = [I, 0] W` (both `n_f × n_f`; `B_z` is
//! nonsingular because `det P_f(z)` has degree `n_f`), computed by faer's real QZ
//! algorithm (`linalg::gevd`). The normal rank is `n_r + p_r + Σρ − n` after the first
//! pass (`n_r` states and `p_r` outputs left).
//!
//! # Numerical aspects
//! Every transformation is orthogonal, so the computed zeros are the exact zeros of a
//! pencil within `tol + O(n eps)` of the data in norm (Emami-Naeini & Van Dooren 1982);
//! this is why they are far more accurate than the roots of the recovered numerator
//! polynomial for models with poles over several decades. Before reducing, the model is
//! balanced exactly by powers of two: each input column of `[B; D]` and each output row of
//! `[C, D]` to a largest magnitude in [1, 2), and the states by a Parlett–Reinsch sweep
//! over `[A, B]` rows and `[A; C]` columns (repeated while anything changes, at most 16
//! sweeps; a scaling that would leave an entry outside the normal range is skipped). The
//! zeros do not change under these scalings, and the rank decisions then do not depend on
//! the units of inputs, outputs or states: rescaling any of them by powers of two gives the
//! same decisions, by other factors the same decisions up to a factor 2 in the gap. When A's
//! largest magnitude is beyond 1e±150, A and B are first multiplied by a power of two k that
//! brings it near 1 (the zeros of (kA, kB, C, D) are k times the zeros; they are scaled
//! back). Every rank decision keeps the singular values above
//! `tol · ‖S‖_F`, S the balanced system matrix `[[A, B], [C, D]]`; `tol` is relative, its
//! default `N² eps` with `N = n + max(m, p)`. Exact structural zeros are found with the
//! default; near-cancellations are the caller's `tol`. Each decision's singular values are
//! kept in [`ZerosInfo::decisions`].
//!
//! Verification: for each zero z (all of them while the work stays below about 2·10⁸
//! flops, else an evenly spread subset) the singular value `σ_{n+r}` of the balanced
//! pencil `P(z)` is computed; relative to `‖S‖_F + |z| √n` it must stay below
//! `max(√eps, 10 N tol)`, else the result is refused. The largest relative residual is in
//! [`ZerosInfo::residual`]. For a SISO model (order ≤ 40) the zeros are first refined
//! against the numerator polynomial in double-double ([`super::refine`]; relative accuracy
//! for zeros far below `‖A‖`), and the refined zeros are the ones verified. Cost: O((n + m + p)³) for the reduction and QZ.
//!
//! Verified candidate search (default tol, non-square models or a normal rank below
//! min(m, p), where zeros are a non-generic structure): rounding amplified along the
//! reduction can land a singular value that exact data would make zero above the default
//! threshold, and the zeros it carries are then missed (29 of 480 planted non-square
//! models, against an exact Smith–McMillan reference). The kept values between the
//! threshold and `√eps ‖S‖_F` (at most 4, ascending) are tried as thresholds; a candidate
//! reduction is accepted when it keeps the normal rank, finds every zero of the current
//! result and more, and every cluster of q coincident zeros z makes the q smallest
//! relevant singular values of `P(z)` at most `100 N eps (‖S‖_F + |z| √n)`: each is then a
//! zero of geometric multiplicity q of a pencil within rounding of the data, which a
//! spurious zero of the cruder reduction is not (its values sit near the dropped one).
//! The accepted tol is [`ZerosInfo::candidate_tol`]. Every zero must be checkable within
//! the work budget, or no candidate is accepted.
//!
//! # References
//! A. Emami-Naeini and P. Van Dooren, "Computation of zeros of linear multivariable
//! systems", Automatica 18 (1982) 415–430. H. H. Rosenbrock, *State-space and
//! Multivariable Theory*, 1970 (the system matrix). C. B. Moler and G. W. Stewart, "An
//! algorithm for generalized matrix eigenvalue problems", SIAM J. Numer. Anal. 10 (1973)
//! (QZ). B. N. Parlett and C. Reinsch, Numer. Math. 13 (1969) (balancing).
//!
//! # Errors
//! `Shape` / `NonFinite` for bad input, `BadValue` for a negative or non-finite tol,
//! `TooLarge` beyond [`MAX_PENCIL`], `NoConvergence` if an SVD or the QZ iteration fails
//! or a reduction does not end square, `Overflow` for a zero beyond the float64 range,
//! `BadValue { arg: "a" }` when a computed zero fails the verification.

use super::{block, sort_complex, vstack};
use crate::error::{require_finite, ModelError, Result};
use crate::matrix::{frobenius_norm, pow2, range_exponent, Matrix};
use crate::state_space::StateSpace;
use crate::structure::householder::Reflector;
use crate::structure::minimal::minimal_realization;
use crate::structure::{hstack, to_faer};
use faer::c64;
use faer::diag::Diag;
use faer::dyn_stack::{MemBuffer, MemStack};
use faer::linalg::evd::ComputeEigenvectors;
use faer::linalg::gevd::{gevd_real, gevd_scratch};
use faer::prelude::*;

/// Largest `n + max(m, p)` accepted (refused before any work).
pub const MAX_PENCIL: usize = 2048;

/// Work budget (in flops, roughly) for verifying the zeros against the pencil.
const VERIFY_BUDGET: f64 = 2.0e8;

/// One rank decision of the reduction.
#[derive(Debug, Clone, PartialEq)]
pub struct Decision {
    /// `"feedthrough"` (the rank of D) or `"output"` (the rank of the rows left over).
    pub block: &'static str,
    /// Which pass: 1 (the model) or 2 (its dual).
    pub pass: u8,
    pub singular_values: Vec<f64>,
    pub kept: usize,
}

/// What the zeros were computed and checked on.
#[derive(Debug, Clone, PartialEq)]
pub struct ZerosInfo {
    /// The relative tolerance used.
    pub tol: f64,
    /// `‖S‖_F` of the balanced system matrix; decisions keep singular values above `tol · norm`.
    pub norm: f64,
    /// Normal rank of the transfer matrix.
    pub normal_rank: usize,
    /// Order of the regular pencil whose eigenvalues are the zeros.
    pub regular_order: usize,
    pub decisions: Vec<Decision>,
    /// Largest `σ_{n+r}(P(z)) / (‖S‖_F + |z| √n)` over the verified zeros (0 when none).
    pub residual: f64,
    /// How many zeros were verified.
    pub verified: usize,
    /// Whether the zeros of a SISO model were refined against its numerator polynomial
    /// ([`super::refine`]).
    pub refined: bool,
    /// Largest relative move of a zero by the refinement (0 when not refined).
    pub refinement_move: f64,
    /// The relative tol of an accepted candidate reduction (see the module's verified
    /// candidate search); None when the default decisions stand.
    pub candidate_tol: Option<f64>,
}

/// Finite zeros (re, im), sorted, and the figures behind them.
#[derive(Debug, Clone, PartialEq)]
pub struct Zeros {
    pub zeros: Vec<(f64, f64)>,
    pub info: ZerosInfo,
}

pub(crate) fn check_tol(tol: Option<f64>) -> Result<()> {
    match tol {
        Some(t) if !(t.is_finite() && t >= 0.0) => Err(ModelError::BadValue {
            arg: "tol",
            detail: format!("must be finite and >= 0 (a relative tolerance), found {t}"),
        }),
        _ => Ok(()),
    }
}

pub(crate) fn check_input(ss: &StateSpace<f64>) -> Result<()> {
    for (arg, m) in [("a", &ss.a), ("b", &ss.b), ("c", &ss.c), ("d", &ss.d)] {
        require_finite(arg, m.as_slice())?;
    }
    let size = ss.n_states() + ss.n_inputs().max(ss.n_outputs());
    if size > MAX_PENCIL {
        return Err(ModelError::TooLarge {
            arg: "a",
            detail: format!(
                "the system pencil has dimension {size} (states + max(inputs, outputs)); the limit is {MAX_PENCIL}"
            ),
        });
    }
    Ok(())
}

/// The finite invariant zeros of `(A, B, C, D)`; `tol` is relative (see the module doc).
pub fn invariant_zeros(ss: &StateSpace<f64>, tol: Option<f64>) -> Result<Zeros> {
    check_input(ss)?;
    check_tol(tol)?;
    let (bal, scale) = balance_system(ss);
    let n = bal.n_states();
    let big_n = (n + bal.n_inputs().max(bal.n_outputs())) as f64;
    let tol_rel = tol.unwrap_or(big_n * big_n * f64::EPSILON);
    let norm = system_norm(&bal);
    let mut decisions = Vec::new();
    let mut found = pencil_zeros(&bal, scale, tol_rel * norm, &mut decisions)?;
    let normal_rank = found.normal_rank;
    let mut candidate_tol = None;
    let (m, p) = (bal.n_inputs(), bal.n_outputs());
    if tol.is_none() && (m != p || normal_rank < m.min(p)) {
        let limit = ROUNDING_LEVEL * big_n * f64::EPSILON;
        for sigma in candidate_values(&decisions, tol_rel * norm, norm) {
            let trial_abs = sigma * (1.0 + CANDIDATE_MARGIN);
            let Ok(trial) = pencil_zeros(&bal, scale, trial_abs, &mut Vec::new()) else {
                continue;
            };
            if trial.normal_rank != normal_rank
                || trial.zeros.len() <= found.zeros.len()
                || !contains_all(&trial.zeros, &found.zeros)
            {
                continue;
            }
            if rounding_level_zeros(&bal, scale, &trial.zeros, normal_rank, norm, limit)? {
                candidate_tol = Some(trial_abs / norm);
                found = trial;
            }
        }
    }
    let found_order = found.regular_order;
    let mut zeros = found.zeros;
    let refinement = super::refine::refine_siso(ss, &mut zeros);
    if refinement.applied {
        sort_complex(&mut zeros);
    }

    let (residual, verified) = verify(&bal, scale, &zeros, normal_rank, norm)?;
    let limit = f64::EPSILON.sqrt().max(10.0 * big_n * tol_rel);
    if residual > limit {
        return Err(ModelError::BadValue {
            arg: "a",
            detail: format!(
                "a computed zero fails the check against the system pencil (relative residual \
                 {residual:.3e} above {limit:.3e}); the model is too close to one with different \
                 zero structure for this tol"
            ),
        });
    }
    Ok(Zeros {
        zeros,
        info: ZerosInfo {
            tol: tol_rel,
            norm,
            normal_rank,
            regular_order: found_order,
            decisions,
            residual,
            verified,
            refined: refinement.applied,
            refinement_move: refinement.largest_move,
            candidate_tol,
        },
    })
}

/// Zeros, normal rank and regular order of one reduction at the absolute tol `tol_abs`.
struct PencilZeros {
    zeros: Vec<(f64, f64)>,
    normal_rank: usize,
    regular_order: usize,
}

fn pencil_zeros(
    bal: &StateSpace<f64>,
    scale: f64,
    tol_abs: f64,
    decisions: &mut Vec<Decision>,
) -> Result<PencilZeros> {
    let n = bal.n_states();
    let first = reduce(bal.clone(), tol_abs, 1, decisions)?;
    let normal_rank = (first.ss.n_states() + first.ss.n_outputs() + first.removed)
        .checked_sub(n)
        .ok_or(ModelError::NoConvergence {
            routine: "the system pencil reduction (normal rank)",
        })?;
    let second = reduce(first.ss.dual(), tol_abs, 2, decisions)?;
    let values = regular_pencil_eigenvalues(&second.ss)?;
    let mut zeros = Vec::with_capacity(values.len());
    for (re, im) in values {
        let (re, im) = (re / scale, im / scale);
        if !(re.is_finite() && im.is_finite()) {
            return Err(ModelError::Overflow {
                what: "a zero of the model".into(),
            });
        }
        zeros.push((re, im));
    }
    sort_complex(&mut zeros);
    Ok(PencilZeros {
        zeros,
        normal_rank,
        regular_order: second.ss.n_states(),
    })
}

/// At most this many candidate reductions are tried.
const MAX_ZERO_CANDIDATES: usize = 4;
/// A candidate tol sits this far (relative) above the kept value it drops.
const CANDIDATE_MARGIN: f64 = 1.0 / 1048576.0;
/// A candidate's zeros must be zeros of a pencil within `ROUNDING_LEVEL · N · eps` (relative)
/// of the data.
const ROUNDING_LEVEL: f64 = 100.0;

/// The kept singular values of the decisions between the default threshold and
/// `sqrt(eps) · norm`, ascending, at most [`MAX_ZERO_CANDIDATES`]: rounding that the
/// reduction amplified above the threshold lands there.
fn candidate_values(decisions: &[Decision], threshold: f64, norm: f64) -> Vec<f64> {
    let ceiling = f64::EPSILON.sqrt() * norm;
    let mut values: Vec<f64> = decisions
        .iter()
        .flat_map(|d| d.singular_values.iter().copied())
        .filter(|&s| s > threshold && s <= ceiling)
        .collect();
    values.sort_by(f64::total_cmp);
    values.dedup();
    values.truncate(MAX_ZERO_CANDIDATES);
    values
}

/// Whether every zero of `smaller` has a partner in `larger` (relative distance 1e-6).
fn contains_all(larger: &[(f64, f64)], smaller: &[(f64, f64)]) -> bool {
    let mut free = vec![true; larger.len()];
    smaller.iter().all(|&(re, im)| {
        let near = |k: usize| {
            let (a, b) = larger[k];
            (a - re).hypot(b - im) <= 1e-6 * re.hypot(im).max(1.0)
        };
        match (0..larger.len()).find(|&k| free[k] && near(k)) {
            Some(k) => {
                free[k] = false;
                true
            }
            None => false,
        }
    })
}

/// The sharp test a candidate's zeros must pass: for each cluster of q coincident zeros at
/// z (relative distance 1e-6), the q singular values `σ_{n+r−q+1} .. σ_{n+r}` of the
/// balanced pencil P(z) all at most `limit · (‖S‖_F + |z| √n)`, so z is a zero of
/// geometric multiplicity q of a pencil within rounding of the data. Every zero is
/// checked, or the candidate is not accepted (false when beyond the work budget).
fn rounding_level_zeros(
    bal: &StateSpace<f64>,
    scale: f64,
    zeros: &[(f64, f64)],
    normal_rank: usize,
    norm: f64,
    limit: f64,
) -> Result<bool> {
    let (n, m, p) = (bal.n_states(), bal.n_inputs(), bal.n_outputs());
    let index = n + normal_rank;
    let (rows, cols) = (n + p, n + m);
    let per_zero = svd_flops(rows, cols);
    if per_zero * zeros.len() as f64 > VERIFY_BUDGET || norm == 0.0 {
        return Ok(false);
    }
    let mut done = vec![false; zeros.len()];
    for k in 0..zeros.len() {
        if done[k] {
            continue;
        }
        let (re, im) = zeros[k];
        let mut q = 0;
        for (j, &(a, b)) in zeros.iter().enumerate() {
            if !done[j] && (a - re).hypot(b - im) <= 1e-6 * re.hypot(im).max(1.0) {
                done[j] = true;
                q += 1;
            }
        }
        if q > index {
            return Ok(false);
        }
        let (zr, zi) = (re * scale, im * scale);
        let s = pencil_singular_values(bal, zr, zi)?;
        let size = norm + zr.hypot(zi) * (n as f64).sqrt();
        let worst = s[index - q..index].iter().fold(0.0f64, |w, &v| w.max(v));
        if worst > limit * size {
            return Ok(false);
        }
    }
    Ok(true)
}

/// Singular values (descending) of the balanced pencil `P(z_b)`, z_b in the scaled variable.
fn pencil_singular_values(bal: &StateSpace<f64>, zr: f64, zi: f64) -> Result<Vec<f64>> {
    let (n, m, p) = (bal.n_states(), bal.n_inputs(), bal.n_outputs());
    let (rows, cols) = (n + p, n + m);
    let pz = Mat::<c64>::from_fn(rows, cols, |i, j| {
        let v = if i < n && j < n {
            *bal.a.get(i, j)
        } else if i < n {
            *bal.b.get(i, j - n)
        } else if j < n {
            *bal.c.get(i - n, j)
        } else {
            *bal.d.get(i - n, j - n)
        };
        if i == j && i < n {
            c64::new(v - zr, -zi)
        } else {
            c64::new(v, 0.0)
        }
    });
    pz.singular_values().map_err(|_| ModelError::NoConvergence {
        routine: "the SVD verifying a zero",
    })
}

/// The invariant zeros of a minimal realization of the same transfer matrix (the
/// transmission zeros). `tol` is the relative tol of the zero computation; the minimal
/// realization uses its own default.
pub fn transmission_zeros(ss: &StateSpace<f64>, tol: Option<f64>) -> Result<Zeros> {
    check_input(ss)?;
    check_tol(tol)?;
    let minimal = minimal_realization(ss, None)?;
    invariant_zeros(&minimal.realization, tol)
}

/// The normal rank of the transfer matrix (the rank of G(s) at almost every s).
pub fn normal_rank(ss: &StateSpace<f64>, tol: Option<f64>) -> Result<usize> {
    check_input(ss)?;
    check_tol(tol)?;
    let (bal, _) = balance_system(ss);
    let n = bal.n_states();
    let big_n = (n + bal.n_inputs().max(bal.n_outputs())) as f64;
    let tol_abs = tol.unwrap_or(big_n * big_n * f64::EPSILON) * system_norm(&bal);
    let first = reduce(bal, tol_abs, 1, &mut Vec::new())?;
    (first.ss.n_states() + first.ss.n_outputs() + first.removed)
        .checked_sub(n)
        .ok_or(ModelError::NoConvergence {
            routine: "the system pencil reduction (normal rank)",
        })
}

fn system_norm(ss: &StateSpace<f64>) -> f64 {
    let all: Vec<f64> = [&ss.a, &ss.b, &ss.c, &ss.d]
        .iter()
        .flat_map(|m| m.as_slice().iter().copied())
        .collect();
    frobenius_norm(&all)
}

// ------------------------------------------------------------------ balancing

/// Multiplies the entries picked by `at` by `f` unless that would leave the normal range
/// (then nothing changes and false is returned).
fn scale_exactly(values: &mut [&mut f64], f: f64) -> bool {
    if f == 1.0 {
        return false;
    }
    let ok = values.iter().all(|v| {
        let w = **v * f;
        **v == 0.0 || (w.is_finite() && w.abs() >= f64::MIN_POSITIVE)
    });
    if ok {
        values.iter_mut().for_each(|v| **v *= f);
    }
    ok
}

/// The power of two that brings `x > 0` into [1, 2).
fn unit_power(x: f64) -> f64 {
    pow2(-(x.log2().floor() as i32))
}

/// The balanced copy `(T⁻¹ A T, T⁻¹ B R, L C T, L D R)` (T, L, R diagonal powers of two)
/// and the factor k by which A and B were finally multiplied (zeros scale by k).
pub(crate) fn balance_system(ss: &StateSpace<f64>) -> (StateSpace<f64>, f64) {
    let mut s = ss.clone();
    // A beyond the safe range first: zeros of (kA, kB, C, D) are k times the zeros.
    let e = range_exponent(s.a.as_slice().iter());
    let mut k = 1.0;
    if e != 0 {
        let f = pow2(e);
        let exact =
            |v: &f64| *v == 0.0 || ((v * f).is_finite() && (v * f).abs() >= f64::MIN_POSITIVE);
        if s.a.as_slice().iter().chain(s.b.as_slice()).all(exact) {
            (s.a, s.b, k) = (s.a.map(|v| v * f), s.b.map(|v| v * f), f);
        }
    }
    let (n, m, p) = (s.n_states(), s.n_inputs(), s.n_outputs());
    for _sweep in 0..16 {
        let mut changed = false;
        for j in 0..m {
            let big = (0..n)
                .map(|i| s.b.get(i, j).abs())
                .chain((0..p).map(|i| s.d.get(i, j).abs()))
                .fold(0.0, f64::max);
            if big > 0.0 {
                let f = unit_power(big);
                let (b, d) = (&mut s.b, &mut s.d);
                let (bc, dc) = (b.cols(), d.cols());
                let mut cells: Vec<&mut f64> = b
                    .as_mut_slice()
                    .iter_mut()
                    .skip(j)
                    .step_by(bc)
                    .chain(d.as_mut_slice().iter_mut().skip(j).step_by(dc))
                    .collect();
                changed |= scale_exactly(&mut cells, f);
            }
        }
        for i in 0..p {
            let big = (0..n)
                .map(|j| s.c.get(i, j).abs())
                .chain((0..m).map(|j| s.d.get(i, j).abs()))
                .fold(0.0, f64::max);
            if big > 0.0 {
                let f = unit_power(big);
                let (c, d) = (&mut s.c, &mut s.d);
                let mut cells: Vec<&mut f64> = c.as_mut_slice()[i * n..(i + 1) * n]
                    .iter_mut()
                    .chain(d.as_mut_slice()[i * m..(i + 1) * m].iter_mut())
                    .collect();
                changed |= scale_exactly(&mut cells, f);
            }
        }
        for i in 0..n {
            let col: f64 = (0..n)
                .filter(|&k| k != i)
                .map(|k| s.a.get(k, i).abs())
                .chain((0..p).map(|k| s.c.get(k, i).abs()))
                .sum();
            let row: f64 = (0..n)
                .filter(|&k| k != i)
                .map(|k| s.a.get(i, k).abs())
                .chain((0..m).map(|k| s.b.get(i, k).abs()))
                .sum();
            if col == 0.0 || row == 0.0 || !col.is_finite() || !row.is_finite() {
                continue;
            }
            let (mut c, mut r, mut f) = (col, row, 1.0);
            while c < r / 2.0 && f < 1e300 {
                c *= 2.0;
                r /= 2.0;
                f *= 2.0;
            }
            while c >= r * 2.0 && f > 1e-300 {
                c /= 2.0;
                r *= 2.0;
                f /= 2.0;
            }
            if c + r < 0.95 * (col + row) && state_scale(&mut s, i, f) {
                changed = true;
            }
        }
        if !changed {
            break;
        }
    }
    (s, k)
}

/// State i scaled by f: row i of [A, B] divided by f, column i of [A; C] multiplied by f.
fn state_scale(s: &mut StateSpace<f64>, i: usize, f: f64) -> bool {
    let (n, m) = (s.n_states(), s.n_inputs());
    let ok = |v: f64, g: f64| {
        let w = v * g;
        v == 0.0 || (w.is_finite() && w.abs() >= f64::MIN_POSITIVE)
    };
    let row_ok = (0..n).all(|k| k == i || ok(*s.a.get(i, k), 1.0 / f))
        && (0..m).all(|k| ok(*s.b.get(i, k), 1.0 / f));
    let col_ok = (0..n).all(|k| k == i || ok(*s.a.get(k, i), f))
        && (0..s.n_outputs()).all(|k| ok(*s.c.get(k, i), f));
    if !(row_ok && col_ok) {
        return false;
    }
    for k in 0..n {
        if k != i {
            s.a.set(i, k, s.a.get(i, k) / f);
            s.a.set(k, i, s.a.get(k, i) * f);
        }
    }
    for k in 0..m {
        s.b.set(i, k, s.b.get(i, k) / f);
    }
    for k in 0..s.n_outputs() {
        s.c.set(k, i, s.c.get(k, i) * f);
    }
    true
}

// ------------------------------------------------------------------ reduction

struct Reduction {
    ss: StateSpace<f64>,
    /// Σρ: states removed together with as many pencil rows.
    removed: usize,
}

/// Singular values of `m` and its full left singular vectors (p × p).
fn left_singular(m: &Matrix<f64>) -> Result<(Vec<f64>, Matrix<f64>)> {
    let (p, q) = (m.rows(), m.cols());
    if p == 0 || q == 0 {
        return Ok((Vec::new(), Matrix::identity(p)));
    }
    let svd = to_faer(m).svd().map_err(|_| ModelError::NoConvergence {
        routine: "the SVD of a system pencil step",
    })?;
    let s = (0..p.min(q)).map(|i| svd.S().column_vector()[i]).collect();
    let u = svd.U();
    let um = Matrix::from_row_major(p, p, (0..p * p).map(|x| u[(x / p, x % p)]).collect())
        .expect("p x p");
    Ok((s, um))
}

/// One reduction pass (module doc), to full row rank of D.
fn reduce(
    mut ss: StateSpace<f64>,
    tol: f64,
    pass: u8,
    decisions: &mut Vec<Decision>,
) -> Result<Reduction> {
    let mut removed = 0;
    loop {
        let (n, m, p) = (ss.n_states(), ss.n_inputs(), ss.n_outputs());
        if p == 0 {
            break;
        }
        let (sigma, u) = left_singular(&ss.d)?;
        let tau = sigma.iter().filter(|&&s| s > tol).count();
        if m > 0 {
            decisions.push(Decision {
                block: "feedthrough",
                pass,
                singular_values: sigma,
                kept: tau,
            });
        }
        let rotated = u.transpose().matmul(&hstack(&[&ss.c, &ss.d], p));
        let c1 = block(&rotated, 0, tau, 0, n);
        let d1 = block(&rotated, 0, tau, n, n + m);
        if tau == p || n == 0 {
            ss.c = c1;
            ss.d = d1;
            break;
        }
        // The rows of C₂ span the states the leftover outputs see directly.
        let c2t = block(&rotated, tau, p, 0, n).transpose();
        let svd = to_faer(&c2t)
            .thin_svd()
            .map_err(|_| ModelError::NoConvergence {
                routine: "the SVD of a system pencil step",
            })?;
        let k = n.min(p - tau);
        let s2: Vec<f64> = (0..k).map(|i| svd.S().column_vector()[i]).collect();
        let rho = s2.iter().filter(|&&s| s > tol).count();
        decisions.push(Decision {
            block: "output",
            pass,
            singular_values: s2,
            kept: rho,
        });
        if rho == 0 {
            ss.c = c1;
            ss.d = d1;
            break;
        }
        let uv = svd.U();
        let mut basis = Matrix::from_row_major(
            n,
            rho,
            (0..n * rho).map(|x| uv[(x / rho, x % rho)]).collect(),
        )
        .expect("n x rho");
        let (mut a, mut b, mut c1) = (ss.a, ss.b, c1);
        for j in 0..rho {
            let x: Vec<f64> = (j..n).map(|i| *basis.get(i, j)).collect();
            let h = Reflector::annihilating(j, &x);
            h.apply_left(&mut basis);
            h.apply_left(&mut a);
            h.apply_right(&mut a);
            h.apply_left(&mut b);
            h.apply_right(&mut c1);
        }
        ss = StateSpace {
            a: block(&a, rho, n, rho, n),
            b: block(&b, rho, n, 0, m),
            c: vstack(&block(&a, 0, rho, rho, n), &block(&c1, 0, tau, rho, n)),
            d: vstack(&block(&b, 0, rho, 0, m), &d1),
        };
        removed += rho;
    }
    Ok(Reduction { ss, removed })
}

/// Eigenvalues of the regular pencil left by the two passes (D square and invertible).
fn regular_pencil_eigenvalues(ss: &StateSpace<f64>) -> Result<Vec<(f64, f64)>> {
    let (n, q) = (ss.n_states(), ss.n_outputs());
    if ss.n_inputs() != q {
        return Err(ModelError::NoConvergence {
            routine: "the system pencil reduction (it did not end with a square D)",
        });
    }
    if n == 0 {
        return Ok(Vec::new());
    }
    let (az, bz) = if q == 0 {
        (to_faer(&ss.a), Mat::<f64>::identity(n, n))
    } else {
        // W = [Q[:, q..], Q[:, ..q]] from [C, D]ᵀ = Q R: [C, D] W = [0, Rᵀ].
        let cdt = to_faer(&hstack(&[&ss.c, &ss.d], q).transpose());
        let qm = cdt.qr().compute_Q();
        let ab = to_faer(&hstack(&[&ss.a, &ss.b], n));
        let w = qm.subcols(q, n);
        (&ab * w, w.subrows(0, n).to_owned())
    };
    let (mut az, mut bz) = (az, bz);
    let mut re = Diag::<f64>::zeros(n);
    let mut im = Diag::<f64>::zeros(n);
    let mut beta = Diag::<f64>::zeros(n);
    let par = Par::Seq;
    let mut mem = MemBuffer::new(gevd_scratch::<f64>(
        n,
        ComputeEigenvectors::No,
        ComputeEigenvectors::No,
        par,
        default(),
    ));
    gevd_real(
        az.as_mut(),
        bz.as_mut(),
        re.as_mut(),
        im.as_mut(),
        beta.as_mut(),
        None,
        None,
        par,
        MemStack::new(&mut mem),
        default(),
    )
    .map_err(|_| ModelError::NoConvergence {
        routine: "the QZ iteration for the zeros",
    })?;
    let (re, im, beta) = (re.column_vector(), im.column_vector(), beta.column_vector());
    let mut out: Vec<(f64, f64)> = (0..n).map(|i| (re[i] / beta[i], im[i] / beta[i])).collect();
    // A 2×2 block gives a pair at (i, i + 1). Only the first entry is used: in faer 0.24 the
    // second one's alpha is scaled by a different factor than its stored beta (its real QZ
    // stores beta[i + 1] = beta[i] but alpha[i + 1] from the other diagonal entry), so the
    // pair is taken as z, conj(z) from the first entry, exactly conjugate.
    let mut i = 0;
    while i < n {
        if im[i] != 0.0 && i + 1 < n && im[i + 1] != 0.0 {
            let (r, w) = (out[i].0, out[i].1.abs());
            out[i] = (r, w);
            out[i + 1] = (r, -w);
            i += 2;
        } else {
            i += 1;
        }
    }
    Ok(out)
}

// ------------------------------------------------------------------ verification

/// Rough flops of one SVD of a rows × cols complex pencil (for the verification budget).
fn svd_flops(rows: usize, cols: usize) -> f64 {
    8.0 * (rows.max(cols) as f64) * (rows.min(cols) as f64).powi(2) + 1.0
}

/// Largest relative `σ_{n+r}(P(z))` over the zeros checked, and how many were checked.
fn verify(
    bal: &StateSpace<f64>,
    scale: f64,
    zeros: &[(f64, f64)],
    normal_rank: usize,
    norm: f64,
) -> Result<(f64, usize)> {
    let (n, m, p) = (bal.n_states(), bal.n_inputs(), bal.n_outputs());
    let index = n + normal_rank; // σ_index (1-based) vanishes at a zero
    if zeros.is_empty() || index == 0 || norm == 0.0 {
        return Ok((0.0, 0));
    }
    let (rows, cols) = (n + p, n + m);
    let per_zero = svd_flops(rows, cols);
    let affordable = ((VERIFY_BUDGET / per_zero) as usize).max(1);
    let picks: Vec<usize> = if affordable >= zeros.len() {
        (0..zeros.len()).collect()
    } else {
        let step = zeros.len() as f64 / affordable as f64;
        let mut v: Vec<usize> = (0..affordable)
            .map(|k| (k as f64 * step) as usize)
            .collect();
        v.push(zeros.len() - 1);
        v.dedup();
        v
    };
    let mut worst = 0.0f64;
    for &k in &picks {
        // The balanced pencil works in the scaled variable: z_b = k z.
        let (zr, zi) = (zeros[k].0 * scale, zeros[k].1 * scale);
        let s = pencil_singular_values(bal, zr, zi)?;
        let sigma = s.get(index - 1).copied().unwrap_or(0.0);
        let size = norm + zr.hypot(zi) * (n as f64).sqrt();
        worst = worst.max(sigma / size);
    }
    Ok((worst, picks.len()))
}
