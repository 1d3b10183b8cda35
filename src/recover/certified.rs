//! Faddeev–LeVerrier in float64 with a running componentwise error bound.
//!
//! # Purpose
//! The fast path of the float recovery routines: the plain recursion, plus for every
//! computed quantity a bound on its distance from the exact result for the same float data,
//! so the caller can accept the fast result only when it is certified accurate.
//!
//! # Method
//! Beside `N̂_k` the recursion carries a nonnegative matrix `E_k ≥ |N̂_k − N_k|`:
//! with `G = E_{k−1} + γ_n |N̂_{k−1}|` and `F = |A| G`,
//! `|fl(A N̂_{k−1}) − A N_{k−1}| ≤ F`, the coefficient error is
//! `δc_k ≤ (Σ_i F_ii + γ_n Σ_i |P_ii|) / k + u |ĉ_k|` and `E_k = F + δc_k I + u |N̂_k|`,
//! where `u = 2⁻⁵³` and `γ_j = j u / (1 − j u)` (standard model of floating-point
//! arithmetic, Higham 2002, §3.1–3.5). Numerator entries `C N̂_k B` get
//! `|C| (E_k + γ_{2n} |N̂_k|) |B|` plus the rounding of the direct-term update.
//!
//! # Numerical aspects
//! The bound is first order in u (terms in u² are dropped) and is a worst case: it tracks
//! the actual growth of the intermediate matrices, so it is small exactly when the recursion
//! suffers no cancellation (clustered, similar-magnitude eigenvalues) and large when
//! eigenvalue magnitudes are spread, where the recursion loses everything. Cost: about
//! twice the plain recursion (two n×n products per step).
//!
//! # References
//! N. J. Higham, *Accuracy and Stability of Numerical Algorithms*, 2nd ed., SIAM 2002.

use crate::state_space::StateSpace;

const U: f64 = f64::EPSILON / 2.0;

fn gamma(j: usize) -> f64 {
    let ju = j as f64 * U;
    ju / (1.0 - ju)
}

/// Results of the float recursion with their componentwise error bounds.
pub struct CertifiedSequence {
    /// `[1, c_1, ..., c_n]`.
    pub coeffs: Vec<f64>,
    pub coeff_bounds: Vec<f64>,
    /// `N_0 .. N_{n−1}`, each n×n row-major, concatenated (empty unless requested).
    pub adjugates: Vec<f64>,
    pub adjugate_bounds: Vec<f64>,
    /// Numerator (p, m, n+1) and its bounds (empty unless a model was given).
    pub numerator: Vec<f64>,
    pub numerator_bounds: Vec<f64>,
}

impl CertifiedSequence {
    /// Largest `bound / |value|` over everything computed (0/0 counts as 0, x/0 as ∞).
    pub fn worst_relative_bound(&self) -> f64 {
        let pairs = self
            .coeffs
            .iter()
            .zip(&self.coeff_bounds)
            .chain(self.adjugates.iter().zip(&self.adjugate_bounds))
            .chain(self.numerator.iter().zip(&self.numerator_bounds));
        let mut worst: f64 = 0.0;
        for (v, e) in pairs {
            if *e == 0.0 {
                continue;
            }
            let r = if *v == 0.0 { f64::INFINITY } else { e / v.abs() };
            worst = worst.max(r);
        }
        worst
    }

    /// True when every result is finite.
    pub fn is_finite(&self) -> bool {
        self.coeffs.iter().chain(&self.adjugates).chain(&self.numerator).all(|v| v.is_finite())
            && self.coeff_bounds.iter().chain(&self.adjugate_bounds).chain(&self.numerator_bounds).all(|v| v.is_finite())
    }
}

/// `out = x · y` for row-major (r×k)·(k×c), overwriting out.
#[inline]
fn matmul(x: &[f64], y: &[f64], out: &mut [f64], r: usize, k: usize, c: usize) {
    out.iter_mut().for_each(|v| *v = 0.0);
    for i in 0..r {
        let out_row = &mut out[i * c..(i + 1) * c];
        for l in 0..k {
            let xv = x[i * k + l];
            if xv == 0.0 {
                continue;
            }
            let y_row = &y[l * c..(l + 1) * c];
            for (o, yv) in out_row.iter_mut().zip(y_row) {
                *o += xv * yv;
            }
        }
    }
}

/// Runs the recursion on the n×n row-major `a`; with `model`, also the transfer-matrix
/// numerator of `model` (whose A must be `a`).
pub fn certified_recursion(a: &[f64], n: usize, keep_adjugates: bool, model: Option<&StateSpace<f64>>) -> CertifiedSequence {
    let abs_a: Vec<f64> = a.iter().map(|v| v.abs()).collect();
    let gn = gamma(n);
    let g2n = gamma(2 * n);
    let mut coeffs = vec![1.0];
    let mut coeff_bounds = vec![0.0];
    let mut adjugates = Vec::new();
    let mut adjugate_bounds = Vec::new();

    let (p, m) = model.map_or((0, 0), |s| (s.n_outputs(), s.n_inputs()));
    let mut numerator = vec![0.0; p * m * (n + 1)];
    let mut numerator_bounds = vec![0.0; p * m * (n + 1)];
    let (b, c, d) = match model {
        Some(s) => (s.b.as_slice(), s.c.as_slice(), s.d.as_slice()),
        None => (&[][..], &[][..], &[][..]),
    };
    let abs_b: Vec<f64> = b.iter().map(|v| v.abs()).collect();
    let abs_c: Vec<f64> = c.iter().map(|v| v.abs()).collect();
    for i in 0..p * m {
        numerator[i * (n + 1)] = d[i];
    }

    let mut current = vec![0.0; n * n];
    for i in 0..n {
        current[i * n + i] = 1.0;
    }
    let mut err = vec![0.0; n * n];
    let mut product = vec![0.0; n * n];
    let mut grown = vec![0.0; n * n];
    let mut propagated = vec![0.0; n * n];
    let (mut nb, mut cnb) = (vec![0.0; n * m], vec![0.0; p * m]);
    let (mut gb, mut cgb) = (vec![0.0; n * m], vec![0.0; p * m]);

    for k in 1..=n {
        if keep_adjugates {
            adjugates.extend_from_slice(&current);
            adjugate_bounds.extend_from_slice(&err);
        }
        matmul(a, &current, &mut product, n, n, n);
        for (g, (e, v)) in grown.iter_mut().zip(err.iter().zip(&current)) {
            *g = e + gn * v.abs();
        }
        matmul(&abs_a, &grown, &mut propagated, n, n, n);

        let (mut trace, mut trace_abs, mut trace_err) = (0.0, 0.0, 0.0);
        for i in 0..n {
            trace += product[i * n + i];
            trace_abs += product[i * n + i].abs();
            trace_err += propagated[i * n + i];
        }
        let ck = -trace / k as f64;
        let ck_err = (trace_err + gn * trace_abs) / k as f64 + U * ck.abs();

        if p * m > 0 {
            // Numerator term for s^(n−k): C N_{k−1} B + c_k D.
            let g2: Vec<f64> = err.iter().zip(&current).map(|(e, v)| e + g2n * v.abs()).collect();
            matmul(&current, b, &mut nb, n, n, m);
            matmul(c, &nb, &mut cnb, p, n, m);
            matmul(&g2, &abs_b, &mut gb, n, n, m);
            matmul(&abs_c, &gb, &mut cgb, p, n, m);
            for i in 0..p * m {
                let v = cnb[i] + ck * d[i];
                numerator[i * (n + 1) + k] = v;
                numerator_bounds[i * (n + 1) + k] = cgb[i] + ck_err * d[i].abs() + 2.0 * U * (cnb[i].abs() + (ck * d[i]).abs());
            }
        }

        coeffs.push(ck);
        coeff_bounds.push(ck_err);
        if k < n {
            for i in 0..n {
                product[i * n + i] += ck;
                propagated[i * n + i] += ck_err;
            }
            for (e, (f, v)) in err.iter_mut().zip(propagated.iter().zip(&product)) {
                *e = f + U * v.abs();
            }
            std::mem::swap(&mut current, &mut product);
        }
    }
    CertifiedSequence { coeffs, coeff_bounds, adjugates, adjugate_bounds, numerator, numerator_bounds }
}
