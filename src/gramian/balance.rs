//! Hankel singular values and balanced realizations of a stable model: a T with
//! `T⁻¹ W_c T⁻ᵀ = Tᵀ W_o T = Σ = diag(σ_1 ≥ σ_2 ≥ ...)`.
//!
//! # Purpose
//! The Hankel singular values `σ_i = sqrt(λ_i(W_c W_o))` and the balanced realization
//! `(T⁻¹ A T, T⁻¹ B, C T, D)`, truncated to its first r states when asked. Balanced
//! truncation keeps stability and obeys `‖G − G_r‖_∞ ≤ 2 (σ_{r+1} + ... + σ_n)`.
//!
//! # Method
//! Square-root balancing (Laub, Heath, Paige & Ward 1987; Tombs & Postlethwaite 1987): the
//! Gramians from [`super::lyapunov`]; factors `W_c = L_c L_cᵀ`, `W_o = L_o L_oᵀ` from the
//! symmetric eigen-decompositions `W = V Λ Vᵀ`, `L = V Λ₊^(1/2)` (eigenvalues clipped at 0,
//! as rounding can make a semidefinite Gramian slightly indefinite); the SVD
//! `L_oᵀ L_c = U Σ Zᵀ`; then `T_r = L_c Z_r Σ_r^(−1/2)` and its left inverse
//! `S_r = Σ_r^(−1/2) U_rᵀ L_oᵀ` (`S_r T_r = I_r`), and `A_r = S_r A T_r`, `B_r = S_r B`,
//! `C_r = C T_r`. The same formulas hold in discrete time with the Stein Gramians, and so
//! does the error bound (Al-Saggaf & Franklin 1987).
//!
//! # Numerical aspects
//! No Gramian is inverted and the product `W_c W_o` is never formed. The σ_i carry an
//! absolute error of order `n eps ‖L_o‖ ‖L_c‖` (the largest ones are accurate to a few
//! ulps, the smallest ones only absolutely; Hammarling's direct Cholesky factors would do
//! better on those). A kept σ_i must be invertible: the default order keeps the σ_i above
//! `n eps σ_1` (the numerically nonzero ones; for a minimal, well-conditioned model all of
//! them), and a requested order whose last σ is at or below that level is refused.
//! Cost O(n³).
//!
//! # References
//! A. J. Laub, M. T. Heath, C. C. Paige and R. C. Ward, "Computation of system balancing
//! transformations and other applications of simultaneous diagonalization algorithms",
//! IEEE Trans. Automat. Control 32 (1987). B. C. Moore, "Principal component analysis in
//! linear systems", IEEE Trans. Automat. Control 26 (1981). K. Glover, Int. J. Control 39
//! (1984) (the error bound). U. M. Al-Saggaf and G. F. Franklin, IEEE Trans. Automat.
//! Control 32 (1987) (discrete time).
//!
//! # Errors
//! As [`super::lyapunov::gramians`] (shape, finiteness, unstable model); `Shape` for D;
//! `BadValue` on `order` above n or above the numerically nonzero σ_i; `NoConvergence` if
//! an eigen-decomposition or SVD fails.

use super::lyapunov::{from_na, gramians, to_na, Gramians};
use crate::error::{require_finite, ModelError, Result};
use crate::matrix::Matrix;
use crate::state_space::StateSpace;
use nalgebra::{DMatrix, SymmetricEigen};

/// A balanced (possibly truncated) realization.
#[derive(Debug, Clone)]
pub struct Balanced {
    pub realization: StateSpace<f64>,
    /// All Hankel singular values, descending.
    pub hankel_singular_values: Vec<f64>,
    /// `2 Σ` of the discarded ones.
    pub error_bound: f64,
    /// Relative residuals of the two Gramian equations.
    pub residuals: [f64; 2],
}

fn iterations(n: usize) -> usize {
    100 * n + 100
}

/// `L` with `L Lᵀ = W` for a symmetric positive semidefinite W (eigenvalues clipped at 0).
fn square_root_factor(w: &DMatrix<f64>) -> Result<DMatrix<f64>> {
    let n = w.nrows();
    if n == 0 {
        return Ok(DMatrix::zeros(0, 0));
    }
    let e = SymmetricEigen::try_new(w.clone(), f64::EPSILON, iterations(n)).ok_or(
        ModelError::NoConvergence {
            routine: "the eigen-decomposition of a Gramian",
        },
    )?;
    let mut l = e.eigenvectors;
    for j in 0..n {
        let s = e.eigenvalues[j].max(0.0).sqrt();
        for i in 0..n {
            l[(i, j)] *= s;
        }
    }
    Ok(l)
}

/// The factors, the SVD of `L_oᵀ L_c` (U, σ descending, Z) and the Gramians.
struct SquareRoot {
    lc: DMatrix<f64>,
    lo: DMatrix<f64>,
    u: DMatrix<f64>,
    sigma: Vec<f64>,
    z: DMatrix<f64>,
    g: Gramians,
}

fn square_root(
    a: &Matrix<f64>,
    b: &Matrix<f64>,
    c: &Matrix<f64>,
    discrete: bool,
) -> Result<SquareRoot> {
    let g = gramians(a, b, c, discrete)?;
    let n = a.rows();
    let lc = square_root_factor(&g.wc)?;
    let lo = square_root_factor(&g.wo)?;
    if n == 0 {
        let e = DMatrix::zeros(0, 0);
        return Ok(SquareRoot {
            lc,
            lo,
            u: e.clone(),
            sigma: Vec::new(),
            z: e,
            g,
        });
    }
    let product = lo.transpose() * &lc;
    let svd = product
        .try_svd(true, true, f64::EPSILON, iterations(n))
        .ok_or(ModelError::NoConvergence {
            routine: "the SVD of the product of Gramian factors",
        })?;
    let (u, vt) = (svd.u.expect("computed"), svd.v_t.expect("computed"));
    // Sort descending (nalgebra's ordered SVD already is; keep it explicit and cheap).
    let mut idx: Vec<usize> = (0..n).collect();
    idx.sort_by(|&x, &y| svd.singular_values[y].total_cmp(&svd.singular_values[x]));
    let sigma: Vec<f64> = idx.iter().map(|&i| svd.singular_values[i]).collect();
    let u = DMatrix::from_fn(n, n, |i, j| u[(i, idx[j])]);
    let z = DMatrix::from_fn(n, n, |i, j| vt[(idx[j], i)]);
    Ok(SquareRoot {
        lc,
        lo,
        u,
        sigma,
        z,
        g,
    })
}

/// The Hankel singular values, descending.
pub fn hankel_singular_values(
    a: &Matrix<f64>,
    b: &Matrix<f64>,
    c: &Matrix<f64>,
    discrete: bool,
) -> Result<Vec<f64>> {
    Ok(square_root(a, b, c, discrete)?.sigma)
}

/// Level below which a Hankel singular value counts as zero: `n eps σ_1`.
pub fn nonzero_level(sigma: &[f64]) -> f64 {
    sigma.len() as f64 * f64::EPSILON * sigma.first().copied().unwrap_or(0.0)
}

/// The balanced realization, truncated to `order` states when given.
pub fn balanced_realization(
    ss: &StateSpace<f64>,
    order: Option<usize>,
    discrete: bool,
) -> Result<Balanced> {
    require_finite("d", ss.d.as_slice())?;
    let sr = square_root(&ss.a, &ss.b, &ss.c, discrete)?;
    let n = ss.a.rows();
    let level = nonzero_level(&sr.sigma);
    let nonzero = sr.sigma.iter().filter(|&&s| s > level).count();
    let r = match order {
        None => nonzero,
        Some(r) if r > n => {
            return Err(ModelError::BadValue { arg: "order", detail: format!("must be at most the model's {n} states, found {r}") })
        }
        Some(r) if r > nonzero => {
            return Err(ModelError::BadValue {
                arg: "order",
                detail: format!(
                    "only {nonzero} Hankel singular values are above the rounding level {level:.3e}; a balanced \
                     realization of order {r} would divide by a zero one (the model is not minimal)"
                ),
            })
        }
        Some(r) => r,
    };
    let inv_root: Vec<f64> = sr.sigma[..r].iter().map(|s| 1.0 / s.sqrt()).collect();
    // T_r = L_c Z_r Σ_r^(−1/2), S_r = Σ_r^(−1/2) U_rᵀ L_oᵀ.
    let mut t = &sr.lc * sr.z.columns(0, r);
    let mut s = sr.u.columns(0, r).transpose() * sr.lo.transpose();
    for j in 0..r {
        for i in 0..n {
            t[(i, j)] *= inv_root[j];
            s[(j, i)] *= inv_root[j];
        }
    }
    let (a, b, c) = (to_na(&ss.a), to_na(&ss.b), to_na(&ss.c));
    let ar = &s * a * &t;
    let br = &s * b;
    let cr = c * &t;
    for m in [&ar, &br, &cr] {
        if !m.iter().all(|v| v.is_finite()) {
            return Err(ModelError::Overflow {
                what: "the balanced realization".into(),
            });
        }
    }
    let error_bound = 2.0 * sr.sigma[r..].iter().sum::<f64>();
    let (m, p) = (ss.b.cols(), ss.c.rows());
    let br = if r == 0 {
        Matrix::zeros(0, m)
    } else {
        from_na(&br)
    };
    let cr = if r == 0 {
        Matrix::zeros(p, 0)
    } else {
        from_na(&cr)
    };
    Ok(Balanced {
        realization: StateSpace {
            a: from_na(&ar),
            b: br,
            c: cr,
            d: ss.d.clone(),
        },
        hankel_singular_values: sr.sigma,
        error_bound,
        residuals: sr.g.residuals,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::gramian::lyapunov::gramians;

    fn m(r: usize, c: usize, v: &[f64]) -> Matrix<f64> {
        Matrix::from_row_major(r, c, v.to_vec()).unwrap()
    }

    #[test]
    fn first_order_closed_form() {
        // 1/(s+1) with b = c = 1: W_c = W_o = 1/2, σ = 1/2 (hand).
        let s =
            hankel_singular_values(&m(1, 1, &[-1.0]), &m(1, 1, &[1.0]), &m(1, 1, &[1.0]), false)
                .unwrap();
        assert!((s[0] - 0.5).abs() < 1e-15);
    }

    #[test]
    fn balanced_gramians_equal_and_diagonal() {
        let ss = StateSpace {
            a: m(3, 3, &[-1.0, 2.0, 0.0, -2.0, -1.0, 0.5, 0.0, 0.3, -4.0]),
            b: m(3, 1, &[1.0, 0.0, 2.0]),
            c: m(1, 3, &[0.5, 1.0, -1.0]),
            d: m(1, 1, &[0.0]),
        };
        for discrete in [false, true] {
            let ss = if discrete {
                StateSpace {
                    a: from_na(&(to_na(&ss.a) * 0.2)),
                    ..ss.clone()
                }
            } else {
                ss.clone()
            };
            let bal = balanced_realization(&ss, None, discrete).unwrap();
            let r = &bal.realization;
            let g = gramians(&r.a, &r.b, &r.c, discrete).unwrap();
            for i in 0..3 {
                for j in 0..3 {
                    let want = if i == j {
                        bal.hankel_singular_values[i]
                    } else {
                        0.0
                    };
                    assert!(
                        (g.wc[(i, j)] - want).abs() < 1e-12 && (g.wo[(i, j)] - want).abs() < 1e-12
                    );
                }
            }
        }
    }

    #[test]
    fn non_minimal_order_refused() {
        // Second state uncontrollable: one zero Hankel singular value.
        let ss = StateSpace {
            a: m(2, 2, &[-1.0, 0.0, 0.0, -2.0]),
            b: m(2, 1, &[1.0, 0.0]),
            c: m(1, 2, &[1.0, 1.0]),
            d: m(1, 1, &[0.0]),
        };
        assert_eq!(
            balanced_realization(&ss, None, false)
                .unwrap()
                .realization
                .a
                .rows(),
            1
        );
        assert!(matches!(
            balanced_realization(&ss, Some(2), false),
            Err(ModelError::BadValue { arg: "order", .. })
        ));
        assert!(matches!(
            balanced_realization(&ss, Some(3), false),
            Err(ModelError::BadValue { arg: "order", .. })
        ));
        let empty = StateSpace {
            a: Matrix::zeros(0, 0),
            b: Matrix::zeros(0, 1),
            c: Matrix::zeros(1, 0),
            d: m(1, 1, &[2.0]),
        };
        assert_eq!(
            balanced_realization(&empty, None, false)
                .unwrap()
                .realization
                .a
                .rows(),
            0
        );
    }
}
