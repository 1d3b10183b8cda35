//! Modal form: a real block-diagonal realization of the poles.
//!
//! # Purpose
//! `A = diag(blocks)` with a real pole `λ` as the 1×1 block `[λ]` and each complex pair
//! `σ ± jω` (ω > 0) as `[[σ, ω], [-ω, σ]]`, ordered by ascending real part, ties by
//! ascending ω (a real pole counts as ω = 0). `B = T⁻¹ b` and `C = c T` for the real modal
//! basis T, `D = d`. Identity: `T⁻¹ A_companion T = A`.
//!
//! # Method
//! The controllable canonical realization is balanced by a diagonal similarity of powers of
//! two (Parlett & Reinsch 1969; exact, it changes no eigenvalue), then its eigenvalues and
//! eigenvectors are computed by faer's real non-symmetric eigensolver (Hessenberg–QR).
//! The eigenvectors (each of unit 2-norm) decide whether the form exists; a pair
//! `v = v_r + j v_i` spans the columns `[v_r, v_i]`, because `A v_r = σ v_r − ω v_i` and
//! `A v_i = ω v_r + σ v_i`. B and C are then taken from the companion matrix's analytic
//! eigenvectors `[1, λ, ..., λ^(n−1)]ᵀ` at the computed poles: `C_λ = c(λ)` and
//! `B_λ = 1 / Π_{μ≠λ}(λ − μ)`, i.e. the residues of the partial-fraction expansion, with
//! each mode rescaled so that its B and C have equal norms.
//!
//! # Numerical aspects
//! A companion matrix is nonderogatory, so a repeated pole is always defective and the
//! modal form does not exist; in floating point a double pole shows up as two eigenvectors
//! at an angle of about √eps. The form is refused when the 2-norm condition number of the
//! (balanced, column-normalised) eigenvector matrix exceeds `1 / (n √eps)` (about 6.7e7/n):
//! past that point B and C would carry fewer than half of the significant digits.
//! The condition number used for the decision is reported in [`ModalInfo`].
//!
//! # References
//! B. N. Parlett and C. Reinsch, "Balancing a matrix for calculation of eigenvalues and
//! eigenvectors", Numer. Math. 13 (1969). T. Kailath, *Linear Systems*, Prentice Hall 1980,
//! ch. 2 (modal and companion forms).
//!
//! # Errors
//! `NoModalForm` for repeated or nearly repeated poles; `NoConvergence` if the eigensolver
//! fails.

use crate::error::{ModelError, Result};
use crate::matrix::Matrix;
use crate::poly::ProperSplit;
use crate::state_space::StateSpace;
use faer::c64;
use faer::prelude::*;

/// What the modal decision was made on.
#[derive(Debug, Clone, PartialEq)]
pub struct ModalInfo {
    /// 2-norm condition number of the balanced eigenvector matrix (unit-norm eigenvectors).
    pub eigenvector_condition: f64,
    /// The refusal threshold `1 / (n √eps)` it was compared with.
    pub condition_limit: f64,
}

pub fn modal_from_split(split: &ProperSplit<f64>) -> Result<(StateSpace<f64>, ModalInfo)> {
    let n = split.order();
    if n == 0 {
        let info = ModalInfo {
            eigenvector_condition: 1.0,
            condition_limit: 1.0 / f64::EPSILON.sqrt(),
        };
        return Ok((super::gain_only(&split.direct), info));
    }
    let companion = super::controllable::controllable_canonical(split);
    let (balanced, _scale) = crate::balance::balance(&companion.a);
    let eig = Mat::from_fn(n, n, |i, j| *balanced.get(i, j))
        .eigen()
        .map_err(|_| ModelError::NoConvergence {
            routine: "the eigenvalue iteration of the modal form",
        })?;
    let values: Vec<(f64, f64)> = eig
        .S()
        .column_vector()
        .iter()
        .map(|z| (z.re, z.im))
        .collect();
    if values
        .iter()
        .any(|(re, im)| !re.is_finite() || !im.is_finite())
    {
        return Err(ModelError::NoConvergence {
            routine: "the eigenvalue iteration of the modal form",
        });
    }

    // One representative per real pole or conjugate pair, in the documented order.
    let mut chosen: Vec<usize> = (0..n).filter(|&k| values[k].1 >= 0.0).collect();
    order_modes(&mut chosen, &values);
    let mut columns: Vec<Vec<f64>> = Vec::with_capacity(n);
    let mut a = Matrix::zeros(n, n);
    for &k in &chosen {
        let (sigma, omega) = values[k];
        let v = normalised_eigenvector(&eig, k);
        let at = columns.len();
        if omega == 0.0 {
            a.set(at, at, sigma);
            columns.push(v.iter().map(|z| z.0).collect());
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
            columns.push(v.iter().map(|z| z.0).collect());
            columns.push(v.iter().map(|z| z.1).collect());
        }
    }
    if columns.len() != n {
        return Err(ModelError::NoConvergence {
            routine: "the eigenvalue pairing of the modal form",
        });
    }

    // Decide on the balanced basis with every (complex) eigenvector of unit norm: [v_r, v_i]
    // is a unitary recombination of [v, conj v], so this is the condition number of the complex
    // eigenvector matrix, and a double pole split into a near-real pair (v_i ≈ 0) shows up.
    let basis = Mat::from_fn(n, n, |i, j| columns[j][i]);
    let sv = basis
        .singular_values()
        .map_err(|_| ModelError::NoConvergence {
            routine: "the SVD of the modal basis",
        })?;
    let condition = if sv[n - 1] > 0.0 {
        sv[0] / sv[n - 1]
    } else {
        f64::INFINITY
    };
    let limit = 1.0 / (n as f64 * f64::EPSILON.sqrt());
    let info = ModalInfo {
        eigenvector_condition: condition,
        condition_limit: limit,
    };
    if !(condition <= limit) {
        let pole = closest_pair(&values);
        return Err(ModelError::NoModalForm {
            detail: format!(
                "the modal form does not exist for repeated (defective) poles; poles {pole} \
                 coincide or nearly coincide (eigenvector condition number {condition:.3e} > {limit:.3e})"
            ),
        });
    }

    // B and C from the companion's analytic eigenvectors v = [1, λ, ..., λ^(n−1)]ᵀ: c·v = c(λ)
    // and (V⁻¹ e_n)_λ = 1 / a'(λ) (last column of the inverse Vandermonde matrix), with
    // a'(λ) = Π_{μ≠λ} (λ − μ) over the computed poles. This is the residue c(λ)/a'(λ) of
    // each mode, far more accurate than solving with the computed eigenvector matrix, whose
    // columns carry errors of order eps·‖A‖/gap.
    let zero_numerator = split.strict_num.iter().all(|c| *c == 0.0);
    let all: Vec<c64> = values.iter().map(|&(re, im)| c64::new(re, im)).collect();
    let (mut b_data, mut c_data) = (vec![0.0; n], vec![0.0; n]);
    let mut at = 0;
    for &k in &chosen {
        let lambda = all[k];
        let derivative = all
            .iter()
            .enumerate()
            .filter(|&(j, _)| j != k)
            .fold(c64::new(1.0, 0.0), |acc, (_, &mu)| acc * (lambda - mu));
        let beta = c64::new(1.0, 0.0) / derivative;
        let gain = split
            .strict_num
            .iter()
            .fold(c64::new(0.0, 0.0), |acc, &ci| {
                acc * lambda + c64::new(ci, 0.0)
            });
        let (bs, cs): (Vec<f64>, Vec<f64>) = if values[k].1 == 0.0 {
            (vec![beta.re], vec![gain.re])
        } else {
            // Coordinates of z v + conj(z v) in the basis [Re v, Im v] are (2 Re z, −2 Im z).
            (vec![2.0 * beta.re, -2.0 * beta.im], vec![gain.re, gain.im])
        };
        // Diagonal rescaling of the mode (the transfer function keeps B·C) so |B| = |C|.
        let (nb, nc) = (
            bs.iter().map(|x| x * x).sum::<f64>().sqrt(),
            cs.iter().map(|x| x * x).sum::<f64>().sqrt(),
        );
        let g = if nb > 0.0 && nc > 0.0 {
            (nc / nb).sqrt()
        } else {
            1.0
        };
        for (i, (bv, cv)) in bs.iter().zip(&cs).enumerate() {
            b_data[at + i] = if zero_numerator { 0.0 } else { bv * g };
            c_data[at + i] = cv / g;
        }
        at += bs.len();
    }
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

/// Unit 2-norm eigenvector k with its largest component real and positive, as (re, im) pairs.
fn normalised_eigenvector(eig: &faer::linalg::solvers::Eigen<f64>, k: usize) -> Vec<(f64, f64)> {
    let u = eig.U();
    let n = u.nrows();
    let col: Vec<(f64, f64)> = (0..n).map(|i| (u[(i, k)].re, u[(i, k)].im)).collect();
    let (mut big, mut big_abs) = (0, -1.0);
    for (i, z) in col.iter().enumerate() {
        let m = z.0.hypot(z.1);
        if m > big_abs {
            big = i;
            big_abs = m;
        }
    }
    let norm = col
        .iter()
        .map(|z| z.0 * z.0 + z.1 * z.1)
        .sum::<f64>()
        .sqrt();
    // Multiply by conj(phase of the largest component) / norm.
    let (pr, pi) = (col[big].0 / big_abs, -col[big].1 / big_abs);
    col.iter()
        .map(|z| ((z.0 * pr - z.1 * pi) / norm, (z.0 * pi + z.1 * pr) / norm))
        .collect()
}

/// The two poles closest to each other, for the error message.
fn closest_pair(values: &[(f64, f64)]) -> String {
    let mut best = (f64::INFINITY, 0, 0);
    for i in 0..values.len() {
        for j in i + 1..values.len() {
            let d = (values[i].0 - values[j].0).hypot(values[i].1 - values[j].1);
            if d < best.0 {
                best = (d, i, j);
            }
        }
    }
    let fmt = |(re, im): (f64, f64)| {
        if im == 0.0 {
            format!("{re:.6e}")
        } else {
            format!("{re:.6e}{im:+.6e}j")
        }
    };
    if values.len() < 2 {
        return "(none)".into();
    }
    format!("{} and {}", fmt(values[best.1]), fmt(values[best.2]))
}
