//! Refinement of an approximate invariant subspace by Newton steps on its Sylvester
//! equation.
//!
//! # Purpose
//! A candidate split `Q = [Q_1, Q_2]` (orthogonal) of the states into an A-invariant part
//! `span(Q_1)` and the rest, found from eigenvectors (the PBH split of the staircase), is only
//! as accurate as the eigenvector basis it came from: its coupling `E = Q_2ᵀ A Q_1`, which
//! the split sets to zero, is of order `eps ‖A‖` times the condition number of that basis.
//! The refinement returns an orthogonal `Q'` near Q whose coupling is of rounding level
//! (the backward error of a stable method), so the split it defines is one the data can
//! stand behind.
//!
//! # Method
//! In the coordinates of Q, `Â = Qᵀ A Q = [[A_11, A_12], [E, A_22]]`. The subspace
//! spanned by `Q [I; P]` is invariant exactly when `A_22 P − P A_11 = −E + P A_12 P`
//! (Stewart 1973). A Newton step drops the quadratic term and solves the Sylvester
//! equation `A_22 P − P A_11 = −E` by Bartels–Stewart (the real Schur forms
//! `A_11 = V T Vᵀ`, `A_22 = U S Uᵀ`, then `S Y − Y T = −Uᵀ E V` block by block, blocks of
//! order at most 2, and `P = U Y Vᵀ`); the new bases are the orthonormalised columns of
//! `Q [I; P]` and `Q [−Pᵀ; I]` (orthogonal to each other in exact arithmetic). The step is
//! repeated with the new coupling, the Schur forms of the first step kept (the changed
//! diagonal blocks only slow the convergence from quadratic to linear, by a factor of order
//! `‖P‖`).
//!
//! # Numerical aspects
//! At most [`MAX_STEPS`] steps; the iteration stops when the coupling is below
//! `n eps ‖A‖_F` or stops decreasing by a factor of 2, and the Q with the smallest coupling
//! is returned with that coupling (relative to `‖A‖_F`). A step is rejected (the last
//! accepted Q returned) when the Sylvester equation is numerically singular (the spectra of
//! `A_11` and `A_22` meet), when `‖P‖_F > 1` (the correction would leave the neighbourhood of
//! the candidate: the candidate was not near an invariant subspace) or when a result is
//! not finite. Cost per step: O(n³) (two real Schur forms once, products and two QR
//! factorizations per step).
//!
//! # References
//! G. W. Stewart, "Error and perturbation bounds for subspaces associated with certain
//! eigenvalue problems", SIAM Review 15 (1973). R. H. Bartels and G. W. Stewart, Comm. ACM
//! 15 (1972). J. W. Demmel, "Three methods for refining estimates of invariant subspaces",
//! Computing 38 (1987).

use crate::gramian::lyapunov::{real_schur, small_solve, RealSchur};
use faer::linalg::solvers::Solve;
use faer::Mat;
use nalgebra::DMatrix;

/// At most this many Newton steps.
pub const MAX_STEPS: usize = 4;

/// The refined split: the new orthogonal Q (`Q_1` its first `k` columns) and its coupling
/// `‖Q_2ᵀ A Q_1‖_F / ‖A‖_F`, before and after.
pub struct Refined {
    pub q: Mat<f64>,
    pub coupling_before: f64,
    pub coupling: f64,
    pub steps: usize,
}

fn to_na(m: faer::MatRef<'_, f64>) -> DMatrix<f64> {
    DMatrix::from_fn(m.nrows(), m.ncols(), |i, j| m[(i, j)])
}

fn from_na(m: &DMatrix<f64>) -> Mat<f64> {
    Mat::from_fn(m.nrows(), m.ncols(), |i, j| m[(i, j)])
}

/// Solves `S Y − Y T = F` for quasi-upper-triangular S (k × k) and T (m × m) with the given
/// diagonal blocks; `None` when a block system is singular or the result is not finite.
fn quasi_triangular_sylvester(
    s: &RealSchur,
    t: &RealSchur,
    f: &DMatrix<f64>,
) -> Option<DMatrix<f64>> {
    let (k, m) = (s.t.nrows(), t.t.nrows());
    let mut y = DMatrix::<f64>::zeros(k, m);
    // Columns of Y by T's blocks from the first (Y T uses the columns to the left), rows by
    // S's blocks from the last (S Y uses the rows below).
    for &(j0, bj) in &t.blocks {
        for &(i0, bi) in s.blocks.iter().rev() {
            let iend = i0 + bi;
            let mut rv = [0.0; 4];
            for c in 0..bj {
                for r in 0..bi {
                    let i = i0 + r;
                    let j = j0 + c;
                    let mut v = f[(i, j)];
                    for l in iend..k {
                        v -= s.t[(i, l)] * y[(l, j)];
                    }
                    for l in 0..j0 {
                        v += y[(i, l)] * t.t[(l, j)];
                    }
                    rv[r + bi * c] = v;
                }
            }
            // (I ⊗ S_II − T_JJᵀ ⊗ I) vec(Y_IJ), column-major vec
            let mut kk = [[0.0; 4]; 4];
            for c in 0..bj {
                for r in 0..bi {
                    for c2 in 0..bj {
                        for r2 in 0..bi {
                            let same_r = if r == r2 { 1.0 } else { 0.0 };
                            let same_c = if c == c2 { 1.0 } else { 0.0 };
                            kk[r + bi * c][r2 + bi * c2] =
                                same_c * s.t[(i0 + r, i0 + r2)] - same_r * t.t[(j0 + c2, j0 + c)];
                        }
                    }
                }
            }
            let sol = small_solve(kk, rv, bi * bj).ok()?;
            for c in 0..bj {
                for r in 0..bi {
                    y[(i0 + r, j0 + c)] = sol[r + bi * c];
                }
            }
        }
    }
    y.iter().all(|v| v.is_finite()).then_some(y)
}

/// An orthonormal basis of the columns of `x` (thin QR; `x` of full column rank).
fn orthonormal(x: &Mat<f64>) -> Mat<f64> {
    if x.ncols() == 0 {
        return Mat::zeros(x.nrows(), 0);
    }
    x.qr().compute_thin_Q()
}

/// `‖Q_2ᵀ A Q_1‖_F` for Q = [Q_1 (k columns), Q_2].
fn coupling(a: &Mat<f64>, q: &Mat<f64>, k: usize) -> f64 {
    let n = q.nrows();
    let e = q.subcols(k, n - k).transpose() * a * q.subcols(0, k);
    e.norm_l2()
}

/// The refined split of `a` (n × n) by `q` (orthogonal, `Q_1` its first `k` columns);
/// `None` when no step was accepted (the candidate stands as it is).
pub fn refine_invariant_split(a: &Mat<f64>, q: &Mat<f64>, k: usize) -> Option<Refined> {
    let n = a.nrows();
    if k == 0 || k >= n {
        return None;
    }
    let na = a.norm_l2();
    if !(na > 0.0 && na.is_finite()) {
        return None;
    }
    let target = n as f64 * f64::EPSILON * na;
    let mut q = q.to_owned();
    let hat = q.transpose() * a * &q;
    let a11 = to_na(hat.as_ref().submatrix(0, 0, k, k));
    let a22 = to_na(hat.as_ref().submatrix(k, k, n - k, n - k));
    let before = coupling(a, &q, k);
    if before <= target {
        return None;
    }
    let (t, s) = (real_schur(&a11).ok()?, real_schur(&a22).ok()?);
    let mut current = before;
    let mut best: Option<Refined> = None;
    for step in 1..=MAX_STEPS {
        let e = q.subcols(k, n - k).transpose() * a * q.subcols(0, k);
        let rhs = -(s.u.transpose() * to_na(e.as_ref()) * &t.u);
        let Some(y) = quasi_triangular_sylvester(&s, &t, &rhs) else {
            break;
        };
        let p = from_na(&(&s.u * y * t.u.transpose()));
        if !(p.norm_l2() <= 1.0) {
            break;
        }
        let next = split_from_correction(&q, &p, k);
        let c = coupling(a, &next, k);
        if !(c < current) {
            break;
        }
        let improved_enough = c <= 0.5 * current;
        current = c;
        q = next;
        best = Some(Refined {
            q: q.clone(),
            coupling_before: before / na,
            coupling: c / na,
            steps: step,
        });
        if c <= target || !improved_enough {
            break;
        }
    }
    best
}

/// The joint correction of a split `Q = [Q_1, Q_2]` (`Q_1` its first `k` columns) of `(a, b)`
/// towards a nearby model with an exact split: an A-invariant `span(Q_1)` that contains B.
///
/// The invariant subspace of the computed A alone can keep a component of B of order
/// `eps ‖A‖ / sep(A_11, A_22)` outside it (the spectra of the two parts interleave); the
/// structure planted in the data is at rounding distance from both conditions at once.
/// With `Q [I; P]` as the new `Q_1`, the conditions are, to first order, `P B_1 = B_2` and
/// a coupling `A_22 P − P A_11` that is small: in the eigenvector coordinates of the two
/// diagonal blocks (`A_11 = X Λ X⁻¹`, `A_22 = Y M Y⁻¹`, `P = Y P̂ X⁻¹`) the coupling is
/// `(μ_i − λ_j) P̂_ij` and the rows of `P̂` decouple: row i minimises
/// `Σ_j |μ_i − λ_j|² |P̂_ij|²` subject to `P̂_i b̂_1 = b̂_2,i` (an m × m Hermitian system,
/// `b̂_1 = X⁻¹ B_1`, `b̂_2 = Y⁻¹ B_2`). The eigenvector bases only shape the correction:
/// the caller measures the new split's coupling and B part in the data and keeps it only
/// when both are smaller. `None` when an eigendecomposition or solve fails or the
/// correction is not finite or has `‖P‖_F > 1`.
pub fn joint_correction(a: &Mat<f64>, b: &Mat<f64>, q: &Mat<f64>, k: usize) -> Option<Mat<f64>> {
    use faer::c64;
    let n = a.nrows();
    let m = b.ncols();
    if k == 0 || k >= n || m == 0 || m > 2 {
        return None;
    }
    let ku = n - k;
    let hat = q.transpose() * a * q;
    let bh = q.transpose() * b;
    let a11 = hat.as_ref().submatrix(0, 0, k, k).to_owned();
    let a22 = hat.as_ref().submatrix(k, k, ku, ku).to_owned();
    let e11 = a11.eigen().ok()?;
    let e22 = a22.eigen().ok()?;
    let (x, lam) = (e11.U().to_owned(), e11.S().column_vector().to_owned());
    let (y, mu) = (e22.U().to_owned(), e22.S().column_vector().to_owned());
    let b1 = Mat::<c64>::from_fn(k, m, |i, j| c64::new(bh[(i, j)], 0.0));
    let b2 = Mat::<c64>::from_fn(ku, m, |i, j| c64::new(bh[(k + i, j)], 0.0));
    let xlu = x.partial_piv_lu();
    let ylu = y.partial_piv_lu();
    let c = xlu.solve(&b1); // k x m
    let r = ylu.solve(&b2); // ku x m
    let mut ph = Mat::<c64>::zeros(ku, k);
    let tiny = f64::MIN_POSITIVE.sqrt();
    for i in 0..ku {
        let w: Vec<f64> = (0..k)
            .map(|j| {
                let d = mu[i] - lam[j];
                (d.re * d.re + d.im * d.im).max(tiny)
            })
            .collect();
        // G_kl = Σ_j c_jk conj(c_jl) / w_j; the row is p_j = Σ_l conj(c_jl) λ_l / w_j
        let mut g = [[c64::new(0.0, 0.0); 2]; 2];
        for (j, wj) in w.iter().enumerate() {
            for kk in 0..m {
                for l in 0..m {
                    g[kk][l] += c[(j, kk)] * c[(j, l)].conj() * (1.0 / wj);
                }
            }
        }
        let rhs: Vec<c64> = (0..m).map(|kk| r[(i, kk)]).collect();
        let lag: Vec<c64> = if m == 1 {
            if g[0][0].norm() == 0.0 {
                return None;
            }
            vec![rhs[0] / g[0][0]]
        } else {
            let det = g[0][0] * g[1][1] - g[0][1] * g[1][0];
            if det.norm() == 0.0 {
                return None;
            }
            vec![
                (g[1][1] * rhs[0] - g[0][1] * rhs[1]) / det,
                (g[0][0] * rhs[1] - g[1][0] * rhs[0]) / det,
            ]
        };
        for (j, wj) in w.iter().enumerate() {
            let mut v = c64::new(0.0, 0.0);
            for l in 0..m {
                v += c[(j, l)].conj() * lag[l];
            }
            ph[(i, j)] = v * (1.0 / wj);
        }
    }
    // P = Y P̂ X⁻¹
    let pc = &y * xlu.rsolve(&ph);
    let p = Mat::<f64>::from_fn(ku, k, |i, j| pc[(i, j)].re);
    if !(p.norm_l2() <= 1.0) {
        return None;
    }
    Some(split_from_correction(q, &p, k))
}

/// The orthonormalised `[Q [I; P], Q [−Pᵀ; I]]`.
fn split_from_correction(q: &Mat<f64>, p: &Mat<f64>, k: usize) -> Mat<f64> {
    let n = q.nrows();
    let upper = Mat::from_fn(n, k, |i, j| {
        if i < k {
            if i == j {
                1.0
            } else {
                0.0
            }
        } else {
            p[(i - k, j)]
        }
    });
    let lower = Mat::from_fn(n, n - k, |i, j| {
        if i < k {
            -p[(j, i)]
        } else if i - k == j {
            1.0
        } else {
            0.0
        }
    });
    let q1 = orthonormal(&(q * &upper));
    let q2 = orthonormal(&(q * &lower));
    Mat::from_fn(n, n, |i, j| if j < k { q1[(i, j)] } else { q2[(i, j - k)] })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn orthogonal(n: usize, seed: u64) -> Mat<f64> {
        // a deterministic pseudo-random orthogonal matrix (QR of a scrambled matrix)
        let mut x = seed;
        let m = Mat::from_fn(n, n, |_, _| {
            x = x
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            ((x >> 11) as f64) / ((1u64 << 53) as f64) - 0.5
        });
        m.qr().compute_Q()
    }

    #[test]
    fn a_perturbed_invariant_split_is_refined_to_rounding_level() {
        // (identity) A = W [[A11, A12], [0, A22]] Wᵀ has span(W_1) invariant; a basis
        // rotated away from it by 1e-9 has coupling of order 1e-9, the refined one of
        // rounding level, and it spans W_1 again (angle of order eps / sep).
        let (n, k) = (12, 5);
        let w = orthogonal(n, 7);
        let mut x = 3u64;
        let tri = Mat::from_fn(n, n, |i, j| {
            x = x
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            let v = ((x >> 11) as f64) / ((1u64 << 53) as f64) - 0.5;
            if i >= k && j < k {
                0.0
            } else if i == j {
                v + if i < k { 2.0 } else { -2.0 }
            } else {
                v
            }
        });
        let a = &w * &tri * w.transpose();
        let tilt = orthogonal(n, 11);
        // a small rotation: I + 1e-9 (G − Gᵀ), re-orthonormalised
        let g = Mat::from_fn(n, n, |i, j| 1e-9 * (tilt[(i, j)] - tilt[(j, i)]));
        let rot = (Mat::<f64>::identity(n, n) + g).qr().compute_Q();
        let q0 = &w * &rot;
        let before = coupling(&a, &q0, k) / a.norm_l2();
        assert!(before > 1e-11, "{before}");
        let r = refine_invariant_split(&a, &q0, k).expect("refined");
        assert!(
            r.coupling <= 1e-14,
            "{} after {} steps",
            r.coupling,
            r.steps
        );
        // the subspace is W_1's: ‖W_2ᵀ Q_1‖ small
        let angle = (w.subcols(k, n - k).transpose() * r.q.subcols(0, k)).norm_l2();
        assert!(angle <= 1e-13, "{angle}");
        // Q is orthogonal
        let err = (r.q.transpose() * &r.q - Mat::<f64>::identity(n, n)).norm_l2();
        assert!(err <= 1e-14, "{err}");
    }

    #[test]
    fn a_split_far_from_an_invariant_subspace_is_left_alone() {
        // (common practice) a random split of a random matrix has coupling of order 1: the
        // first correction is not small, so no step is accepted.
        let n = 10;
        let a = orthogonal(n, 5);
        assert!(refine_invariant_split(&a, &orthogonal(n, 9), 4).is_none());
    }
}
