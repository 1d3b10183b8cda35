//! Cholesky factors of the Gramians computed directly: `W = L Lᵀ` with
//! `A W + W Aᵀ + B Bᵀ = 0` (continuous time) or `A W Aᵀ − W + B Bᵀ = 0` (discrete time),
//! and the same for the observability Gramian with `(Aᵀ, Cᵀ)`.
//!
//! # Purpose
//! The square-root factors that balancing and the Hankel singular values need, without
//! forming the Gramian and without an eigen-decomposition of it: the factor of a
//! positive semidefinite W whose condition number is far beyond 1/eps keeps the
//! information that rounding would destroy in `W` itself (a factor has the square root of
//! W's condition number), and its diagonal is never clipped.
//!
//! # Method
//! Hammarling (1982). The real Schur form `A = Q S Qᵀ` (nalgebra; 2×2 diagonal blocks with
//! real eigenvalues are split by one rotation first), then `F = Qᵀ B` is replaced by the
//! upper triangular R with `R Rᵀ = F Fᵀ` (reflections from the right). The transformed
//! equation `S X + X Sᵀ + R Rᵀ = 0` is solved for the upper triangular `U` with `X = U Uᵀ`
//! block by block from the last diagonal block of S (size k = 1 or 2) to the first. With
//! `S = [[S₁, s], [0, λ]]`, `R = [[R₁₁, r₁₂], [0, r₂₂]]`, `U = [[U₁, u], [0, τ]]`:
//!
//! * `λ ττᵀ + ττᵀ λᵀ + r₂₂ r₂₂ᵀ = 0` (discrete: `λ ττᵀ λᵀ − ττᵀ + r₂₂ r₂₂ᵀ = 0`) gives τ:
//!   in closed form for k = 1 (`τ = |r₂₂| / √(−2λ)`, discrete `|r₂₂| / √((1−λ)(1+λ))`), and
//!   for k = 2 as the upper Cholesky factor of the 2×2 solution (its determinant with
//!   error-free products);
//! * with `M = τ⁻¹ r₂₂` and `Γ = (τ⁻¹ λ τ)ᵀ`, the column block u solves the Sylvester
//!   equation `S₁ u + u Γ = −s τ − r₁₂ Mᵀ` (discrete: `u − S₁ u Γ = s τ Γ + r₁₂ Mᵀ`),
//!   block row by block row from the bottom;
//! * the leading problem is the same equation of order n − k with `R₁ R₁ᵀ` replaced by
//!   `[R₁₁, w][R₁₁, w]ᵀ`, where `w = r₁₂ − u M` (discrete: `w = [v, r₁₂] N⊥` with
//!   `v = S₁ u + s τ` and `N⊥` an orthonormal complement of `N = [Γ; Mᵀ]`, whose columns
//!   are orthonormal by the 2×2 equation); `[R₁₁, w]` is brought back to upper triangular
//!   form by reflections that mix column i with w (O(n² k) per step).
//!
//! Where τ = 0 (a block the inputs do not reach) M = 0 and Γ = 0 (discrete Γ = I) satisfy
//! the same identities, so u = 0 and the recursion goes on; nothing is divided by τ's size.
//! The factor in the original coordinates is `L = Q U`. The observability factor reuses
//! the same Schur form: `Aᵀ = (Q P)(P Sᵀ P)(Q P)ᵀ` with P the reversal permutation is again
//! a real Schur form, so one Schur decomposition serves both Gramians, and
//! `L_oᵀ L_c = U_oᵀ P U_c` without the orthogonal factors.
//!
//! # Numerical aspects
//! Every step is a triangular solve, a 2×2 closed form or an orthogonal reflection; the
//! method is backward stable in the sense that the computed U is the exact factor of a
//! Lyapunov (Stein) equation with nearby S and R (Hammarling 1982, §6), and the residual
//! `‖S UUᵀ + UUᵀ Sᵀ + R Rᵀ‖ / (2‖S‖‖U‖² + ‖R‖²)` measured in the tests is of order n eps.
//! The factor's diagonal is nonnegative by construction. The forward error, like that of
//! any solver, grows with the separation of A and −Aᵀ (a pole near the stability boundary).
//! A 2×2 block whose own 2×2 Gramian is singular to working precision (possible only for a
//! pair of eigenvalues that is extremely non-normal) is refused rather than factored wrongly.
//! Data of any magnitude: the 2×2 steps work on copies scaled by their largest entry, the
//! reflections on scaled norms. Cost ≈ 10 n³ for the Schur form plus O(n³) for the recursion.
//!
//! # References
//! S. J. Hammarling, "Numerical solution of the stable, non-negative definite Lyapunov
//! equation", IMA J. Numer. Anal. 2 (1982) 303–323 (both the continuous and the discrete
//! equation). G. H. Golub and C. F. Van Loan, *Matrix Computations*, 4th ed., 2013, §5.1
//! (Householder reflections), §7.4 (real Schur form).
//!
//! # Errors
//! `Shape` / `NonFinite` for bad input; `BadValue` on `a` for an unstable model (as
//! [`super::lyapunov::check_stable`]); `NoConvergence` if the Schur form fails, a small
//! block system is singular, or a 2×2 block's own Gramian is numerically singular;
//! `Overflow` for a non-finite factor.

use super::lyapunov::{check_stable, check_triple, real_schur, small_solve, to_na, RealSchur};
use crate::error::{ModelError, Result};
use crate::matrix::Matrix;
use nalgebra::DMatrix;

/// The Householder reflector of x: `(β, v, t)` with `(I − t [1; v][1; v]ᵀ) x = β e₀`
/// (t = 0, the identity, when x's tail is zero). Norms are computed scaled.
fn reflector(x: &[f64]) -> (f64, Vec<f64>, f64) {
    let tail = &x[1..];
    let tail_norm = scaled_norm(tail);
    let alpha = x[0];
    if tail_norm == 0.0 {
        return (alpha, vec![0.0; tail.len()], 0.0);
    }
    let norm = alpha.hypot(tail_norm);
    let beta = if alpha >= 0.0 { -norm } else { norm };
    let t = (beta - alpha) / beta;
    let denom = alpha - beta;
    (beta, tail.iter().map(|v| v / denom).collect(), t)
}

fn scaled_norm(x: &[f64]) -> f64 {
    let big = x.iter().fold(0.0f64, |m, v| m.max(v.abs()));
    if big == 0.0 || !big.is_finite() {
        return big;
    }
    big * x.iter().map(|v| (v / big) * (v / big)).sum::<f64>().sqrt()
}

/// Given the upper triangular leading `size × size` part of `r` and `w` (`size × k`),
/// overwrites that part with an upper triangular R' such that `R' R'ᵀ = R Rᵀ + w wᵀ`,
/// by reflections that mix column i of R with the columns of w, from the last row up.
fn absorb_columns(r: &mut DMatrix<f64>, size: usize, w: &mut DMatrix<f64>) {
    let k = w.ncols();
    let mut x = vec![0.0; k + 1];
    for i in (0..size).rev() {
        x[0] = r[(i, i)];
        for q in 0..k {
            x[q + 1] = w[(i, q)];
        }
        let (beta, v, t) = reflector(&x);
        if t == 0.0 {
            continue;
        }
        for row in 0..i {
            let mut dot = r[(row, i)];
            for q in 0..k {
                dot += w[(row, q)] * v[q];
            }
            let f = t * dot;
            r[(row, i)] -= f;
            for q in 0..k {
                w[(row, q)] -= f * v[q];
            }
        }
        r[(i, i)] = beta;
        for q in 0..k {
            w[(i, q)] = 0.0;
        }
    }
}

/// The upper triangular R (n × n) with `R Rᵀ = F Fᵀ`.
pub fn triangular_square_root(f: &DMatrix<f64>) -> DMatrix<f64> {
    let n = f.nrows();
    let mut r = DMatrix::zeros(n, n);
    let mut w = f.clone();
    absorb_columns(&mut r, n, &mut w);
    r
}

/// `a b − c d` with one rounding (error-free products by fused multiply-add).
fn difference_of_products(a: f64, b: f64, c: f64, d: f64) -> f64 {
    let p = a * b;
    let ep = a.mul_add(b, -p);
    let q = c * d;
    let eq = c.mul_add(d, -q);
    (p - q) + (ep - eq)
}

type Small = [[f64; 2]; 2];

/// The diagonal block's quantities τ (upper triangular), M = τ⁻¹ r₂₂ and Γ = (τ⁻¹ λ τ)ᵀ.
struct BlockStep {
    tau: Small,
    m: Small,
    gamma: Small,
}

fn block_step(lambda: &Small, r22: &Small, k: usize, discrete: bool) -> Result<BlockStep> {
    if k == 1 {
        let l = lambda[0][0];
        let root = if discrete {
            ((1.0 - l) * (1.0 + l)).sqrt()
        } else {
            (-2.0 * l).sqrt()
        };
        let rr = r22[0][0];
        let m = if rr < 0.0 { -root } else { root };
        return Ok(BlockStep {
            tau: [[rr.abs() / root, 0.0], [0.0; 2]],
            m: [[m, 0.0], [0.0; 2]],
            gamma: [[l, 0.0], [0.0; 2]],
        });
    }
    let scale = r22.iter().flatten().fold(0.0f64, |mx, v| mx.max(v.abs()));
    if scale == 0.0 {
        // A block the inputs do not reach: τ = 0, M = 0, Γ = 0 (discrete Γ = I).
        let g = if discrete { 1.0 } else { 0.0 };
        return Ok(BlockStep {
            tau: [[0.0; 2]; 2],
            m: [[0.0; 2]; 2],
            gamma: [[g, 0.0], [0.0, g]],
        });
    }
    let rs: Small = [
        [r22[0][0] / scale, r22[0][1] / scale],
        [r22[1][0] / scale, r22[1][1] / scale],
    ];
    // Right-hand side Q = rs rsᵀ and the 4×4 Kronecker system for vec(Y), Y[r][c] = y[r + 2c].
    let mut q = [0.0; 4];
    for c in 0..2 {
        for r in 0..2 {
            q[r + 2 * c] = -(rs[r][0] * rs[c][0] + rs[r][1] * rs[c][1]);
        }
    }
    let mut kron = [[0.0; 4]; 4];
    for c in 0..2 {
        for r in 0..2 {
            for c2 in 0..2 {
                for r2 in 0..2 {
                    let same = if r == r2 && c == c2 { 1.0 } else { 0.0 };
                    kron[r + 2 * c][r2 + 2 * c2] = if discrete {
                        lambda[r][r2] * lambda[c][c2] - same
                    } else {
                        let dc = if c == c2 { 1.0 } else { 0.0 };
                        let dr = if r == r2 { 1.0 } else { 0.0 };
                        lambda[r][r2] * dc + dr * lambda[c][c2]
                    };
                }
            }
        }
    }
    let y = small_solve(kron, q, 4)?;
    let (y11, y12, y22) = (y[0], 0.5 * (y[1] + y[2]), y[3]);
    let det = difference_of_products(y11, y22, y12, y12);
    if y22.is_nan() || y22 <= 0.0 || det.is_nan() || det <= 0.0 {
        return Err(ModelError::NoConvergence {
            routine:
                "the Cholesky factor of a 2x2 diagonal block of a Gramian (numerically singular)",
        });
    }
    let t22 = y22.sqrt();
    let t12 = y12 / t22;
    let t11 = (det / y22).sqrt();
    let tau: Small = [[t11 * scale, t12 * scale], [0.0, t22 * scale]];
    // τ⁻¹ of the scaled factor (scale cancels in M and Γ).
    let inv: Small = [[1.0 / t11, -t12 / (t11 * t22)], [0.0, 1.0 / t22]];
    let ts: Small = [[t11, t12], [0.0, t22]];
    let mul = |x: &Small, z: &Small| -> Small {
        let mut o = [[0.0; 2]; 2];
        for i in 0..2 {
            for j in 0..2 {
                o[i][j] = x[i][0] * z[0][j] + x[i][1] * z[1][j];
            }
        }
        o
    };
    let m = mul(&inv, &rs);
    let g = mul(&mul(&inv, lambda), &ts);
    Ok(BlockStep {
        tau,
        m,
        gamma: [[g[0][0], g[1][0]], [g[0][1], g[1][1]]],
    })
}

/// Solves `T y = rhs` (bi × k unknowns y, column-major y[r + bi c]) where the operator is
/// `y ↦ S_ii y + y Γ` (continuous) or `y ↦ y − S_ii y Γ` (discrete).
fn small_sylvester(
    sii: &Small,
    gamma: &Small,
    rhs: &Small,
    bi: usize,
    k: usize,
    discrete: bool,
) -> Result<Small> {
    let mut kron = [[0.0; 4]; 4];
    let mut rv = [0.0; 4];
    for c in 0..k {
        for r in 0..bi {
            rv[r + bi * c] = rhs[r][c];
            for c2 in 0..k {
                for r2 in 0..bi {
                    let dc = if c == c2 { 1.0 } else { 0.0 };
                    let dr = if r == r2 { 1.0 } else { 0.0 };
                    kron[r + bi * c][r2 + bi * c2] = if discrete {
                        dr * dc - sii[r][r2] * gamma[c2][c]
                    } else {
                        sii[r][r2] * dc + dr * gamma[c2][c]
                    };
                }
            }
        }
    }
    let y = small_solve(kron, rv, bi * k)?;
    let mut out = [[0.0; 2]; 2];
    for c in 0..k {
        for r in 0..bi {
            out[r][c] = y[r + bi * c];
        }
    }
    Ok(out)
}

/// The upper triangular U with `S X + X Sᵀ + F Fᵀ = 0` (discrete: `S X Sᵀ − X + F Fᵀ = 0`),
/// `X = U Uᵀ`, for the quasi-upper-triangular S with the given diagonal blocks (each 2×2
/// block with a complex pair) and S stable.
pub fn factor_on_schur(
    s: &DMatrix<f64>,
    blocks: &[(usize, usize)],
    f: &DMatrix<f64>,
    discrete: bool,
) -> Result<DMatrix<f64>> {
    let n = s.nrows();
    let mut r = triangular_square_root(f);
    let mut u_factor = DMatrix::<f64>::zeros(n, n);
    for idx in (0..blocks.len()).rev() {
        let (j, k) = blocks[idx];
        let mut lambda = [[0.0; 2]; 2];
        let mut r22 = [[0.0; 2]; 2];
        for a in 0..k {
            for b in 0..k {
                lambda[a][b] = s[(j + a, j + b)];
                r22[a][b] = if b >= a { r[(j + a, j + b)] } else { 0.0 };
            }
        }
        let step = block_step(&lambda, &r22, k, discrete)?;
        let (tau, m, gamma) = (step.tau, step.m, step.gamma);
        for a in 0..k {
            for b in a..k {
                u_factor[(j + a, j + b)] = tau[a][b];
            }
        }
        if j == 0 {
            break;
        }
        // s τ (j × k), and r₁₂ Mᵀ (j × k).
        let mut s_tau = DMatrix::<f64>::zeros(j, k);
        let mut r12_mt = DMatrix::<f64>::zeros(j, k);
        for row in 0..j {
            for c in 0..k {
                let mut st = 0.0;
                let mut rm = 0.0;
                for q in 0..k {
                    st += s[(row, j + q)] * tau[q][c];
                    rm += r[(row, j + q)] * m[c][q];
                }
                s_tau[(row, c)] = st;
                r12_mt[(row, c)] = rm;
            }
        }
        // Right-hand side of the Sylvester (Stein–Sylvester) equation for u.
        let mut rhs = DMatrix::<f64>::zeros(j, k);
        for row in 0..j {
            for c in 0..k {
                rhs[(row, c)] = if discrete {
                    let mut stg = 0.0;
                    for q in 0..k {
                        stg += s_tau[(row, q)] * gamma[q][c];
                    }
                    stg + r12_mt[(row, c)]
                } else {
                    -s_tau[(row, c)] - r12_mt[(row, c)]
                };
            }
        }
        // Block rows from the bottom; `acc` holds Σ_{l > i} S_il u_l.
        let mut u = DMatrix::<f64>::zeros(j, k);
        let mut acc = DMatrix::<f64>::zeros(j, k);
        let mut v = DMatrix::<f64>::zeros(j, k);
        for &(i0, bi) in blocks[..idx].iter().rev() {
            let mut sii = [[0.0; 2]; 2];
            let mut local = [[0.0; 2]; 2];
            for a in 0..bi {
                for b in 0..bi {
                    sii[a][b] = s[(i0 + a, i0 + b)];
                }
                for c in 0..k {
                    local[a][c] = if discrete {
                        let mut ag = 0.0;
                        for q in 0..k {
                            ag += acc[(i0 + a, q)] * gamma[q][c];
                        }
                        rhs[(i0 + a, c)] + ag
                    } else {
                        rhs[(i0 + a, c)] - acc[(i0 + a, c)]
                    };
                }
            }
            let ui = small_sylvester(&sii, &gamma, &local, bi, k, discrete)?;
            for a in 0..bi {
                for c in 0..k {
                    u[(i0 + a, c)] = ui[a][c];
                    let mut su = 0.0;
                    for b in 0..bi {
                        su += sii[a][b] * ui[b][c];
                    }
                    v[(i0 + a, c)] = su + acc[(i0 + a, c)] + s_tau[(i0 + a, c)];
                }
            }
            for row in 0..i0 {
                for c in 0..k {
                    let mut su = 0.0;
                    for b in 0..bi {
                        su += s[(row, i0 + b)] * ui[b][c];
                    }
                    acc[(row, c)] += su;
                }
            }
        }
        for row in 0..j {
            for c in 0..k {
                u_factor[(row, j + c)] = u[(row, c)];
            }
        }
        // The columns that join R₁₁ in the leading problem.
        let mut w = DMatrix::<f64>::zeros(j, k);
        if !discrete {
            for row in 0..j {
                for c in 0..k {
                    let mut um = 0.0;
                    for q in 0..k {
                        um += u[(row, q)] * m[q][c];
                    }
                    w[(row, c)] = r[(row, j + c)] - um;
                }
            }
        } else {
            let complement = orthonormal_complement(&gamma, &m, k);
            for row in 0..j {
                for c in 0..k {
                    let mut x = 0.0;
                    for q in 0..k {
                        x +=
                            v[(row, q)] * complement[q][c] + r[(row, j + q)] * complement[k + q][c];
                    }
                    w[(row, c)] = x;
                }
            }
        }
        absorb_columns(&mut r, j, &mut w);
    }
    if !u_factor.iter().all(|x| x.is_finite()) {
        return Err(ModelError::Overflow {
            what: "the Cholesky factor of the Gramian".into(),
        });
    }
    Ok(u_factor)
}

/// An orthonormal basis (2k × k) of the complement of the columns of `N = [Γ; Mᵀ]`
/// (which are orthonormal up to rounding), from the reflections of N's QR factorization.
fn orthonormal_complement(gamma: &Small, m: &Small, k: usize) -> [[f64; 2]; 4] {
    let size = 2 * k;
    // Columns of N.
    let mut cols = [[0.0; 4]; 2];
    for r in 0..k {
        for c in 0..k {
            cols[c][r] = gamma[r][c];
            cols[c][k + r] = m[c][r];
        }
    }
    // Reflections H_c for c = 0..k, applied to N; then H_0 ... H_{k-1} [e_k ... e_{2k-1}].
    let mut refl: Vec<(Vec<f64>, f64, usize)> = Vec::new();
    for c in 0..k {
        let x: Vec<f64> = cols[c][c..size].to_vec();
        let (_, v, t) = reflector(&x);
        let mut full = vec![1.0];
        full.extend(v);
        for column in cols.iter_mut().take(k).skip(c) {
            let dot: f64 = (c..size).map(|r| full[r - c] * column[r]).sum();
            for r in c..size {
                column[r] -= t * dot * full[r - c];
            }
        }
        refl.push((full, t, c));
    }
    let mut out = [[0.0; 2]; 4];
    for c in 0..k {
        let mut e = [0.0; 4];
        e[k + c] = 1.0;
        for (full, t, start) in refl.iter().rev() {
            let dot: f64 = (*start..size).map(|r| full[r - start] * e[r]).sum();
            for r in *start..size {
                e[r] -= t * dot * full[r - start];
            }
        }
        for r in 0..size {
            out[r][c] = e[r];
        }
    }
    out
}

/// Splits every 2×2 diagonal block with real eigenvalues by one rotation, so that each
/// remaining 2×2 block holds a complex pair (the recursion needs a nonsingular 2×2 factor).
pub fn split_real_blocks(schur: &mut RealSchur) {
    let n = schur.t.nrows();
    let mut blocks = Vec::new();
    for &(i, size) in &schur.blocks.clone() {
        if size == 1 {
            blocks.push((i, 1));
            continue;
        }
        let t = &schur.t;
        let (a, b, c, d) = (t[(i, i)], t[(i, i + 1)], t[(i + 1, i)], t[(i + 1, i + 1)]);
        let half = 0.5 * (a - d);
        let disc = half * half + b * c;
        if disc < 0.0 {
            blocks.push((i, 2));
            continue;
        }
        // An eigenvector (x, y) for μ = (a + d)/2 + sign(half)√disc. With
        // `shifted = μ − d` (no cancellation) and `μ − a = b c / shifted` (from
        // (μ − a)(μ − d) = b c): (shifted, c) or (b, μ − a), whichever is larger.
        let root = disc.sqrt();
        let shifted = if half >= 0.0 {
            half + root
        } else {
            half - root
        };
        let (x, y) = if shifted != 0.0 {
            let first = (shifted, c);
            let second = (b, b * c / shifted);
            if first.0.hypot(first.1) >= second.0.hypot(second.1) {
                first
            } else {
                second
            }
        } else if c == 0.0 {
            (1.0, 0.0)
        } else {
            (0.0, 1.0)
        };
        let h = x.hypot(y);
        let (cs, sn) = (x / h, y / h);
        // G = [[cs, −sn], [sn, cs]]; T ← Gᵀ T G on rows/columns i, i+1; Q ← Q G.
        let t = &mut schur.t;
        for col in 0..n {
            let (p, q) = (t[(i, col)], t[(i + 1, col)]);
            t[(i, col)] = cs * p + sn * q;
            t[(i + 1, col)] = -sn * p + cs * q;
        }
        for row in 0..n {
            let (p, q) = (t[(row, i)], t[(row, i + 1)]);
            t[(row, i)] = cs * p + sn * q;
            t[(row, i + 1)] = -sn * p + cs * q;
        }
        t[(i + 1, i)] = 0.0;
        let u = &mut schur.u;
        for row in 0..n {
            let (p, q) = (u[(row, i)], u[(row, i + 1)]);
            u[(row, i)] = cs * p + sn * q;
            u[(row, i + 1)] = -sn * p + cs * q;
        }
        blocks.push((i, 1));
        blocks.push((i + 1, 1));
    }
    schur.blocks = blocks;
}

/// Both Cholesky factors of a stable model's Gramians from one real Schur form.
#[derive(Debug, Clone)]
pub struct GramianFactors {
    /// `W_c = L_c L_cᵀ` (n × n) in the model's coordinates.
    pub lc: DMatrix<f64>,
    /// `W_o = L_o L_oᵀ` (n × n) in the model's coordinates.
    pub lo: DMatrix<f64>,
    /// `L_oᵀ L_c`, formed from the triangular factors (`U_oᵀ P U_c`).
    pub product: DMatrix<f64>,
    /// The real Schur form of A used (2×2 blocks hold complex pairs).
    pub schur: RealSchur,
    /// `‖ |U_oᵀ P| |U_c| ‖_F`: the scale of the rounding errors of forming the product
    /// (|fl(XY) − XY| ≤ γ_n |X| |Y| entrywise, Higham 2002, §3.5).
    pub product_abs_norm: f64,
}

/// The Cholesky factors of both Gramians of (A, B, C).
pub fn gramian_factors(
    a: &Matrix<f64>,
    b: &Matrix<f64>,
    c: &Matrix<f64>,
    discrete: bool,
) -> Result<GramianFactors> {
    check_triple(a, b, c)?;
    let (an, bn, cn) = (to_na(a), to_na(b), to_na(c));
    let n = an.nrows();
    let mut schur = real_schur(&an)?;
    check_stable(&schur, discrete)?;
    split_real_blocks(&mut schur);
    let fc = schur.u.transpose() * &bn;
    let uc = factor_on_schur(&schur.t, &schur.blocks, &fc, discrete)?;
    // Aᵀ = (Q P)(P Sᵀ P)(Q P)ᵀ: reverse rows and columns of Sᵀ, and the block list.
    let flipped = DMatrix::from_fn(n, n, |i, j| schur.t[(n - 1 - j, n - 1 - i)]);
    let flipped_blocks: Vec<(usize, usize)> = schur
        .blocks
        .iter()
        .rev()
        .map(|&(i, size)| (n - i - size, size))
        .collect();
    let qtc = schur.u.transpose() * cn.transpose();
    let fo = DMatrix::from_fn(n, cn.nrows(), |i, j| qtc[(n - 1 - i, j)]);
    let uo = factor_on_schur(&flipped, &flipped_blocks, &fo, discrete)?;
    let lc = &schur.u * &uc;
    // L_o = Q P U_o: row i of P U_o is row n − 1 − i of U_o.
    let puo = DMatrix::from_fn(n, n, |i, j| uo[(n - 1 - i, j)]);
    let lo = &schur.u * &puo;
    let product = puo.transpose() * &uc;
    let abs_product = puo.abs().transpose() * uc.abs();
    let product_abs_norm = crate::matrix::frobenius_norm(abs_product.as_slice());
    Ok(GramianFactors {
        lc,
        lo,
        product,
        schur,
        product_abs_norm,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::gramian::lyapunov::{from_na, gramians};

    fn m(r: usize, c: usize, v: &[f64]) -> Matrix<f64> {
        Matrix::from_row_major(r, c, v.to_vec()).unwrap()
    }

    /// A seeded pseudo-random generator (splitmix64) for test data.
    fn uniform(seed: &mut u64) -> f64 {
        *seed = seed.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = *seed;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^= z >> 31;
        (z >> 11) as f64 / (1u64 << 53) as f64 * 2.0 - 1.0
    }

    fn random(r: usize, c: usize, seed: &mut u64) -> DMatrix<f64> {
        DMatrix::from_fn(r, c, |_, _| uniform(seed))
    }

    /// A stable random A: shifted (continuous) or scaled into the unit disc (discrete).
    fn stable(n: usize, seed: &mut u64, discrete: bool) -> DMatrix<f64> {
        let a = random(n, n, seed);
        let ev = a.complex_eigenvalues();
        if discrete {
            let rho = ev.iter().map(|z| z.norm()).fold(0.0, f64::max);
            a * (0.9 / rho)
        } else {
            let top = ev.iter().map(|z| z.re).fold(f64::MIN, f64::max);
            a - DMatrix::identity(n, n) * (top + 0.2)
        }
    }

    fn residual(a: &DMatrix<f64>, l: &DMatrix<f64>, f: &DMatrix<f64>, discrete: bool) -> f64 {
        let w = l * l.transpose();
        let q = f * f.transpose();
        let r = if discrete {
            a * &w * a.transpose() - &w + &q
        } else {
            a * &w + &w * a.transpose() + &q
        };
        let scale = if discrete {
            a.norm() * a.norm() * w.norm() + w.norm() + q.norm()
        } else {
            2.0 * a.norm() * w.norm() + q.norm()
        };
        r.norm() / scale
    }

    #[test]
    fn triangular_square_root_reproduces_f_ft() {
        // R Rᵀ = F Fᵀ and R upper triangular (identity), wide and tall F.
        let mut seed = 7;
        for (n, m) in [(5, 2), (4, 7), (6, 6), (1, 3)] {
            let f = random(n, m, &mut seed);
            let r = triangular_square_root(&f);
            for i in 0..n {
                for j in 0..i {
                    assert_eq!(r[(i, j)], 0.0);
                }
            }
            let err = (&r * r.transpose() - &f * f.transpose()).norm();
            assert!(err < 1e-14 * (&f * f.transpose()).norm(), "{err}");
        }
    }

    #[test]
    fn scalar_closed_forms() {
        // a w + w a + b² = 0 → w = b²/(−2a); a w a − w + b² = 0 → w = b²/(1 − a²) (hand).
        let g =
            gramian_factors(&m(1, 1, &[-2.0]), &m(1, 1, &[2.0]), &m(1, 1, &[3.0]), false).unwrap();
        assert!((g.lc[(0, 0)].abs() - 1.0).abs() < 1e-15);
        assert!((g.lo[(0, 0)].abs() - 1.5).abs() < 1e-15);
        let g =
            gramian_factors(&m(1, 1, &[0.5]), &m(1, 1, &[3.0]), &m(1, 1, &[1.0]), true).unwrap();
        assert!((g.lc[(0, 0)].powi(2) - 12.0).abs() < 1e-13);
    }

    #[test]
    fn residuals_and_agreement_with_bartels_stewart() {
        // Residual identity of both equations, and L Lᵀ equal to the Bartels–Stewart
        // Gramians (well-conditioned random cases, several inputs and outputs).
        let mut seed = 11;
        for discrete in [false, true] {
            for (n, mi, p) in [
                (1, 1, 1),
                (2, 1, 1),
                (5, 2, 3),
                (9, 1, 1),
                (16, 3, 2),
                (30, 2, 4),
            ] {
                let a = stable(n, &mut seed, discrete);
                let b = random(n, mi, &mut seed);
                let c = random(p, n, &mut seed);
                let (am, bm, cm) = (from_na(&a), from_na(&b), from_na(&c));
                let g = gramian_factors(&am, &bm, &cm, discrete).unwrap();
                let rc = residual(&a, &g.lc, &b, discrete);
                let ro = residual(&a.transpose(), &g.lo, &c.transpose(), discrete);
                assert!(rc < 1e-14 && ro < 1e-14, "n {n} {discrete}: {rc:e} {ro:e}");
                let bs = gramians(&am, &bm, &cm, discrete).unwrap();
                let wc = &g.lc * g.lc.transpose();
                let wo = &g.lo * g.lo.transpose();
                assert!((&wc - &bs.wc).norm() < 1e-11 * bs.wc.norm());
                assert!((&wo - &bs.wo).norm() < 1e-11 * bs.wo.norm());
                // L_oᵀ L_c equals the triangular product (identity: Qᵀ Q = I).
                let direct = g.lo.transpose() * &g.lc;
                assert!((&direct - &g.product).norm() < 1e-12 * direct.norm());
            }
        }
    }

    #[test]
    fn lightly_damped_pairs_and_unreached_blocks() {
        // 2×2 blocks with damping 1e-4, and a block the input does not reach (b = 0 there):
        // the factor stays exact (identity: residual) and its rows for that block vanish.
        let a = m(
            5,
            5,
            &[
                -1e-4, 5.0, 0.0, 0.0, 0.0, -5.0, -1e-4, 0.0, 0.0, 0.0, 0.0, 0.0, -0.3, 2.0, 0.0,
                0.0, 0.0, -2.0, -0.3, 0.0, 0.0, 0.0, 0.0, 0.0, -1.0,
            ],
        );
        let b = m(5, 1, &[1.0, 0.5, 0.0, 0.0, 1.0]);
        let c = m(1, 5, &[1.0, 0.0, 1.0, 1.0, 2.0]);
        for discrete in [false, true] {
            let a = if discrete {
                from_na(&(to_na(&a) * 0.19))
            } else {
                a.clone()
            };
            let g = gramian_factors(&a, &b, &c, discrete).unwrap();
            let an = to_na(&a);
            assert!(residual(&an, &g.lc, &to_na(&b), discrete) < 1e-14);
            let wc = &g.lc * g.lc.transpose();
            for j in 0..5 {
                assert!(
                    wc[(2, j)].abs() < 1e-14 * wc.norm() && wc[(3, j)].abs() < 1e-14 * wc.norm()
                );
            }
        }
    }

    #[test]
    fn real_pair_blocks_are_split() {
        // A 2×2 block with real eigenvalues −1, −3 given as a full block: split, same factor.
        let mut s = RealSchur {
            u: DMatrix::identity(2, 2),
            t: DMatrix::from_row_slice(2, 2, &[-2.0, 1.0, 1.0, -2.0]),
            blocks: vec![(0, 2)],
        };
        split_real_blocks(&mut s);
        assert_eq!(s.blocks, vec![(0, 1), (1, 1)]);
        assert!(s.t[(1, 0)] == 0.0);
        let back = &s.u * &s.t * s.u.transpose();
        let err = (back - DMatrix::from_row_slice(2, 2, &[-2.0, 1.0, 1.0, -2.0])).norm();
        assert!(err < 1e-14, "{err} {}", s.t);
        let mut d = [s.t[(0, 0)], s.t[(1, 1)]];
        d.sort_by(f64::total_cmp);
        assert!((d[0] + 3.0).abs() < 1e-15 && (d[1] + 1.0).abs() < 1e-15);
    }

    #[test]
    fn huge_and_tiny_data() {
        // B of size 1e300 or 1e-300: no overflow in the factor (the Gramian itself would).
        for scale in [1e300, 1e-300] {
            let a = m(2, 2, &[-1.0, 3.0, -3.0, -1.0]);
            let b = m(2, 1, &[scale, 0.5 * scale]);
            let c = m(1, 2, &[1.0, 1.0]);
            let g = gramian_factors(&a, &b, &c, false).unwrap();
            let unit = gramian_factors(&a, &m(2, 1, &[1.0, 0.5]), &c, false).unwrap();
            let err = (&g.lc / scale - &unit.lc).norm() / unit.lc.norm();
            assert!(err < 1e-14, "{err}");
        }
    }
}
