//! Verification of a reduced model against the model it came from.
//!
//! # Purpose
//! A routine that removes states (minimal realization, Kalman decomposition) checks that
//! what it returns has the transfer function of its input before returning it.
//!
//! # Method
//! The Markov parameters `C A^k B`, `k = 0 .. 2n − 1` (n the order of the full model),
//! determine a transfer function of order at most n (two realizations of orders n and
//! n_r <= n with equal `C A^k B` for `k < 2n` have the same transfer function: Kalman 1963).
//! Both models are compared on scaled data: A divided by
//! `α = min(‖A‖_F, sqrt(‖A‖_1 ‖A‖_∞))`, an upper bound of `‖A‖_2`, so the powers stay
//! bounded, and the columns of B and rows of C scaled by powers of two to unit exponent
//! (so the figure does not depend on the units of the inputs and outputs). The residual is
//! `max_k ‖Ĉ (A/α)^k B̂ − Ĉ_r (A_r/α)^k B̂_r‖_F / (‖Ĉ‖_F ‖B̂‖_F)`.
//!
//! # Numerical aspects
//! Each parameter is computed with a relative error of about `k n eps`; a reduced model
//! of a backward-stable reduction matches to that level. [`markov_tolerance`] is the
//! acceptance threshold `100 · n · 2n · eps`. Cost `O(n² m · 2n)`.
//!
//! # References
//! R. E. Kalman, "Mathematical description of linear dynamical systems", SIAM J. Control 1
//! (1963).

use super::to_faer;
use crate::matrix::{frobenius_norm, pow2, Matrix};
use crate::state_space::StateSpace;

/// The acceptance threshold of [`markov_residual`] for a model of order n: `200 n² eps`.
pub fn markov_tolerance(n: usize) -> f64 {
    let n = n.max(1) as f64;
    100.0 * n * 2.0 * n * f64::EPSILON
}

fn exponent(v: f64) -> i32 {
    if v > 0.0 && v.is_finite() {
        v.log2().floor() as i32
    } else {
        0
    }
}

/// Exponents bringing each column of `b` to a norm in [1, 2).
fn column_unit_exponents(b: &Matrix<f64>) -> Vec<i32> {
    (0..b.cols())
        .map(|j| {
            let col: Vec<f64> = (0..b.rows()).map(|i| *b.get(i, j)).collect();
            -exponent(frobenius_norm(&col))
        })
        .collect()
}

fn scaled_b(b: &Matrix<f64>, e: &[i32]) -> faer::Mat<f64> {
    faer::Mat::from_fn(b.rows(), b.cols(), |i, j| {
        b.get(i, j) * pow2(e[j] / 2) * pow2(e[j] - e[j] / 2)
    })
}

fn scaled_c(c: &Matrix<f64>, e: &[i32]) -> faer::Mat<f64> {
    faer::Mat::from_fn(c.rows(), c.cols(), |i, j| {
        c.get(i, j) * pow2(e[i] / 2) * pow2(e[i] - e[i] / 2)
    })
}

/// The relative Markov-parameter residual of `reduced` against `full` (see the module).
pub fn markov_residual(full: &StateSpace<f64>, reduced: &StateSpace<f64>) -> f64 {
    let n = full.n_states();
    let eb = column_unit_exponents(&full.b);
    let ec = column_unit_exponents(&full.c.transpose());
    let (b, c) = (scaled_b(&full.b, &eb), scaled_c(&full.c, &ec));
    let (br, cr) = (scaled_b(&reduced.b, &eb), scaled_c(&reduced.c, &ec));
    let denom = b.norm_l2() * c.norm_l2();
    let a = to_faer(&full.a);
    let ar = to_faer(&reduced.a);
    let one = |m: &faer::Mat<f64>| -> f64 {
        (0..m.ncols())
            .map(|j| (0..m.nrows()).map(|i| m[(i, j)].abs()).sum::<f64>())
            .fold(0.0, f64::max)
    };
    let fro = a.norm_l2();
    let alpha = fro.min((one(&a) * one(&a.transpose().to_owned())).sqrt());
    let alpha = if alpha > 0.0 && alpha.is_finite() {
        alpha
    } else {
        1.0
    };
    let (a, ar) = (
        &a * faer::Scale(1.0 / alpha),
        &ar * faer::Scale(1.0 / alpha),
    );
    let (mut x, mut xr) = (b, br);
    let mut worst: f64 = 0.0;
    for _ in 0..(2 * n).max(1) {
        let diff = &c * &x - &cr * &xr;
        let num = diff.norm_l2();
        if num > 0.0 {
            worst = worst.max(if denom > 0.0 {
                num / denom
            } else {
                f64::INFINITY
            });
        }
        if !worst.is_finite() {
            return f64::INFINITY;
        }
        x = &a * &x;
        xr = &ar * &xr;
    }
    worst
}
