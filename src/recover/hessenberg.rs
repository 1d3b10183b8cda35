//! `det(sI − A) = det(sI − H)` and `C adj(sI − A) B = C Q adj(sI − H) Qᵀ B` for any
//! orthogonal Q with `H = Qᵀ A Q`: the transfer matrix from an orthogonal Hessenberg
//! reduction and a determinant recurrence on the Hessenberg matrix.
//!
//! # Purpose
//! A fast, backward-stable recovery of the characteristic polynomial and the transfer
//! matrix of a float model in O(n³) operations per input, with an a-posteriori estimate of
//! the error of every returned coefficient. Unlike the Faddeev–LeVerrier recursion its
//! accuracy does not collapse when eigenvalue magnitudes are spread (identified models
//! with fast and slow modes); unlike the exact route its cost does not grow with the bit
//! length of the data. It is not correctly rounded: `Method::Auto` keeps that promise.
//!
//! # Method
//! For each input j (one reduction when there are no inputs):
//! 1. A Householder reflection P₀ with `P₀ b_j = β e₁`, then the Householder reduction of
//!    `P₀ A P₀` to upper Hessenberg form H by reflections acting on coordinates 2..n, which
//!    leave e₁ fixed (Golub & Van Loan §7.4.3). So `Qᵀ b_j = β e₁`, `H = Qᵀ A Q`, `C̃ = C Q`.
//! 2. La Budde's recurrence for the characteristic polynomials `χ_i = det(sI − H[i.., i..])`
//!    of all trailing principal submatrices, from the bottom up (expansion along the first
//!    row of each trailing block; `χ_n = 1`, 0-based):
//!    `χ_i = (s − h_ii) χ_{i+1} − Σ_{l>i} h_il (Π_{k=i}^{l−1} h_{k+1,k}) χ_{l+1}`.
//!    `χ_0` is the denominator.
//! 3. The first column of `adj(sI − H)` of an upper Hessenberg H is
//!    `adj(sI − H)_{i,0} = (Π_{k<i} h_{k+1,k}) χ_{i+1}(s)` (the minor is block triangular:
//!    a triangle of subdiagonal entries and the trailing block), so
//!    `c adj(sI − A) b_j = β Σ_i c̃_i (Π_{k<i} h_{k+1,k}) χ_{i+1}(s)` for every output row
//!    c, and the transfer-matrix numerator is that plus `d_j χ_0`.
//!
//! Cost: about (10/3) n³ flops for each reduction and n³/6 for the recurrence, per input.
//! The denominator is taken from the first input's reduction.
//!
//! # Numerical aspects
//! The reduction is backward stable: H is exactly similar to `A + ΔA` with
//! `‖ΔA‖_F ≤ c n u ‖A‖_F` (Higham 2002, §19.3; u the unit roundoff), and C̃, β carry errors
//! of the same relative size. The recurrence is a Laplace expansion of the determinant;
//! its monomials are those of the signless expansion on |H|, so the absolute-value
//! recurrence `χ̄` on |H| bounds every sensitivity `|∂χ/∂h_ij| ≤ ∂χ̄/∂|h_ij|`.
//! The returned estimate of each coefficient's absolute error is, to first order,
//! * the running rounding-error bound of the recurrence (componentwise, as in
//!   [`super::certified`]: each level adds `γ_{2(n−i)+2}` times the sum of the absolute
//!   values of its terms and propagates the errors of the levels below), plus
//! * `η · dχ̄/dδ`, the first-order growth of the signless coefficients when every entry of
//!   the Hessenberg pattern of |H| grows by δ, with `η = n u ‖A‖_F`; likewise
//!   `n u ‖c‖₂` for the output rows and `n u` relative for β.
//!
//! The reduction's error below the subdiagonal is not modelled entry by entry: the estimate
//! is an estimate, not a bound, and the tests compare it with the exact error on seeded
//! surveys of well-conditioned, clustered and spread models. Like every route through a
//! backward-stable reduction, small coefficients of ill-conditioned models (spread
//! eigenvalues, a non-normal A) lose relative accuracy; the estimate says how much.
//! Results that overflow are refused.
//!
//! # References
//! G. H. Golub and C. F. Van Loan, *Matrix Computations*, 4th ed., §5.1, §7.4.
//! R. Rehman and I. C. F. Ipsen, "La Budde's method for computing characteristic
//! polynomials", arXiv:1104.3769 (2011).
//! P. Misra and R. V. Patel, "Computation of transfer function matrices of linear
//! multivariable systems", Automatica 23 (1987) — the idea of reducing (A, b) to a
//! Hessenberg form with b along e₁ before forming the numerators.
//! N. J. Higham, *Accuracy and Stability of Numerical Algorithms*, 2nd ed., SIAM 2002.
//!
//! # Errors
//! `Shape` / `NonFinite` for bad input (checked by the callers in [`super`]), `Overflow`
//! when a coefficient or its estimate is not finite.

use crate::error::{ModelError, Result};

const UNIT: f64 = f64::EPSILON / 2.0;

fn gamma(j: usize) -> f64 {
    let ju = j as f64 * UNIT;
    ju / (1.0 - ju)
}

/// Scratch space for one model of a given shape; reused across the models of a batch so
/// the route allocates nothing per model.
#[derive(Default)]
pub struct HessenbergWork {
    h: Vec<f64>,
    ct: Vec<f64>,
    v: Vec<f64>,
    w: Vec<f64>,
    /// La Budde tables, (n+1) rows of n+1 coefficients (row i holds χ_i, degree n − i).
    chi: Vec<f64>,
    err: Vec<f64>,
    mag: Vec<f64>,
    der: Vec<f64>,
    terms: Vec<f64>,
    b_column: Vec<f64>,
    c_row_eta: Vec<f64>,
}

/// Coefficients and per-coefficient absolute error estimates.
pub struct HessenbergResult<'a> {
    /// `[1, c_1, ..., c_n]`.
    pub den: &'a mut [f64],
    pub den_estimate: &'a mut [f64],
    /// (p, m, n+1), empty without inputs or outputs.
    pub num: &'a mut [f64],
    pub num_estimate: &'a mut [f64],
}

/// A reflection `I − τ v vᵀ` with `(I − τ v vᵀ) x = α e₁`; `τ = 0` (identity, α = x₀)
/// when x already is a multiple of e₁. Scaled, so no overflow for large entries.
fn reflector(x: &[f64], v: &mut [f64]) -> (f64, f64) {
    if x.len() < 2 {
        return (0.0, x.first().copied().unwrap_or(0.0));
    }
    let scale = x.iter().fold(0.0f64, |s, e| s.max(e.abs()));
    let tail = x[1..].iter().any(|&e| e != 0.0);
    if scale == 0.0 || !tail {
        return (0.0, x[0]);
    }
    let mut ss = 0.0;
    for (vi, xi) in v.iter_mut().zip(x) {
        *vi = xi / scale;
        ss += *vi * *vi;
    }
    let norm = ss.sqrt();
    let alpha = if v[0] >= 0.0 { -norm } else { norm };
    v[0] -= alpha;
    let vv: f64 = v.iter().map(|e| e * e).sum();
    (2.0 / vv, alpha * scale)
}

/// `M ← (I − τ v vᵀ) M` on rows `off..off+len`, columns `col0..cols`.
fn apply_left(
    m: &mut [f64],
    cols: usize,
    off: usize,
    col0: usize,
    v: &[f64],
    tau: f64,
    w: &mut [f64],
) {
    let w = &mut w[..cols];
    w[col0..].iter_mut().for_each(|x| *x = 0.0);
    for (i, vi) in v.iter().enumerate() {
        let row = &m[(off + i) * cols + col0..(off + i + 1) * cols];
        for (wj, x) in w[col0..].iter_mut().zip(row) {
            *wj += vi * x;
        }
    }
    for (i, vi) in v.iter().enumerate() {
        let f = tau * vi;
        let row = &mut m[(off + i) * cols + col0..(off + i + 1) * cols];
        for (x, wj) in row.iter_mut().zip(&w[col0..]) {
            *x -= f * wj;
        }
    }
}

/// `M ← M (I − τ v vᵀ)` on columns `off..off+len` of every row.
fn apply_right(m: &mut [f64], cols: usize, off: usize, v: &[f64], tau: f64) {
    if cols == 0 {
        return;
    }
    for row in m.chunks_mut(cols) {
        let part = &mut row[off..off + v.len()];
        let s: f64 = part.iter().zip(v).map(|(x, vi)| x * vi).sum();
        let f = tau * s;
        for (x, vi) in part.iter_mut().zip(v) {
            *x -= f * vi;
        }
    }
}

impl HessenbergWork {
    fn prepare(&mut self, n: usize, p: usize) {
        let t = (n + 1) * (n + 1);
        for (buf, len) in [
            (&mut self.h, n * n),
            (&mut self.ct, p * n),
            (&mut self.v, n),
            (&mut self.w, n),
            (&mut self.chi, t),
            (&mut self.err, t),
            (&mut self.mag, t),
            (&mut self.der, t),
            (&mut self.terms, n + 1),
            (&mut self.b_column, n),
            (&mut self.c_row_eta, p),
        ] {
            buf.clear();
            buf.resize(len, 0.0);
        }
    }

    /// H ← reduced copy of `a` (with `b` along e₁ first when given), C̃ ← C Q.
    /// Returns β (0 without b).
    fn reduce(&mut self, a: &[f64], n: usize, b: Option<&[f64]>, c: &[f64]) -> f64 {
        self.h.copy_from_slice(a);
        self.ct.copy_from_slice(c);
        let mut beta = 0.0;
        if let Some(b) = b {
            let (tau, alpha) = reflector(b, &mut self.v[..n]);
            beta = alpha;
            if tau != 0.0 {
                apply_left(&mut self.h, n, 0, 0, &self.v[..n], tau, &mut self.w);
                apply_right(&mut self.h, n, 0, &self.v[..n], tau);
                apply_right(&mut self.ct, n, 0, &self.v[..n], tau);
            }
        }
        for k in 0..n.saturating_sub(2) {
            let len = n - k - 1;
            // Column k below the diagonal, copied to w (w is free here).
            for i in 0..len {
                self.w[i] = self.h[(k + 1 + i) * n + k];
            }
            let (tau, alpha) = {
                let (w, v) = (&self.w[..len], &mut self.v[..len]);
                reflector(w, v)
            };
            if tau == 0.0 {
                continue;
            }
            apply_left(
                &mut self.h,
                n,
                k + 1,
                k + 1,
                &self.v[..len],
                tau,
                &mut self.w,
            );
            self.h[(k + 1) * n + k] = alpha;
            for i in k + 2..n {
                self.h[i * n + k] = 0.0;
            }
            apply_right(&mut self.h, n, k + 1, &self.v[..len], tau);
            apply_right(&mut self.ct, n, k + 1, &self.v[..len], tau);
        }
        beta
    }

    /// La Budde's recurrence from the bottom up, with the running rounding bound (`err`),
    /// the signless magnitudes (`mag`) and their growth under a uniform perturbation of
    /// the Hessenberg pattern (`der`).
    fn la_budde(&mut self, n: usize) {
        let w = n + 1;
        let h = &self.h;
        let (chi, err, mag, der, terms) = (
            &mut self.chi,
            &mut self.err,
            &mut self.mag,
            &mut self.der,
            &mut self.terms,
        );
        chi[n * w] = 1.0;
        mag[n * w] = 1.0;
        err[n * w] = 0.0;
        der[n * w] = 0.0;
        for i in (0..n).rev() {
            let deg = n - i;
            let hii = h[i * n + i];
            let ahii = hii.abs();
            // (s − h_ii) χ_{i+1}
            for t in 0..=deg {
                let (up, low) = (
                    if t < deg { chi[(i + 1) * w + t] } else { 0.0 },
                    if t >= 1 {
                        chi[(i + 1) * w + t - 1]
                    } else {
                        0.0
                    },
                );
                chi[i * w + t] = up - hii * low;
                terms[t] = up.abs() + (hii * low).abs();
                let (eu, el) = (
                    if t < deg { err[(i + 1) * w + t] } else { 0.0 },
                    if t >= 1 {
                        err[(i + 1) * w + t - 1]
                    } else {
                        0.0
                    },
                );
                err[i * w + t] = eu + ahii * el;
                let (mu, ml) = (
                    if t < deg { mag[(i + 1) * w + t] } else { 0.0 },
                    if t >= 1 {
                        mag[(i + 1) * w + t - 1]
                    } else {
                        0.0
                    },
                );
                mag[i * w + t] = mu + ahii * ml;
                let (du, dl) = (
                    if t < deg { der[(i + 1) * w + t] } else { 0.0 },
                    if t >= 1 {
                        der[(i + 1) * w + t - 1]
                    } else {
                        0.0
                    },
                );
                der[i * w + t] = du + ahii * dl + ml;
            }
            // − Σ_l h_il (Π_{k=i}^{l−1} h_{k+1,k}) χ_{l+1}, landing at offset l − i + 1.
            let (mut prod, mut prod_abs, mut prod_der) = (1.0f64, 1.0f64, 0.0f64);
            for l in i + 1..n {
                let sub = h[l * n + l - 1];
                prod_der = prod_der * sub.abs() + prod_abs;
                prod *= sub;
                prod_abs *= sub.abs();
                let hil = h[i * n + l];
                let g = hil * prod;
                let ga = g.abs();
                let g_abs_exact = hil.abs() * prod_abs;
                let g_der = hil.abs() * prod_der + prod_abs;
                let off = l - i + 1;
                let len = n - l; // degree of χ_{l+1} plus one
                for s in 0..len {
                    let t = s + off;
                    let q = chi[(l + 1) * w + s];
                    chi[i * w + t] -= g * q;
                    terms[t] += (g * q).abs();
                    err[i * w + t] += ga * err[(l + 1) * w + s];
                    mag[i * w + t] += g_abs_exact * mag[(l + 1) * w + s];
                    der[i * w + t] +=
                        g_abs_exact * der[(l + 1) * w + s] + g_der * mag[(l + 1) * w + s];
                }
            }
            let gl = gamma(2 * deg + 2);
            for t in 0..=deg {
                err[i * w + t] += gl * terms[t];
            }
        }
    }

    /// The characteristic polynomial of the n×n row-major `a` and its error estimates.
    pub fn characteristic_polynomial(
        &mut self,
        a: &[f64],
        n: usize,
        den: &mut [f64],
        den_estimate: &mut [f64],
    ) -> Result<()> {
        self.prepare(n, 0);
        self.reduce(a, n, None, &[]);
        self.la_budde(n);
        let eta = n as f64 * UNIT * frobenius(a);
        self.write_den(n, eta, den, den_estimate);
        check_finite(den, den_estimate)
    }

    fn write_den(&self, n: usize, eta: f64, den: &mut [f64], den_estimate: &mut [f64]) {
        den.copy_from_slice(&self.chi[..n + 1]);
        for t in 0..=n {
            den_estimate[t] = self.err[t] + eta * self.der[t];
        }
    }

    /// The transfer matrix of (A, B, C, D), row-major, with n states, m inputs, p outputs.
    #[allow(clippy::too_many_arguments)]
    pub fn transfer_function(
        &mut self,
        a: &[f64],
        b: &[f64],
        c: &[f64],
        d: &[f64],
        (n, m, p): (usize, usize, usize),
        out: HessenbergResult<'_>,
    ) -> Result<()> {
        self.prepare(n, p);
        let w = n + 1;
        let eta = n as f64 * UNIT * frobenius(a);
        if m == 0 || p == 0 {
            // No numerator needs B; the denominator alone.
            self.reduce(a, n, None, c);
            self.la_budde(n);
            self.write_den(n, eta, out.den, out.den_estimate);
            return check_finite(out.den, out.den_estimate);
        }
        for r in 0..p {
            self.c_row_eta[r] = n as f64 * UNIT * frobenius(&c[r * n..(r + 1) * n]);
        }
        let gsum = gamma(n + 2);
        let mut col = std::mem::take(&mut self.b_column);
        for j in 0..m {
            for (i, x) in col.iter_mut().enumerate() {
                *x = b[i * m + j];
            }
            let beta = self.reduce(a, n, Some(&col), c);
            self.la_budde(n);
            if j == 0 {
                self.write_den(n, eta, out.den, out.den_estimate);
            }
            for r in 0..p {
                let base = (r * m + j) * w;
                let num = &mut out.num[base..base + w];
                let est = &mut out.num_estimate[base..base + w];
                num.iter_mut().for_each(|x| *x = 0.0);
                est.iter_mut().for_each(|x| *x = 0.0);
                // β Σ_i c̃_i π_i χ_{i+1}, π_i = Π_{k<i} h_{k+1,k}.
                let (mut pi, mut pi_abs, mut pi_der) = (1.0f64, 1.0f64, 0.0f64);
                for i in 0..n {
                    if i > 0 {
                        let sub = self.h[i * n + i - 1];
                        pi_der = pi_der * sub.abs() + pi_abs;
                        pi *= sub;
                        pi_abs *= sub.abs();
                    }
                    let ci = self.ct[r * n + i];
                    let wgt = beta * ci * pi;
                    let wa = (beta * ci).abs() * pi_abs;
                    let row = (i + 1) * w;
                    for s in 0..n - i {
                        let t = s + i + 1;
                        let q = self.chi[row + s];
                        num[t] += wgt * q;
                        est[t] += wa * self.err[row + s]
                            + gsum * (wgt * q).abs()
                            + beta.abs()
                                * (eta
                                    * (ci.abs() * pi_der * self.mag[row + s]
                                        + ci.abs() * pi_abs * self.der[row + s])
                                    + (self.c_row_eta[r] + n as f64 * UNIT * ci.abs())
                                        * pi_abs
                                        * self.mag[row + s]);
                    }
                }
                let drj = d[r * m + j];
                if drj != 0.0 {
                    for t in 0..w {
                        let dv = drj * out.den[t];
                        let sum = num[t] + dv;
                        est[t] += drj.abs() * out.den_estimate[t]
                            + UNIT * (num[t].abs() + dv.abs()) * 2.0;
                        num[t] = sum;
                    }
                }
            }
        }
        self.b_column = col;
        check_finite(out.den, out.den_estimate)?;
        check_finite(out.num, out.num_estimate)
    }
}

fn frobenius(x: &[f64]) -> f64 {
    let scale = x.iter().fold(0.0f64, |s, e| s.max(e.abs()));
    if scale == 0.0 {
        return 0.0;
    }
    scale
        * x.iter()
            .map(|e| (e / scale) * (e / scale))
            .sum::<f64>()
            .sqrt()
}

fn check_finite(values: &[f64], estimates: &[f64]) -> Result<()> {
    if values.iter().chain(estimates).all(|v| v.is_finite()) {
        Ok(())
    } else {
        Err(ModelError::Overflow {
            what: "the Hessenberg route's coefficients".into(),
        })
    }
}

/// Largest estimate relative to its coefficient: `est / |value|`, ∞ where the estimate
/// reaches the value, 0 for a zero estimate.
pub fn worst_relative_estimate(values: &[f64], estimates: &[f64]) -> f64 {
    let mut worst: f64 = 0.0;
    for (v, e) in values.iter().zip(estimates) {
        if *e == 0.0 {
            continue;
        }
        worst = worst.max(if *e < v.abs() {
            e / v.abs()
        } else {
            f64::INFINITY
        });
    }
    worst
}

/// Owned results of a single call: coefficients and per-coefficient absolute estimates.
pub struct HessenbergTransfer {
    pub num: Vec<f64>,
    pub num_estimate: Vec<f64>,
    pub den: Vec<f64>,
    pub den_estimate: Vec<f64>,
}

impl HessenbergTransfer {
    /// The worst relative estimate over the denominator and every numerator coefficient.
    pub fn worst_relative_estimate(&self) -> f64 {
        worst_relative_estimate(&self.den, &self.den_estimate)
            .max(worst_relative_estimate(&self.num, &self.num_estimate))
    }
}

/// Characteristic polynomial `[1, c_1, ..., c_n]` of the n×n row-major `a` and the
/// estimates of its coefficients' absolute errors.
pub fn characteristic_polynomial(a: &[f64], n: usize) -> Result<(Vec<f64>, Vec<f64>)> {
    let (mut den, mut est) = (vec![0.0; n + 1], vec![0.0; n + 1]);
    HessenbergWork::default().characteristic_polynomial(a, n, &mut den, &mut est)?;
    Ok((den, est))
}

/// Transfer matrix of a float model: numerator (p, m, n+1), denominator (n+1), estimates.
pub fn transfer_function(ss: &crate::state_space::StateSpace<f64>) -> Result<HessenbergTransfer> {
    let (n, m, p) = (ss.n_states(), ss.n_inputs(), ss.n_outputs());
    let mut r = HessenbergTransfer {
        num: vec![0.0; p * m * (n + 1)],
        num_estimate: vec![0.0; p * m * (n + 1)],
        den: vec![0.0; n + 1],
        den_estimate: vec![0.0; n + 1],
    };
    HessenbergWork::default().transfer_function(
        ss.a.as_slice(),
        ss.b.as_slice(),
        ss.c.as_slice(),
        ss.d.as_slice(),
        (n, m, p),
        HessenbergResult {
            den: &mut r.den,
            den_estimate: &mut r.den_estimate,
            num: &mut r.num,
            num_estimate: &mut r.num_estimate,
        },
    )?;
    Ok(r)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::matrix::Matrix;
    use crate::recover::dyadic;
    use crate::state_space::StateSpace;

    fn lcg(seed: &mut u64) -> f64 {
        *seed = seed
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        ((*seed >> 11) as f64 / (1u64 << 53) as f64) * 2.0 - 1.0
    }

    #[test]
    fn triangular_matrix_gives_the_product_of_its_diagonal_factors() {
        // det(sI − A) = (s − 1)(s − 2)(s + 3) = s³ − 7s + 6 (identity: triangular A).
        let a = [1.0, 5.0, -2.0, 0.0, 2.0, 7.0, 0.0, 0.0, -3.0];
        let (den, est) = characteristic_polynomial(&a, 3).unwrap();
        let want = [1.0, 0.0, -7.0, 6.0];
        for t in 0..4 {
            assert!(
                (den[t] - want[t]).abs() <= est[t].max(1e-300),
                "{t}: {den:?} {est:?}"
            );
        }
    }

    #[test]
    fn companion_transfer_function_comes_back() {
        // Controllable canonical form of (s² + 3s + 5) / (s³ + 2s² − s + 4) (identity:
        // the form places the coefficients).
        let a = Matrix::from_row_major(3, 3, vec![0.0, 1.0, 0.0, 0.0, 0.0, 1.0, -4.0, 1.0, -2.0])
            .unwrap();
        let b = Matrix::from_row_major(3, 1, vec![0.0, 0.0, 1.0]).unwrap();
        let c = Matrix::from_row_major(1, 3, vec![5.0, 3.0, 1.0]).unwrap();
        let d = Matrix::from_row_major(1, 1, vec![0.5]).unwrap();
        let ss = StateSpace::new(a, b, c, d).unwrap();
        let r = transfer_function(&ss).unwrap();
        let den = [1.0, 2.0, -1.0, 4.0];
        let num = [0.5, 1.0 + 1.0, 3.0 - 0.5, 5.0 + 2.0];
        for t in 0..4 {
            assert!(
                (r.den[t] - den[t]).abs() <= r.den_estimate[t] + 1e-15,
                "{:?}",
                r.den
            );
            assert!(
                (r.num[t] - num[t]).abs() <= r.num_estimate[t] + 1e-15,
                "{:?}",
                r.num
            );
        }
    }

    #[test]
    fn error_within_estimate_against_the_exact_route() {
        // Reference: the exact transfer matrix of the float data, rounded once (dyadic.rs).
        let mut seed = 7u64;
        for trial in 0..40 {
            let (n, m, p) = (1 + trial % 9, 1 + trial % 3, 1 + (trial / 3) % 2);
            let mut r = |len: usize| (0..len).map(|_| lcg(&mut seed)).collect::<Vec<f64>>();
            let ss = StateSpace::new(
                Matrix::from_row_major(n, n, r(n * n)).unwrap(),
                Matrix::from_row_major(n, m, r(n * m)).unwrap(),
                Matrix::from_row_major(p, n, r(p * n)).unwrap(),
                Matrix::from_row_major(p, m, r(p * m)).unwrap(),
            )
            .unwrap();
            let got = transfer_function(&ss).unwrap();
            let (num, den) = dyadic::transfer_function_dyadic(&ss).unwrap();
            for (x, (e, want)) in got.den.iter().zip(got.den_estimate.iter().zip(&den)) {
                assert!((x - want).abs() <= *e + want.abs() * UNIT, "den {trial}");
            }
            for (x, (e, want)) in got.num.iter().zip(got.num_estimate.iter().zip(&num)) {
                assert!(
                    (x - want).abs() <= *e + want.abs() * UNIT,
                    "num {trial}: {x} {want} {e}"
                );
            }
        }
    }

    #[test]
    fn zero_order_and_zero_input_models() {
        let (den, est) = characteristic_polynomial(&[], 0).unwrap();
        assert_eq!((den, est), (vec![1.0], vec![0.0]));
        // A pure gain with one input and one output: num = D.
        let gain = Matrix::from_row_major(1, 1, vec![2.5]).unwrap();
        let empty = |r, c| Matrix::from_row_major(r, c, vec![]).unwrap();
        let ss0 = StateSpace::new(empty(0, 0), empty(0, 1), empty(1, 0), gain).unwrap();
        let r0 = transfer_function(&ss0).unwrap();
        assert_eq!((r0.num, r0.den), (vec![2.5], vec![1.0]));
        let z = |r, c| Matrix::from_row_major(r, c, vec![0.0; r * c]).unwrap();
        let mut a = z(2, 2);
        a.set(0, 1, 1.0);
        let ss = StateSpace::new(a, z(2, 1), z(1, 2), z(1, 1)).unwrap();
        let r = transfer_function(&ss).unwrap();
        assert_eq!(r.num, vec![0.0; 3]);
        assert_eq!(r.den, vec![1.0, 0.0, 0.0]);
    }
}
