//! Luenberger canonical forms of a multi-input, multi-output model.
//!
//! `z = T x` with `T A T⁻¹ = A_c`, `T B = B_c`, `C T⁻¹ = C_c`, `D` unchanged, where
//! (controller form) `A_c` is block upper companion: one block of size `μ_j` per input
//! `j` with `μ_j > 0`, ones on the superdiagonal inside each block, zeros elsewhere except
//! the last row of each block, which holds the coefficients of `A^{μ_j}` on the chosen
//! basis; `B_c` is zero except the last row of each block, which is `e_jᵀ Γ` with `Γ` unit
//! upper triangular (a 1 in column `j`, zeros left of it). The observer form is the dual:
//! the controller form of `(Aᵀ, Cᵀ, Bᵀ, Dᵀ)`, transposed.
//!
//! # Purpose
//! The canonical form in which an engineer reads the structure of a controllable MIMO
//! model: the controllability indices `μ_1, ..., μ_m` (one per input, summing to n) and the
//! coefficients of each block.
//!
//! # Method
//! Luenberger (1967): the columns of `[B, AB, ..., A^{n-1}B]` are scanned in the order
//! `b_1, ..., b_m, A b_1, ..., A b_m, A² b_1, ...` and a column is kept when it is
//! independent of those kept before it; once `A^k b_j` depends on earlier columns, so do
//! all later powers of `b_j`. `μ_j` counts the kept columns of input j. With
//! `P = [b_1, ..., A^{μ_1-1} b_1, b_2, ..., A^{μ_m-1} b_m]` and `σ_j = μ_1 + ... + μ_j`,
//! `q_j` is row `σ_j` of `P⁻¹` and `T` stacks the rows `q_j, q_j A, ..., q_j A^{μ_j-1}`.
//!
//! In float the independence decisions are not made on the Krylov columns: the orthogonal
//! controllability staircase ([`crate::structure::staircase`]) decides the step sizes
//! `k_1 ≥ k_2 ≥ ...` (how many columns are kept at each power), and in its coordinates the
//! part of `A^{l-1} b_j` that is new at step l is `M_l e_j`, `M_l = A_{l,l-1} ··· A_{21} B_1`
//! (a `k_l × m` matrix; the earlier steps' directions are removed by the orthogonal
//! structure, not by projections on Krylov columns). At step l the inputs still in the scan
//! are taken in order and input j is kept when the part of `M_l e_j` orthogonal to the
//! columns kept before it at this step exceeds `n² eps ‖A_{l,l-1}‖_F ‖M_{l-1} e_j‖_F`
//! (`n² eps ‖b̃_j‖` at the first step): relative to the data that column is made from, so
//! the decision does not change when an input is scaled. When exactly `k_l` inputs are
//! still in the scan, all of them are kept without a test (the staircase decided). The
//! number kept must equal the
//! staircase's `k_l`; otherwise the assignment of indices to inputs is too close to call
//! and the call is refused. The transformation is then built from the Krylov columns in the
//! given coordinates (LU solves with partial pivoting) and the result placed into the exact
//! pattern of the form (structural ones and zeros exact).
//!
//! In exact mode (rationals) the scan is the definition itself: exact elimination of each
//! candidate column against those kept. The form is then built in two exact steps so that
//! no inverse of the Krylov basis is formed: Luenberger's controllability form
//! `(P⁻¹ A P, P⁻¹ B, C P)` (m solves with P), in which the kept columns are unit vectors,
//! then the controller form of that, whose `T` has small entries.
//!
//! # Numerical aspects
//! The form is as well conditioned as `T`: its entries carry relative errors of about
//! `κ₂(T) eps`, and `κ₂(T)` grows with the spread of the pole magnitudes and with n (the
//! transformation contains powers of A). Refused when `κ₂(T) > 1/√eps ≈ 6.7e7` (the
//! entries would keep fewer than half the digits). Every float result is verified: the
//! normwise residual of `T A = A_c T`, `T B = B_c`, `C = C_c T` (relative to
//! `‖T‖_F ‖A‖_F`, `‖T‖_F ‖B‖_F`, `‖C_c‖_F ‖T‖_F`) must be below `√eps`, and the first
//! 2n Markov parameters of the form are compared with those of the input (on `A/‖A‖_F`,
//! relative to `‖C‖_F ‖B‖_F`); both figures are reported. Cost O(n³).
//!
//! # References
//! D. G. Luenberger, "Canonical forms for linear multivariable systems", IEEE Trans.
//! Automat. Control 12 (1967) 290–293. T. Kailath, *Linear Systems*, Prentice Hall, 1980,
//! §6.4. P. Van Dooren, "The generalized eigenstructure problem in linear system theory",
//! IEEE Trans. Automat. Control 26 (1981) (the staircase decisions).
//!
//! # Errors
//! `Shape` / `NonFinite` for bad input, `BadValue` when the model is not controllable
//! (resp. observable) or the index assignment is too close to call, `IllConditioned`-type
//! refusals as `Unverified` (condition number or residual above its limit), `TooLarge`
//! above order 1024 (float) or 64 (exact), or when the exact form's estimated time exceeds
//! the exact-arithmetic budget (checked before the work starts).

use crate::error::{require_finite, ModelError, Result};
use crate::matrix::{frobenius_norm, Matrix};
use crate::state_space::StateSpace;
use crate::structure::staircase::controllability_staircase;
use crate::structure::{condition_number, from_faer, to_faer};
use faer::prelude::*;
use num_rational::BigRational;
use num_traits::{One, ToPrimitive, Zero};

/// Which Luenberger form.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LuenbergerForm {
    Controller,
    Observer,
}

/// Largest order of the float form (dense O(n³) work).
pub const MAX_ORDER_FLOAT: usize = 1024;
/// Largest order of the exact form (rational elimination; entries grow).
pub const MAX_ORDER_EXACT: usize = 64;
/// The largest condition number of T accepted: 1/√eps.
pub const CONDITION_LIMIT: f64 = 67_108_864.0;
/// The largest relative residual of the similarity accepted: √eps.
pub const RESIDUAL_LIMIT: f64 = 1.490_116_119_384_765_6e-8;

/// What the form was decided on and how well it checks against its input.
#[derive(Debug, Clone, PartialEq)]
pub struct MultivariableInfo {
    /// μ_j per input (controller) or per output (observer), in the given order.
    pub indices: Vec<usize>,
    /// κ₂(T) (in exact mode, of T rounded to float64).
    pub condition: f64,
    /// Normwise relative residual of the similarity (0 in exact mode).
    pub residual: f64,
    /// Largest relative deviation of the first 2n Markov parameters (0 in exact mode).
    pub markov_error: f64,
    /// The staircase tolerance used (None in exact mode).
    pub tol: Option<f64>,
    /// The transformation `T` (`z = T x`) of the form returned.
    pub transform: Matrix<f64>,
}

fn not_reached(form: LuenbergerForm, rank: usize, n: usize) -> ModelError {
    let (arg, what) = match form {
        LuenbergerForm::Controller => ("b", "controllable"),
        LuenbergerForm::Observer => ("c", "observable"),
    };
    ModelError::BadValue {
        arg,
        detail: format!(
            "the model is not {what} ({what} dimension {rank} of {n} states); the Luenberger \
             form exists only for a {what} model (reduce it first, e.g. by a minimal realization)"
        ),
    }
}

/// The input as the controller form sees it (the dual for the observer form).
fn primal<T: crate::scalar::Scalar>(ss: &StateSpace<T>, form: LuenbergerForm) -> StateSpace<T> {
    match form {
        LuenbergerForm::Controller => ss.clone(),
        LuenbergerForm::Observer => ss.dual(),
    }
}

fn check_order(n: usize, limit: usize) -> Result<()> {
    if n > limit {
        return Err(ModelError::TooLarge {
            arg: "a",
            detail: format!(
                "order {n} exceeds the limit {limit} for the multivariable canonical form"
            ),
        });
    }
    Ok(())
}

/// Column `j` of a row-major matrix.
fn column(m: &Matrix<f64>, j: usize) -> Vec<f64> {
    (0..m.rows()).map(|i| *m.get(i, j)).collect()
}

fn matvec(a: &Matrix<f64>, x: &[f64]) -> Vec<f64> {
    (0..a.rows())
        .map(|i| (0..a.cols()).map(|k| a.get(i, k) * x[k]).sum())
        .collect()
}

fn vecmat(x: &[f64], a: &Matrix<f64>) -> Vec<f64> {
    (0..a.cols())
        .map(|j| (0..a.rows()).map(|k| x[k] * a.get(k, j)).sum())
        .collect()
}

fn dot(x: &[f64], y: &[f64]) -> f64 {
    x.iter().zip(y).map(|(a, b)| a * b).sum()
}

/// The float controller-form scan on the staircase: μ_j per input.
fn indices_on_staircase(
    ss: &StateSpace<f64>,
    tol: Option<f64>,
    form: LuenbergerForm,
) -> Result<(Vec<usize>, f64)> {
    let (n, m) = (ss.n_states(), ss.n_inputs());
    let st = controllability_staircase(&ss.a, &ss.b, None, tol)?;
    if st.rank < n {
        return Err(not_reached(form, st.rank, n));
    }
    let eps_rel = (n * n) as f64 * f64::EPSILON;
    let mut mu = vec![0usize; m];
    let mut active: Vec<bool> = vec![true; m];
    // M_l as columns (one per input), each of length k_l; `base[j]` the norm its test is relative to.
    let k1 = st.blocks[0];
    let mut cols: Vec<Vec<f64>> = (0..m)
        .map(|j| (0..k1).map(|i| *st.b.get(i, j)).collect())
        .collect();
    let mut base: Vec<f64> = cols.iter().map(|c| frobenius_norm(c)).collect();
    let mut offset = 0usize;
    for (l, &kl) in st.blocks.iter().enumerate() {
        if l > 0 {
            // M_l = A_{l,l-1} M_{l-1}: rows of block l, columns of block l-1.
            let kp = st.blocks[l - 1];
            let (prev, cur) = (offset - kp, offset);
            let sub: Vec<f64> = (0..kl)
                .flat_map(|i| (0..kp).map(move |k| (i, k)))
                .map(|(i, k)| *st.a.get(cur + i, prev + k))
                .collect();
            let sub_norm = frobenius_norm(&sub);
            for j in 0..m {
                let old = &cols[j];
                base[j] = sub_norm * frobenius_norm(old);
                cols[j] = (0..kl)
                    .map(|i| (0..kp).map(|k| sub[i * kp + k] * old[k]).sum())
                    .collect();
            }
        }
        // When as many inputs are still in the scan as the staircase finds new directions,
        // every one of them is kept: there is nothing to decide (the staircase decided).
        let candidates = active.iter().filter(|&&x| x).count();
        if candidates == kl {
            (0..m).filter(|&j| active[j]).for_each(|j| mu[j] += 1);
            offset += kl;
            continue;
        }
        // Greedy scan over the inputs still active, against an orthonormal basis.
        let mut basis: Vec<Vec<f64>> = Vec::new();
        for j in 0..m {
            if !active[j] {
                continue;
            }
            let mut r = cols[j].clone();
            for _ in 0..2 {
                for q in &basis {
                    let h = dot(q, &r);
                    r.iter_mut().zip(q).for_each(|(x, y)| *x -= h * y);
                }
            }
            let rn = frobenius_norm(&r);
            if rn > eps_rel * base[j] && rn > 0.0 && basis.len() < kl {
                r.iter_mut().for_each(|x| *x /= rn);
                basis.push(r);
                mu[j] += 1;
            } else {
                active[j] = false;
            }
        }
        if basis.len() != kl {
            return Err(ModelError::BadValue {
                arg: "tol",
                detail: format!(
                    "the assignment of the indices to the {} is too close to call at step {}: the \
                     staircase finds {kl} new directions, the scan of the {} in order {} \
                     (tol={:.3e}); try another tol",
                    if form == LuenbergerForm::Controller {
                        "inputs"
                    } else {
                        "outputs"
                    },
                    l + 1,
                    if form == LuenbergerForm::Controller {
                        "inputs"
                    } else {
                        "outputs"
                    },
                    basis.len(),
                    st.tol
                ),
            });
        }
        offset += kl;
    }
    Ok((mu, st.tol))
}

/// `T` of the controller form from the indices: rows `q_j A^r`, and the rows `q_j A^{μ_j}`.
fn float_transform(ss: &StateSpace<f64>, mu: &[usize]) -> (Matrix<f64>, Vec<Vec<f64>>) {
    let n = ss.n_states();
    let mut p = Matrix::zeros(n, n);
    let mut at = 0;
    for (j, &mj) in mu.iter().enumerate() {
        let mut v = column(&ss.b, j);
        for _ in 0..mj {
            for (i, x) in v.iter().enumerate() {
                p.set(i, at, *x);
            }
            at += 1;
            v = matvec(&ss.a, &v);
        }
    }
    // Rows σ_j of P⁻¹: solve Pᵀ q = e_σ.
    let lu = to_faer(&p.transpose()).partial_piv_lu();
    let mut t = Matrix::zeros(n, n);
    let mut tails = Vec::new();
    let mut row = 0;
    let mut sigma = 0;
    for &mj in mu {
        if mj == 0 {
            continue;
        }
        sigma += mj;
        let e = faer::Mat::from_fn(n, 1, |i, _| f64::from(u8::from(i == sigma - 1)));
        let q = lu.solve(&e);
        let mut r: Vec<f64> = (0..n).map(|i| q[(i, 0)]).collect();
        for _ in 0..mj {
            for (k, x) in r.iter().enumerate() {
                t.set(row, k, *x);
            }
            row += 1;
            r = vecmat(&r, &ss.a);
        }
        tails.push(r);
    }
    (t, tails)
}

fn residual(x: &Matrix<f64>, y: &Matrix<f64>) -> f64 {
    let d: Vec<f64> = x
        .as_slice()
        .iter()
        .zip(y.as_slice())
        .map(|(a, b)| a - b)
        .collect();
    frobenius_norm(&d)
}

fn relative(num: f64, den: f64) -> f64 {
    if num == 0.0 {
        0.0
    } else if den == 0.0 {
        f64::INFINITY
    } else {
        num / den
    }
}

/// Largest deviation of the first `count` Markov parameters of `y` from those of `x`,
/// computed on `A/α` (α = ‖A_x‖_F), relative to `‖C_x‖_F ‖B_x‖_F`.
fn markov_deviation(x: &StateSpace<f64>, y: &StateSpace<f64>, count: usize) -> f64 {
    let alpha = frobenius_norm(x.a.as_slice());
    let alpha = if alpha > 0.0 { alpha } else { 1.0 };
    let scale = frobenius_norm(x.c.as_slice()) * frobenius_norm(x.b.as_slice());
    let (mut px, mut py) = (x.b.clone(), y.b.clone());
    let (ax, ay) = (x.a.map(|v| v / alpha), y.a.map(|v| v / alpha));
    let mut worst = 0.0f64;
    for _ in 0..count {
        let hx = x.c.matmul(&px);
        let hy = y.c.matmul(&py);
        worst = worst.max(relative(residual(&hx, &hy), scale));
        px = ax.matmul(&px);
        py = ay.matmul(&py);
    }
    worst
}

/// The float Luenberger form of `ss` (controller or observer) with its info.
///
/// # Errors
/// See the module documentation.
pub fn multivariable_f64(
    ss: &StateSpace<f64>,
    form: LuenbergerForm,
    tol: Option<f64>,
) -> Result<(StateSpace<f64>, MultivariableInfo)> {
    for (arg, m) in [("a", &ss.a), ("b", &ss.b), ("c", &ss.c), ("d", &ss.d)] {
        require_finite(arg, m.as_slice())?;
    }
    crate::structure::staircase::check_tol(tol)?;
    let n = ss.n_states();
    check_order(n, MAX_ORDER_FLOAT)?;
    let pr = primal(ss, form);
    let m = pr.n_inputs();
    if n == 0 {
        let info = MultivariableInfo {
            indices: vec![0; m],
            condition: 1.0,
            residual: 0.0,
            markov_error: 0.0,
            tol,
            transform: Matrix::zeros(0, 0),
        };
        return Ok((ss.clone(), info));
    }
    let (mu, used_tol) = indices_on_staircase(&pr, tol, form)?;
    let (t, tails) = float_transform(&pr, &mu);
    // A nearly singular Krylov basis can leave T beyond the float64 range: ill-conditioned.
    let finite = t
        .as_slice()
        .iter()
        .chain(tails.iter().flatten())
        .all(|v| v.is_finite());
    let condition = if finite {
        condition_number(&t)?
    } else {
        f64::INFINITY
    };
    if !(condition <= CONDITION_LIMIT) {
        return Err(ModelError::Unverified {
            what: "the multivariable canonical form",
            detail: format!(
                "the transformation to the form has condition number {condition:.3e}, above the \
                 limit 1/sqrt(eps) = {CONDITION_LIMIT:.3e}: its entries would keep fewer than half \
                 the digits (indices {mu:?})"
            ),
        });
    }
    // Rows of A_c at the block ends: (q_j A^{μ_j}) T⁻¹, i.e. solve Tᵀ x = (q_j A^{μ_j})ᵀ;
    // C_c = C T⁻¹: solve Tᵀ X = Cᵀ.
    let lu_t = to_faer(&t.transpose()).partial_piv_lu();
    let mut a_c = Matrix::zeros(n, n);
    let mut b_c = Matrix::zeros(n, m);
    let (mut start, mut block) = (0usize, 0usize);
    for (j, &mj) in mu.iter().enumerate() {
        if mj == 0 {
            continue;
        }
        let last = start + mj - 1;
        for r in start..last {
            a_c.set(r, r + 1, 1.0);
        }
        let rhs = faer::Mat::from_fn(n, 1, |i, _| tails[block][i]);
        let x = lu_t.solve(&rhs);
        for k in 0..n {
            a_c.set(last, k, x[(k, 0)]);
        }
        // B_c row: q_j A^{μ_j - 1} B = (row `last` of T) B; 1 at j, zeros left of it.
        let trow: Vec<f64> = (0..n).map(|k| *t.get(last, k)).collect();
        let brow = vecmat(&trow, &pr.b);
        for (k, v) in brow.into_iter().enumerate() {
            let value = match k.cmp(&j) {
                std::cmp::Ordering::Less => 0.0,
                std::cmp::Ordering::Equal => 1.0,
                std::cmp::Ordering::Greater => v,
            };
            b_c.set(last, k, value);
        }
        start += mj;
        block += 1;
    }
    let c_c = from_faer(lu_t.solve(to_faer(&pr.c.transpose())).as_ref()).transpose();
    let out = StateSpace {
        a: a_c,
        b: b_c,
        c: c_c,
        d: pr.d.clone(),
    };
    for m in [&out.a, &out.b, &out.c] {
        if m.as_slice().iter().any(|v| !v.is_finite()) {
            return Err(ModelError::Overflow {
                what: "the multivariable canonical form".into(),
            });
        }
    }
    // Verification against the input.
    let tn = frobenius_norm(t.as_slice());
    let res_a = relative(
        residual(&t.matmul(&pr.a), &out.a.matmul(&t)),
        tn * frobenius_norm(pr.a.as_slice()),
    );
    let res_b = relative(
        residual(&t.matmul(&pr.b), &out.b),
        tn * frobenius_norm(pr.b.as_slice()),
    );
    let res_c = relative(
        residual(&pr.c, &out.c.matmul(&t)),
        frobenius_norm(out.c.as_slice()) * tn,
    );
    let res = res_a.max(res_b).max(res_c);
    let markov_error = markov_deviation(&pr, &out, 2 * n);
    if !(res <= RESIDUAL_LIMIT) {
        return Err(ModelError::Unverified {
            what: "the multivariable canonical form",
            detail: format!(
                "the similarity residual {res:.3e} exceeds sqrt(eps) = {RESIDUAL_LIMIT:.3e} \
                 (condition number of T {condition:.3e})"
            ),
        });
    }
    let (result, transform) = match form {
        LuenbergerForm::Controller => (out, t),
        // Observer: x_o = T⁻ᵀ ... the dual of z = T x for the dual model; the state map of
        // the observer form is (T⁻¹)ᵀ, reported as such.
        LuenbergerForm::Observer => {
            let inv = from_faer(lu_t.solve(faer::Mat::<f64>::identity(n, n)).as_ref());
            (out.dual(), inv)
        }
    };
    let info = MultivariableInfo {
        indices: mu,
        condition,
        residual: res,
        markov_error,
        tol: Some(used_tol),
        transform,
    };
    Ok((result, info))
}

// ---- exact

type Q = BigRational;

/// Reduces `v` against an echelon basis (pivot column, row); true when something is left.
fn reduce_exact(basis: &[(usize, Vec<Q>)], v: &mut [Q]) {
    for (p, row) in basis {
        if !v[*p].is_zero() {
            let f = v[*p].clone() / &row[*p];
            for (x, y) in v.iter_mut().zip(row) {
                if !y.is_zero() {
                    *x -= &f * y;
                }
            }
        }
    }
}

/// The exact inverse by Gauss–Jordan elimination; None when singular.
fn inverse_exact(m: &Matrix<Q>) -> Option<Matrix<Q>> {
    let n = m.rows();
    let mut a: Vec<Vec<Q>> = (0..n)
        .map(|i| (0..n).map(|j| m.get(i, j).clone()).collect())
        .collect();
    let mut inv: Vec<Vec<Q>> = (0..n)
        .map(|i| {
            (0..n)
                .map(|j| if i == j { Q::one() } else { Q::zero() })
                .collect()
        })
        .collect();
    for col in 0..n {
        let piv = (col..n).find(|&r| !a[r][col].is_zero())?;
        a.swap(col, piv);
        inv.swap(col, piv);
        let p = a[col][col].clone();
        for x in a[col].iter_mut() {
            *x /= &p;
        }
        for x in inv[col].iter_mut() {
            *x /= &p;
        }
        for r in 0..n {
            if r != col && !a[r][col].is_zero() {
                let f = a[r][col].clone();
                let (pa, pi) = (a[col].clone(), inv[col].clone());
                for (x, y) in a[r].iter_mut().zip(&pa) {
                    if !y.is_zero() {
                        *x -= &f * y;
                    }
                }
                for (x, y) in inv[r].iter_mut().zip(&pi) {
                    if !y.is_zero() {
                        *x -= &f * y;
                    }
                }
            }
        }
    }
    Matrix::from_row_major(n, n, inv.into_iter().flatten().collect())
}

/// An exact matrix scaled by a power of two (its largest entry near 1) and rounded to
/// float64: the condition number is scale invariant, so entries beyond the float64 range
/// still give one (∞ when the scaled copy is singular in float64).
fn scaled_f64_matrix(m: &Matrix<Q>) -> Matrix<f64> {
    let top = m
        .as_slice()
        .iter()
        .filter(|q| !q.is_zero())
        .map(|q| q.numer().bits() as i64 - q.denom().bits() as i64)
        .max()
        .unwrap_or(0);
    let two = num_bigint::BigInt::from(2u8);
    let factor = if top >= 0 {
        Q::new(num_bigint::BigInt::one(), two.pow(top as u32))
    } else {
        Q::from_integer(two.pow((-top) as u32))
    };
    m.map(|q: &Q| (q * &factor).to_f64().unwrap_or(f64::INFINITY))
}

/// Seconds per unit of [`check_exact_budget`]'s cost model, measured on this machine
/// class with margin (the model overestimates large entries, so it refuses on the safe side).
const SECONDS_PER_UNIT: f64 = 4e-8;

/// Refuses, before any work, an exact form whose estimated time exceeds the exact-arithmetic
/// budget. Cost model: `n⁴ (1 + n² β / 64)^1.6` units, β the bits of A's entries once its
/// denominators are cleared (the bits of its distinct denominators plus its longest
/// numerator) plus the longest entry of B: the Krylov columns and the eliminations carry
/// numbers of about `n² β` bits.
fn check_exact_budget(ss: &StateSpace<Q>) -> Result<()> {
    let n = ss.n_states() as f64;
    let mut dens: Vec<&num_bigint::BigInt> = ss.a.as_slice().iter().map(|q| q.denom()).collect();
    dens.sort();
    dens.dedup();
    let den_bits: u64 = dens.iter().map(|d| d.bits()).sum();
    let num_bits =
        ss.a.as_slice()
            .iter()
            .map(|q| q.numer().bits())
            .max()
            .unwrap_or(0);
    let b_bits =
        ss.b.as_slice()
            .iter()
            .map(|q| q.numer().bits() + q.denom().bits())
            .max()
            .unwrap_or(0);
    let beta = (den_bits + num_bits + b_bits) as f64;
    let units = n.powi(4) * (1.0 + n * n * beta / 64.0).powf(1.6);
    let seconds = units * SECONDS_PER_UNIT;
    let budget = crate::recover::rational::EXACT_TIME_BUDGET_SECONDS;
    if seconds > budget {
        return Err(ModelError::TooLarge {
            arg: "a",
            detail: format!(
                "the exact multivariable form of this order-{} model with entries of about {beta:.0} \
                 bits (denominators cleared) would take about {seconds:.0} s, beyond the {budget} s \
                 budget of exact arithmetic; use fewer distinct denominators or float data",
                ss.n_states()
            ),
        });
    }
    Ok(())
}

/// The exact Luenberger form of `ss` and its info (`info.transform` is left empty),
/// indices by exact column selection.
///
/// # Errors
/// `BadValue` when not controllable (observable); `TooLarge` above order 64 or beyond the
/// exact-arithmetic time budget (estimated before the work starts).
pub fn multivariable_exact(
    ss: &StateSpace<Q>,
    form: LuenbergerForm,
) -> Result<(StateSpace<Q>, MultivariableInfo)> {
    let n = ss.n_states();
    check_order(n, MAX_ORDER_EXACT)?;
    let pr = primal(ss, form);
    let m = pr.n_inputs();
    check_exact_budget(&pr)?;
    let mut mu = vec![0usize; m];
    if n > 0 {
        // The scan b_1..b_m, A b_1..A b_m, ... with exact elimination.
        let mut powers: Vec<Vec<Q>> = (0..m)
            .map(|j| (0..n).map(|i| pr.b.get(i, j).clone()).collect())
            .collect();
        let mut active = vec![true; m];
        let mut basis: Vec<(usize, Vec<Q>)> = Vec::new();
        while basis.len() < n && active.iter().any(|&x| x) {
            for j in 0..m {
                if basis.len() == n {
                    break;
                }
                if !active[j] {
                    continue;
                }
                let mut v = powers[j].clone();
                reduce_exact(&basis, &mut v);
                match v.iter().position(|x| !x.is_zero()) {
                    Some(p) => {
                        basis.push((p, v));
                        mu[j] += 1;
                    }
                    None => active[j] = false,
                }
            }
            for j in 0..m {
                if active[j] {
                    let v = &powers[j];
                    powers[j] = (0..n)
                        .map(|i| {
                            let mut s = Q::zero();
                            for (k, x) in v.iter().enumerate() {
                                if !x.is_zero() && !pr.a.get(i, k).is_zero() {
                                    s += pr.a.get(i, k) * x;
                                }
                            }
                            s
                        })
                        .collect();
                }
            }
        }
        if basis.len() < n {
            return Err(not_reached(form, basis.len(), n));
        }
    }
    // Two steps, so that no big inverse is formed: first Luenberger's controllability form
    // in the basis P of the kept Krylov columns (m solves with P), where the kept columns
    // are unit vectors; then the controller form of that, whose T has small entries.
    let mut p = Matrix::<Q>::zeros(n, n);
    let mut rhs: Vec<Vec<Q>> = Vec::new(); // A^{μ_j} b_j (μ_j > 0), or b_j (μ_j = 0)
    let mut at = 0;
    for (j, &mj) in mu.iter().enumerate() {
        let mut v: Vec<Q> = (0..n).map(|i| pr.b.get(i, j).clone()).collect();
        for _ in 0..mj {
            for (i, x) in v.iter().enumerate() {
                p.set(i, at, x.clone());
            }
            at += 1;
            let col = Matrix::from_row_major(n, 1, v).expect("n x 1");
            v = pr.a.matmul(&col).into_vec();
        }
        rhs.push(v);
    }
    let x = solve_exact(&p, &rhs).ok_or_else(|| not_reached(form, n.saturating_sub(1), n))?;
    // (A_p, B_p, C_p) = (P⁻¹ A P, P⁻¹ B, C P).
    let mut a_p = Matrix::<Q>::zeros(n, n);
    let mut b_p = Matrix::<Q>::zeros(n, m);
    let mut start = 0;
    for (j, &mj) in mu.iter().enumerate() {
        if mj == 0 {
            for i in 0..n {
                b_p.set(i, j, x[j][i].clone());
            }
            continue;
        }
        b_p.set(start, j, Q::one());
        for r in 0..mj - 1 {
            a_p.set(start + r + 1, start + r, Q::one());
        }
        for i in 0..n {
            a_p.set(i, start + mj - 1, x[j][i].clone());
        }
        start += mj;
    }
    let c_p = pr.c.matmul(&p);
    // Controller form of (A_p, B_p): q_j = e_{σ_j}ᵀ, T rows q_j A_p^r.
    let mut t = Matrix::<Q>::zeros(n, n);
    let (mut row, mut sigma) = (0usize, 0usize);
    for &mj in &mu {
        if mj == 0 {
            continue;
        }
        sigma += mj;
        let mut r = Matrix::<Q>::zeros(1, n);
        r.set(0, sigma - 1, Q::one());
        for _ in 0..mj {
            for k in 0..n {
                t.set(row, k, r.get(0, k).clone());
            }
            row += 1;
            r = r.matmul(&a_p);
        }
    }
    let t_inv = inverse_exact(&t).ok_or_else(|| not_reached(form, n.saturating_sub(1), n))?;
    let out = StateSpace {
        a: t.matmul(&a_p).matmul(&t_inv),
        b: t.matmul(&b_p),
        c: c_p.matmul(&t_inv),
        d: pr.d.clone(),
    };
    // κ₂ of the whole transformation T P⁻¹ (z = T P⁻¹ x), in float from scaled copies.
    let condition = if n == 0 {
        1.0
    } else {
        let (tf, pf) = (scaled_f64_matrix(&t), scaled_f64_matrix(&p));
        if tf
            .as_slice()
            .iter()
            .chain(pf.as_slice())
            .all(|v| v.is_finite())
        {
            // (T P⁻¹)ᵀ = P⁻ᵀ Tᵀ: solve Pᵀ Y = Tᵀ.
            let y = to_faer(&pf.transpose())
                .partial_piv_lu()
                .solve(to_faer(&tf.transpose()));
            let whole = from_faer(y.as_ref());
            if whole.as_slice().iter().all(|v| v.is_finite()) {
                condition_number(&whole)?
            } else {
                f64::INFINITY
            }
        } else {
            f64::INFINITY
        }
    };
    let result = match form {
        LuenbergerForm::Controller => out,
        LuenbergerForm::Observer => out.dual(),
    };
    let info = MultivariableInfo {
        indices: mu,
        condition,
        residual: 0.0,
        markov_error: 0.0,
        tol: None,
        transform: Matrix::zeros(0, 0),
    };
    Ok((result, info))
}

/// The solutions `x_k` of `P x_k = r_k` by one exact elimination; None when P is singular.
fn solve_exact(p: &Matrix<Q>, rhs: &[Vec<Q>]) -> Option<Vec<Vec<Q>>> {
    let n = p.rows();
    let k = rhs.len();
    let mut a: Vec<Vec<Q>> = (0..n)
        .map(|i| {
            (0..n)
                .map(|j| p.get(i, j).clone())
                .chain(rhs.iter().map(|r| r[i].clone()))
                .collect()
        })
        .collect();
    for col in 0..n {
        let piv = (col..n).find(|&r| !a[r][col].is_zero())?;
        a.swap(col, piv);
        let pivot_row = a[col].clone();
        for r in col + 1..n {
            if !a[r][col].is_zero() {
                let f = a[r][col].clone() / &pivot_row[col];
                for (x, y) in a[r].iter_mut().zip(&pivot_row).skip(col) {
                    if !y.is_zero() {
                        *x -= &f * y;
                    }
                }
            }
        }
    }
    let mut out = vec![vec![Q::zero(); n]; k];
    for (c, sol) in out.iter_mut().enumerate() {
        for i in (0..n).rev() {
            let mut v = a[i][n + c].clone();
            for j in i + 1..n {
                if !a[i][j].is_zero() && !sol[j].is_zero() {
                    v -= &a[i][j] * &sol[j];
                }
            }
            sol[i] = v / &a[i][i];
        }
    }
    Some(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn model_f64() -> StateSpace<f64> {
        // (hand-worked) indices (2, 1); blocks [[0, 1], [-2, -3]] and [[-3]].
        StateSpace::new(
            Matrix::from_row_major(3, 3, vec![-1.0, 0.0, 0.0, 1.0, -2.0, 0.0, 0.0, 0.0, -3.0])
                .unwrap(),
            Matrix::from_row_major(3, 2, vec![1.0, 0.0, 0.0, 0.0, 0.0, 1.0]).unwrap(),
            Matrix::from_row_major(2, 3, vec![1.0, 1.0, 0.0, 0.0, 0.0, 1.0]).unwrap(),
            Matrix::zeros(2, 2),
        )
        .unwrap()
    }

    #[test]
    fn hand_worked_controller_form() {
        let expected_a = [0.0, 1.0, 0.0, -2.0, -3.0, 0.0, 0.0, 0.0, -3.0];
        let expected_b = [0.0, 0.0, 1.0, 0.0, 0.0, 1.0];
        let (out, info) =
            multivariable_f64(&model_f64(), LuenbergerForm::Controller, None).unwrap();
        assert_eq!(info.indices, vec![2, 1]);
        assert_eq!(out.a.as_slice(), &expected_a[..]);
        assert_eq!(out.b.as_slice(), &expected_b[..]);
        let exact = model_f64();
        let q = |m: &Matrix<f64>| m.map(|v| Q::from_float(*v).unwrap());
        let exact = StateSpace::new(q(&exact.a), q(&exact.b), q(&exact.c), q(&exact.d)).unwrap();
        let (out_q, info_q) = multivariable_exact(&exact, LuenbergerForm::Controller).unwrap();
        assert_eq!(info_q.indices, vec![2, 1]);
        assert_eq!(out_q.a, q(&out.a));
        assert_eq!(out_q.b, q(&out.b));
        assert_eq!(out_q.c, q(&out.c));
    }

    #[test]
    fn refuses_an_uncontrollable_model() {
        let mut ss = model_f64();
        ss.b = Matrix::from_row_major(3, 2, vec![1.0, 0.0, 0.0, 0.0, 0.0, 0.0]).unwrap();
        let err = multivariable_f64(&ss, LuenbergerForm::Controller, None).unwrap_err();
        assert!(err.to_string().contains("not controllable"), "{err}");
        // The observer form of the same model: (A, C) is observable.
        let (_, info) = multivariable_f64(&ss, LuenbergerForm::Observer, None).unwrap();
        assert_eq!(info.indices.iter().sum::<usize>(), 3);
    }
}
