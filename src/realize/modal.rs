//! Modal form: a real block-diagonal realization of the poles.
//!
//! Identity: `c(s)/a(s) = Σ_k r_k / (s − λ_k)` (partial fractions over the simple poles),
//! realized as `A = diag(blocks)`, `B_k C_k = r_k`.
//!
//! # Purpose
//! A real pole `λ` is the 1×1 block `[λ]`, each complex pair `σ ± jω` (ω > 0) the block
//! `[[σ, ω], [-ω, σ]]`, ordered by ascending real part, ties by ascending ω (a real pole
//! counts as ω = 0). `D = d`. The realization is as accurate as the roots of its own
//! float coefficients allow: the poles are those roots (rounded once), the residues are
//! evaluated at them, so DC gain and frequency response follow.
//!
//! # Method
//! The poles are the roots of the monic denominator refined by the Aberth–Ehrlich iteration
//! in double-double arithmetic from the balanced companion matrix's eigenvalues
//! ([`super::roots`]). Each residue `r = c(λ)/a'(λ)` is evaluated in double-double at the
//! refined root (through the reversed polynomials where `|λ| > 1`, so nothing overflows
//! that the result does not). The residue is split between B and C by a power of two
//! (`B = 2^k`, `C = r / 2^k`, k chosen so that the two have about equal size), so `B·C`
//! is the rounded residue exactly. A pair `v = v_r + j v_i` of the companion spans
//! `[v_r, v_i]` (`A v_r = σ v_r − ω v_i`, `A v_i = ω v_r + σ v_i`); in these coordinates
//! `B = (2β, 0)`, `C = (Re r/β, Im r/β)` with β a power of two.
//!
//! # Numerical aspects
//! A companion matrix is nonderogatory, so a repeated pole is always defective and the
//! modal form does not exist; nearly repeated poles give residues of size `1/gap` that
//! cancel in the transfer function. The form is refused when two poles are closer than
//! `√eps` relative to the larger (past that point B and C would carry fewer than half of
//! the significant digits), with both poles named; `form="jordan"` treats them as one.
//! Reported in [`ModalInfo`]: that separation and its limit, the poles' estimated relative
//! error against the exact roots of the float coefficients (the iteration's last
//! correction plus the final rounding), and — as a diagnostic only, never a reason to
//! refuse — the condition number of the transformation from the balanced companion form
//! (a Vandermonde matrix, large for poles as tame as 1, 2, ..., 10).
//!
//! # References
//! B. N. Parlett and C. Reinsch, "Balancing a matrix for calculation of eigenvalues and
//! eigenvectors", Numer. Math. 13 (1969). O. Aberth, "Iteration methods for finding all
//! zeros of a polynomial simultaneously", Math. Comp. 27 (1973). T. Kailath, *Linear
//! Systems*, Prentice Hall 1980, ch. 2 (modal and companion forms).
//!
//! # Errors
//! `NoModalForm` for repeated or nearly repeated poles (the message names them);
//! `NoConvergence` if the eigensolver or the refinement fails on separated poles;
//! `Overflow` only when a residue itself leaves the float64 range.

use super::roots::{self, Cdd};
use crate::error::{ModelError, Result};
use crate::matrix::{pow2, Matrix};
use crate::poly::ProperSplit;
use crate::state_space::StateSpace;
use faer::prelude::*;

/// The figures the modal decision and its accuracy rest on.
#[derive(Debug, Clone, PartialEq)]
pub struct ModalInfo {
    /// 2-norm condition number of the balanced companion's eigenvector basis (unit
    /// columns): the transformation's conditioning, a diagnostic only.
    pub eigenvector_condition: f64,
    /// `1 / (n √eps)`: the eigenvector condition past which a basis solve would lose half
    /// the digits (the residues here do not go through one). Kept for comparison.
    pub condition_limit: f64,
    /// Smallest `|λ_i − λ_j| / max(|λ_i|, |λ_j|)` over the pole pairs (1 for one pole).
    pub pole_separation: f64,
    /// The refusal limit `√eps` for `pole_separation`.
    pub separation_limit: f64,
    /// Largest estimated relative error of a returned pole against the exact root of the
    /// float coefficients.
    pub pole_error: f64,
}

/// Relative separation of two poles: `|x − y| / max(|x|, |y|)`, 0 for two zeros.
pub(crate) fn relative_gap(x: (f64, f64), y: (f64, f64)) -> f64 {
    let d = (x.0 - y.0).hypot(x.1 - y.1);
    let m = x.0.hypot(x.1).max(y.0.hypot(y.1));
    if m == 0.0 {
        0.0
    } else {
        d / m
    }
}

/// The closest pair of poles in the relative sense, as (gap, i, j).
pub(crate) fn closest_relative(values: &[(f64, f64)]) -> (f64, usize, usize) {
    let mut best = (f64::INFINITY, 0, 0);
    for i in 0..values.len() {
        for j in i + 1..values.len() {
            let g = relative_gap(values[i], values[j]);
            if g < best.0 {
                best = (g, i, j);
            }
        }
    }
    if best.0 == f64::INFINITY {
        best.0 = 1.0;
    }
    best
}

pub(crate) fn format_pole((re, im): (f64, f64)) -> String {
    if im == 0.0 {
        format!("{re:.6e}")
    } else {
        format!("{re:.6e}{im:+.6e}j")
    }
}

/// `B = 2^k`, `C = r / 2^k` for a real residue, with `|B| ≈ |C|` and `B·C = r` exactly
/// (barring subnormal results).
fn split_real(r: f64) -> (f64, f64) {
    if r == 0.0 {
        return (0.0, 0.0);
    }
    let k = (r.abs().log2() / 2.0).round() as i32;
    let b = pow2(k);
    (b, r / b)
}

/// `B = (2β, 0)`, `C = (Re r / β, Im r / β)` for a complex residue, β a power of two with
/// `|B| ≈ |C|`.
fn split_pair(r: (f64, f64)) -> ([f64; 2], [f64; 2]) {
    let m = r.0.hypot(r.1);
    if m == 0.0 {
        return ([0.0; 2], [0.0; 2]);
    }
    let k = ((m.log2() - 1.0) / 2.0).round() as i32;
    let beta = pow2(k);
    ([2.0 * beta, 0.0], [r.0 / beta, r.1 / beta])
}

/// Condition number (2-norm) of the (generalized) eigenvector basis of the companion
/// matrix of `den` balanced by `scale` (`S⁻¹ A S`, S = diag(scale)): for each pole λ of
/// multiplicity m the chain `(1/j!) dʲ/dλʲ [1, λ, ..., λ^(n−1)]ᵀ`, j < m, divided by the
/// scale, each complex column of unit norm and split into real and imaginary parts.
/// Entries are formed from logarithms, so no power of λ overflows. Infinite when singular.
pub(crate) fn basis_condition(scale: &[f64], poles: &[((f64, f64), usize)]) -> f64 {
    let n = scale.len();
    let mut ln_fact = vec![0.0f64; n + 1];
    for k in 1..=n {
        ln_fact[k] = ln_fact[k - 1] + (k as f64).ln();
    }
    let mut columns: Vec<Vec<f64>> = Vec::with_capacity(n);
    for &((re, im), m) in poles {
        let modulus = re.hypot(im);
        let arg = im.atan2(re);
        for j in 0..m {
            let mut logs = vec![f64::NEG_INFINITY; n];
            for (i, slot) in logs.iter_mut().enumerate().skip(j) {
                let power = (i - j) as f64;
                let lm = if power == 0.0 {
                    0.0
                } else if modulus == 0.0 {
                    f64::NEG_INFINITY
                } else {
                    power * modulus.ln()
                };
                *slot = ln_fact[i] - ln_fact[j] - ln_fact[i - j] + lm - scale[i].ln();
            }
            let top = logs.iter().copied().fold(f64::NEG_INFINITY, f64::max);
            let mut vr = vec![0.0; n];
            let mut vi = vec![0.0; n];
            for i in j..n {
                if logs[i] == f64::NEG_INFINITY {
                    continue;
                }
                let mag = (logs[i] - top).exp();
                let phase = (i - j) as f64 * arg;
                if im == 0.0 {
                    let sign = if re < 0.0 && (i - j) % 2 == 1 {
                        -1.0
                    } else {
                        1.0
                    };
                    vr[i] = sign * mag;
                } else {
                    vr[i] = mag * phase.cos();
                    vi[i] = mag * phase.sin();
                }
            }
            let norm = vr.iter().chain(&vi).map(|x| x * x).sum::<f64>().sqrt();
            if im == 0.0 {
                columns.push(vr.iter().map(|x| x / norm).collect());
            } else {
                columns.push(vr.iter().map(|x| x / norm).collect());
                columns.push(vi.iter().map(|x| x / norm).collect());
            }
        }
    }
    if columns.len() != n || n == 0 {
        return if n == 0 { 1.0 } else { f64::INFINITY };
    }
    let basis = Mat::from_fn(n, n, |i, j| columns[j][i]);
    match basis.singular_values() {
        Ok(sv) if sv[n - 1] > 0.0 && sv[0].is_finite() => sv[0] / sv[n - 1],
        _ => f64::INFINITY,
    }
}

pub fn modal_from_split(split: &ProperSplit<f64>) -> Result<(StateSpace<f64>, ModalInfo)> {
    let n = split.order();
    let separation_limit = f64::EPSILON.sqrt();
    let condition_limit = 1.0 / (n.max(1) as f64 * f64::EPSILON.sqrt());
    if n == 0 {
        let info = ModalInfo {
            eigenvector_condition: 1.0,
            condition_limit,
            pole_separation: 1.0,
            separation_limit,
            pole_error: 0.0,
        };
        return Ok((super::gain_only(&split.direct), info));
    }
    let refined = roots::refined_roots(&split.den, 200)?;
    let values: Vec<(f64, f64)> = refined.roots.iter().map(|z| z.to_pair()).collect();
    let (separation, i, j) = if n >= 2 {
        closest_relative(&values)
    } else {
        (1.0, 0, 0)
    };
    if separation <= separation_limit {
        return Err(ModelError::NoModalForm {
            detail: format!(
                "the modal form does not exist for repeated (defective) poles; poles {} and {} \
                 coincide or nearly coincide (relative separation {separation:.3e} <= {separation_limit:.3e}, \
                 below which B and C would lose half the digits); form='jordan' treats them as one repeated pole",
                format_pole(values[i]),
                format_pole(values[j])
            ),
        });
    }
    if !refined.converged {
        return Err(ModelError::NoConvergence {
            routine: "the refinement of the poles (Aberth iteration) of the modal form",
        });
    }
    let pole_error = refined
        .roots
        .iter()
        .zip(&refined.relative_error)
        .map(|(z, e)| {
            let (r, i) = z.to_pair();
            let size = r.hypot(i);
            let rounding = if size > 0.0 {
                (z.re.sub(roots::Dd::from(r)).to_f64()).hypot(z.im.sub(roots::Dd::from(i)).to_f64())
                    / size
            } else {
                0.0
            };
            e + rounding
        })
        .fold(0.0, f64::max);

    // One representative per real pole or conjugate pair, in the documented order.
    let mut chosen: Vec<usize> = (0..n).filter(|&k| values[k].1 >= 0.0).collect();
    order_modes(&mut chosen, &values);
    let poly = roots::Polynomial::new(&split.den);
    let zero_numerator = split.strict_num.iter().all(|c| *c == 0.0);
    let mut a = Matrix::zeros(n, n);
    let (mut b_data, mut c_data) = (vec![0.0; n], vec![0.0; n]);
    let mut at = 0;
    for &k in &chosen {
        let (sigma, omega) = values[k];
        let r = if zero_numerator {
            Cdd::ZERO
        } else {
            poly.residue(&split.strict_num, refined.roots[k])
                .ok_or_else(|| ModelError::Overflow {
                    what: format!(
                        "the residue of the modal form at the pole {}",
                        format_pole(values[k])
                    ),
                })?
        };
        let (rr, ri) = r.to_pair();
        if !rr.is_finite() || !ri.is_finite() {
            return Err(ModelError::Overflow {
                what: format!(
                    "the residue of the modal form at the pole {}",
                    format_pole(values[k])
                ),
            });
        }
        if omega == 0.0 {
            if at >= n {
                break;
            }
            a.set(at, at, sigma);
            let (bv, cv) = split_real(rr);
            b_data[at] = bv;
            c_data[at] = cv;
            at += 1;
        } else {
            if at + 1 >= n {
                return Err(ModelError::NoConvergence {
                    routine: "the eigenvalue pairing of the modal form",
                });
            }
            a.set(at, at, sigma);
            a.set(at, at + 1, omega);
            a.set(at + 1, at, -omega);
            a.set(at + 1, at + 1, sigma);
            let (bv, cv) = split_pair((rr, ri));
            b_data[at..at + 2].copy_from_slice(&bv);
            c_data[at..at + 2].copy_from_slice(&cv);
            at += 2;
        }
    }
    if at != n {
        return Err(ModelError::NoConvergence {
            routine: "the eigenvalue pairing of the modal form",
        });
    }
    let companion = super::controllable::controllable_canonical(split);
    let (_, scale) = crate::balance::balance(&companion.a);
    let poles: Vec<((f64, f64), usize)> = chosen.iter().map(|&k| (values[k], 1)).collect();
    let info = ModalInfo {
        eigenvector_condition: basis_condition(&scale, &poles),
        condition_limit,
        pole_separation: separation,
        separation_limit,
        pole_error,
    };
    let b = Matrix::from_row_major(n, 1, b_data).expect("n x 1");
    let c = Matrix::from_row_major(1, n, c_data).expect("1 x n");
    if b.as_slice()
        .iter()
        .chain(c.as_slice())
        .any(|v| !v.is_finite())
    {
        return Err(ModelError::Overflow {
            what: "the modal B and C".into(),
        });
    }
    Ok((
        StateSpace {
            a,
            b,
            c,
            d: companion.d,
        },
        info,
    ))
}

/// Sorts the chosen poles by ascending real part, ties by ascending frequency. Real parts
/// within `64 n eps max|λ|` of their neighbour count as tied: the eigensolver's roundoff must
/// not decide the documented order of, e.g., −1, −1 ± 0.5j, −1 ± 2j.
fn order_modes(chosen: &mut [usize], values: &[(f64, f64)]) {
    chosen.sort_by(|&x, &y| values[x].0.total_cmp(&values[y].0));
    let scale = values
        .iter()
        .map(|(re, im)| re.hypot(*im))
        .fold(0.0, f64::max);
    let tol = 64.0 * values.len() as f64 * f64::EPSILON * scale;
    let mut start = 0;
    while start < chosen.len() {
        let mut end = start + 1;
        while end < chosen.len() && values[chosen[end]].0 - values[chosen[end - 1]].0 <= tol {
            end += 1;
        }
        chosen[start..end].sort_by(|&x, &y| values[x].1.total_cmp(&values[y].1));
        start = end;
    }
}
