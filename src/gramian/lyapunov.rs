//! Lyapunov and Stein equations, and the Gramians of a stable model:
//! `A W + W Aᵀ + Q = 0` (continuous time) and `A W Aᵀ − W + Q = 0` (discrete time).
//!
//! # Purpose
//! The controllability Gramian `W_c` solves the equation with `Q = B Bᵀ`; the observability
//! Gramian `W_o` solves it with `Aᵀ` in place of A and `Q = Cᵀ C`. Both exist, are unique
//! and positive semidefinite exactly when A is stable (continuous: every eigenvalue has a
//! negative real part; discrete: every eigenvalue lies inside the unit circle).
//!
//! # Method
//! Bartels & Stewart (1972), Kitagawa (1977) for the Stein equation: the real Schur form
//! `A = U T Uᵀ` (T quasi-upper-triangular, 1×1 and 2×2 diagonal blocks; nalgebra), the
//! transformed equation `T X + X Tᵀ = −Uᵀ Q U` (or `T X Tᵀ − X = −Uᵀ Q U`) solved block by
//! block, columns from the last to the first and rows from the last to the first: each
//! block of X solves a Sylvester (Stein) equation of size at most 2×2 (a linear system of
//! at most 4 unknowns, Gaussian elimination with partial pivoting), all blocks below it and
//! to its right being known. Then `W = U X Uᵀ`, symmetrized.
//!
//! # Numerical aspects
//! Backward stable in the sense of Bartels–Stewart: the computed W solves a nearby
//! equation, with relative residual
//! `‖A W + W Aᵀ + Q‖_F / (2 ‖A‖_F ‖W‖_F + ‖Q‖_F)` of order n eps (reported). The forward
//! error grows with the sep of A and −Aᵀ: a model with an eigenvalue close to the stability
//! boundary has a large, ill-conditioned Gramian. The stability test is on the eigenvalues
//! of T's diagonal blocks (boundary cases, e.g. a pole at exactly 0 or on the unit circle,
//! are refused). Cost O(n³).
//!
//! # References
//! R. H. Bartels and G. W. Stewart, "Solution of the matrix equation AX + XB = C",
//! Comm. ACM 15 (1972). G. Kitagawa, "An algorithm for solving the matrix equation
//! X = F X Fᵀ + S", Int. J. Control 25 (1977). K. Zhou, J. C. Doyle and K. Glover,
//! *Robust and Optimal Control*, 1996, ch. 3 (Gramians).
//!
//! # Errors
//! `Shape` / `NonFinite` for bad input; `BadValue` on `a` for an unstable model;
//! `NoConvergence` if the Schur form fails or a small block system is singular;
//! `Overflow` for a non-finite result.

use crate::error::{require_finite, ModelError, Result};
use crate::matrix::Matrix;
use crate::state_space::StateSpace;
use nalgebra::DMatrix;

pub(crate) fn to_na(m: &Matrix<f64>) -> DMatrix<f64> {
    DMatrix::from_row_slice(m.rows(), m.cols(), m.as_slice())
}

pub(crate) fn from_na(m: &DMatrix<f64>) -> Matrix<f64> {
    let (r, c) = m.shape();
    Matrix::from_row_major(r, c, (0..r * c).map(|x| m[(x / c, x % c)]).collect()).expect("shape")
}

/// The real Schur form `A = U T Uᵀ` and the (start, size) of T's diagonal blocks.
#[derive(Debug, Clone)]
pub struct RealSchur {
    pub u: DMatrix<f64>,
    pub t: DMatrix<f64>,
    pub blocks: Vec<(usize, usize)>,
}

pub fn real_schur(a: &DMatrix<f64>) -> Result<RealSchur> {
    let n = a.nrows();
    let fail = || ModelError::NoConvergence {
        routine: "the real Schur form of a",
    };
    let schur = a
        .clone()
        .try_schur(f64::EPSILON, 100 * n + 100)
        .ok_or_else(fail)?;
    let (u, mut t) = schur.unpack();
    // Below the subdiagonal T is zero in exact arithmetic: make it so.
    for j in 0..n {
        for i in j + 2..n {
            t[(i, j)] = 0.0;
        }
    }
    let mut blocks = Vec::new();
    let mut i = 0;
    while i < n {
        if i + 1 < n && t[(i + 1, i)] != 0.0 {
            if i + 2 < n && t[(i + 2, i + 1)] != 0.0 {
                return Err(fail());
            }
            blocks.push((i, 2));
            i += 2;
        } else {
            blocks.push((i, 1));
            i += 1;
        }
    }
    Ok(RealSchur { u, t, blocks })
}

/// The eigenvalues (re, im) of T's diagonal blocks.
pub fn eigenvalues(s: &RealSchur) -> Vec<(f64, f64)> {
    let t = &s.t;
    let mut out = Vec::new();
    for &(i, size) in &s.blocks {
        if size == 1 {
            out.push((t[(i, i)], 0.0));
            continue;
        }
        let (a, b, c, d) = (t[(i, i)], t[(i, i + 1)], t[(i + 1, i)], t[(i + 1, i + 1)]);
        let half = 0.5 * (a + d);
        let disc = 0.25 * (a - d) * (a - d) + b * c;
        if disc >= 0.0 {
            out.push((half + disc.sqrt(), 0.0));
            out.push((half - disc.sqrt(), 0.0));
        } else {
            out.push((half, (-disc).sqrt()));
            out.push((half, -(-disc).sqrt()));
        }
    }
    out
}

/// The conditioning of the Gramians with respect to relative perturbations of the poles:
/// `max_i |λ_i| / |Re λ_i|` (continuous time; the Gramian of one mode is proportional to
/// `1 / |Re λ|`) or `max_i 1 / (1 − |λ_i|²)` (discrete time, likewise `1 / (1 − |λ|²)`),
/// at least 1. Lightly damped modes and poles near the unit circle make it large.
pub fn pole_conditioning(s: &RealSchur, discrete: bool) -> f64 {
    eigenvalues(s)
        .into_iter()
        .map(|(re, im)| {
            if discrete {
                1.0 / (1.0 - re.hypot(im).powi(2))
            } else {
                re.hypot(im) / re.abs()
            }
        })
        .fold(1.0, f64::max)
}

/// Refuses an unstable model, naming the offending eigenvalue.
pub fn check_stable(s: &RealSchur, discrete: bool) -> Result<()> {
    for (re, im) in eigenvalues(s) {
        let bad = if discrete {
            re.hypot(im) >= 1.0
        } else {
            re >= 0.0
        };
        if bad {
            let rule = if discrete {
                "magnitude >= 1 (discrete time)"
            } else {
                "real part >= 0 (continuous time)"
            };
            // A continuous-time refusal of a model whose poles all lie inside the unit
            // circle is most likely a discrete-time model passed without the flag.
            let hint = if !discrete && eigenvalues(s).iter().all(|&(r, i)| r.hypot(i) < 1.0) {
                "; every eigenvalue lies inside the unit circle, so the model looks discrete: \
                 pass discrete=True if it is a discrete-time model"
            } else {
                ""
            };
            return Err(ModelError::BadValue {
                arg: "a",
                detail: format!(
                    "the model is not stable: eigenvalue {re:.6e}{im:+.6e}j has {rule}; Gramians and balancing \
                     need a stable model{hint}"
                ),
            });
        }
    }
    Ok(())
}

/// Solves `K y = r` (K of order ≤ 4) by Gaussian elimination with partial pivoting.
pub(crate) fn small_solve(mut k: [[f64; 4]; 4], mut r: [f64; 4], n: usize) -> Result<[f64; 4]> {
    for col in 0..n {
        let piv = (col..n)
            .max_by(|&x, &y| k[x][col].abs().total_cmp(&k[y][col].abs()))
            .expect("nonempty");
        if k[piv][col] == 0.0 {
            return Err(ModelError::NoConvergence {
                routine: "a 2x2 block of the Lyapunov solver (singular)",
            });
        }
        k.swap(col, piv);
        r.swap(col, piv);
        for row in col + 1..n {
            let f = k[row][col] / k[col][col];
            for j in col..n {
                k[row][j] -= f * k[col][j];
            }
            r[row] -= f * r[col];
        }
    }
    let mut y = [0.0; 4];
    for row in (0..n).rev() {
        let mut s = r[row];
        for j in row + 1..n {
            s -= k[row][j] * y[j];
        }
        y[row] = s / k[row][row];
    }
    Ok(y)
}

/// Solves `T X + X Tᵀ = −F` (continuous) or `T X Tᵀ − X = −F` (discrete) on the quasi-upper-
/// triangular T with the given diagonal blocks.
pub fn solve_quasi_triangular(
    t: &DMatrix<f64>,
    blocks: &[(usize, usize)],
    f: &DMatrix<f64>,
    discrete: bool,
) -> Result<DMatrix<f64>> {
    let n = t.nrows();
    let mut x = DMatrix::<f64>::zeros(n, n);
    let mut g = DMatrix::<f64>::zeros(n, 2);
    for &(j0, bj) in blocks.iter().rev() {
        let jend = j0 + bj;
        // G[:, c] = Σ_{l ≥ jend} X[:, l] T[j0 + c, l]: the columns to the right, already known.
        for c in 0..bj {
            for i in 0..n {
                let mut s = 0.0;
                for l in jend..n {
                    s += x[(i, l)] * t[(j0 + c, l)];
                }
                g[(i, c)] = s;
            }
        }
        for &(i0, bi) in blocks.iter().rev() {
            let iend = i0 + bi;
            let mut rhs = [[0.0; 2]; 2];
            for r in 0..bi {
                for c in 0..bj {
                    let mut s = -f[(i0 + r, j0 + c)];
                    if discrete {
                        // − Σ_{k ≥ i0} T[i, k] G[k, c] − Σ_{k ≥ iend} T[i, k] (X[k, jj] T_jjᵀ)[c]
                        for k in i0..n {
                            s -= t[(i0 + r, k)] * g[(k, c)];
                        }
                        for k in iend..n {
                            let mut xt = 0.0;
                            for q in 0..bj {
                                xt += x[(k, j0 + q)] * t[(j0 + c, j0 + q)];
                            }
                            s -= t[(i0 + r, k)] * xt;
                        }
                    } else {
                        s -= g[(i0 + r, c)];
                        for k in iend..n {
                            s -= t[(i0 + r, k)] * x[(k, j0 + c)];
                        }
                    }
                    rhs[r][c] = s;
                }
            }
            // Unknown Y (bi × bj), column-major: y[r + bi c].
            let size = bi * bj;
            let mut k = [[0.0; 4]; 4];
            let mut rv = [0.0; 4];
            for c in 0..bj {
                for r in 0..bi {
                    rv[r + bi * c] = rhs[r][c];
                    for c2 in 0..bj {
                        for r2 in 0..bi {
                            let tii = t[(i0 + r, i0 + r2)];
                            let tjj = t[(j0 + c, j0 + c2)];
                            let same_r = if r == r2 { 1.0 } else { 0.0 };
                            let same_c = if c == c2 { 1.0 } else { 0.0 };
                            k[r + bi * c][r2 + bi * c2] = if discrete {
                                tjj * tii - same_r * same_c
                            } else {
                                same_c * tii + tjj * same_r
                            };
                        }
                    }
                }
            }
            let y = small_solve(k, rv, size)?;
            for c in 0..bj {
                for r in 0..bi {
                    x[(i0 + r, j0 + c)] = y[r + bi * c];
                }
            }
        }
    }
    Ok(x)
}

/// A solution W and its relative residual.
#[derive(Debug, Clone)]
pub struct Solution {
    pub w: DMatrix<f64>,
    pub residual: f64,
}

/// Overflow-safe Frobenius norm (nalgebra's `norm` squares the entries as they are).
fn frobenius(m: &DMatrix<f64>) -> f64 {
    crate::matrix::frobenius_norm(m.as_slice())
}

/// Relative residual of the Lyapunov (Stein) equation,
/// `‖R‖ / (2‖A‖‖W‖ + ‖Q‖)` (or `‖R‖ / (‖A‖²‖W‖ + ‖W‖ + ‖Q‖)`), evaluated divided through
/// by ‖W‖ so that neither quotient overflows where the ratio is representable.
pub fn residual(a: &DMatrix<f64>, w: &DMatrix<f64>, q: &DMatrix<f64>, discrete: bool) -> f64 {
    let aw = a * w;
    let r = if discrete {
        &aw * a.transpose() - w + q
    } else {
        &aw + aw.transpose() + q
    };
    let (na, nw, nq, nr) = (frobenius(a), frobenius(w), frobenius(q), frobenius(&r));
    if nw == 0.0 {
        return if nq == 0.0 { 0.0 } else { nr / nq };
    }
    let scale_over_w = if discrete {
        na * na + 1.0 + nq / nw
    } else {
        2.0 * na + nq / nw
    };
    (nr / nw) / scale_over_w
}

/// `A W + W Aᵀ + Q = 0` (or `A W Aᵀ − W + Q = 0`) for a stable A and symmetric Q, given
/// A's real Schur form.
pub fn solve_with_schur(
    a: &DMatrix<f64>,
    s: &RealSchur,
    q: &DMatrix<f64>,
    discrete: bool,
) -> Result<Solution> {
    let f = s.u.transpose() * q * &s.u;
    let x = solve_quasi_triangular(&s.t, &s.blocks, &f, discrete)?;
    let w = &s.u * x * s.u.transpose();
    let w = (&w + w.transpose()) * 0.5;
    if !w.iter().all(|v| v.is_finite()) {
        return Err(ModelError::Overflow {
            what: "the Gramian".into(),
        });
    }
    let residual = residual(a, &w, q, discrete);
    Ok(Solution { w, residual })
}

/// Solves the Lyapunov (Stein) equation for a square A and symmetric Q of the same size.
pub fn solve_lyapunov(a: &Matrix<f64>, q: &Matrix<f64>, discrete: bool) -> Result<Solution> {
    let n = a.rows();
    if a.cols() != n {
        return Err(ModelError::Shape {
            arg: "a",
            expected: "a square matrix".into(),
            found: format!("shape ({}, {})", n, a.cols()),
        });
    }
    if q.rows() != n || q.cols() != n {
        return Err(ModelError::Shape {
            arg: "q",
            expected: format!("shape ({n}, {n})"),
            found: format!("shape ({}, {})", q.rows(), q.cols()),
        });
    }
    require_finite("a", a.as_slice())?;
    require_finite("q", q.as_slice())?;
    let an = to_na(a);
    let s = real_schur(&an)?;
    check_stable(&s, discrete)?;
    solve_with_schur(&an, &s, &to_na(q), discrete)
}

/// Controllability and observability Gramians with their relative residuals.
#[derive(Debug, Clone)]
pub struct Gramians {
    pub wc: DMatrix<f64>,
    pub wo: DMatrix<f64>,
    pub residuals: [f64; 2],
}

pub(crate) fn check_triple(a: &Matrix<f64>, b: &Matrix<f64>, c: &Matrix<f64>) -> Result<()> {
    let d = Matrix::zeros(c.rows(), b.cols());
    StateSpace::new(a.clone(), b.clone(), c.clone(), d)?;
    require_finite("a", a.as_slice())?;
    require_finite("b", b.as_slice())?;
    require_finite("c", c.as_slice())
}

/// `A W_c + W_c Aᵀ + B Bᵀ = 0`, `Aᵀ W_o + W_o A + Cᵀ C = 0` (or the Stein equations).
pub fn gramians(
    a: &Matrix<f64>,
    b: &Matrix<f64>,
    c: &Matrix<f64>,
    discrete: bool,
) -> Result<Gramians> {
    check_triple(a, b, c)?;
    let (an, bn, cn) = (to_na(a), to_na(b), to_na(c));
    let s = real_schur(&an)?;
    check_stable(&s, discrete)?;
    let wc = solve_with_schur(&an, &s, &(&bn * bn.transpose()), discrete)?;
    let at = an.transpose();
    let st = real_schur(&at)?;
    let wo = solve_with_schur(&at, &st, &(cn.transpose() * &cn), discrete)?;
    Ok(Gramians {
        wc: wc.w,
        wo: wo.w,
        residuals: [wc.residual, wo.residual],
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn m(r: usize, c: usize, v: &[f64]) -> Matrix<f64> {
        Matrix::from_row_major(r, c, v.to_vec()).unwrap()
    }

    #[test]
    fn scalar_closed_forms() {
        // a w + w a + b² = 0 → w = b² / (−2a); a w a − w + b² = 0 → w = b² / (1 − a²) (hand).
        let w = solve_lyapunov(&m(1, 1, &[-2.0]), &m(1, 1, &[4.0]), false).unwrap();
        assert!((w.w[(0, 0)] - 1.0).abs() < 1e-15);
        let w = solve_lyapunov(&m(1, 1, &[0.5]), &m(1, 1, &[3.0]), true).unwrap();
        assert!((w.w[(0, 0)] - 4.0).abs() < 1e-14);
    }

    #[test]
    fn complex_poles_small_residual() {
        // Lightly damped pairs and a real pole: 2×2 Schur blocks (identity: the residual).
        let a = m(
            5,
            5,
            &[
                -0.1, 3.0, 0.2, 0.0, 1.0, -3.0, -0.1, 0.0, 0.5, 0.0, 0.0, 0.0, -1.0, 10.0, 0.3,
                0.0, 0.0, -10.0, -1.0, 0.0, 0.1, 0.2, 0.3, 0.4, -5.0,
            ],
        );
        let b = m(5, 2, &[1.0, 0.0, 0.0, 1.0, 1.0, 1.0, -1.0, 0.5, 0.2, 0.0]);
        let c = m(1, 5, &[1.0, 2.0, 0.0, -1.0, 0.5]);
        for discrete in [false, true] {
            let a = if discrete {
                from_na(&(to_na(&a) * 0.09))
            } else {
                a.clone()
            };
            let g = gramians(&a, &b, &c, discrete).unwrap();
            assert!(
                g.residuals[0] < 1e-14 && g.residuals[1] < 1e-14,
                "{:?}",
                g.residuals
            );
        }
    }

    #[test]
    fn unstable_refused() {
        let a = m(2, 2, &[0.0, 1.0, -1.0, 0.0]); // poles ±j
        let b = m(2, 1, &[0.0, 1.0]);
        let c = m(1, 2, &[1.0, 0.0]);
        assert!(matches!(
            gramians(&a, &b, &c, false),
            Err(ModelError::BadValue { arg: "a", .. })
        ));
        let a = m(2, 2, &[0.5, 0.0, 0.0, -1.0]);
        assert!(matches!(
            gramians(&a, &b, &c, true),
            Err(ModelError::BadValue { arg: "a", .. })
        ));
        assert!(gramians(
            &Matrix::zeros(0, 0),
            &Matrix::zeros(0, 1),
            &Matrix::zeros(1, 0),
            false
        )
        .is_ok());
    }
}
