//! Controller form: the controllable canonical form with the states in reverse order.
//!
//! A has first row `[-a_{n-1}, ..., -a_0]` and ones on the subdiagonal, `B = e_1`,
//! `C = [c_{n-1}, ..., c_0]`, `D = d`. It is `P A P` for the reversal permutation P of the
//! controllable canonical form, so the transfer function is the same. The observer form is
//! its dual.

use crate::matrix::Matrix;
use crate::poly::ProperSplit;
use crate::scalar::Scalar;
use crate::state_space::StateSpace;

pub fn controller<T: Scalar>(split: &ProperSplit<T>) -> StateSpace<T> {
    let n = split.order();
    if n == 0 {
        return super::gain_only(&split.direct);
    }
    let mut a = Matrix::zeros(n, n);
    for j in 0..n {
        a.set(0, j, split.a(n - 1 - j).neg());
    }
    for i in 1..n {
        a.set(i, i - 1, T::one());
    }
    let mut b = Matrix::zeros(n, 1);
    b.set(0, 0, T::one());
    let mut c = Matrix::zeros(1, n);
    for j in 0..n {
        c.set(0, j, split.c(n - 1 - j).clone());
    }
    let d = Matrix::from_row_major(1, 1, vec![split.direct.clone()]).expect("1x1");
    StateSpace { a, b, c, d }
}
