//! Zeros and gains of state-space models.
//!
//! | routine | module |
//! | --- | --- |
//! | invariant zeros, transmission zeros, normal rank (system pencil reduction) | [`pencil`] |
//! | DC gain G(0) or G(1) | [`dc_gain`] |
//! | zeros, poles and gain of a SISO transfer function, and back | [`zeros_poles_gain`] |
//! | refinement of SISO zeros against the numerator in double-double | [`refine`] |
//! | invariant zeros of many models at once | [`batch`] |

pub mod batch;
pub mod dc_gain;
pub mod pencil;
pub mod refine;
pub mod zeros_poles_gain;

use crate::matrix::Matrix;

/// Rows `r0..r1`, columns `c0..c1` of `m`.
pub(crate) fn block(m: &Matrix<f64>, r0: usize, r1: usize, c0: usize, c1: usize) -> Matrix<f64> {
    let w = c1 - c0;
    Matrix::from_row_major(
        r1 - r0,
        w,
        (0..(r1 - r0) * w)
            .map(|x| *m.get(r0 + x / w, c0 + x % w))
            .collect(),
    )
    .expect("block shape")
}

/// `[top; bottom]` (both with the same number of columns).
pub(crate) fn vstack(top: &Matrix<f64>, bottom: &Matrix<f64>) -> Matrix<f64> {
    let cols = top.cols().max(bottom.cols());
    let mut data = top.as_slice().to_vec();
    data.extend_from_slice(bottom.as_slice());
    Matrix::from_row_major(top.rows() + bottom.rows(), cols, data).expect("same column count")
}

/// Sorts complex values by ascending real part, then ascending imaginary part.
pub(crate) fn sort_complex(values: &mut [(f64, f64)]) {
    values.sort_by(|x, y| x.0.total_cmp(&y.0).then(x.1.total_cmp(&y.1)));
}

#[cfg(test)]
mod tests;
