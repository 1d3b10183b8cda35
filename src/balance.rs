//! Diagonal balancing by powers of two (Parlett & Reinsch 1969).
//!
//! `S⁻¹ A S` with S diagonal, its entries powers of two, chosen so that each row and column
//! of the result have comparable norms. Exact in floating point (only exponents change), it
//! changes no eigenvalue, controllable or observable subspace dimension or transfer
//! function, and it reduces ‖A‖ — and with it the rounding errors of later orthogonal
//! reductions — for badly scaled matrices such as companion matrices.
//!
//! Reference: B. N. Parlett and C. Reinsch, "Balancing a matrix for calculation of
//! eigenvalues and eigenvectors", Numer. Math. 13 (1969).

use crate::matrix::Matrix;
use crate::state_space::StateSpace;

/// Diagonal balancing by powers of two: returns `S⁻¹ A S` and the diagonal of S.
///
/// Parlett–Reinsch iteration with radix 2 (exact in floating point), at most 64 sweeps.
pub fn balance(a: &Matrix<f64>) -> (Matrix<f64>, Vec<f64>) {
    let n = a.rows();
    let mut m = a.clone();
    let mut scale = vec![1.0; n];
    balance_in_place(m.as_mut_slice(), n, &mut scale);
    (m, scale)
}

/// [`balance`] on a row-major n×n slice, in place; `scale` (n entries, all 1 on entry)
/// receives the diagonal of S. No allocation (the small conversions call it on the stack).
pub fn balance_in_place(m: &mut [f64], n: usize, scale: &mut [f64]) {
    debug_assert!(m.len() == n * n && scale.len() == n);
    for _sweep in 0..64 {
        let mut converged = true;
        for i in 0..n {
            let (mut col, mut row) = (0.0, 0.0);
            for j in 0..n {
                if j != i {
                    col += m[j * n + i].abs();
                    row += m[i * n + j].abs();
                }
            }
            // Zero or overflowing sums: nothing to balance here (and an infinite sum would
            // never leave the scaling loops below).
            if col == 0.0 || row == 0.0 || !col.is_finite() || !row.is_finite() {
                continue;
            }
            let sum = col + row;
            let mut f = 1.0;
            let (mut c, mut r) = (col, row);
            while c < r / 2.0 {
                c *= 2.0;
                r /= 2.0;
                f *= 2.0;
            }
            while c >= r * 2.0 {
                c /= 2.0;
                r *= 2.0;
                f /= 2.0;
            }
            if (c + r) < 0.95 * sum {
                converged = false;
                scale[i] *= f;
                for j in 0..n {
                    m[i * n + j] /= f;
                    m[j * n + i] *= f;
                }
            }
        }
        if converged {
            break;
        }
    }
}

/// The balanced model `(S⁻¹ A S, S⁻¹ B, C S, D)` and the diagonal of S (the model itself
/// and a unit scale if scaling B or C would overflow).
pub fn balance_model(ss: &StateSpace<f64>) -> (StateSpace<f64>, Vec<f64>) {
    let (a, scale) = balance(&ss.a);
    let mut b = ss.b.clone();
    let mut c = ss.c.clone();
    for (i, s) in scale.iter().enumerate() {
        for j in 0..b.cols() {
            b.set(i, j, b.get(i, j) / s);
        }
        for r in 0..c.rows() {
            c.set(r, i, c.get(r, i) * s);
        }
    }
    if [&a, &b, &c]
        .iter()
        .any(|m| m.as_slice().iter().any(|v| !v.is_finite()))
    {
        return (ss.clone(), vec![1.0; ss.n_states()]);
    }
    (
        StateSpace {
            a,
            b,
            c,
            d: ss.d.clone(),
        },
        scale,
    )
}
