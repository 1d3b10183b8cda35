//! Refinement of the zeros of a SISO model against its numerator polynomial in
//! double-double arithmetic.
//!
//! # Purpose
//! The pencil zeros are backward stable with respect to the matrices: a zero far below
//! `‖A‖` carries an absolute error of order `eps ‖A‖` and so loses relative accuracy when
//! the poles and zeros spread over many decades. For a SISO model the zeros are also the
//! roots of the numerator `N(s) = det [[sI − A, −B], [C, D]]` (identity: the Schur
//! complement), a polynomial whose coefficients the recovery computes from the float data
//! to within a certified relative bound (or exactly, rounded once); roots of such coefficients are accurate *relative to their own size*.
//!
//! # Method
//! Numerator by the certified double-double Faddeev–LeVerrier recursion
//! ([`crate::recover::certified::certified_double_double`]) when its bound is at most
//! [`MAX_BOUND`], else by the exact recursion on the float data rounded once
//! ([`crate::recover::transfer_function_f64`], `Method::Exact`) when the entries' binary
//! exponents span at most [`MAX_EXACT_ENTRY_BITS`] bits (so its integers stay small), else
//! no refinement. Starting values:
//! the pencil zeros. Iteration: Aberth–Ehrlich steps `N_k / (1 − N_k Σ_{j≠k} 1/(z_k − z_j))`
//! with `N_k = N(z_k)/N'(z_k)` evaluated by Horner's rule in complex double-double
//! ([`crate::realize::roots::Polynomial`], the reversed polynomial beyond `|z| = 1`), at
//! most [`MAX_SWEEPS`] sweeps; real zeros stay real, pairs stay exactly conjugate.
//!
//! # Numerical aspects
//! The refinement is taken only when it can be stood behind: the numerator's degree equals
//! the number of pencil zeros, its certified relative bound is at most [`MAX_BOUND`], every
//! zero converged (last relative correction below `1e−13`), and every refined zero lies
//! within `1e−6 |z|` (relative) of its pencil value — a refined zero further away may have
//! jumped to a neighbouring root. Otherwise the pencil zeros are kept unchanged. Either
//! way the caller verifies the zeros against the pencil. Skipped above order
//! [`MAX_ORDER`] (the recursion costs O(n⁴)).
//!
//! # References
//! O. Aberth, Math. Comp. 27 (1973); L. W. Ehrlich, Comm. ACM 10 (1967); T. J. Dekker,
//! Numer. Math. 18 (1971) (double-double arithmetic).

use crate::realize::roots::{aberth_correction, Cdd, Polynomial};
use crate::recover::certified::certified_double_double;
use crate::recover::{transfer_function_f64, Method};
use crate::state_space::StateSpace;

/// Largest order refined.
pub const MAX_ORDER: usize = 40;
/// Largest certified relative error bound of the numerator coefficients accepted.
pub const MAX_BOUND: f64 = 1e-14;
/// Largest span of the entries' binary exponents (plus the 53 bits of a significand) for
/// which the exact recursion is run when the certified one is not accurate enough.
pub const MAX_EXACT_ENTRY_BITS: i32 = 200;
/// Most Aberth sweeps.
pub const MAX_SWEEPS: usize = 60;
/// Largest relative move from a pencil zero accepted.
const MAX_MOVE: f64 = 1e-6;

/// What the refinement did.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Refinement {
    /// Whether the refined zeros replaced the pencil zeros.
    pub applied: bool,
    /// Largest relative move `|z_refined − z_pencil| / |z_pencil|` (0 when not applied).
    pub largest_move: f64,
    /// Largest last relative Aberth correction (0 when not applied).
    pub last_correction: f64,
}

/// Bits of the integers the exact recursion starts from: the span of the binary exponents
/// of the nonzero entries of A, B, C and D plus 53.
fn entry_bits(ss: &StateSpace<f64>) -> i32 {
    let (mut lo, mut hi) = (i32::MAX, i32::MIN);
    for m in [&ss.a, &ss.b, &ss.c, &ss.d] {
        for &v in m.as_slice() {
            if v != 0.0 && v.is_finite() {
                let e = v.abs().log2().floor() as i32;
                lo = lo.min(e);
                hi = hi.max(e);
            }
        }
    }
    if lo > hi {
        0
    } else {
        hi - lo + 53
    }
}

/// Refines the sorted zeros `zeros` of the SISO model `ss` in place (see the module doc).
pub fn refine_siso(ss: &StateSpace<f64>, zeros: &mut [(f64, f64)]) -> Refinement {
    let skip = Refinement::default();
    let n = ss.n_states();
    if ss.n_inputs() != 1 || ss.n_outputs() != 1 || zeros.is_empty() || n > MAX_ORDER {
        return skip;
    }
    let seq = certified_double_double(ss.a.as_slice(), n, false, Some(ss));
    // The bound of the recursion plus the final rounding to float64.
    let bound = seq.worst_relative_bound() + f64::EPSILON / 2.0;
    let num = if seq.is_finite() && bound <= MAX_BOUND {
        seq.numerator
    } else if entry_bits(ss) <= MAX_EXACT_ENTRY_BITS {
        // Exact on the float data, rounded once (the entries' binary exponents span few
        // bits, so the integers of the exact recursion stay small).
        match transfer_function_f64(ss, Method::Exact) {
            Ok((num, _, _)) => num,
            Err(_) => return skip,
        }
    } else {
        return skip;
    };
    let lead = num.iter().take_while(|c| **c == 0.0).count();
    let num = &num[lead..];
    if num.len() != zeros.len() + 1 {
        return skip;
    }
    let poly = Polynomial::new(num);
    // Representatives: real zeros and the upper member of each pair; `mate[k]` is the
    // index of the conjugate (k itself for a real zero).
    let m = zeros.len();
    let mut mate = vec![usize::MAX; m];
    for k in 0..m {
        if zeros[k].1 == 0.0 {
            mate[k] = k;
        } else if zeros[k].1 > 0.0 {
            let found =
                (0..m).find(|&j| mate[j] == usize::MAX && zeros[j] == (zeros[k].0, -zeros[k].1));
            let Some(j) = found else {
                return skip;
            };
            mate[k] = j;
            mate[j] = k;
        }
    }
    if mate.contains(&usize::MAX) {
        return skip;
    }
    let mut z: Vec<Cdd> = zeros.iter().map(|&(r, i)| Cdd::new(r, i)).collect();
    let reps: Vec<usize> = (0..m).filter(|&k| zeros[k].1 >= 0.0).collect();
    let mut last = vec![f64::INFINITY; m];
    let mut done = vec![false; m];
    for _ in 0..MAX_SWEEPS {
        if reps.iter().all(|&k| done[k]) {
            break;
        }
        let approx: Vec<(f64, f64)> = z.iter().map(|v| v.to_pair()).collect();
        for &k in &reps {
            if done[k] {
                continue;
            }
            let Some(nk) = poly.newton(z[k]) else {
                return skip;
            };
            let (cr, mut ci) = aberth_correction(nk.to_pair(), k, &approx);
            if !(cr.is_finite() && ci.is_finite()) {
                return skip;
            }
            if mate[k] == k {
                ci = 0.0;
            }
            let size = z[k].abs_f64();
            z[k] = z[k].sub(Cdd::new(cr, ci));
            if mate[k] != k {
                let c = z[k];
                z[mate[k]] = Cdd {
                    re: c.re,
                    im: c.im.neg(),
                };
            }
            let rel = if size > 0.0 {
                cr.hypot(ci) / size
            } else {
                cr.hypot(ci)
            };
            if rel <= 2f64.powi(-100) || (rel <= 1e-13 && rel > 0.5 * last[k]) {
                done[k] = true;
            }
            last[k] = rel;
        }
    }
    if !reps.iter().all(|&k| done[k] || last[k] <= 1e-13) {
        return skip;
    }
    let mut largest_move = 0.0f64;
    let refined: Vec<(f64, f64)> = z.iter().map(|v| v.to_pair()).collect();
    for (r, p) in refined.iter().zip(zeros.iter()) {
        let size = p.0.hypot(p.1);
        let moved = (r.0 - p.0).hypot(r.1 - p.1);
        let rel = if size > 0.0 { moved / size } else { moved };
        if !(rel <= MAX_MOVE) {
            return skip;
        }
        largest_move = largest_move.max(rel);
    }
    // Two zeros drawn to one root: keep the pencil's.
    for i in 0..m {
        for j in i + 1..m {
            if refined[i] == refined[j] && zeros[i] != zeros[j] {
                return skip;
            }
        }
    }
    zeros.copy_from_slice(&refined);
    Refinement {
        applied: true,
        largest_move,
        last_correction: reps.iter().map(|&k| last[k]).fold(0.0, f64::max),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::matrix::Matrix;

    #[test]
    fn spread_zeros_of_a_canonical_model_come_out_to_a_few_ulps() {
        // G(s) = (s + 1)(s + 1e3)(s + 1e6) / (s + 2)^4 in controllable canonical form
        // (identity: the numerator coefficients 1, 1001001, 1001001000, 1e9 are exact, so
        // the zeros of the float data are −1, −1e3, −1e6 exactly).
        let den = [1.0, 8.0, 24.0, 32.0, 16.0];
        let num = [1.0, 1_001_001.0, 1_001_001_000.0, 1e9];
        let n = 4;
        let mut a = Matrix::zeros(n, n);
        for j in 0..n {
            a.set(0, j, -den[j + 1]);
        }
        for i in 1..n {
            a.set(i, i - 1, 1.0);
        }
        let mut b = Matrix::zeros(n, 1);
        b.set(0, 0, 1.0);
        let c = Matrix::from_row_major(1, n, num.to_vec()).unwrap();
        let ss = StateSpace::new(a, b, c, Matrix::zeros(1, 1)).unwrap();
        let z = crate::zeros::pencil::invariant_zeros(&ss, None).unwrap();
        assert!(z.info.refined, "{:?}", z.info);
        let mut got: Vec<f64> = z.zeros.iter().map(|v| v.0).collect();
        got.sort_by(f64::total_cmp);
        for (g, want) in got.iter().zip([-1e6, -1e3, -1.0]) {
            assert!(
                (g - want).abs() <= 4.0 * f64::EPSILON * want.abs(),
                "{got:?}"
            );
        }
        assert!(z.zeros.iter().all(|v| v.1 == 0.0));
    }

    #[test]
    fn mimo_models_are_left_to_the_pencil() {
        let ss = StateSpace::new(
            Matrix::from_row_major(1, 1, vec![-1.0]).unwrap(),
            Matrix::from_row_major(1, 2, vec![1.0, 1.0]).unwrap(),
            Matrix::from_row_major(1, 1, vec![1.0]).unwrap(),
            Matrix::from_row_major(1, 2, vec![0.0, 1.0]).unwrap(),
        )
        .unwrap();
        let mut zeros = vec![(-2.0, 0.0)];
        assert!(!refine_siso(&ss, &mut zeros).applied);
        assert_eq!(zeros, vec![(-2.0, 0.0)]);
    }
}
