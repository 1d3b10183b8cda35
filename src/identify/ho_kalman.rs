//! Realization from Markov parameters: `h_0 = D`, `h_i = C A^(i−1) B` (i ≥ 1).
//!
//! # Purpose
//! A discrete-time realization `(A, B, C, D)` of order n whose Markov parameters match the
//! given `h_0, h_1, ..., h_{k−1}` (p × m each): exactly when the data come from a system of
//! order n and the Hankel matrix is large enough, in the least-squares sense of the
//! truncated SVD otherwise.
//!
//! # Method
//! Ho & Kalman (1966) with Kung's SVD (1978). With `L = k − 1` nonzero-lag parameters, the
//! block Hankel matrix `H` (r block rows, c block columns, `r + c = L`, chosen to maximise
//! `min(r p, c m)`) has block (i, j) = `h_{i+j+1}`, and the shifted matrix `H↑` has
//! block (i, j) = `h_{i+j+2}`. For a system of order n, `H = O Γ` (extended observability
//! times extended controllability) and `H↑ = O A Γ`. The SVD `H = U Σ Vᵀ` truncated to n
//! gives the balanced-style factors `O = U_n Σ_n^(1/2)`, `Γ = Σ_n^(1/2) V_nᵀ`; then
//! `C` = first p rows of O, `B` = first m columns of Γ, and A is the least-squares solution
//! of `O A Γ = H↑`: `A = O⁺ H↑ Γ⁺ = Σ_n^(−1/2) U_nᵀ H↑ V_n Σ_n^(−1/2)` (pseudo-inverses from
//! the SVD, since U_n and V_n have orthonormal columns).
//!
//! # Numerical aspects
//! The order is the number of singular values above `tol`, default
//! `n_H² eps ‖H‖_F` with `n_H = min(r p, c m)` (the API's rank-decision default), or the
//! caller's `order`. Noisy data have no exact rank: all singular values are returned, so
//! the caller can read the gap and pass `order` or `tol`. The realization is internally
//! balanced with respect to the finite Hankel matrix (the finite-horizon Gramians
//! `O_nᵀ O_n = Γ_n Γ_nᵀ = Σ_n`). A kept singular value of exactly zero (order above the
//! rank of H) cannot be inverted and is refused. Parameters beyond 1e150 or below 1e-150
//! in magnitude are worked on scaled by an even power of two (exact; no decision changes).
//! Cost: one SVD of an (r p) × (c m) matrix.
//!
//! # References
//! B. L. Ho and R. E. Kalman, "Effective construction of linear state-variable models from
//! input/output functions", Regelungstechnik 14 (1966). S.-Y. Kung, "A new identification
//! and model reduction algorithm via singular value decomposition", 12th Asilomar
//! Conference on Circuits, Systems and Computers (1978).
//!
//! # Errors
//! `Shape` when the data length does not match (k, p, m) or k = 0; `NonFinite`; `BadValue`
//! for a bad tol, for an order above what the parameters can determine (too few Markov
//! parameters: `order ≤ min(r p, c m)`), or for an order whose singular value is zero;
//! `TooLarge` for a Hankel matrix beyond the size limit; `NoConvergence` if the SVD fails;
//! `Overflow` for a non-finite result.

use crate::error::{require_finite, ModelError, Result};
use crate::matrix::{range_exponent, Matrix};
use crate::state_space::StateSpace;
use faer::Mat;

/// Largest number of Hankel entries accepted (refused before allocation).
pub const MAX_HANKEL_ENTRIES: usize = 1 << 24;

/// A realization from Markov parameters and the data its order was decided on.
#[derive(Debug, Clone)]
pub struct MarkovRealization {
    pub realization: StateSpace<f64>,
    /// All singular values of the block Hankel matrix, descending.
    pub singular_values: Vec<f64>,
    pub order: usize,
    /// The tolerance the order was decided with (also reported when `order` was given).
    pub tol: f64,
    /// Block rows and block columns of the Hankel matrix.
    pub block_rows: usize,
    pub block_cols: usize,
}

/// Block rows r and columns c with `r + c = l`, maximising `min(r p, c m)` (ties: the most
/// even split).
pub fn hankel_blocks(l: usize, p: usize, m: usize) -> (usize, usize) {
    if l < 2 {
        return (l, 0);
    }
    let mut best = (l - l / 2, l / 2);
    let score = |r: usize, c: usize| (r * p).min(c * m);
    for r in 1..l {
        let c = l - r;
        let (s, sb) = (score(r, c), score(best.0, best.1));
        let even = (r as isize - c as isize).abs() < (best.0 as isize - best.1 as isize).abs();
        if s > sb || (s == sb && even) {
            best = (r, c);
        }
    }
    best
}

/// `markov` holds k matrices p × m, row-major, one after the other.
pub fn realize_markov(
    markov: &[f64],
    k: usize,
    p: usize,
    m: usize,
    order: Option<usize>,
    tol: Option<f64>,
) -> Result<MarkovRealization> {
    if k == 0 {
        return Err(ModelError::Shape {
            arg: "markov",
            expected: "at least one Markov parameter (markov[0] = D)".into(),
            found: "k = 0".into(),
        });
    }
    if markov.len() != k * p * m {
        return Err(ModelError::Shape {
            arg: "markov",
            expected: format!("{} values (k, p, m) = ({k}, {p}, {m})", k * p * m),
            found: format!("{}", markov.len()),
        });
    }
    require_finite("markov", markov)?;
    crate::structure::staircase::check_tol(tol)?;
    let h = |i: usize, row: usize, col: usize| markov[(i * p + row) * m + col];
    let d = Matrix::from_row_major(p, m, markov[..p * m].to_vec()).expect("p x m");

    let l = k - 1;
    let (r, c) = hankel_blocks(l, p, m);
    let (rows, cols) = (r * p, c * m);
    let max_order = rows.min(cols);
    if let Some(n) = order {
        if n > max_order {
            let need = minimum_parameters(n, p, m);
            return Err(ModelError::BadValue {
                arg: "order",
                detail: format!(
                    "too few Markov parameters for order {n}: {k} given (D and {l} more) determine at most \
                     order {max_order} (a {r}x{c} block Hankel matrix); order {n} needs at least {need}"
                ),
            });
        }
    }
    if rows.saturating_mul(cols) > MAX_HANKEL_ENTRIES {
        return Err(ModelError::TooLarge {
            arg: "markov",
            detail: format!("the {rows}x{cols} Hankel matrix exceeds {MAX_HANKEL_ENTRIES} entries"),
        });
    }
    if max_order == 0 {
        return Ok(MarkovRealization {
            realization: StateSpace {
                a: Matrix::zeros(0, 0),
                b: Matrix::zeros(0, m),
                c: Matrix::zeros(p, 0),
                d,
            },
            singular_values: Vec::new(),
            order: 0,
            tol: tol.unwrap_or(0.0),
            block_rows: r,
            block_cols: c,
        });
    }

    // Parameters near the ends of the float64 range are worked on scaled by an even power of
    // two σ = 4^e (exact): the singular values and tol scale by σ, B and C by √σ = 2^e, and A
    // not at all, so no decision changes and nothing overflows where the result is finite.
    let half_exponent = range_half_exponent(&markov[p * m..]);
    let root_sigma = 2f64.powi(half_exponent);
    let sigma = root_sigma * root_sigma;
    // H (block (i, j) = h_{i+j+1}) and the shifted H↑ (block (i, j) = h_{i+j+2}).
    let hankel = Mat::from_fn(rows, cols, |x, y| {
        h(x / p + y / m + 1, x % p, y % m) * sigma
    });
    let shifted = Mat::from_fn(rows, cols, |x, y| {
        h(x / p + y / m + 2, x % p, y % m) * sigma
    });
    let norm = hankel.norm_l2();
    let tol_scaled = match tol {
        Some(t) => t * sigma,
        None => {
            let nh = max_order as f64;
            nh * nh * f64::EPSILON * norm
        }
    };
    let svd = hankel.thin_svd().map_err(|_| ModelError::NoConvergence {
        routine: "the SVD of the Hankel matrix",
    })?;
    let s: Vec<f64> = (0..max_order).map(|i| svd.S().column_vector()[i]).collect();
    let n = order.unwrap_or_else(|| s.iter().filter(|&&x| x > tol_scaled).count());
    if n > 0 && !(s[n - 1] > 0.0) {
        return Err(ModelError::BadValue {
            arg: "order",
            detail: format!(
                "order {n} exceeds the rank of the Hankel matrix (singular value {n} is zero)"
            ),
        });
    }
    let (u, v) = (svd.U(), svd.V());
    let root: Vec<f64> = s[..n].iter().map(|x| x.sqrt()).collect();
    // C = first p rows of U_n Σ^(1/2); B = first m columns of Σ^(1/2) V_nᵀ.
    let cm = Matrix::from_row_major(
        p,
        n,
        (0..p * n)
            .map(|x| u[(x / n, x % n)] * root[x % n])
            .collect(),
    )
    .expect("p x n");
    let bm = Matrix::from_row_major(
        n,
        m,
        (0..n * m)
            .map(|x| root[x / m] * v[(x % m, x / m)])
            .collect(),
    )
    .expect("n x m");
    // A = Σ^(−1/2) U_nᵀ H↑ V_n Σ^(−1/2).
    let un = u.subcols(0, n);
    let vn = v.subcols(0, n);
    let core = un.transpose() * &shifted * vn;
    let a = Matrix::from_row_major(
        n,
        n,
        (0..n * n)
            .map(|x| core[(x / n, x % n)] / (root[x / n] * root[x % n]))
            .collect(),
    )
    .expect("n x n");
    let (bm, cm) = (bm.map(|x| x / root_sigma), cm.map(|x| x / root_sigma));
    let s: Vec<f64> = s.iter().map(|x| x / sigma).collect();
    let tol = tol.unwrap_or(tol_scaled / sigma);
    for (what, values) in [
        ("A", a.as_slice()),
        ("B", bm.as_slice()),
        ("C", cm.as_slice()),
        ("Hankel singular values", &s[..]),
    ] {
        if !values.iter().all(|x| x.is_finite()) {
            return Err(ModelError::Overflow {
                what: format!("the realization's {what}"),
            });
        }
    }
    Ok(MarkovRealization {
        realization: StateSpace { a, b: bm, c: cm, d },
        singular_values: s,
        order: n,
        tol,
        block_rows: r,
        block_cols: c,
    })
}

/// e with `4^e · max|x|` near 1 when the largest magnitude is outside the safe range, else
/// 0, clamped so that 4^e stays a normal float64 (2^±1000); the scaled data are then
/// within 2^±75 of 1, far inside the range.
fn range_half_exponent(x: &[f64]) -> i32 {
    (range_exponent(x) / 2).clamp(-500, 500)
}

/// The fewest Markov parameters (including D) with `min(r p, c m) ≥ n`.
pub fn minimum_parameters(n: usize, p: usize, m: usize) -> usize {
    if n == 0 {
        return 1;
    }
    if p == 0 || m == 0 {
        return usize::MAX;
    }
    let (r, c) = (n.div_ceil(p), n.div_ceil(m));
    1 + r + c
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Markov parameters of (A, B, C, D), flattened (k, p, m).
    fn markov_of(ss: &StateSpace<f64>, k: usize) -> Vec<f64> {
        let mut out = ss.d.as_slice().to_vec();
        let mut ab = ss.b.clone();
        for _ in 1..k {
            out.extend_from_slice(ss.c.matmul(&ab).as_slice());
            ab = ss.a.matmul(&ab);
        }
        out
    }

    fn m(r: usize, c: usize, v: &[f64]) -> Matrix<f64> {
        Matrix::from_row_major(r, c, v.to_vec()).unwrap()
    }

    #[test]
    fn recovers_order_and_markov_parameters() {
        // Order 3, two inputs, one output (identity: h_i = C A^(i-1) B for the result too).
        let ss = StateSpace {
            a: m(3, 3, &[0.5, 0.2, 0.0, -0.1, 0.3, 0.1, 0.0, 0.05, -0.4]),
            b: m(3, 2, &[1.0, 0.0, 0.5, 1.0, -1.0, 0.3]),
            c: m(1, 3, &[1.0, -0.5, 2.0]),
            d: m(1, 2, &[0.1, 0.0]),
        };
        let k = 20;
        let data = markov_of(&ss, k);
        let r = realize_markov(&data, k, 1, 2, None, None).unwrap();
        assert_eq!(r.order, 3);
        let again = markov_of(&r.realization, k);
        let err = data
            .iter()
            .zip(&again)
            .map(|(x, y)| (x - y).abs())
            .fold(0.0, f64::max);
        assert!(err < 1e-12, "Markov parameters differ by {err}");
    }

    #[test]
    fn too_few_parameters_and_bad_shapes() {
        let data = vec![0.0, 1.0, 0.5, 0.25];
        assert!(matches!(
            realize_markov(&data, 4, 1, 1, Some(3), None),
            Err(ModelError::BadValue { arg: "order", .. })
        ));
        assert!(realize_markov(&data, 4, 1, 1, Some(1), None).is_ok());
        assert!(matches!(
            realize_markov(&data, 3, 1, 1, None, None),
            Err(ModelError::Shape { .. })
        ));
        assert!(matches!(
            realize_markov(&[], 0, 1, 1, None, None),
            Err(ModelError::Shape { .. })
        ));
        let only_d = realize_markov(&[2.0], 1, 1, 1, None, None).unwrap();
        assert_eq!(only_d.order, 0);
        assert_eq!(*only_d.realization.d.get(0, 0), 2.0);
    }

    #[test]
    fn first_order_geometric_sequence() {
        // h_i = 0.5^(i-1): A = 0.5, C B = 1 (hand-worked).
        let data: Vec<f64> = std::iter::once(0.0)
            .chain((0..10).map(|i| 0.5f64.powi(i)))
            .collect();
        let r = realize_markov(&data, 11, 1, 1, None, None).unwrap();
        assert_eq!(r.order, 1);
        assert!((r.realization.a.get(0, 0) - 0.5).abs() < 1e-14);
        assert!((r.realization.c.get(0, 0) * r.realization.b.get(0, 0) - 1.0).abs() < 1e-14);
    }
}

#[cfg(test)]
mod range_tests {
    use super::*;

    fn markov_of(scale: f64) -> Vec<f64> {
        // h_i = 0.5^(i-1) · scale (i ≥ 1): the first-order system A = 0.5, B C = scale.
        let mut h = vec![0.0];
        for i in 1..12 {
            h.push(0.5f64.powi(i - 1) * scale);
        }
        h
    }

    #[test]
    fn scaled_parameters_give_the_scaled_realization() {
        // (identity) Markov parameters times 4^k: same A, B and C times 2^k, singular values times 4^k.
        let plain = realize_markov(&markov_of(1.0), 12, 1, 1, None, None).unwrap();
        for k in [-500i32, -300, 300, 500] {
            let factor = 4f64.powi(k / 2) * 4f64.powi(k - k / 2);
            let big = realize_markov(&markov_of(factor), 12, 1, 1, None, None).unwrap();
            assert_eq!(big.order, plain.order);
            let a_rel = (big.realization.a.get(0, 0) - plain.realization.a.get(0, 0)).abs();
            assert!(a_rel < 1e-15, "{k}: {a_rel}");
            let bc = big.realization.b.get(0, 0) * big.realization.c.get(0, 0) / factor;
            assert!(
                (bc - plain.realization.b.get(0, 0) * plain.realization.c.get(0, 0)).abs() < 1e-15
            );
            assert!(big.tol.is_finite() && big.singular_values.iter().all(|s| s.is_finite()));
        }
    }

    #[test]
    fn parameters_at_the_top_of_the_range_are_finite() {
        let h = vec![0.0, 8.98846567e307, 8.98846567e307];
        let r = realize_markov(&h, 3, 1, 1, None, None).unwrap();
        assert!(r.tol.is_finite());
        assert_eq!(r.order, 1);
    }
}
