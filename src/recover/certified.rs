//! Faddeev–LeVerrier with a running componentwise error bound, in float64 or double-double.
//!
//! # Purpose
//! The fast path of the float recovery routines: the recursion in a working precision
//! (float64, or double-double with about 106 bits), and for every computed quantity a bound
//! on its distance from the exact result for the same float data, so the caller accepts the
//! fast result only when the bound certifies it.
//!
//! # Method
//! Beside `N̂_k` the recursion carries a nonnegative matrix `E_k ≥ |N̂_k − N_k|`:
//! with `G = E_{k−1} + γ_n |N̂_{k−1}|` and `F = |A| G`,
//! `|fl(A N̂_{k−1}) − A N_{k−1}| ≤ F`; the coefficient error is
//! `δc_k ≤ (Σ_i F_ii + γ_n Σ_i |P_ii|) / k + u |ĉ_k|` and `E_k = F + δc_k I + u |N̂_k|`,
//! where u is the working precision's unit roundoff and `γ_j = j u / (1 − j u)` (standard
//! model of floating-point arithmetic, Higham 2002, §3.1–3.5). Numerator entries
//! `C N̂_k B + ĉ_{k+1} D` get `|C| (E_k + γ_{2n} |N̂_k|) |B| + δc_{k+1} |D|` plus the rounding
//! of the final sum.
//!
//! # Numerical aspects
//! The bound is first order in u and a worst case; it follows the actual magnitudes of the
//! intermediate matrices, so it is small when the recursion suffers little cancellation and
//! large when eigenvalue magnitudes are spread (where float64 loses every digit). The
//! bounds themselves are accumulated in float64 (their own rounding is negligible next to
//! the quantities bounded). Cost: two n×n products per step; double-double products cost
//! about 20 flops each.
//!
//! # References
//! N. J. Higham, *Accuracy and Stability of Numerical Algorithms*, 2nd ed., SIAM 2002.

use super::double_double::{self, Dd};
use crate::state_space::StateSpace;

/// The arithmetic the recursion runs in.
pub trait Working: Copy + Send + Sync {
    /// Unit roundoff of one operation.
    const UNIT: f64;
    fn from_f64(x: f64) -> Self;
    fn to_f64(self) -> f64;
    fn add(self, other: Self) -> Self;
    /// `self + a · b`.
    fn add_mul_f64(self, a: f64, b: Self) -> Self;
    fn neg(self) -> Self;
    fn div_small(self, k: f64) -> Self;
    fn abs_f64(self) -> f64;
}

impl Working for f64 {
    const UNIT: f64 = f64::EPSILON / 2.0;
    #[inline(always)]
    fn from_f64(x: f64) -> Self {
        x
    }
    #[inline(always)]
    fn to_f64(self) -> f64 {
        self
    }
    #[inline(always)]
    fn add(self, o: Self) -> Self {
        self + o
    }
    // Not fused, so results are identical on every CPU.
    #[inline(always)]
    fn add_mul_f64(self, a: f64, b: Self) -> Self {
        self + a * b
    }
    #[inline(always)]
    fn neg(self) -> Self {
        -self
    }
    #[inline(always)]
    fn div_small(self, k: f64) -> Self {
        self / k
    }
    #[inline(always)]
    fn abs_f64(self) -> f64 {
        self.abs()
    }
}

impl<const FMA: bool> Working for Dd<FMA> {
    const UNIT: f64 = double_double::UNIT_ROUNDOFF;
    #[inline(always)]
    fn from_f64(x: f64) -> Self {
        Dd::from_f64(x)
    }
    #[inline(always)]
    fn to_f64(self) -> f64 {
        Dd::to_f64(self)
    }
    #[inline(always)]
    fn add(self, o: Self) -> Self {
        Dd::add(self, o)
    }
    #[inline(always)]
    fn add_mul_f64(self, a: f64, b: Self) -> Self {
        Dd::add_mul_f64(self, a, b)
    }
    #[inline(always)]
    fn neg(self) -> Self {
        Dd::neg(self)
    }
    #[inline(always)]
    fn div_small(self, k: f64) -> Self {
        Dd::div_small(self, k)
    }
    #[inline(always)]
    fn abs_f64(self) -> f64 {
        Dd::abs_f64(self)
    }
}

/// The double-double recursion, with the product errors from fused multiply-adds where the
/// CPU has them (same results bit for bit, about twice as fast).
pub fn certified_double_double(
    a: &[f64],
    n: usize,
    keep_adjugates: bool,
    model: Option<&StateSpace<f64>>,
) -> CertifiedSequence {
    #[cfg(target_arch = "x86_64")]
    {
        if std::arch::is_x86_feature_detected!("fma") {
            // SAFETY: the CPU supports FMA (checked just above).
            return unsafe { certified_with_fma(a, n, keep_adjugates, model) };
        }
    }
    certified_recursion::<Dd<false>>(a, n, keep_adjugates, model)
}

#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "fma")]
unsafe fn certified_with_fma(
    a: &[f64],
    n: usize,
    keep_adjugates: bool,
    model: Option<&StateSpace<f64>>,
) -> CertifiedSequence {
    certified_recursion::<Dd<true>>(a, n, keep_adjugates, model)
}

fn gamma(j: usize, unit: f64) -> f64 {
    let ju = j as f64 * unit;
    ju / (1.0 - ju)
}

/// Results (rounded to float64) of the recursion with componentwise bounds on the error of
/// the working-precision values (the final rounding to float64 is not included).
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
    /// Largest bound on the error relative to the *exact* value over everything computed
    /// ([`worst_relative_bound_of`] over coefficients, adjugates and numerator).
    pub fn worst_relative_bound(&self) -> f64 {
        worst_relative_bound_of(
            [&self.coeffs, &self.adjugates, &self.numerator],
            [
                &self.coeff_bounds,
                &self.adjugate_bounds,
                &self.numerator_bounds,
            ],
        )
    }

    /// True when every result and bound is finite.
    pub fn is_finite(&self) -> bool {
        all_finite(
            [&self.coeffs, &self.adjugates, &self.numerator],
            [
                &self.coeff_bounds,
                &self.adjugate_bounds,
                &self.numerator_bounds,
            ],
        )
    }
}

/// Largest bound on the error relative to the *exact* value over the values and their
/// bounds (paired part by part): `bound / (|value| − bound)`, since
/// `|exact| ≥ |value| − bound`; ∞ where the bound reaches the computed value (no relative
/// accuracy is certified there); a zero bound counts as 0. Shared by the scalar and the
/// lane recursion, so both decide alike.
pub fn worst_relative_bound_of<const P: usize>(values: [&[f64]; P], bounds: [&[f64]; P]) -> f64 {
    let mut worst: f64 = 0.0;
    for (vs, es) in values.iter().zip(&bounds) {
        for (v, e) in vs.iter().zip(es.iter()) {
            if *e == 0.0 {
                continue;
            }
            let r = if *e < v.abs() {
                e / (v.abs() - e)
            } else {
                f64::INFINITY
            };
            worst = worst.max(r);
        }
    }
    worst
}

/// True when every value and bound is finite.
pub fn all_finite<const P: usize>(values: [&[f64]; P], bounds: [&[f64]; P]) -> bool {
    values.iter().all(|vs| vs.iter().all(|v| v.is_finite()))
        && bounds.iter().all(|es| es.iter().all(|v| v.is_finite()))
}

/// `out = x · y` for row-major f64 (r×k) times working (k×c); with W = f64 it also
/// accumulates the (nonnegative) error bounds.
#[inline(always)]
fn mul_left<W: Working>(x: &[f64], y: &[W], out: &mut [W], r: usize, k: usize, c: usize) {
    out.iter_mut().for_each(|v| *v = W::from_f64(0.0));
    for i in 0..r {
        let out_row = &mut out[i * c..(i + 1) * c];
        for l in 0..k {
            let xv = x[i * k + l];
            if xv == 0.0 {
                continue;
            }
            for (o, yv) in out_row.iter_mut().zip(&y[l * c..(l + 1) * c]) {
                *o = o.add_mul_f64(xv, *yv);
            }
        }
    }
}

/// `out = x · y` for row-major working (r×k) times f64 (k×c).
#[inline(always)]
fn mul_right<W: Working>(x: &[W], y: &[f64], out: &mut [W], r: usize, k: usize, c: usize) {
    out.iter_mut().for_each(|v| *v = W::from_f64(0.0));
    for i in 0..r {
        let out_row = &mut out[i * c..(i + 1) * c];
        for l in 0..k {
            let xv = x[i * k + l];
            for (o, yv) in out_row.iter_mut().zip(&y[l * c..(l + 1) * c]) {
                if *yv != 0.0 {
                    *o = o.add_mul_f64(*yv, xv);
                }
            }
        }
    }
}

/// Runs the recursion on the n×n row-major `a` in working precision W; with `model`, also
/// the transfer-matrix numerator of `model` (whose A must be `a`).
#[inline(always)]
pub fn certified_recursion<W: Working>(
    a: &[f64],
    n: usize,
    keep_adjugates: bool,
    model: Option<&StateSpace<f64>>,
) -> CertifiedSequence {
    let u = W::UNIT;
    let abs_a: Vec<f64> = a.iter().map(|v| v.abs()).collect();
    let (gn, g2n) = (gamma(n, u), gamma(2 * n, u));
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

    let zero = W::from_f64(0.0);
    let mut current = vec![zero; n * n];
    for i in 0..n {
        current[i * n + i] = W::from_f64(1.0);
    }
    let mut err = vec![0.0; n * n];
    let mut product = vec![zero; n * n];
    let mut grown = vec![0.0; n * n];
    let mut propagated = vec![0.0; n * n];
    let (mut nb, mut cnb) = (vec![zero; n * m], vec![zero; p * m]);
    let (mut gb, mut cgb) = (vec![0.0; n * m], vec![0.0; p * m]);
    let mut grown2 = vec![0.0; if p * m > 0 { n * n } else { 0 }];

    for k in 1..=n {
        if keep_adjugates {
            adjugates.extend(current.iter().map(|v| v.to_f64()));
            adjugate_bounds.extend_from_slice(&err);
        }
        mul_left(a, &current, &mut product, n, n, n);
        for (g, (e, v)) in grown.iter_mut().zip(err.iter().zip(&current)) {
            *g = e + gn * v.abs_f64();
        }
        mul_left::<f64>(&abs_a, &grown, &mut propagated, n, n, n);

        let (mut trace, mut trace_abs, mut trace_err) = (zero, 0.0, 0.0);
        for i in 0..n {
            trace = trace.add(product[i * n + i]);
            trace_abs += product[i * n + i].abs_f64();
            trace_err += propagated[i * n + i];
        }
        let ck = trace.neg().div_small(k as f64);
        let ck_err = (trace_err + gn * trace_abs) / k as f64 + u * ck.abs_f64();

        if p * m > 0 {
            // Numerator term for s^(n−k): C N_{k−1} B + c_k D.
            for (g, (e, v)) in grown2.iter_mut().zip(err.iter().zip(&current)) {
                *g = e + g2n * v.abs_f64();
            }
            mul_right(&current, b, &mut nb, n, n, m);
            mul_left(c, &nb, &mut cnb, p, n, m);
            mul_left::<f64>(&grown2, &abs_b, &mut gb, n, n, m);
            mul_left::<f64>(&abs_c, &gb, &mut cgb, p, n, m);
            for i in 0..p * m {
                let v = cnb[i].add_mul_f64(d[i], ck);
                numerator[i * (n + 1) + k] = v.to_f64();
                numerator_bounds[i * (n + 1) + k] = cgb[i]
                    + ck_err * d[i].abs()
                    + 2.0 * u * (cnb[i].abs_f64() + (ck.abs_f64() * d[i].abs()));
            }
        }

        coeffs.push(ck.to_f64());
        coeff_bounds.push(ck_err);
        if k < n {
            for i in 0..n {
                product[i * n + i] = product[i * n + i].add(ck);
                propagated[i * n + i] += ck_err;
            }
            for (e, (f, v)) in err.iter_mut().zip(propagated.iter().zip(&product)) {
                *e = f + u * v.abs_f64();
            }
            std::mem::swap(&mut current, &mut product);
        }
    }
    CertifiedSequence {
        coeffs,
        coeff_bounds,
        adjugates,
        adjugate_bounds,
        numerator,
        numerator_bounds,
    }
}
