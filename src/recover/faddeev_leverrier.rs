//! The Faddeev–LeVerrier recursion over any [`Scalar`] (exact for rationals and integers).
//!
//! # Purpose
//! For an n×n matrix A, the characteristic polynomial
//! `det(sI − A) = s^n + c_1 s^(n−1) + ... + c_n` and the adjugate
//! `adj(sI − A) = N_0 s^(n−1) + N_1 s^(n−2) + ... + N_{n−1}`.
//!
//! # Method
//! `N_0 = I`; for k = 1..n: `c_k = −tr(A N_{k−1}) / k`, `N_k = A N_{k−1} + c_k I`
//! (and `N_n = 0`, the Cayley–Hamilton theorem). Then for a model (A, B, C, D) the transfer
//! matrix numerator on the power grid s^n .. s^0 is `D` followed by
//! `C N_{k−1} B + c_k D`, k = 1..n, since `C adj(sI−A) B + det(sI−A) D` collects so.
//!
//! # Numerical aspects
//! Exact over the rationals, and over the integers for an integer matrix (every division
//! by k is exact there because the c_k are integers). In floating point see
//! [`super::certified`]; this generic version is used for exact data only.
//!
//! # References
//! D. K. Faddeev and V. N. Faddeeva, *Computational Methods of Linear Algebra*, Freeman 1963;
//! U. J. J. Le Verrier (1840); F. R. Gantmacher, *The Theory of Matrices*, vol. 1, ch. IV.

use crate::matrix::Matrix;
use crate::scalar::Scalar;
use crate::state_space::StateSpace;

/// Coefficients `[1, c_1, ..., c_n]` and adjugate matrices `N_0 .. N_{n−1}`.
pub fn faddeev_leverrier<T: Scalar>(a: &Matrix<T>) -> (Vec<T>, Vec<Matrix<T>>) {
    let n = a.rows();
    let mut coeffs = Vec::with_capacity(n + 1);
    coeffs.push(T::one());
    let mut adjugates = Vec::with_capacity(n);
    if n == 0 {
        return (coeffs, adjugates);
    }
    let mut current = Matrix::identity(n);
    for k in 1..=n {
        let mut product = a.matmul(&current);
        let ck = product.trace().neg().div_exact(&T::from_i64(k as i64));
        adjugates.push(current);
        if k < n {
            for i in 0..n {
                let v = product.get(i, i).add(&ck);
                product.set(i, i, v);
            }
        }
        coeffs.push(ck);
        current = product;
    }
    (coeffs, adjugates)
}

/// Numerator (p, m, n+1 row-major) and monic denominator of `C (sI−A)⁻¹ B + D`.
pub fn transfer_function<T: Scalar>(ss: &StateSpace<T>) -> (Vec<T>, Vec<T>) {
    let (coeffs, adjugates) = faddeev_leverrier(&ss.a);
    let numerator = numerator_from_sequence(ss, &coeffs, &adjugates);
    (numerator, coeffs)
}

/// Assembles `D s^n + Σ_k (C N_{k−1} B + c_k D) s^(n−k)` entry by entry.
pub fn numerator_from_sequence<T: Scalar>(
    ss: &StateSpace<T>,
    coeffs: &[T],
    adjugates: &[Matrix<T>],
) -> Vec<T> {
    let (n, p, m) = (ss.n_states(), ss.n_outputs(), ss.n_inputs());
    let mut num = vec![T::zero(); p * m * (n + 1)];
    for i in 0..p {
        for j in 0..m {
            num[(i * m + j) * (n + 1)] = ss.d.get(i, j).clone();
        }
    }
    for (k, nk) in adjugates.iter().enumerate() {
        let cnb = ss.c.matmul(&nk.matmul(&ss.b));
        for i in 0..p {
            for j in 0..m {
                let mut v = cnb.get(i, j).clone();
                v.add_mul(&coeffs[k + 1], ss.d.get(i, j));
                num[(i * m + j) * (n + 1) + k + 1] = v;
            }
        }
    }
    num
}
