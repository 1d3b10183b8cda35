//! Controllability form: coordinates in which the controllability matrix is the identity.
//!
//! A has ones on the subdiagonal and last column `[-a_0, ..., -a_{n-1}]ᵀ`, `B = e_1`, so
//! `A^(k-1) B = e_k` and `[B, AB, ..., A^(n-1)B] = I`; C then lists the Markov parameters
//! `[h_1, ..., h_n]` (`h_k = C A^(k-1) B`). The observability form is its dual (observability
//! matrix the identity, B the Markov parameters).

use crate::matrix::Matrix;
use crate::poly::ProperSplit;
use crate::scalar::Scalar;
use crate::state_space::StateSpace;

pub fn controllability<T: Scalar>(split: &ProperSplit<T>) -> StateSpace<T> {
    let n = split.order();
    if n == 0 {
        return super::gain_only(&split.direct);
    }
    let mut a = Matrix::zeros(n, n);
    for i in 1..n {
        a.set(i, i - 1, T::one());
    }
    for i in 0..n {
        a.set(i, n - 1, split.a(i).neg());
    }
    let mut b = Matrix::zeros(n, 1);
    b.set(0, 0, T::one());
    let h = split.markov_parameters();
    let c = Matrix::from_row_major(1, n, h).expect("1xn");
    let d = Matrix::from_row_major(1, 1, vec![split.direct.clone()]).expect("1x1");
    StateSpace { a, b, c, d }
}
