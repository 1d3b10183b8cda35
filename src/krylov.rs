//! Krylov matrices: controllability `[B, AB, ..., A^(n−1)B]` and observability
//! `[C; CA; ...; CA^(n−1)]`.
//!
//! For display and for hand checks only. Rank decisions in statewright are never made on
//! these matrices: their columns `A^k B` align with the dominant eigenvectors as k grows and
//! their singular values spread like the powers of the eigenvalue magnitudes, so a model
//! that is controllable can have a numerically rank-deficient controllability matrix (and
//! scaling does not cure it). The staircase algorithm decides instead.

use crate::matrix::Matrix;
use crate::scalar::Scalar;

/// `[B, AB, ..., A^(n−1)B]`, n × (n·m). Shapes must agree (A n×n, B n×m).
pub fn controllability_matrix<T: Scalar>(a: &Matrix<T>, b: &Matrix<T>) -> Matrix<T> {
    let (n, m) = (a.rows(), b.cols());
    let mut out = Matrix::zeros(n, n * m);
    let mut block = b.clone();
    for k in 0..n {
        for i in 0..n {
            for j in 0..m {
                out.set(i, k * m + j, block.get(i, j).clone());
            }
        }
        if k + 1 < n {
            block = a.matmul(&block);
        }
    }
    out
}

/// `[C; CA; ...; CA^(n−1)]`, (n·p) × n: the transpose of the dual controllability matrix.
pub fn observability_matrix<T: Scalar>(a: &Matrix<T>, c: &Matrix<T>) -> Matrix<T> {
    controllability_matrix(&a.transpose(), &c.transpose()).transpose()
}
