//! A small dense row-major matrix over any [`Scalar`]: enough for the generic recursions
//! (products, traces, transposes), with no dependence on a linear-algebra crate.

use crate::scalar::Scalar;

#[derive(Debug, Clone, PartialEq)]
pub struct Matrix<T> {
    rows: usize,
    cols: usize,
    data: Vec<T>,
}

impl<T: Scalar> Matrix<T> {
    pub fn zeros(rows: usize, cols: usize) -> Self {
        Matrix {
            rows,
            cols,
            data: vec![T::zero(); rows * cols],
        }
    }

    pub fn identity(n: usize) -> Self {
        let mut m = Self::zeros(n, n);
        for i in 0..n {
            m.data[i * n + i] = T::one();
        }
        m
    }

    /// Builds from row-major data; `None` when the length does not match.
    pub fn from_row_major(rows: usize, cols: usize, data: Vec<T>) -> Option<Self> {
        (data.len() == rows * cols).then_some(Matrix { rows, cols, data })
    }

    pub fn rows(&self) -> usize {
        self.rows
    }
    pub fn cols(&self) -> usize {
        self.cols
    }
    pub fn as_slice(&self) -> &[T] {
        &self.data
    }
    pub fn as_mut_slice(&mut self) -> &mut [T] {
        &mut self.data
    }
    pub fn into_vec(self) -> Vec<T> {
        self.data
    }

    pub fn get(&self, i: usize, j: usize) -> &T {
        &self.data[i * self.cols + j]
    }
    pub fn set(&mut self, i: usize, j: usize, v: T) {
        self.data[i * self.cols + j] = v;
    }

    pub fn transpose(&self) -> Self {
        let mut t = Self::zeros(self.cols, self.rows);
        for i in 0..self.rows {
            for j in 0..self.cols {
                t.data[j * self.rows + i] = self.data[i * self.cols + j].clone();
            }
        }
        t
    }

    /// `self * rhs`; the caller guarantees `self.cols == rhs.rows`.
    pub fn matmul(&self, rhs: &Self) -> Self {
        debug_assert_eq!(self.cols, rhs.rows);
        let mut out = Self::zeros(self.rows, rhs.cols);
        for i in 0..self.rows {
            for k in 0..self.cols {
                let a = &self.data[i * self.cols + k];
                if a.is_zero() {
                    continue;
                }
                let row = &rhs.data[k * rhs.cols..(k + 1) * rhs.cols];
                let out_row = &mut out.data[i * rhs.cols..(i + 1) * rhs.cols];
                for (o, b) in out_row.iter_mut().zip(row) {
                    o.add_mul(a, b);
                }
            }
        }
        out
    }

    pub fn trace(&self) -> T {
        let mut t = T::zero();
        for i in 0..self.rows.min(self.cols) {
            t = t.add(&self.data[i * self.cols + i]);
        }
        t
    }

    pub fn map<U: Scalar>(&self, f: impl Fn(&T) -> U) -> Matrix<U> {
        Matrix {
            rows: self.rows,
            cols: self.cols,
            data: self.data.iter().map(f).collect(),
        }
    }
}

/// Frobenius norm of `values`, scaled by the largest magnitude so that entries beyond 1e154
/// do not overflow when squared: finite whenever the norm itself is representable.
pub fn frobenius_norm(values: &[f64]) -> f64 {
    scaled_frobenius_norm(1.0, values)
}

/// `factor · ‖values‖_F` with the factor applied before the norm is assembled, so that the
/// product is finite whenever it is representable (a small factor times a norm that
/// overflows, as in a tolerance `n² eps ‖A‖_F`).
pub fn scaled_frobenius_norm(factor: f64, values: &[f64]) -> f64 {
    let big = largest_magnitude(values);
    if big == 0.0 || !big.is_finite() {
        return factor * big;
    }
    (factor * big)
        * values
            .iter()
            .map(|v| (v / big) * (v / big))
            .sum::<f64>()
            .sqrt()
}

fn largest_magnitude<'a>(values: impl IntoIterator<Item = &'a f64>) -> f64 {
    values.into_iter().fold(0.0f64, |acc, v| acc.max(v.abs()))
}

/// Magnitudes inside this band are worked on as they are; beyond it, routines that form
/// sums of products (reflections, norms, SVDs) work on a copy scaled by a power of two.
pub const SAFE_RANGE: std::ops::RangeInclusive<f64> = 1.0e-150..=1.0e150;

/// e with `2^e · max|values|` near 1 when the largest magnitude is outside [`SAFE_RANGE`],
/// else 0 (ordinary data are left bit for bit alone). |e| ≤ 1075.
pub fn range_exponent<'a>(values: impl IntoIterator<Item = &'a f64>) -> i32 {
    let big = largest_magnitude(values);
    if big == 0.0 || SAFE_RANGE.contains(&big) {
        return 0;
    }
    -(big.log2().round() as i32)
}

/// `2^e` for |e| up to about 2000, in two steps where one would leave the normal range
/// (2^±1074 is not a normal float64, but its halves are).
pub fn pow2(e: i32) -> f64 {
    2f64.powi(e / 2) * 2f64.powi(e - e / 2)
}
