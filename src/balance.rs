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

use crate::error::{ModelError, Result};
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
    scale_ports_in_place(b.as_mut_slice(), c.as_mut_slice(), &scale);
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

/// `S⁻¹ B` and `C S` in place, for the diagonal `scale` of S (B row-major with
/// `scale.len()` rows, C row-major with `scale.len()` columns; either may be empty).
pub fn scale_ports_in_place(b: &mut [f64], c: &mut [f64], scale: &[f64]) {
    let n = scale.len();
    if n == 0 {
        return;
    }
    // (chunks of zero length are not allowed: a model without inputs has an empty B.)
    for (row, s) in b.chunks_mut((b.len() / n).max(1)).zip(scale) {
        row.iter_mut().for_each(|v| *v /= s);
    }
    for row in c.chunks_mut(n) {
        row.iter_mut().zip(scale).for_each(|(v, s)| *v *= s);
    }
}

/// Back from balanced coordinates, in place: `S A S⁻¹`, `S B` and `C S⁻¹` (row-major,
/// shapes as in [`scale_ports_in_place`]; the scalings are exact powers of two). An
/// overflow names the converted model's matrix.
pub fn unbalance_in_place(
    a: &mut [f64],
    b: &mut [f64],
    c: &mut [f64],
    scale: &[f64],
) -> Result<()> {
    let n = scale.len();
    if n > 0 {
        for (row, &si) in a.chunks_mut(n).zip(scale) {
            row.iter_mut()
                .zip(scale)
                .for_each(|(v, &sj)| *v = *v * si / sj);
        }
        for (row, &si) in b.chunks_mut((b.len() / n).max(1)).zip(scale) {
            row.iter_mut().for_each(|v| *v *= si);
        }
        for row in c.chunks_mut(n) {
            row.iter_mut().zip(scale).for_each(|(v, s)| *v /= s);
        }
    }
    for (arg, x) in [("a", &*a), ("b", &*b), ("c", &*c)] {
        if !x.iter().all(|v| v.is_finite()) {
            return Err(ModelError::Overflow {
                what: format!("the converted model's {arg} in the given state coordinates"),
            });
        }
    }
    Ok(())
}
