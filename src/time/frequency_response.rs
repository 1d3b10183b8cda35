//! The frequency response `G(s) = C (sI − A)⁻¹ B + D` at `s = jω` (continuous time) or
//! `s = exp(jωT)` (discrete time) for many ω, by one Hessenberg reduction and one
//! Hessenberg solve per frequency.
//!
//! # Purpose
//! Bode and Nyquist data of a state-space model without passing through its
//! transfer-function coefficients, whose roots and values are ill-conditioned at high
//! orders.
//!
//! # Method
//! Laub (1981): once, the orthogonal Hessenberg reduction `A = Q H Qᵀ` (blocked Householder
//! reflections, faer), `B̃ = Qᵀ B`, `C̃ = C Q`, so that `G(s) = C̃ (sI − H)⁻¹ B̃ + D`; then
//! per frequency Gaussian elimination with partial pivoting on the upper Hessenberg
//! `sI − H` (one row operation per column, O(n²) complex operations instead of O(n³)).
//! The triangular factor is never stored: the right-hand sides are eliminated with the
//! rows, and `C̃ U⁻¹` is built forward, column by column, as the rows of U appear
//! (module `frequency_lanes`), so `G` comes out of the one sweep. The frequencies are
//! solved 4 or 8 at a time, one per SIMD lane (AVX2 + FMA or AVX-512F, chosen at run
//! time; plain code elsewhere, same bits), and spread over the rayon thread pool when the
//! work is large enough. When the model has more outputs than inputs the dual
//! `(Aᵀ, Cᵀ, Bᵀ, Dᵀ)` is reduced instead (G of the dual is Gᵀ), so the cost per frequency
//! is about `4 n² (1 + min(m, p))` flops. (A real Schur form would make each solve
//! cheaper, but its QR iteration costs several milliseconds at n = 100, more than 1,000
//! frequencies of these solves.)
//!
//! # Numerical aspects
//! Backward stable: the Hessenberg reduction is orthogonal, and Gaussian elimination with
//! partial pivoting on a Hessenberg matrix has growth factor at most n (Wilkinson), so the
//! computed response is exact for a model within a small multiple of `n eps ‖A‖` of the
//! given one; the forward substitution that builds `C̃ U⁻¹` is backward stable like the back
//! substitution it replaces. Near a pole the relative accuracy falls like
//! `κ(sI − A) eps`. A frequency is refused, the error naming its index and value, when
//! `sI − A` is singular to working precision: a pivot's modulus at or below
//! `n eps (‖H‖₁ + |s|)`, or the condition estimate `(‖H‖₁ + |s|) ‖w‖_∞` at or beyond
//! `1/eps`, where `w U = e` is solved in the same sweep with the growth-seeking signs of
//! the LINPACK estimator (Cline, Moler, Stewart & Wilkinson 1979; `‖w‖_∞ ≤ ‖U⁻¹‖₁ ≤
//! 2 ‖(sI − H)⁻¹‖₁`, so the estimate is a lower bound of `κ₁` up to a factor 2, and in
//! practice within a small factor of it). Small pivots alone do not reveal such points
//! (`−I + 20 N`, N the shift, has unit pivots and `κ ≈ 20¹³`), and there the elimination
//! returns numbers without a correct digit. The estimator costs one more accumulator row
//! per frequency. A frequency is also refused when the response overflows. Cost O(n³) once,
//! then O(n² (1 + min(m, p)) + n m p) per frequency.
//!
//! # References
//! A. J. Laub, "Efficient multivariable frequency response computations", IEEE Trans.
//! Automat. Control 26 (1981) 407–408. A. K. Cline, C. B. Moler, G. W. Stewart and J. H.
//! Wilkinson, "An estimate for the condition number of a matrix", SIAM J. Numer. Anal. 16
//! (1979) 368–375. J. H. Wilkinson, *The Algebraic Eigenvalue
//! Problem*, 1965 (growth in Hessenberg elimination). G. H. Golub and C. F. Van Loan,
//! *Matrix Computations*, 4th ed., sec. 7.4 (the Hessenberg reduction).
//!
//! # Errors
//! `Shape` / `NonFinite` for the model or the frequencies; `BadValue` on `sample_time`
//! (not positive and finite) and on `frequencies` (a frequency at a pole, naming it).

use super::dense::{check_model, check_sample_time};
use super::frequency_lanes::{lanes, solve_block, LaneModel, LaneWork, MAX_LANES};
use crate::error::{require_finite, ModelError, Result};
use crate::state_space::StateSpace;
use faer::dyn_stack::{MemBuffer, MemStack, StackReq};
use faer::linalg::householder as hh;
use faer::{Conj, Mat, Par};
use nalgebra::Complex;
use rayon::prelude::*;

/// The model in Hessenberg coordinates, ready for many evaluations.
#[derive(Debug, Clone)]
pub struct HessenbergModel {
    n: usize,
    /// Inputs and outputs of the reduced model (those of the dual when `dual`).
    m: usize,
    p: usize,
    /// The dual model (Aᵀ, Cᵀ, Bᵀ, Dᵀ) is reduced when it has fewer outputs (p > m): the
    /// cost per frequency is O(n² (1 + outputs)).
    dual: bool,
    /// H, row-major (zero below the subdiagonal).
    h: Vec<f64>,
    /// B̃ = Qᵀ B, column-major (column r at r·n).
    b: Vec<f64>,
    /// C̃ = C Q, row-major.
    c: Vec<f64>,
    /// D of the model (not of the dual), row-major.
    d: Vec<f64>,
    /// ‖H‖₁.
    norm: f64,
}

/// Why one evaluation failed: singular to working precision, or an overflow.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum EvaluationFailure {
    AtPole,
    /// The estimate of `κ₁(sI − A)` reached `1/eps`.
    IllConditioned {
        estimate: f64,
    },
    Overflow,
}

/// `A = Q H Qᵀ` (Householder, faer's blocked reduction) with `Qᵀ B` and `C Q`; the
/// arguments are row-major, H comes back row-major, Qᵀ B column-major, C Q row-major.
fn hessenberg_reduction(
    a: &[f64],
    n: usize,
    b: &[f64],
    m: usize,
    c: &[f64],
    p: usize,
) -> (Vec<f64>, Vec<f64>, Vec<f64>) {
    let mut hm = Mat::from_fn(n, n, |i, j| a[i * n + j]);
    let mut bm = Mat::from_fn(n, m, |i, r| b[i * m + r]);
    let mut cm = Mat::from_fn(p, n, |k, i| c[k * n + i]);
    if n > 2 {
        let par = Par::Seq;
        let bs = faer::linalg::qr::no_pivoting::factor::recommended_block_size::<f64>(n - 1, n - 1);
        let mut factor = Mat::<f64>::zeros(bs, n - 1);
        let req = StackReq::any_of(&[
            faer::linalg::evd::hessenberg::hessenberg_in_place_scratch::<f64>(
                n,
                bs,
                par,
                Default::default(),
            ),
            hh::apply_block_householder_sequence_transpose_on_the_left_in_place_scratch::<f64>(
                n - 1,
                bs,
                m,
            ),
            hh::apply_block_householder_sequence_on_the_right_in_place_scratch::<f64>(n - 1, bs, p),
        ]);
        let mut buf = MemBuffer::new(req);
        let stack = MemStack::new(&mut buf);
        faer::linalg::evd::hessenberg::hessenberg_in_place(
            hm.as_mut(),
            factor.as_mut(),
            par,
            stack,
            Default::default(),
        );
        let basis = hm.as_ref().submatrix(1, 0, n - 1, n - 1);
        hh::apply_block_householder_sequence_transpose_on_the_left_in_place_with_conj(
            basis,
            factor.as_ref(),
            Conj::No,
            bm.as_mut().submatrix_mut(1, 0, n - 1, m),
            par,
            stack,
        );
        hh::apply_block_householder_sequence_on_the_right_in_place_with_conj(
            basis,
            factor.as_ref(),
            Conj::No,
            cm.as_mut().submatrix_mut(0, 1, p, n - 1),
            par,
            stack,
        );
    }
    let mut h = vec![0.0; n * n];
    for i in 0..n {
        for j in i.saturating_sub(1)..n {
            h[i * n + j] = hm[(i, j)];
        }
    }
    let bt = (0..m * n).map(|x| bm[(x % n, x / n)]).collect();
    let ct = (0..p * n).map(|x| cm[(x / n, x % n)]).collect();
    (h, bt, ct)
}

fn transpose(x: &[f64], rows: usize, cols: usize) -> Vec<f64> {
    (0..rows * cols)
        .map(|i| x[(i % rows) * cols + i / rows])
        .collect()
}

impl HessenbergModel {
    /// Checks the model and reduces A (or Aᵀ, for the dual when p > m) to Hessenberg form.
    pub fn new(ss: &StateSpace<f64>) -> Result<Self> {
        check_model(ss)?;
        // G is the same in every state coordinates; balanced by powers of two (exact),
        // badly scaled states no longer make sI - A look singular far from any pole.
        let (balanced, _) = crate::balance::balance_model(ss);
        let ss = &balanced;
        let (n, m, p) = (ss.n_states(), ss.n_inputs(), ss.n_outputs());
        let dual = p > m;
        let (h, b, c) = if dual {
            let at = transpose(ss.a.as_slice(), n, n);
            let bt = transpose(ss.c.as_slice(), p, n);
            let ct = transpose(ss.b.as_slice(), n, m);
            hessenberg_reduction(&at, n, &bt, p, &ct, m)
        } else {
            hessenberg_reduction(ss.a.as_slice(), n, ss.b.as_slice(), m, ss.c.as_slice(), p)
        };
        if !(h.iter().chain(&b).chain(&c).all(|v| v.is_finite())) {
            return Err(ModelError::Overflow {
                what: "the orthogonal reduction of a".into(),
            });
        }
        let norm = (0..n)
            .map(|j| (0..n).map(|i| h[i * n + j].abs()).sum::<f64>())
            .fold(0.0, f64::max);
        let (m, p) = if dual { (p, m) } else { (m, p) };
        Ok(HessenbergModel {
            n,
            m,
            p,
            dual,
            h,
            b,
            c,
            d: ss.d.as_slice().to_vec(),
            norm,
        })
    }

    /// The responses at `points` into `out`, block by
    /// block; the first failing point's index within `points`.
    fn evaluate_blocks(
        &self,
        points: &[Complex<f64>],
        out: &mut [Complex<f64>],
    ) -> std::result::Result<(), (usize, EvaluationFailure)> {
        let (n, m, p) = (self.n, self.m, self.p);
        let per = m * p;
        let model = LaneModel {
            n,
            m,
            p,
            h: &self.h,
            b: &self.b,
            c: &self.c,
        };
        let mut work = LaneWork::new(n, m, p);
        // Outputs of the original model: pm rows, mm columns.
        let (pm, mm) = if self.dual { (m, p) } else { (p, m) };
        let width = lanes();
        for (block, s) in points.chunks(width).enumerate() {
            let mut s_re = [0.0; MAX_LANES];
            let mut s_im = [0.0; MAX_LANES];
            let mut tol = [0.0; MAX_LANES];
            let mut scale = [0.0; MAX_LANES];
            for l in 0..width {
                // A short last block is padded with its last point.
                let z = s[l.min(s.len() - 1)];
                s_re[l] = z.re;
                s_im[l] = z.im;
                scale[l] = self.norm + z.norm();
                tol[l] = n as f64 * f64::EPSILON * scale[l];
            }
            let failed = solve_block(&model, &s_re, &s_im, &tol, &mut work);
            for l in 0..s.len() {
                let index = block * width + l;
                if failed[l] {
                    return Err((index, EvaluationFailure::AtPole));
                }
                let estimate = work.growth[l] * scale[l];
                // `!(x < y)` so that a NaN estimate is refused too.
                if !(estimate * f64::EPSILON < 1.0) {
                    return Err((index, EvaluationFailure::IllConditioned { estimate }));
                }
                let o = &mut out[index * per..(index + 1) * per];
                for k in 0..pm {
                    for r in 0..mm {
                        // Entry (k, r) of G is entry (r, k) of the dual's response.
                        let at = if self.dual { r * m + k } else { k * m + r };
                        let v =
                            Complex::new(self.d[k * mm + r] + work.g_re[at][l], work.g_im[at][l]);
                        if !(v.re.is_finite() && v.im.is_finite()) {
                            return Err((index, EvaluationFailure::Overflow));
                        }
                        o[k * mm + r] = v;
                    }
                }
            }
        }
        Ok(())
    }

    /// The responses at the points `s` (k·p·m values), sequentially or over rayon.
    pub fn evaluate_many(
        &self,
        points: &[Complex<f64>],
        parallel: bool,
    ) -> std::result::Result<Vec<Complex<f64>>, (usize, EvaluationFailure)> {
        let per = self.p * self.m;
        let mut out = vec![Complex::new(0.0, 0.0); points.len() * per];
        if per == 0 || points.is_empty() {
            return Ok(out);
        }
        // Work of about 10⁶ flops per task keeps the scheduling cost small; whole blocks.
        let per_point = 4 * self.n * self.n * (1 + self.p) + 1;
        let chunk = (1_000_000 / per_point).max(1).div_ceil(MAX_LANES) * MAX_LANES;
        if !parallel || points.len() <= chunk {
            self.evaluate_blocks(points, &mut out)?;
            return Ok(out);
        }
        let results: Vec<std::result::Result<(), (usize, EvaluationFailure)>> = out
            .par_chunks_mut(chunk * per)
            .zip(points.par_chunks(chunk))
            .enumerate()
            .map(|(i, (o, s))| {
                self.evaluate_blocks(s, o)
                    .map_err(|(k, f)| (i * chunk + k, f))
            })
            .collect();
        match results
            .into_iter()
            .filter_map(|r| r.err())
            .min_by_key(|e| e.0)
        {
            Some(e) => Err(e),
            None => Ok(out),
        }
    }
}

/// The points s of the frequencies: jω, or exp(jωT) with a sample time.
pub fn points(frequencies: &[f64], sample_time: Option<f64>) -> Result<Vec<Complex<f64>>> {
    require_finite("frequencies", frequencies)?;
    match sample_time {
        None => Ok(frequencies.iter().map(|&w| Complex::new(0.0, w)).collect()),
        Some(t) => {
            check_sample_time(t)?;
            Ok(frequencies
                .iter()
                .map(|&w| {
                    let phase = w * t;
                    if phase.is_finite() {
                        Complex::new(phase.cos(), phase.sin())
                    } else {
                        Complex::new(f64::NAN, f64::NAN)
                    }
                })
                .collect())
        }
    }
}

/// The error for a failed evaluation at `frequencies[index]`.
pub fn failure_error(
    index: usize,
    failure: EvaluationFailure,
    frequencies: &[f64],
    point: Complex<f64>,
) -> ModelError {
    let w = frequencies[index];
    match failure {
        EvaluationFailure::AtPole => ModelError::BadValue {
            arg: "frequencies",
            detail: format!(
                "frequencies[{index}] = {w:.6e} rad/s lies at a pole of the model: sI - A is singular to working \
                 precision at s = {:.6e}{:+.6e}j",
                point.re, point.im
            ),
        },
        EvaluationFailure::IllConditioned { estimate } => ModelError::BadValue {
            arg: "frequencies",
            detail: format!(
                "frequencies[{index}] = {w:.6e} rad/s: sI - A is singular to working precision at \
                 s = {:.6e}{:+.6e}j (estimated condition number {estimate:.1e}, at or beyond \
                 1/eps = {:.1e}: near a pole, or where A is far from normal), so no digit of the \
                 response could be trusted",
                point.re,
                point.im,
                1.0 / f64::EPSILON
            ),
        },
        EvaluationFailure::Overflow => ModelError::Overflow {
            what: format!("the frequency response at frequencies[{index}] = {w:.6e} rad/s"),
        },
    }
}

/// `G` at every frequency: a (k, p, m) row-major array.
pub fn frequency_response(
    ss: &StateSpace<f64>,
    frequencies: &[f64],
    sample_time: Option<f64>,
    parallel: bool,
) -> Result<Vec<Complex<f64>>> {
    let model = HessenbergModel::new(ss)?;
    let s = points(frequencies, sample_time)?;
    if s.iter().any(|z| !z.re.is_finite()) {
        return Err(ModelError::BadValue {
            arg: "frequencies",
            detail: "frequency * sample_time overflows".into(),
        });
    }
    model
        .evaluate_many(&s, parallel)
        .map_err(|(i, f)| failure_error(i, f, frequencies, s[i]))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::matrix::Matrix;

    fn model(
        a: &[f64],
        n: usize,
        b: &[f64],
        m: usize,
        c: &[f64],
        p: usize,
        d: &[f64],
    ) -> StateSpace<f64> {
        StateSpace::new(
            Matrix::from_row_major(n, n, a.to_vec()).unwrap(),
            Matrix::from_row_major(n, m, b.to_vec()).unwrap(),
            Matrix::from_row_major(p, n, c.to_vec()).unwrap(),
            Matrix::from_row_major(p, m, d.to_vec()).unwrap(),
        )
        .unwrap()
    }

    #[test]
    fn first_order_lag() {
        // G(s) = 1 / (s + 2) (identity: the closed form at s = jω).
        let ss = model(&[-2.0], 1, &[1.0], 1, &[1.0], 1, &[0.0]);
        let w = [0.0, 1.0, 10.0];
        let g = frequency_response(&ss, &w, None, false).unwrap();
        for (x, w) in g.iter().zip(w) {
            let want = Complex::new(1.0, 0.0) / Complex::new(2.0, w);
            assert!((x - want).norm() < 1e-15);
        }
    }

    #[test]
    fn dense_model_agrees_with_a_direct_solve() {
        // G(jω) against Gaussian elimination on the full complex system (identity).
        let n = 6;
        let mut seed = 7u64;
        let mut next = || {
            seed = seed
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            ((seed >> 11) as f64 / (1u64 << 53) as f64) - 0.5
        };
        let a: Vec<f64> = (0..n * n)
            .map(|i| next() - if i % (n + 1) == 0 { 2.0 } else { 0.0 })
            .collect();
        let b: Vec<f64> = (0..n * 2).map(|_| next()).collect();
        let c: Vec<f64> = (0..3 * n).map(|_| next()).collect();
        let d: Vec<f64> = (0..6).map(|_| next()).collect();
        let ss = model(&a, n, &b, 2, &c, 3, &d);
        let w = [0.3, 2.5];
        let g = frequency_response(&ss, &w, None, false).unwrap();
        for (f, w) in w.iter().enumerate() {
            let s = Complex::new(0.0, *w);
            let mut mat = nalgebra::DMatrix::<Complex<f64>>::from_fn(n, n, |i, j| {
                Complex::new(-a[i * n + j], 0.0) + if i == j { s } else { Complex::new(0.0, 0.0) }
            });
            mat = mat.try_inverse().unwrap();
            for k in 0..3 {
                for r in 0..2 {
                    let mut want = Complex::new(d[k * 2 + r], 0.0);
                    for i in 0..n {
                        for j in 0..n {
                            want += c[k * n + i] * mat[(i, j)] * b[j * 2 + r];
                        }
                    }
                    let got = g[f * 6 + k * 2 + r];
                    assert!((got - want).norm() < 1e-13, "{got} vs {want}");
                }
            }
        }
    }

    /// `C (sI − A)⁻¹ B + D` by nalgebra's complex LU on the full matrix (the reference).
    fn direct(ss: &StateSpace<f64>, s: Complex<f64>) -> Vec<Complex<f64>> {
        let (n, m, p) = (ss.n_states(), ss.n_inputs(), ss.n_outputs());
        let mat = nalgebra::DMatrix::<Complex<f64>>::from_fn(n, n, |i, j| {
            let e = Complex::new(-*ss.a.get(i, j), 0.0);
            if i == j {
                e + s
            } else {
                e
            }
        });
        let rhs = nalgebra::DMatrix::<Complex<f64>>::from_fn(n, m, |i, r| {
            Complex::new(*ss.b.get(i, r), 0.0)
        });
        let x = mat.lu().solve(&rhs).unwrap();
        let mut g = vec![Complex::new(0.0, 0.0); p * m];
        for k in 0..p {
            for r in 0..m {
                g[k * m + r] = Complex::new(*ss.d.get(k, r), 0.0)
                    + (0..n)
                        .map(|i| x[(i, r)] * *ss.c.get(k, i))
                        .sum::<Complex<f64>>();
            }
        }
        g
    }

    #[test]
    fn blocks_threads_and_orientation_agree_with_a_direct_solve() {
        // Many frequencies (a short last block, several parallel tasks), a model with more
        // outputs than inputs (the dual is reduced) and one with more inputs, against a
        // direct complex solve (identity), and bit-for-bit equal sequential / parallel.
        let n = 40;
        let mut seed = 11u64;
        let mut next = || {
            seed = seed
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            ((seed >> 11) as f64 / (1u64 << 53) as f64) - 0.5
        };
        let a: Vec<f64> = (0..n * n)
            .map(|i| next() - if i % (n + 1) == 0 { 3.0 } else { 0.0 })
            .collect();
        let b: Vec<f64> = (0..n * 2).map(|_| next()).collect();
        let c: Vec<f64> = (0..3 * n).map(|_| next()).collect();
        let d: Vec<f64> = (0..6).map(|_| next()).collect();
        let tall = model(&a, n, &b, 2, &c, 3, &d);
        let wide = model(&a, n, &c, 3, &b, 2, &d);
        let w: Vec<f64> = (0..1203).map(|i| 1e-3 * 1.01f64.powi(i)).collect();
        for ss in [&tall, &wide] {
            let g = frequency_response(ss, &w, None, true).unwrap();
            let seq = frequency_response(ss, &w, None, false).unwrap();
            assert_eq!(g, seq);
            let per = ss.n_outputs() * ss.n_inputs();
            for (f, &w) in w.iter().enumerate().step_by(97).chain([(1202, &w[1202])]) {
                let want = direct(ss, Complex::new(0.0, w));
                for (x, y) in g[f * per..(f + 1) * per].iter().zip(&want) {
                    assert!((x - y).norm() <= 1e-12 * y.norm().max(1.0), "{x} vs {y}");
                }
            }
        }
    }

    #[test]
    fn pivoting_on_a_small_subdiagonal() {
        // A Hessenberg A whose subdiagonal is tiny against the diagonal and huge in one
        // place, so both pivot choices occur, against a direct complex solve (identity).
        let n = 6;
        let mut a = vec![0.0; n * n];
        for i in 0..n {
            for j in 0..n {
                if j + 1 >= i {
                    a[i * n + j] = ((i * 7 + j * 3) % 5) as f64 - 2.0;
                }
            }
            a[i * n + i] -= 1.0 + i as f64;
        }
        a[n] = 1e-9; // entry (1, 0)
        a[3 * n + 2] = 1e3;
        let b: Vec<f64> = (0..n).map(|i| 1.0 + i as f64).collect();
        let c: Vec<f64> = (0..n).map(|i| (i as f64 - 2.5) / 3.0).collect();
        let ss = model(&a, n, &b, 1, &c, 1, &[0.0]);
        let w = [0.0, 0.1, 1.0, 3.0, 10.0, 1e3];
        let g = frequency_response(&ss, &w, None, false).unwrap();
        for (x, &w) in g.iter().zip(&w) {
            let y = direct(&ss, Complex::new(0.0, w))[0];
            assert!((x - y).norm() <= 1e-12 * y.norm().max(1e-300), "{x} vs {y}");
        }
    }

    #[test]
    fn integrator_at_zero_frequency_is_refused() {
        let ss = model(
            &[0.0, 1.0, 0.0, -1.0],
            2,
            &[0.0, 1.0],
            1,
            &[1.0, 0.0],
            1,
            &[0.0],
        );
        let err = frequency_response(&ss, &[1.0, 0.0], None, false).unwrap_err();
        assert!(err.to_string().contains("frequencies[1]"), "{err}");
        // Discrete: the pole z = 1 is at ω = 0 as well.
        let err = frequency_response(&ss, &[0.0], Some(0.1), false);
        assert!(err.is_ok(), "z = 1 is no pole of A here");
    }
}
