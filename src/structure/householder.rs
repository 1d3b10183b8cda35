//! Householder reflections `H = I − τ v vᵀ` applied to parts of row-major matrices.
//!
//! `H x = α e_1` with `α = −sign(x_0) ‖x‖` (the sign that avoids cancellation in
//! `v_0 = x_0 − α`), `τ = 2 / vᵀv`. H is symmetric and orthogonal, so `H = Hᵀ = H⁻¹` and a
//! similarity by H is `H A H`. Reference: G. H. Golub and C. F. Van Loan, *Matrix
//! Computations*, 4th ed., §5.1.

use crate::matrix::Matrix;

/// A reflection acting on the index range `offset .. offset + v.len()`.
#[derive(Debug, Clone)]
pub struct Reflector {
    pub offset: usize,
    pub v: Vec<f64>,
    pub tau: f64,
}

impl Reflector {
    /// The reflection that maps `x` (placed at `offset`) onto a multiple of its first axis.
    pub fn annihilating(offset: usize, x: &[f64]) -> Self {
        let norm = x.iter().map(|v| v * v).sum::<f64>().sqrt();
        let tail = x[1..].iter().map(|v| v * v).sum::<f64>();
        if norm == 0.0 || tail == 0.0 {
            return Reflector {
                offset,
                v: vec![0.0; x.len()],
                tau: 0.0,
            };
        }
        let alpha = if x[0] >= 0.0 { -norm } else { norm };
        let mut v = x.to_vec();
        v[0] -= alpha;
        let vv = v.iter().map(|e| e * e).sum::<f64>();
        Reflector {
            offset,
            v,
            tau: 2.0 / vv,
        }
    }

    /// `M ← H M` (rows `offset..` of M).
    pub fn apply_left(&self, m: &mut Matrix<f64>) {
        if self.tau == 0.0 {
            return;
        }
        let cols = m.cols();
        let data = m.as_mut_slice();
        let mut w = vec![0.0; cols];
        for (i, vi) in self.v.iter().enumerate() {
            let row = &data[(self.offset + i) * cols..(self.offset + i + 1) * cols];
            for (wj, x) in w.iter_mut().zip(row) {
                *wj += vi * x;
            }
        }
        for (i, vi) in self.v.iter().enumerate() {
            let f = self.tau * vi;
            let row = &mut data[(self.offset + i) * cols..(self.offset + i + 1) * cols];
            for (x, wj) in row.iter_mut().zip(&w) {
                *x -= f * wj;
            }
        }
    }

    /// `M ← M H` (columns `offset..` of M).
    pub fn apply_right(&self, m: &mut Matrix<f64>) {
        if self.tau == 0.0 {
            return;
        }
        let cols = m.cols();
        let len = self.v.len();
        for row in m.as_mut_slice().chunks_mut(cols) {
            let part = &mut row[self.offset..self.offset + len];
            let s: f64 = part.iter().zip(&self.v).map(|(x, v)| x * v).sum();
            let f = self.tau * s;
            for (x, v) in part.iter_mut().zip(&self.v) {
                *x -= f * v;
            }
        }
    }
}
