//! Controllability and observability staircase forms by orthogonal transformations.
//!
//! # Purpose
//! An orthogonal Q with `Qᵀ A Q = [[A_c, A_12], [0, A_u]]`, `Qᵀ B = [[B_c], [0]]`, where
//! `(A_c, B_c)` is controllable and in staircase (block upper Hessenberg) form:
//! `B_c = [B_1; 0]` with `B_1` of full row rank `k_1`, and each subdiagonal block
//! `A_{i+1,i}` (k_{i+1} × k_i) of full row rank. The controllable dimension is `Σ k_i`.
//! The observability form is the dual: the same routine on `(Aᵀ, Cᵀ, Bᵀ)`, transposed.
//!
//! # Method
//! Van Dooren (1981) / Paige (1981): at step i the block `Z` that feeds the states not yet
//! reached (B at the first step, then the block of A below the last step's columns) is
//! decomposed by the SVD, `Z = U Σ Vᵀ`; its numerical rank `r` is the number of singular
//! values above `tol`. Householder reflections `H` with `Hᵀ U_r = [D; 0]` are applied as a
//! similarity to A (and to B, C, Q); then `Hᵀ Z = [D Σ_r V_rᵀ; W]` where `W` has norm
//! `σ_{r+1} ≤ tol` and is set to zero. The reduction stops when `r = 0` (the rest is
//! uncontrollable) or all states are reached.
//!
//! # Numerical aspects
//! Backward stable: the result is the exact staircase form of `(A + E, B + F)` with
//! `‖E‖, ‖F‖` of order `tol + n eps ‖(A, B)‖` (Van Dooren 1981). Default (scale
//! invariant, [`Tolerance::Relative`]): the first step against `n² eps ‖B̂‖_F` (B with its
//! columns scaled by powers of two to one exponent), later steps against `n² eps ‖A‖_F`;
//! then a verified search for rounding-level values amplified along the chain (candidate
//! factors up to `sqrt(eps)`, and an eigenvector-guided split by the PBH eigenvector test,
//! refined to a split at rounding distance from the data: [`super::refine`]),
//! a smaller controllable part being accepted only when it reproduces the Krylov sequence
//! `A^k B`, `k < 2n`, to `200 n² eps` (a check of a candidate split, not a rank decision
//! from the controllability matrix). Every step records its threshold and backward error,
//! and the final split its a-posteriori residual from the returned Q. The decisions are
//! invariant under input scaling, uniform state scaling and orthogonal changes of
//! coordinates (up to rounding). [`super::minimal`] and
//! [`super::kalman`] work on a balanced copy instead (smaller rounding errors for
//! companion-like models). The singular values every decision was made on are
//! kept ([`StepRecord`]), so a caller sees how close each one was. Data whose largest entry
//! is beyond 1e150 or below 1e-150 (in magnitude) are reduced on a copy scaled by a power of
//! two, so no intermediate sum overflows or underflows where the results are representable. Ranks are never decided
//! from the controllability matrix `[B, AB, ..., A^(n−1)B]`: its columns align with the
//! dominant eigenvectors and its singular values spread like powers of the eigenvalue
//! magnitudes, so a controllable model with fast and slow modes looks rank deficient.
//! Cost: O(n³) (about `m` reflections per step, each O(n²)).
//!
//! # References
//! P. Van Dooren, "The generalized eigenstructure problem in linear system theory",
//! IEEE Trans. Automat. Control 26 (1981). C. C. Paige, "Properties of numerical
//! algorithms related to computing controllability", IEEE Trans. Automat. Control 26 (1981).
//! H. H. Rosenbrock, *State-space and Multivariable Theory*, 1970 (the controllability form).
//!
//! # Errors
//! `Shape` / `NonFinite` for bad input, `BadValue` for a negative or non-finite tol,
//! `NoConvergence` if an SVD fails.

use super::householder::Reflector;
use crate::error::{require_finite, ModelError, Result};
use crate::matrix::{pow2, range_exponent, scaled_frobenius_norm, Matrix};
use crate::state_space::StateSpace;
use faer::Mat;

/// The singular values one rank decision was made on, how many were kept, the threshold
/// they were judged against and the backward error of the decision.
#[derive(Debug, Clone, PartialEq)]
pub struct StepRecord {
    pub singular_values: Vec<f64>,
    pub kept: usize,
    /// Singular values above this count (the tol of this step, in the units of
    /// `singular_values`).
    pub threshold: f64,
    /// The Frobenius norm of the discarded part (the singular values not kept), relative
    /// to the norm of the data the step is judged against (‖B̂‖_F at the first step,
    /// ‖A‖_F later; see [`Tolerance`]): what the decision changed, relative to the data.
    pub backward_error: f64,
}

/// How the rank decisions are judged.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Tolerance {
    /// One absolute tol for every step, in the caller's units (an explicit `tol`).
    Absolute(f64),
    /// The scale-invariant default with this relative factor (`n² eps` for the public
    /// routines): the first step against `factor · ‖B̂‖_F`, where `B̂` is `B` with its
    /// columns scaled by powers of two to the exponent of the largest column norm, the
    /// later steps against `factor · ‖A‖_F`.
    Relative(f64),
}

/// A staircase form and what its decisions were made on.
#[derive(Debug, Clone, PartialEq)]
pub struct Staircase {
    pub a: Matrix<f64>,
    pub b: Matrix<f64>,
    pub c: Option<Matrix<f64>>,
    /// The orthogonal transformation Q.
    pub q: Matrix<f64>,
    /// Step sizes `k_1, k_2, ...`; they sum to `rank`.
    pub blocks: Vec<usize>,
    /// Controllable (or observable) dimension.
    pub rank: usize,
    pub steps: Vec<StepRecord>,
    /// The tolerance used: the explicit tol, or under the default the threshold of the
    /// steps after the first (`n² eps ‖A‖_F`; each step's own is in `steps`).
    pub tol: f64,
    /// A posteriori backward error of the split into reached and unreached states,
    /// recomputed from the returned Q and the data: `‖(Qᵀ A Q)_21‖_F / ‖A‖_F` and
    /// `‖(Qᵀ B)_2‖_F / ‖B‖_F` (the blocks set to zero; 0 when every state is reached).
    pub split_residual: [f64; 2],
}

/// Frobenius norm, scaled by the largest entry so that it does not overflow for entries
/// near the top of the float64 range.
pub fn frobenius(m: &Matrix<f64>) -> f64 {
    crate::matrix::frobenius_norm(m.as_slice())
}

/// The relative factor of the default tol, `n² eps`.
pub fn default_factor(n: usize) -> f64 {
    let n = n as f64;
    n * n * f64::EPSILON
}

/// Exponents `e_j` with `2^(e_j)` times column j of `b` having the exponent of the largest
/// column norm (0 for a zero column): the input balancing of the default tol. Exact, and
/// the same bits for `b` with its columns scaled by any powers of two.
fn column_exponents(b: &Matrix<f64>) -> Vec<i32> {
    let exp = |v: f64| -> Option<i32> {
        if v > 0.0 && v.is_finite() {
            Some(v.log2().floor() as i32)
        } else {
            None
        }
    };
    let norms: Vec<Option<i32>> = (0..b.cols())
        .map(|j| {
            let col: Vec<f64> = (0..b.rows()).map(|i| *b.get(i, j)).collect();
            exp(crate::matrix::frobenius_norm(&col))
        })
        .collect();
    let top = norms.iter().flatten().copied().max().unwrap_or(0);
    norms.iter().map(|e| e.map_or(0, |e| top - e)).collect()
}

/// `m` with column j multiplied by `2^(sign · e_j)` (exact away from underflow).
fn scale_columns(m: &Matrix<f64>, e: &[i32], sign: i32) -> Matrix<f64> {
    let mut out = m.clone();
    for (j, &k) in e.iter().enumerate() {
        if k == 0 {
            continue;
        }
        // two factors so that 2^k itself need not be representable
        let (f1, f2) = (pow2(sign * (k / 2)), pow2(sign * (k - k / 2)));
        for i in 0..m.rows() {
            out.set(i, j, m.get(i, j) * f1 * f2);
        }
    }
    out
}

/// A power of two `s` with `s · max|m|` near 1 when the matrices' largest magnitude is
/// outside the safe range, else 1.
fn range_scale(ms: &[&Matrix<f64>]) -> f64 {
    pow2(range_exponent(ms.iter().flat_map(|m| m.as_slice())))
}

fn scaled(m: &Matrix<f64>, s: f64) -> Matrix<f64> {
    if s == 1.0 {
        m.clone()
    } else {
        m.map(|v| v * s)
    }
}

/// `m / s`, refused when an entry leaves the float64 range (the true value is not representable).
fn unscaled(m: Matrix<f64>, s: f64, what: &str) -> Result<Matrix<f64>> {
    if s == 1.0 {
        return Ok(m);
    }
    let out = m.map(|v| v / s);
    require_representable(out.as_slice(), what)?;
    Ok(out)
}

fn require_representable(values: &[f64], what: &str) -> Result<()> {
    if values.iter().all(|v| v.is_finite()) {
        Ok(())
    } else {
        Err(ModelError::Overflow {
            what: what.to_string(),
        })
    }
}

pub(crate) fn check_tol(tol: Option<f64>) -> Result<()> {
    match tol {
        Some(t) if !(t.is_finite() && t >= 0.0) => Err(ModelError::BadValue {
            arg: "tol",
            detail: format!("must be finite and >= 0, found {t}"),
        }),
        _ => Ok(()),
    }
}

/// Checks (A, B[, C]) for shape and finiteness.
pub(crate) fn check_pair(a: &Matrix<f64>, b: &Matrix<f64>, c: Option<&Matrix<f64>>) -> Result<()> {
    let d = Matrix::zeros(c.map_or(0, |c| c.rows()), b.cols());
    let c0 = c.cloned().unwrap_or_else(|| Matrix::zeros(0, a.rows()));
    let ss = StateSpace::new(a.clone(), b.clone(), c0, d)?;
    require_finite("a", ss.a.as_slice())?;
    require_finite("b", ss.b.as_slice())?;
    require_finite("c", ss.c.as_slice())
}

fn thin_svd(
    rows: usize,
    cols: usize,
    at: impl Fn(usize, usize) -> f64,
) -> Result<(Vec<f64>, Mat<f64>)> {
    let z = Mat::from_fn(rows, cols, at);
    let svd = z.thin_svd().map_err(|_| ModelError::NoConvergence {
        routine: "the SVD of a staircase step",
    })?;
    let s: Vec<f64> = (0..rows.min(cols))
        .map(|i| svd.S().column_vector()[i])
        .collect();
    Ok((s, svd.U().to_owned()))
}

/// The controllability staircase of (A, B), carrying C along when given.
///
/// Default (`tol = None`): the scale-invariant [`Tolerance::Relative`] with factor
/// `n² eps`: the first step keeps the singular values of `B̂` above `n² eps ‖B̂‖_F`
/// (`B̂ = B` with its columns scaled by powers of two to the exponent of the largest
/// column norm), each later step those of its block of `A` above `n² eps ‖A‖_F`. The
/// decisions are unchanged when the inputs are scaled (any powers of two: `B̂` has the
/// same bits), when all states are scaled by one factor (A is unchanged, `B̂` scales with
/// B), and, up to rounding, under orthogonal changes of state coordinates. An explicit tol
/// is absolute and applies to every step, in the caller's units.
///
/// Data near the ends of the float64 range are reduced on a copy scaled by powers of two
/// (A and B by one factor, C by its own), which changes no decision: the reduction is
/// homogeneous in (A, B, tol) and linear in C. Results are scaled back; one that is not
/// representable there is refused with `Overflow` rather than returned as infinity.
pub fn controllability_staircase(
    a: &Matrix<f64>,
    b: &Matrix<f64>,
    c: Option<&Matrix<f64>>,
    tol: Option<f64>,
) -> Result<Staircase> {
    check_tol(tol)?;
    match tol {
        Some(t) => staircase_with(a, b, c, Tolerance::Absolute(t), None),
        None => with_eigen_cache(|| {
            let f0 = default_factor(a.rows());
            let st0 = staircase_with(a, b, c, Tolerance::Relative(f0), None)?;
            let st = verified_search(a, b, c, st0, f0);
            Ok(eigenvector_split(a, b, c, f0, &st)?.unwrap_or(st))
        }),
    }
}

/// The default's search for rounding-level values amplified above `n² eps` along the chain
/// of steps: candidate factors from the kept singular values in `(n² eps, sqrt(eps)]`
/// (largest first, at most four per result and eight in all); a candidate with a smaller
/// reached dimension is accepted only when its split reproduces the Krylov sequence:
/// the Markov parameters of `(A, B, I)` against `(A_c, B_c, Q_c)`
/// ([`super::verify::markov_residual`] at most [`super::verify::markov_tolerance`]), i.e.
/// `A^k B` stays in the reached subspace to rounding level for `k < 2n`. This is a check of
/// a candidate, not a rank decision from the controllability matrix.
fn verified_search(
    a: &Matrix<f64>,
    b: &Matrix<f64>,
    c: Option<&Matrix<f64>>,
    st0: Staircase,
    f0: f64,
) -> Staircase {
    let n = a.rows();
    if n == 0 {
        return st0;
    }
    let full = StateSpace {
        a: a.clone(),
        b: b.clone(),
        c: Matrix::identity(n),
        d: Matrix::zeros(n, b.cols()),
    };
    let vt = super::verify::markov_tolerance(n);
    let mut frontier = super::minimal::candidate_factors(&[&st0], f0);
    let mut best = st0;
    let mut tries = 0;
    while !frontier.is_empty() && tries < super::minimal::MAX_TRIES {
        let f = frontier.remove(0);
        tries += 1;
        let Ok(st) = staircase_with(a, b, c, Tolerance::Relative(f), None) else {
            continue;
        };
        if st.rank >= best.rank {
            continue;
        }
        let k = st.rank;
        let reduced = StateSpace {
            a: leading_block(&st.a, k, k),
            b: leading_block(&st.b, k, b.cols()),
            c: super::columns(&st.q, 0, k),
            d: Matrix::zeros(n, b.cols()),
        };
        let r = super::verify::markov_residual(&full, &reduced);
        if r <= vt {
            frontier = super::minimal::candidate_factors(&[&st], f);
            best = st;
        }
    }
    best
}

/// Relative size below which a kept singular value makes the chain suspicious enough for
/// the eigenvector check (random controllable chains stay above it).
const SUSPICIOUS_STEP: f64 = 1e-2;
/// A mode is a candidate for the uncontrollable part when `|vᵀ B̂| <= this · ‖v‖ ‖B̂‖_F`
/// (v a left eigenvector; the PBH eigenvector test).
const PBH_CANDIDATE: f64 = 1e-8;

/// Eigenvector-guided split (PBH test): when the staircase reached more states than a
/// left-eigenvector count says are controllable, the left eigenvectors `v` of the modes
/// with `|vᵀ B̂| <= 1e-8 ‖v‖ ‖B̂‖_F` span a candidate left-invariant subspace `Q_2` with
/// `Q_2ᵀ B ≈ 0`. That basis is only as good as the eigenvectors' conditioning, so the
/// split is refined ([`super::refine`]): Newton steps on its Sylvester equation bring the
/// coupling `Q_2ᵀ A Q_1` to rounding level, then a joint correction moves it towards a
/// nearby model whose split also holds B (kept only when the larger of the two relative
/// residuals, coupling and `‖Q_2ᵀ B̂‖ / ‖B̂‖`, goes down). The split `[Q_1, Q_2]` is
/// accepted only when it reproduces the Krylov sequence (as in [`verified_search`]). The controllable part then gets its own
/// staircase; the split is recorded as a final step whose value is `‖Q_2ᵀ A Q_1‖_F`.
/// Only tried when some kept step value is below `1e-2` relative (a long, weak chain).
pub(crate) fn eigenvector_split(
    a: &Matrix<f64>,
    b: &Matrix<f64>,
    c: Option<&Matrix<f64>>,
    f0: f64,
    st: &Staircase,
) -> Result<Option<Staircase>> {
    let n = a.rows();
    if n < 2 || b.cols() == 0 || st.rank == 0 {
        return Ok(None);
    }
    let suspicious = st.steps.iter().any(|step| {
        let scale = step.threshold / f0;
        step.threshold > 0.0
            && step.singular_values[..step.kept]
                .iter()
                .any(|&v| v / scale < SUSPICIOUS_STEP)
    });
    if !suspicious || range_scale(&[a, b]) != 1.0 {
        return Ok(None);
    }
    let e = column_exponents(b);
    let b_hat = scale_columns(b, &e, 1);
    let Some(eig) = eigen_of_transpose(a) else {
        return Ok(None);
    };
    let (u, values) = (eig.0.as_ref(), &eig.1);
    let nb = frobenius(&b_hat);
    let bh = super::to_faer(&b_hat);
    let mut cols: Vec<Vec<f64>> = Vec::new();
    for i in 0..n {
        let lam = values[i];
        if lam.im < 0.0 {
            continue; // its conjugate stands for the pair
        }
        let v: Vec<faer::c64> = (0..n).map(|k| u[(k, i)]).collect();
        let vn = v
            .iter()
            .map(|z| z.re * z.re + z.im * z.im)
            .sum::<f64>()
            .sqrt();
        let mut worst: f64 = 0.0;
        for j in 0..b.cols() {
            let (mut re, mut im) = (0.0, 0.0);
            for k in 0..n {
                re += v[k].re * bh[(k, j)];
                im += v[k].im * bh[(k, j)];
            }
            worst = worst.max((re * re + im * im).sqrt());
        }
        if worst <= PBH_CANDIDATE * vn * nb {
            cols.push(v.iter().map(|z| z.re).collect());
            if lam.im > 0.0 {
                cols.push(v.iter().map(|z| z.im).collect());
            }
        }
    }
    let ku = cols.len();
    if ku == 0 || n - ku >= st.rank {
        return Ok(None);
    }
    let w = Matrix::from_row_major(n, ku, (0..n * ku).map(|x| cols[x % ku][x / ku]).collect())
        .expect("n x ku");
    let Ok(svd) = super::to_faer(&w).svd() else {
        return Ok(None);
    };
    let sv = svd.S().column_vector();
    if !(sv[ku - 1] > 1e-8 * sv[0]) {
        return Ok(None);
    }
    let uu = super::from_faer(svd.U());
    let nc = n - ku;
    // Q = [Q_1, Q_2]: the complement first, then the eigenvector span; refined to an
    // invariant split (coupling of rounding level) when the eigenvector basis was not
    // well conditioned.
    let q0 = super::hstack(
        &[&super::columns(&uu, ku, n), &super::columns(&uu, 0, ku)],
        n,
    );
    let q0 =
        match super::refine::refine_invariant_split(&super::to_faer(a), &super::to_faer(&q0), nc) {
            Some(r) => super::from_faer(r.q.as_ref()),
            None => q0,
        };
    // then the joint correction towards a split that also holds B (kept when it lowers
    // the larger of the two relative residuals)
    let q0 = {
        let (af, bf) = (super::to_faer(a), super::to_faer(&b_hat));
        let qf = super::to_faer(&q0);
        let measure = |q: &faer::Mat<f64>| {
            let q1 = q.subcols(0, nc);
            let q2 = q.subcols(nc, n - nc);
            let e = (q2.transpose() * &af * q1).norm_l2() / af.norm_l2();
            let r = (q2.transpose() * &bf).norm_l2() / bf.norm_l2();
            (e, r)
        };
        let worse = |(e, r): (f64, f64)| e.max(r);
        let m0 = measure(&qf);
        match super::refine::joint_correction(&af, &bf, &qf, nc) {
            Some(qj) if worse(measure(&qj)) < worse(m0) => super::from_faer(qj.as_ref()),
            _ => q0,
        }
    };
    let q1 = super::columns(&q0, 0, nc);
    let q2 = super::columns(&q0, nc, n);
    // the controllable part and its own staircase, thresholds from the whole pair
    let a11 = q1.transpose().matmul(a).matmul(&q1);
    let b1 = q1.transpose().matmul(b);
    let c1 = c.map(|c| c.matmul(&q1));
    let inner = staircase_with(
        &a11,
        &b1,
        c1.as_ref(),
        Tolerance::Relative(f0),
        Some((a, b)),
    )?;
    let qc = q1.matmul(&inner.q);
    let k = inner.rank;
    let reduced = StateSpace {
        a: leading_block(&inner.a, k, k),
        b: leading_block(&inner.b, k, b.cols()),
        c: super::columns(&qc, 0, k),
        d: Matrix::zeros(n, b.cols()),
    };
    let full = StateSpace {
        a: a.clone(),
        b: b.clone(),
        c: Matrix::identity(n),
        d: Matrix::zeros(n, b.cols()),
    };
    if super::verify::markov_residual(&full, &reduced) > super::verify::markov_tolerance(n) {
        return Ok(None);
    }
    // assemble Q = [Q_1 Q_c, Q_2] and the transformed matrices
    let q = super::hstack(&[&qc, &q2], n);
    let mut ta = q.transpose().matmul(a).matmul(&q);
    let mut tb = q.transpose().matmul(b);
    let coupling: Vec<f64> = (nc..n)
        .flat_map(|i| (0..nc).map(move |j| (i, j)))
        .map(|(i, j)| *ta.get(i, j))
        .collect();
    let coupling_norm = crate::matrix::frobenius_norm(&coupling);
    for i in 0..nc {
        for j in 0..nc {
            ta.set(i, j, *inner.a.get(i, j));
        }
        for j in 0..b.cols() {
            tb.set(i, j, *inner.b.get(i, j));
        }
    }
    for i in nc..n {
        for j in 0..nc {
            ta.set(i, j, 0.0);
        }
        for j in 0..b.cols() {
            tb.set(i, j, 0.0);
        }
    }
    let tc = c.map(|c| c.matmul(&q));
    let mut steps = inner.steps.clone();
    let na = frobenius(a);
    steps.push(StepRecord {
        singular_values: vec![coupling_norm],
        kept: 0,
        threshold: coupling_norm.max(st.tol),
        backward_error: if coupling_norm == 0.0 {
            0.0
        } else {
            coupling_norm / na
        },
    });
    let mut out = Staircase {
        a: ta,
        b: tb,
        c: tc,
        q,
        blocks: inner.blocks.clone(),
        rank: k,
        steps,
        tol: st.tol,
        split_residual: [0.0, 0.0],
    };
    out.split_residual = split_residual(a, &b_hat, &out);
    Ok(Some(out))
}

/// An eigendecomposition of `Aᵀ` (right eigenvectors as columns, eigenvalues).
type Eigen = std::rc::Rc<(Mat<faer::c64>, Vec<faer::c64>)>;

/// The cache: the depth of nested [`with_eigen_cache`] calls and the (matrix, result) pairs.
type EigenCache = (usize, Vec<(Matrix<f64>, Eigen)>);

/// At most this many eigendecompositions are kept within one call.
const EIGEN_CACHE_SIZE: usize = 4;

thread_local! {
    /// Eigendecompositions computed within the current top-level call ([`with_eigen_cache`]),
    /// keyed by the exact bits of the matrix: the candidate search, the rank guards and the
    /// Kalman decomposition's passes meet the same A (or Aᵀ) several times, and an
    /// eigendecomposition is a pure function of its input, so a repeat is looked up
    /// instead of recomputed (no decision changes).
    static EIGEN_CACHE: std::cell::RefCell<EigenCache> =
        const { std::cell::RefCell::new((0, Vec::new())) };
}

/// Runs `f` with the eigendecomposition cache active (nested calls share it); the cache is
/// emptied when the outermost call returns.
pub(crate) fn with_eigen_cache<R>(f: impl FnOnce() -> R) -> R {
    struct Scope;
    impl Drop for Scope {
        fn drop(&mut self) {
            EIGEN_CACHE.with(|c| {
                let mut c = c.borrow_mut();
                c.0 -= 1;
                if c.0 == 0 {
                    c.1.clear();
                }
            });
        }
    }
    EIGEN_CACHE.with(|c| c.borrow_mut().0 += 1);
    let _scope = Scope;
    f()
}

/// The eigendecomposition of `aᵀ` (faer), looked up in the cache of the current call when
/// one is active; `None` when it fails.
fn eigen_of_transpose(a: &Matrix<f64>) -> Option<Eigen> {
    let active = EIGEN_CACHE.with(|c| {
        let c = c.borrow();
        if c.0 == 0 {
            return None;
        }
        let same = |m: &Matrix<f64>| {
            m.rows() == a.rows()
                && m.as_slice()
                    .iter()
                    .zip(a.as_slice())
                    .all(|(x, y)| x.to_bits() == y.to_bits())
        };
        Some(c.1.iter().find(|(m, _)| same(m)).map(|(_, e)| e.clone()))
    });
    if let Some(Some(hit)) = active {
        return Some(hit);
    }
    let eig = super::to_faer(&a.transpose()).eigen().ok()?;
    let out: Eigen = std::rc::Rc::new((
        eig.U().to_owned(),
        (0..a.rows()).map(|i| eig.S().column_vector()[i]).collect(),
    ));
    if active.is_some() {
        EIGEN_CACHE.with(|c| {
            let mut c = c.borrow_mut();
            if c.1.len() == EIGEN_CACHE_SIZE {
                c.1.remove(0);
            }
            c.1.push((a.clone(), out.clone()));
        });
    }
    Some(out)
}

fn leading_block(m: &Matrix<f64>, rows: usize, cols: usize) -> Matrix<f64> {
    Matrix::from_row_major(
        rows,
        cols,
        (0..rows * cols)
            .map(|x| *m.get(x / cols, x % cols))
            .collect(),
    )
    .expect("block")
}

/// The controllability staircase with the decisions judged by `t`.
///
/// `reference`: for a pass on a part of a model (the controllable part, say), the model's
/// own (A, B): the relative thresholds and the input balancing are taken from it, not
/// from the part, whose blocks may be rounding noise of the earlier reduction.
pub fn staircase_with(
    a: &Matrix<f64>,
    b: &Matrix<f64>,
    c: Option<&Matrix<f64>>,
    t: Tolerance,
    reference: Option<(&Matrix<f64>, &Matrix<f64>)>,
) -> Result<Staircase> {
    check_pair(a, b, c)?;
    let s_ab = range_scale(&[a, b]);
    let s_c = c.map_or(1.0, |c| range_scale(&[c]));
    let (a_s, b_s, c_s) = (scaled(a, s_ab), scaled(b, s_ab), c.map(|c| scaled(c, s_c)));
    let (ref_a, ref_b) = match reference {
        Some((ra, rb)) => (scaled(ra, s_ab), scaled(rb, s_ab)),
        None => (a_s.clone(), b_s.clone()),
    };
    // Input balancing (default only): the columns of B to one exponent, exactly.
    let e = match t {
        Tolerance::Relative(_) => column_exponents(&ref_b),
        Tolerance::Absolute(_) => vec![0; b.cols()],
    };
    let b_hat = scale_columns(&b_s, &e, 1);
    let (tol_first, tol_later) = match t {
        Tolerance::Absolute(x) => (x * s_ab, x * s_ab),
        Tolerance::Relative(f) => (
            scaled_frobenius_norm(f, scale_columns(&ref_b, &e, 1).as_slice()),
            scaled_frobenius_norm(f, ref_a.as_slice()),
        ),
    };
    let mut st = reduce(&a_s, &b_hat, c_s.as_ref(), tol_first, tol_later)?;
    st.split_residual = split_residual(&a_s, &b_hat, &st);
    st.b = scale_columns(&st.b, &e, -1);
    st.a = unscaled(st.a, s_ab, "the transformed A of the staircase form")?;
    st.b = unscaled(st.b, s_ab, "the transformed B of the staircase form")?;
    st.c =
        st.c.map(|c| unscaled(c, s_c, "the transformed C of the staircase form"))
            .transpose()?;
    for step in &mut st.steps {
        step.singular_values.iter_mut().for_each(|v| *v /= s_ab);
        step.threshold /= s_ab;
        require_representable(
            &step.singular_values,
            "the singular values of a staircase step",
        )?;
    }
    st.tol = match t {
        Tolerance::Absolute(x) => x,
        Tolerance::Relative(_) => st.tol / s_ab,
    };
    Ok(st)
}

/// `‖(Qᵀ A Q)_21‖_F / ‖A‖_F` and `‖(Qᵀ B)_2‖_F / ‖B‖_F` for the returned Q (0 for 0/0).
fn split_residual(a: &Matrix<f64>, b: &Matrix<f64>, st: &Staircase) -> [f64; 2] {
    let (n, k) = (a.rows(), st.rank);
    if k == n {
        return [0.0, 0.0];
    }
    let q = super::to_faer(&st.q);
    let (q1, q2) = (q.subcols(0, k), q.subcols(k, n - k));
    let a21 = q2.transpose() * super::to_faer(a) * q1;
    let b2 = q2.transpose() * super::to_faer(b);
    let rel = |num: f64, den: f64| if num == 0.0 { 0.0 } else { num / den };
    [
        rel(a21.norm_l2(), frobenius(a)),
        rel(b2.norm_l2(), frobenius(b)),
    ]
}

/// One staircase reduction with step sizes decided by `tol`.
fn reduce(
    a: &Matrix<f64>,
    b: &Matrix<f64>,
    c: Option<&Matrix<f64>>,
    tol_first: f64,
    tol_later: f64,
) -> Result<Staircase> {
    let (norm_b, norm_a) = (frobenius(b), frobenius(a));
    let (n, m) = (a.rows(), b.cols());
    let (mut a, mut b, mut c) = (a.clone(), b.clone(), c.cloned());
    let mut q = Matrix::identity(n);
    let (mut blocks, mut steps) = (Vec::new(), Vec::new());
    let mut reached = 0; // states already in the staircase
    let mut prev = 0; // first column of the last step's block
    while reached < n {
        let rows = n - reached;
        let first = blocks.is_empty();
        let width = if first { m } else { reached - prev };
        if width == 0 {
            break;
        }
        let source = if first { &b } else { &a };
        let col0 = if first { 0 } else { prev };
        let (sigma, u) = thin_svd(rows, width, |i, j| *source.get(reached + i, col0 + j))?;
        let (tol, scale) = if first {
            (tol_first, norm_b)
        } else {
            (tol_later, norm_a)
        };
        let r = sigma.iter().filter(|&&s| s > tol).count();
        let dropped = crate::matrix::frobenius_norm(&sigma[r..]);
        steps.push(StepRecord {
            singular_values: sigma,
            kept: r,
            threshold: tol,
            backward_error: if dropped == 0.0 { 0.0 } else { dropped / scale },
        });

        // Reflections taking span(U_r) onto the first r axes of the remaining states.
        let mut basis =
            Matrix::from_row_major(rows, r, (0..rows * r).map(|k| u[(k / r, k % r)]).collect())
                .expect("rows x r");
        for j in 0..r {
            let x: Vec<f64> = (j..rows).map(|i| *basis.get(i, j)).collect();
            let local = Reflector::annihilating(j, &x);
            local.apply_left(&mut basis);
            let h = Reflector {
                offset: reached + j,
                ..local
            };
            h.apply_left(&mut a);
            h.apply_right(&mut a);
            h.apply_left(&mut b);
            if let Some(c) = c.as_mut() {
                h.apply_right(c);
            }
            h.apply_right(&mut q);
        }
        // What lies below the rank decision is at most tol in norm: make it exactly zero.
        let target = if first { &mut b } else { &mut a };
        for i in reached + r..n {
            for j in col0..col0 + width {
                target.set(i, j, 0.0);
            }
        }
        if r == 0 {
            break;
        }
        blocks.push(r);
        prev = reached;
        reached += r;
    }
    Ok(Staircase {
        a,
        b,
        c,
        q,
        rank: reached,
        blocks,
        steps,
        tol: tol_later,
        split_residual: [0.0, 0.0],
    })
}

/// The observability staircase: `Qᵀ A Q = [[A_o, 0], [A_21, A_u]]`, `C Q = [C_o, 0]`, by
/// duality (the controllability staircase of `(Aᵀ, Cᵀ)`, transposed). The default tol is
/// the dual one: the first step against `n² eps ‖Ĉ‖_F` (`C` with its rows scaled by powers
/// of two to the exponent of the largest row norm), later steps against `n² eps ‖A‖_F`.
pub fn observability_staircase(
    a: &Matrix<f64>,
    b: Option<&Matrix<f64>>,
    c: &Matrix<f64>,
    tol: Option<f64>,
) -> Result<Staircase> {
    let b = b.cloned().unwrap_or_else(|| Matrix::zeros(a.rows(), 0));
    // Check in the caller's orientation so messages name the caller's arguments.
    check_pair(a, &b, Some(c))?;
    let dual =
        controllability_staircase(&a.transpose(), &c.transpose(), Some(&b.transpose()), tol)?;
    Ok(transpose_dual(dual))
}

/// The observability staircase with the decisions judged by `t` (the dual of
/// [`staircase_with`]; the default balances the rows of C), followed under a relative
/// (default) tolerance by the eigenvector-guided split of the dual (the PBH eigenvector
/// test with right eigenvectors and C), verified as for controllability: the observability
/// passes of the minimal realization and the Kalman decomposition meet the same long weak
/// chains.
pub fn observability_with(
    a: &Matrix<f64>,
    b: Option<&Matrix<f64>>,
    c: &Matrix<f64>,
    t: Tolerance,
    reference: Option<(&Matrix<f64>, &Matrix<f64>)>,
) -> Result<Staircase> {
    let b = b.cloned().unwrap_or_else(|| Matrix::zeros(a.rows(), 0));
    check_pair(a, &b, Some(c))?;
    let (at, ct, bt) = (a.transpose(), c.transpose(), b.transpose());
    let reference = reference.map(|(ra, rc)| (ra.transpose(), rc.transpose()));
    let dual = staircase_with(
        &at,
        &ct,
        Some(&bt),
        t,
        reference.as_ref().map(|(ra, rc)| (ra, rc)),
    )?;
    Ok(transpose_dual(with_eigenvector_split(
        &at,
        &ct,
        Some(&bt),
        t,
        dual,
    )?))
}

/// `st` (a staircase of `(a, b)` judged by `t`) replaced by its eigenvector-guided split
/// ([`eigenvector_split`]) under a relative, nonzero tolerance when the split is found and
/// verified; otherwise `st` itself.
pub(crate) fn with_eigenvector_split(
    a: &Matrix<f64>,
    b: &Matrix<f64>,
    c: Option<&Matrix<f64>>,
    t: Tolerance,
    st: Staircase,
) -> Result<Staircase> {
    Ok(match t {
        Tolerance::Relative(f) if f > 0.0 => eigenvector_split(a, b, c, f, &st)?.unwrap_or(st),
        _ => st,
    })
}

/// The observability form from the controllability staircase of the dual.
fn transpose_dual(dual: Staircase) -> Staircase {
    Staircase {
        a: dual.a.transpose(),
        b: dual.c.map(|x| x.transpose()).expect("carried along"),
        c: Some(dual.b.transpose()),
        q: dual.q,
        blocks: dual.blocks,
        rank: dual.rank,
        steps: dual.steps,
        tol: dual.tol,
        split_residual: dual.split_residual,
    }
}

/// True when the staircase reaches every state.
pub fn is_controllable(a: &Matrix<f64>, b: &Matrix<f64>, tol: Option<f64>) -> Result<bool> {
    Ok(controllability_staircase(a, b, None, tol)?.rank == a.rows())
}

/// True when the dual staircase reaches every state.
pub fn is_observable(a: &Matrix<f64>, c: &Matrix<f64>, tol: Option<f64>) -> Result<bool> {
    Ok(observability_staircase(a, None, c, tol)?.rank == a.rows())
}

/// The leading `k × k`, `k × m`, `p × k` parts (the reduced subsystem after a staircase).
pub(crate) fn leading_part(
    a: &Matrix<f64>,
    b: &Matrix<f64>,
    c: &Matrix<f64>,
    k: usize,
) -> (Matrix<f64>, Matrix<f64>, Matrix<f64>) {
    let sub = |m: &Matrix<f64>, rows: usize, cols: usize| {
        Matrix::from_row_major(
            rows,
            cols,
            (0..rows * cols)
                .map(|x| *m.get(x / cols, x % cols))
                .collect(),
        )
        .expect("sub")
    };
    (sub(a, k, k), sub(b, k, b.cols()), sub(c, c.rows(), k))
}

#[cfg(test)]
mod tests {
    use super::*;

    const BIG: f64 = f64::MAX;

    fn m(r: usize, c: usize, v: &[f64]) -> Matrix<f64> {
        Matrix::from_row_major(r, c, v.to_vec()).unwrap()
    }

    #[test]
    fn entries_at_the_top_of_the_range_give_finite_exact_results() {
        // A = 0, B = e_8, C = [MAX; 8]: the one reflection swaps e_1 and −e_8, so C Q is a
        // signed permutation of C (identity), finite although C e_1 + C e_8 overflows.
        let n = 8;
        let a = Matrix::zeros(n, n);
        let mut bv = vec![0.0; n];
        bv[n - 1] = 1.0;
        let b = m(n, 1, &bv);
        let c = m(1, n, &[BIG; 8]);
        let s = controllability_staircase(&a, &b, Some(&c), None).unwrap();
        let cq = s.c.unwrap();
        assert!(cq.as_slice().iter().all(|v| v.abs() == BIG), "{cq:?}");
        assert_eq!(s.rank, 1);
    }

    #[test]
    fn default_tol_is_finite_when_the_norm_is_not() {
        // ‖A‖_F = √2 · MAX overflows; n² eps ‖A‖_F = 4 · 2.2e-16 · 2.5e308 does not.
        let a = m(2, 2, &[BIG, BIG, 0.0, 0.0]);
        let b = Matrix::zeros(2, 0);
        let s = controllability_staircase(&a, &b, None, None).unwrap();
        let expected = 4.0 * f64::EPSILON * BIG * 2f64.sqrt();
        assert!(
            (s.tol - expected).abs() <= 1e-15 * expected,
            "{} vs {}",
            s.tol,
            expected
        );
    }

    #[test]
    fn scaling_changes_no_decision() {
        // (identity) the staircase of (2^k A, 2^k B) is that of (A, B) scaled by 2^k.
        let a = m(3, 3, &[1.0, 2.0, 0.0, -1.0, 0.5, 3.0, 0.0, 0.25, -2.0]);
        let b = m(3, 1, &[1.0, 0.0, 1.0]);
        let c = m(1, 3, &[0.0, 1.0, -1.0]);
        let k = 2f64.powi(700);
        let plain = controllability_staircase(&a, &b, Some(&c), None).unwrap();
        let big = controllability_staircase(
            &a.map(|v| v * k),
            &b.map(|v| v * k),
            Some(&c.map(|v| v / k)),
            None,
        )
        .unwrap();
        assert_eq!(plain.q, big.q);
        assert_eq!(plain.blocks, big.blocks);
        assert_eq!(plain.a.map(|v| v * k), big.a);
        assert_eq!(plain.c.unwrap().map(|v| v / k), big.c.unwrap());
        assert_eq!(plain.tol * k, big.tol);
    }

    #[test]
    fn the_eigendecomposition_cache_returns_what_a_fresh_computation_does() {
        // (identity) an eigendecomposition is a pure function of its input: within one call
        // a repeat is the cached result, bit for bit the fresh one; outside a call nothing
        // is kept.
        let a = m(3, 3, &[1.0, 2.0, 0.0, -1.0, 0.5, 3.0, 0.0, 0.25, -2.0]);
        let fresh = eigen_of_transpose(&a).unwrap();
        let (first, second) = with_eigen_cache(|| {
            (
                eigen_of_transpose(&a).unwrap(),
                eigen_of_transpose(&a).unwrap(),
            )
        });
        assert!(std::rc::Rc::ptr_eq(&first, &second));
        assert_eq!(fresh.1, first.1);
        for j in 0..3 {
            for i in 0..3 {
                assert_eq!(fresh.0[(i, j)], first.0[(i, j)]);
            }
        }
        EIGEN_CACHE.with(|c| assert!(c.borrow().0 == 0 && c.borrow().1.is_empty()));
    }

    #[test]
    fn an_unrepresentable_result_is_refused_not_infinite() {
        // B = [MAX, MAX]ᵀ: the first step's singular value is √2 · MAX, beyond the range.
        let a = Matrix::zeros(2, 2);
        let b = m(2, 1, &[BIG, BIG]);
        match controllability_staircase(&a, &b, None, None) {
            Err(ModelError::Overflow { .. }) => {}
            other => panic!("expected Overflow, got {other:?}"),
        }
    }
}
