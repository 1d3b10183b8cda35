//! A lower estimate of the H-infinity norm `‖G‖_∞ = sup_ω σ_max(G(jω))` (discrete time:
//! `sup_θ σ_max(G(e^{jθ}))`) of a stable model or of the difference of two, from a
//! frequency grid and a local refinement.
//!
//! # Purpose
//! The figures the balancing routines verify their results with: `σ_1 ≤ ‖G − D‖_∞` (the
//! Hankel norm never exceeds the H-infinity norm) and `‖G − G_r‖_∞ ≤ 2 Σ σ_discarded`
//! (the truncation bound). Every value returned is attained at a frequency that is
//! returned with it, so it is a true lower bound of the norm up to evaluation rounding.
//!
//! # Method
//! Each model is kept in real Schur coordinates `(T, Qᵀ B, C Q, D)`, so that one evaluation
//! `C Q (sI − T)⁻¹ Qᵀ B + D` is a complex back substitution over T's 1×1 and 2×2 diagonal
//! blocks (O(n² m) operations). Grid: ω = 0, 8 points per decade from a hundredth of the
//! smallest pole magnitude to a hundred times the largest, and, for each pole, its
//! imaginary part and its magnitude (where a lightly damped resonance peaks). In discrete
//! time the same construction on the continuous-time equivalents `log z` of the poles,
//! clipped to [0, π], plus θ = π. The three largest local maxima of the grid are refined
//! by golden-section search between their neighbours (60 steps, on log ω away from 0).
//! σ_max is the largest singular value of the p × m complex matrix (nalgebra SVD; the
//! modulus when p = m = 1).
//!
//! # Numerical aspects
//! A grid search is a lower estimate: a peak narrower than the grid spacing and not at a
//! pole's imaginary part can be missed (the refinement recovers any peak inside a
//! bracketing grid interval). Evaluation near a lightly damped pole loses accuracy in
//! proportion to the condition number of `sI − T`; callers compare with allowances for it.
//!
//! # References
//! K. Zhou, J. C. Doyle and K. Glover, *Robust and Optimal Control*, 1996, ch. 4 (the
//! H-infinity norm as the peak gain). J. Kiefer, "Sequential minimax search for a maximum",
//! Proc. Amer. Math. Soc. 4 (1953) (golden-section search).
//!
//! # Errors
//! `NoConvergence` if a small SVD fails; `BadValue` for a singular `sI − T` (a pole on the
//! axis, refused earlier by the stability checks of the callers).

use super::lyapunov::{eigenvalues, RealSchur};
use crate::error::{ModelError, Result};
use nalgebra::{Complex, DMatrix};

type C64 = Complex<f64>;

/// A model in real Schur coordinates.
#[derive(Debug, Clone)]
pub struct SchurModel {
    pub t: DMatrix<f64>,
    pub blocks: Vec<(usize, usize)>,
    pub b: DMatrix<f64>,
    pub c: DMatrix<f64>,
    pub d: DMatrix<f64>,
    /// Poles (re, im).
    pub poles: Vec<(f64, f64)>,
}

impl SchurModel {
    /// `(A, B, C, D)` given A's real Schur form.
    pub fn new(schur: &RealSchur, b: &DMatrix<f64>, c: &DMatrix<f64>, d: &DMatrix<f64>) -> Self {
        SchurModel {
            t: schur.t.clone(),
            blocks: schur.blocks.clone(),
            b: schur.u.transpose() * b,
            c: c * &schur.u,
            d: d.clone(),
            poles: eigenvalues(schur),
        }
    }

    /// `G(s)` (p × m), D excluded when `with_d` is false.
    pub fn evaluate(&self, s: C64, with_d: bool) -> Result<DMatrix<C64>> {
        let n = self.t.nrows();
        let (p, m) = (self.c.nrows(), self.b.ncols());
        let mut out = DMatrix::from_fn(p, m, |i, j| {
            if with_d {
                C64::new(self.d[(i, j)], 0.0)
            } else {
                C64::new(0.0, 0.0)
            }
        });
        let singular = || ModelError::BadValue {
            arg: "a",
            detail: "a pole lies on the frequency axis; the frequency response is infinite there"
                .into(),
        };
        let mut x = vec![C64::new(0.0, 0.0); n];
        for col in 0..m {
            for (i, xi) in x.iter_mut().enumerate() {
                *xi = C64::new(self.b[(i, col)], 0.0);
            }
            for &(i0, bi) in self.blocks.iter().rev() {
                // (sI − T_ii) x_i = b_i + Σ_{l beyond the block} T_il x_l
                let mut rhs = [C64::new(0.0, 0.0); 2];
                for (r, slot) in rhs.iter_mut().enumerate().take(bi) {
                    let row = i0 + r;
                    let mut acc = x[row];
                    for (l, xl) in x.iter().enumerate().skip(i0 + bi) {
                        acc += *xl * self.t[(row, l)];
                    }
                    *slot = acc;
                }
                if bi == 1 {
                    let den = s - self.t[(i0, i0)];
                    if den.norm() == 0.0 {
                        return Err(singular());
                    }
                    x[i0] = rhs[0] / den;
                } else {
                    let a11 = s - self.t[(i0, i0)];
                    let a12 = C64::new(-self.t[(i0, i0 + 1)], 0.0);
                    let a21 = C64::new(-self.t[(i0 + 1, i0)], 0.0);
                    let a22 = s - self.t[(i0 + 1, i0 + 1)];
                    let det = a11 * a22 - a12 * a21;
                    if det.norm() == 0.0 {
                        return Err(singular());
                    }
                    x[i0] = (rhs[0] * a22 - a12 * rhs[1]) / det;
                    x[i0 + 1] = (a11 * rhs[1] - a21 * rhs[0]) / det;
                }
            }
            for i in 0..p {
                let mut acc = C64::new(0.0, 0.0);
                for (l, xl) in x.iter().enumerate() {
                    acc += *xl * self.c[(i, l)];
                }
                out[(i, col)] += acc;
            }
        }
        Ok(out)
    }
}

fn largest_singular_value(g: &DMatrix<C64>) -> Result<f64> {
    if g.nrows() == 0 || g.ncols() == 0 {
        return Ok(0.0);
    }
    if g.nrows() == 1 && g.ncols() == 1 {
        return Ok(g[(0, 0)].norm());
    }
    let svd =
        g.clone()
            .try_svd(false, false, f64::EPSILON, 200)
            .ok_or(ModelError::NoConvergence {
                routine: "the SVD of a frequency response",
            })?;
    Ok(svd.singular_values.iter().fold(0.0, |m, &v| m.max(v)))
}

/// The peak gain found and where: `value = σ_max(G(point))`.
#[derive(Debug, Clone, Copy)]
pub struct Peak {
    pub value: f64,
    /// ω in rad/s (continuous) or θ in rad/sample (discrete).
    pub frequency: f64,
}

/// `σ_max(Σ_k sign_k G_k(point))` at ω (or θ).
fn gain(models: &[(&SchurModel, f64, bool)], omega: f64, discrete: bool) -> Result<f64> {
    let s = if discrete {
        C64::new(omega.cos(), omega.sin())
    } else {
        C64::new(0.0, omega)
    };
    let mut total: Option<DMatrix<C64>> = None;
    for (model, sign, with_d) in models {
        let g = model.evaluate(s, *with_d)? * C64::new(*sign, 0.0);
        total = Some(match total {
            None => g,
            Some(t) => t + g,
        });
    }
    largest_singular_value(&total.unwrap_or_else(|| DMatrix::zeros(0, 0)))
}

/// The grid of frequencies for the poles of the given models.
fn grid(models: &[(&SchurModel, f64, bool)], discrete: bool) -> Vec<f64> {
    let mut marks = Vec::new();
    for (model, _, _) in models {
        for &(re, im) in &model.poles {
            let (re, im) = if discrete {
                // log z = log|z| + j arg z
                (re.hypot(im).ln(), im.atan2(re).abs())
            } else {
                (re, im.abs())
            };
            let mag = re.hypot(im);
            if mag.is_finite() && mag > 0.0 {
                marks.push(mag);
            }
            if im > 0.0 {
                marks.push(im);
            }
        }
    }
    let top = if discrete {
        std::f64::consts::PI
    } else {
        f64::MAX
    };
    let mut out = vec![0.0];
    if !marks.is_empty() {
        let lo = marks.iter().fold(f64::MAX, |m, &v| m.min(v)) / 100.0;
        let hi = (marks.iter().fold(0.0f64, |m, &v| m.max(v)) * 100.0).min(top);
        let (l0, l1) = (lo.log10(), hi.log10());
        let count = ((l1 - l0) * 8.0).ceil().clamp(8.0, 400.0) as usize;
        for i in 0..=count {
            out.push(
                10f64
                    .powf(l0 + (l1 - l0) * i as f64 / count as f64)
                    .min(top),
            );
        }
        out.extend(marks.iter().map(|&v| v.min(top)));
    } else {
        out.push(1.0);
    }
    if discrete {
        out.push(std::f64::consts::PI);
    }
    out.retain(|v| v.is_finite());
    out.sort_by(f64::total_cmp);
    out.dedup();
    out
}

/// The largest gain of `Σ_k sign_k G_k` found on the grid and by refinement.
pub fn peak_gain(models: &[(&SchurModel, f64, bool)], discrete: bool) -> Result<Peak> {
    let freqs = grid(models, discrete);
    let mut values = Vec::with_capacity(freqs.len());
    for &w in &freqs {
        values.push(gain(models, w, discrete)?);
    }
    let mut best = Peak {
        value: 0.0,
        frequency: 0.0,
    };
    for (i, &v) in values.iter().enumerate() {
        if v > best.value {
            best = Peak {
                value: v,
                frequency: freqs[i],
            };
        }
    }
    // Local maxima, largest first; refine the three largest.
    let mut maxima: Vec<usize> = (0..freqs.len())
        .filter(|&i| {
            (i == 0 || values[i] >= values[i - 1])
                && (i + 1 == freqs.len() || values[i] >= values[i + 1])
        })
        .collect();
    maxima.sort_by(|&x, &y| values[y].total_cmp(&values[x]));
    for &i in maxima.iter().take(3) {
        let lo = if i == 0 { freqs[0] } else { freqs[i - 1] };
        let hi = if i + 1 == freqs.len() {
            freqs[i]
        } else {
            freqs[i + 1]
        };
        if hi <= lo {
            continue;
        }
        // Golden section on log ω where the bracket is away from 0, else on ω.
        let use_log = lo > 0.0;
        let (mut a, mut b) = if use_log {
            (lo.ln(), hi.ln())
        } else {
            (lo, hi)
        };
        let to_freq = |x: f64| if use_log { x.exp() } else { x };
        let ratio = 0.5 * (5f64.sqrt() - 1.0);
        let mut x1 = b - ratio * (b - a);
        let mut x2 = a + ratio * (b - a);
        let mut f1 = gain(models, to_freq(x1), discrete)?;
        let mut f2 = gain(models, to_freq(x2), discrete)?;
        for _ in 0..60 {
            if f1 >= f2 {
                b = x2;
                x2 = x1;
                f2 = f1;
                x1 = b - ratio * (b - a);
                f1 = gain(models, to_freq(x1), discrete)?;
            } else {
                a = x1;
                x1 = x2;
                f1 = f2;
                x2 = a + ratio * (b - a);
                f2 = gain(models, to_freq(x2), discrete)?;
            }
            if (b - a).abs() <= 1e-12 * (a.abs() + b.abs()) {
                break;
            }
        }
        for (x, f) in [(x1, f1), (x2, f2)] {
            if f > best.value {
                best = Peak {
                    value: f,
                    frequency: to_freq(x),
                };
            }
        }
    }
    Ok(best)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::gramian::lyapunov::real_schur;

    #[test]
    fn first_order_and_resonance_peaks() {
        // 1/(s + 2): peak 1/2 at ω = 0 (hand). ω0²/(s² + 2ζω0 s + ω0²), ζ = 1e-3, ω0 = 3:
        // peak 1/(2ζ√(1 − ζ²)) (hand).
        let a = DMatrix::from_row_slice(1, 1, &[-2.0]);
        let s = real_schur(&a).unwrap();
        let one = DMatrix::from_row_slice(1, 1, &[1.0]);
        let model = SchurModel::new(&s, &one, &one, &DMatrix::zeros(1, 1));
        let p = peak_gain(&[(&model, 1.0, true)], false).unwrap();
        assert!((p.value - 0.5).abs() < 1e-15);
        let (zeta, w0) = (1e-3, 3.0);
        let a = DMatrix::from_row_slice(2, 2, &[0.0, 1.0, -w0 * w0, -2.0 * zeta * w0]);
        let s = real_schur(&a).unwrap();
        let b = DMatrix::from_row_slice(2, 1, &[0.0, 1.0]);
        let c = DMatrix::from_row_slice(1, 2, &[w0 * w0, 0.0]);
        let model = SchurModel::new(&s, &b, &c, &DMatrix::zeros(1, 1));
        let p = peak_gain(&[(&model, 1.0, true)], false).unwrap();
        let want = 1.0 / (2.0 * zeta * (1.0 - zeta * zeta).sqrt());
        assert!((p.value - want).abs() < 1e-9 * want, "{} {}", p.value, want);
        // Difference of a model with itself: zero (identity).
        let p = peak_gain(&[(&model, 1.0, true), (&model, -1.0, true)], false).unwrap();
        assert_eq!(p.value, 0.0);
    }

    #[test]
    fn discrete_peak() {
        // 1/(z − 0.5): peak at θ = 0, 1/(1 − 0.5) = 2; 1/(z + 0.5): at θ = π, 2 (hand).
        for pole in [0.5, -0.5] {
            let a = DMatrix::from_row_slice(1, 1, &[pole]);
            let s = real_schur(&a).unwrap();
            let one = DMatrix::from_row_slice(1, 1, &[1.0]);
            let model = SchurModel::new(&s, &one, &one, &DMatrix::zeros(1, 1));
            let p = peak_gain(&[(&model, 1.0, true)], true).unwrap();
            assert!((p.value - 2.0).abs() < 1e-14, "{}", p.value);
        }
    }
}
