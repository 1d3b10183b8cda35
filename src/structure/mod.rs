//! Structure of a state-space model: which modes the inputs steer and the outputs see.
//!
//! | routine | module |
//! | --- | --- |
//! | controllability / observability staircase, is_controllable / is_observable | [`staircase`] |
//! | Kalman decomposition | [`kalman`] |
//! | minimal realization | [`minimal`] |
//! | similarity transformation between two minimal realizations | [`similarity`] |
//! | refinement of an eigenvector-guided split to an invariant subspace | [`refine`] |
//! | Markov-parameter check of a reduced model | [`verify`] |

pub mod householder;
pub mod kalman;
pub mod minimal;
pub mod refine;
pub mod similarity;
pub mod staircase;
pub mod verify;

use crate::matrix::Matrix;

/// Columns `from..to` of `m`.
pub(crate) fn columns(m: &Matrix<f64>, from: usize, to: usize) -> Matrix<f64> {
    let (rows, width) = (m.rows(), to - from);
    Matrix::from_row_major(
        rows,
        width,
        (0..rows * width)
            .map(|x| *m.get(x / width, from + x % width))
            .collect(),
    )
    .expect("column block")
}

/// `[x | y | ...]` side by side (all with the same number of rows).
pub(crate) fn hstack(parts: &[&Matrix<f64>], rows: usize) -> Matrix<f64> {
    let cols: usize = parts.iter().map(|p| p.cols()).sum();
    let mut out = Matrix::zeros(rows, cols);
    let mut at = 0;
    for p in parts {
        for i in 0..rows {
            for j in 0..p.cols() {
                out.set(i, at + j, *p.get(i, j));
            }
        }
        at += p.cols();
    }
    out
}

pub(crate) fn to_faer(m: &Matrix<f64>) -> faer::Mat<f64> {
    faer::Mat::from_fn(m.rows(), m.cols(), |i, j| *m.get(i, j))
}

pub(crate) fn from_faer(m: faer::MatRef<'_, f64>) -> Matrix<f64> {
    let (r, c) = (m.nrows(), m.ncols());
    Matrix::from_row_major(r, c, (0..r * c).map(|x| m[(x / c, x % c)]).collect()).expect("shape")
}

/// 2-norm condition number (∞ for a singular or empty-rank matrix; 1 for 0×0).
pub(crate) fn condition_number(m: &Matrix<f64>) -> crate::error::Result<f64> {
    if m.rows() == 0 {
        return Ok(1.0);
    }
    let s = to_faer(m)
        .singular_values()
        .map_err(|_| crate::error::ModelError::NoConvergence {
            routine: "the SVD for a condition number",
        })?;
    let last = *s.last().expect("nonempty");
    Ok(if last > 0.0 {
        s[0] / last
    } else {
        f64::INFINITY
    })
}
