//! Controllable canonical (phase-variable) form.
//!
//! States are the phase variables x_1 = z, x_2 = z', ..., x_n = z^(n-1) of
//! `a(p) z = u`, so A has ones on the superdiagonal and last row `[-a_0, ..., -a_{n-1}]`,
//! `B = e_n`, `C = [c_0, ..., c_{n-1}]`, `D = d`. Identity: `C (sI - A)^-1 B = c(s)/a(s)`,
//! since `(sI - A)^-1 e_n = [1, s, ..., s^(n-1)]ᵀ / a(s)`.
//! The observable canonical form is its dual.

use crate::matrix::Matrix;
use crate::poly::ProperSplit;
use crate::scalar::Scalar;
use crate::state_space::StateSpace;

pub fn controllable_canonical<T: Scalar>(split: &ProperSplit<T>) -> StateSpace<T> {
    let n = split.order();
    if n == 0 {
        return super::gain_only(&split.direct);
    }
    let mut a = Matrix::zeros(n, n);
    for i in 0..n - 1 {
        a.set(i, i + 1, T::one());
    }
    for j in 0..n {
        a.set(n - 1, j, split.a(j).neg());
    }
    let mut b = Matrix::zeros(n, 1);
    b.set(n - 1, 0, T::one());
    let mut c = Matrix::zeros(1, n);
    for j in 0..n {
        c.set(0, j, split.c(j).clone());
    }
    let d = Matrix::from_row_major(1, 1, vec![split.direct.clone()]).expect("1x1");
    StateSpace { a, b, c, d }
}
