//! The state-space quadruple `(A, B, C, D)` shared by every algorithm of the core.

use crate::error::{ModelError, Result};
use crate::matrix::Matrix;
use crate::scalar::Scalar;

/// `x' = A x + B u`, `y = C x + D u` with n states, m inputs and p outputs.
#[derive(Debug, Clone, PartialEq)]
pub struct StateSpace<T> {
    pub a: Matrix<T>,
    pub b: Matrix<T>,
    pub c: Matrix<T>,
    pub d: Matrix<T>,
}

impl<T: Scalar> StateSpace<T> {
    /// Checks that the four shapes fit together: A n×n, B n×m, C p×n, D p×m.
    pub fn new(a: Matrix<T>, b: Matrix<T>, c: Matrix<T>, d: Matrix<T>) -> Result<Self> {
        let n = a.rows();
        let shape = |m: &Matrix<T>| format!("shape ({}, {})", m.rows(), m.cols());
        if a.cols() != n {
            return Err(ModelError::Shape {
                arg: "a",
                expected: "a square matrix".into(),
                found: shape(&a),
            });
        }
        if b.rows() != n {
            return Err(ModelError::Shape {
                arg: "b",
                expected: format!("{n} rows (one per state)"),
                found: shape(&b),
            });
        }
        if c.cols() != n {
            return Err(ModelError::Shape {
                arg: "c",
                expected: format!("{n} columns (one per state)"),
                found: shape(&c),
            });
        }
        if d.rows() != c.rows() || d.cols() != b.cols() {
            return Err(ModelError::Shape {
                arg: "d",
                expected: format!("shape ({}, {}) (outputs x inputs)", c.rows(), b.cols()),
                found: shape(&d),
            });
        }
        Ok(StateSpace { a, b, c, d })
    }

    pub fn n_states(&self) -> usize {
        self.a.rows()
    }
    pub fn n_inputs(&self) -> usize {
        self.b.cols()
    }
    pub fn n_outputs(&self) -> usize {
        self.c.rows()
    }

    /// The dual system `(Aᵀ, Cᵀ, Bᵀ, Dᵀ)`: same transfer function transposed; swaps
    /// controllability and observability.
    pub fn dual(&self) -> Self {
        StateSpace {
            a: self.a.transpose(),
            b: self.c.transpose(),
            c: self.b.transpose(),
            d: self.d.transpose(),
        }
    }
}
