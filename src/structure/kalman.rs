//! Kalman decomposition into controllable/observable parts.
//!
//! # Purpose
//! A nonsingular `T = [X_1, X_2, X_3, X_4]` with `T⁻¹ A T` of the pattern
//! `[[A11, 0, A13, 0], [A21, A22, A23, A24], [0, 0, A33, 0], [0, 0, A43, A44]]`,
//! `T⁻¹ B = [B1; B2; 0; 0]`, `C T = [C1, 0, C3, 0]`: part 1 controllable and observable,
//! 2 controllable and unobservable, 3 uncontrollable and observable, 4 uncontrollable and
//! unobservable. `(A11, B1, C1, D)` is a minimal realization.
//!
//! # Method
//! The rank decisions and subspaces come from the model balanced by a diagonal power-of-two
//! similarity (exact; it shrinks the rounding errors of companion-like models), mapped back
//! and re-orthonormalised in the caller's coordinates.
//! From orthonormal bases of three subspaces, each found by staircase passes:
//! the controllable subspace R (controllability staircase), R ∩ N (the unobservable
//! subspace of the controllable part, by an observability staircase on that part; since R
//! is A-invariant this is exactly R ∩ N) and the unobservable subspace N (observability
//! staircase). `X_1 = R ⊖ (R∩N)`, `X_2 = R∩N`, `X_4 = N ⊖ (R∩N)` (the part of N orthogonal
//! to X_2, from an SVD) and `X_3 = (R + N)^⊥` (the orthogonal complement of the others, from
//! an SVD). The pattern follows from the invariance of R, N and R∩N under A, `B ⊂ R` and
//! `C N = 0`. Each block of T is orthonormal; T itself is not orthogonal in general (R and
//! N need not be orthogonal), and no orthogonal T reaches this pattern in general.
//!
//! # Numerical aspects
//! Rank decisions as in [`super::minimal`]: by default scale invariant (each staircase step
//! against the norm of its own data block of the balanced model, `n² eps ‖B̂‖_F` at the
//! first controllability step, `n² eps ‖Ĉ‖_F` at the first observability step,
//! `n² eps ‖A‖_F` later; B̂, Ĉ with columns / rows scaled by powers of two to one exponent);
//! an explicit tol is absolute, on the balanced model. The transformed matrices are computed
//! with an LU solve with T; the entries the pattern says are zero are set to zero and the
//! largest of them (relative to ‖A‖, ‖B‖, ‖C‖) is reported, as is the 2-norm condition
//! number of T, which bounds how much the solve can amplify rounding errors.
//!
//! Verification: the pattern residual, the relative norms of the parts of B and C set to
//! zero, and the Markov-parameter residual of the minimal part `(A11, B1, C1)` against the
//! model ([`super::verify`]). Under the default a result is accepted when the pattern
//! residual is at most `100 n eps max(1, cond T)` and the Markov residual at most
//! `200 n² eps`; candidate factors between `n² eps` and `sqrt(eps)` are tried first (the
//! factor found by the minimal realization's search, then the kept singular values of each
//! passing result; the smallest minimal part that passes wins), then the default, then
//! exact zeros only
//! (tol 0); if none passes the call is refused with `Unverified`, and so is a result whose
//! minimal part keeps more states than the verified minimal realization of the same model,
//! or whose controllable or observable dimension differs from the default staircase of the
//! whole model (its sizes would be wrong although its response is right). The default
//! minimal realization of the same balanced model is computed once: its two passes at `n² eps`
//! are the decomposition's first two there, and its rank guard (the default observability
//! staircase of the whole model) is the observable dimension checked here, so neither is
//! recomputed. With an explicit tol the
//! result is refused when more than half of B or of C (in Frobenius norm) would be set to
//! zero or the minimal part's Markov residual exceeds 1/2: B is never zeroed silently.
//!
//! # References
//! R. E. Kalman, SIAM J. Control 1 (1963); E. G. Gilbert, "Controllability and
//! observability in multivariable control systems", SIAM J. Control 1 (1963);
//! P. Van Dooren, IEEE Trans. Automat. Control 26 (1981).

use super::minimal::check_model;
use super::minimal::{candidate_factors, MAX_TRIES};
use super::staircase::{
    check_tol, default_factor, frobenius, leading_part, observability_with, staircase_with,
    Staircase, Tolerance,
};
use super::verify::{markov_residual, markov_tolerance};
use super::{columns, condition_number, from_faer, hstack, to_faer};
use crate::balance::balance_model;
use crate::error::{ModelError, Result};
use crate::matrix::Matrix;
use crate::state_space::StateSpace;
use faer::prelude::*;

pub struct KalmanDecomposition {
    pub realization: StateSpace<f64>,
    pub t: Matrix<f64>,
    /// Dimensions of parts 1..4.
    pub sizes: [usize; 4],
    /// 2-norm condition number of T.
    pub condition: f64,
    /// Largest entry set to zero by the pattern, relative to the norm of its matrix.
    pub pattern_residual: f64,
    /// Frobenius norms of the parts of `T⁻¹ B` and `C T` set to zero, relative to ‖B‖_F, ‖C‖_F.
    pub zeroed_b: f64,
    pub zeroed_c: f64,
    /// Markov-parameter residual of the minimal part against the model.
    pub markov_residual: f64,
    /// Singular values, thresholds and backward errors of the three staircases
    /// (controllable subspace, unobservable part of it, unobservable subspace).
    pub staircases: [super::staircase::Staircase; 3],
    /// The relative factor of the decisions (NaN for an explicit tol).
    pub factor: f64,
}

/// The first `k` left singular vectors of `m` (an orthonormal basis of its dominant range).
fn leading_left_vectors(m: &Matrix<f64>, k: usize) -> Result<Matrix<f64>> {
    if k == 0 || m.cols() == 0 {
        return Ok(Matrix::zeros(m.rows(), 0));
    }
    let svd = to_faer(m).svd().map_err(|_| ModelError::NoConvergence {
        routine: "the SVD in the Kalman decomposition",
    })?;
    Ok(columns(&from_faer(svd.U()), 0, k))
}

/// An orthonormal basis of the orthogonal complement of the columns of `w` (full column rank).
fn complement(w: &Matrix<f64>) -> Result<Matrix<f64>> {
    let n = w.rows();
    if w.cols() == 0 {
        return Ok(Matrix::identity(n));
    }
    let svd = to_faer(w).svd().map_err(|_| ModelError::NoConvergence {
        routine: "the SVD in the Kalman decomposition",
    })?;
    Ok(columns(&from_faer(svd.U()), w.cols().min(n), n))
}

pub fn kalman_decomposition(ss: &StateSpace<f64>, tol: Option<f64>) -> Result<KalmanDecomposition> {
    super::staircase::with_eigen_cache(|| kalman_decomposition_in(ss, tol))
}

fn kalman_decomposition_in(ss: &StateSpace<f64>, tol: Option<f64>) -> Result<KalmanDecomposition> {
    check_model(ss)?;
    check_tol(tol)?;
    let n = ss.n_states();
    // Decisions on the balanced model (exact power-of-two scaling: smaller rounding errors
    // for badly scaled models such as companion forms); geometry back in the caller's
    // coordinates.
    let (bal, scale) = balance_model(ss);
    if let Some(x) = tol {
        let k = decompose(ss, &bal, &scale, Tolerance::Absolute(x), None)?;
        if k.zeroed_b > 0.5 || k.zeroed_c > 0.5 || k.markov_residual > 0.5 {
            return Err(ModelError::Unverified {
                what: "the Kalman decomposition",
                detail: format!(
                    "at tol={x:.3e} the decomposition would set {:.3} of B and {:.3} of C (relative \
                     Frobenius norms) to zero and its minimal part's Markov parameters differ by {:.3e} \
                     relative: tol is above the scale of the data; pass a smaller tol or none",
                    k.zeroed_b, k.zeroed_c, k.markov_residual
                ),
            });
        }
        return Ok(k);
    }
    let f0 = default_factor(n);
    let vt = markov_tolerance(n);
    let passes = |k: &KalmanDecomposition| {
        k.markov_residual <= vt
            && k.pattern_residual <= 100.0 * n as f64 * f64::EPSILON * k.condition.max(1.0)
    };
    // The default minimal realization works on the same balanced model: its passes at the
    // default factor are the first two of the default decomposition, and its rank guard is
    // the observability staircase the consistency check below needs.
    let (minimal, mut shared) = super::minimal::minimal_default(&bal);
    let k0 = decompose(
        ss,
        &bal,
        &scale,
        Tolerance::Relative(f0),
        shared.at_default.take(),
    )?;
    let (p0, m0, c0) = (k0.pattern_residual, k0.markov_residual, k0.condition);
    let mut frontier = {
        let [a, b, c] = &k0.staircases;
        candidate_factors(&[a, b, c], f0)
    };
    // The factor the minimal realization's search settled on decides the controllable and
    // the observable part together; try it first (three separate passes at a factor
    // between two rounding-level values can disagree).
    let mut minimal_order = None;
    if let Ok(m) = minimal {
        minimal_order = Some(m.realization.n_states());
        if m.factor > f0 {
            frontier.insert(0, m.factor);
        }
    }
    // A decomposition whose minimal part keeps more states than the verified minimal
    // realization has missed part of the structure (its Markov check cannot see that:
    // extra states never spoil the response), so its sizes would be a wrong answer.
    // The same holds for the controllable and the observable dimension against the
    // default staircases of the whole balanced model (verified searches of their own).
    let controllable = super::staircase::controllability_staircase(&bal.a, &bal.b, None, None)
        .map(|s| s.rank)
        .ok();
    let observable = shared.observable_rank(&bal);
    let consistent = |k: KalmanDecomposition| -> Result<KalmanDecomposition> {
        let [co, cu, uo, _] = k.sizes;
        let mismatch = match (minimal_order, controllable, observable) {
            (Some(order), _, _) if co > order => Some(format!(
                "its controllable and observable part has {co} states where the verified \
                 minimal realization has {order}"
            )),
            (_, Some(r), _) if co + cu != r => Some(format!(
                "its controllable part has {} states where the controllability staircase \
                 finds {r}",
                co + cu
            )),
            (_, _, Some(r)) if co + uo != r => Some(format!(
                "its observable part has {} states where the observability staircase finds {r}",
                co + uo
            )),
            _ => None,
        };
        match mismatch {
            Some(what) => Err(ModelError::Unverified {
                what: "the Kalman decomposition",
                detail: format!(
                    "{what}: the default decisions missed part of the structure (the response \
                     check cannot see kept states); pass an explicit tol"
                ),
            }),
            None => Ok(k),
        }
    };
    let mut best = passes(&k0).then_some(k0);
    let mut tries = 0;
    while !frontier.is_empty() && tries < MAX_TRIES {
        let f = frontier.remove(0);
        tries += 1;
        if let Ok(k) = decompose(ss, &bal, &scale, Tolerance::Relative(f), None) {
            if passes(&k) {
                let [a, b, c] = &k.staircases;
                frontier = candidate_factors(&[a, b, c], f);
                if best.as_ref().is_none_or(|b| k.sizes[0] < b.sizes[0]) {
                    best = Some(k);
                }
            }
        }
    }
    if let Some(b) = best {
        return consistent(b);
    }
    // The default result fails the check: keep every state that is not decided by an
    // exact zero, if that passes.
    if let Ok(keep) = decompose(ss, &bal, &scale, Tolerance::Relative(0.0), None) {
        if passes(&keep) {
            return consistent(keep);
        }
    }
    Err(ModelError::Unverified {
        what: "the Kalman decomposition",
        detail: format!(
            "the decomposition at the default tol fails its check (pattern residual {:.3e}, \
             Markov residual of the minimal part {:.3e}; thresholds {:.3e}, {vt:.3e}) and so does \
             the one by exact zeros only; pass an explicit tol",
            p0,
            m0,
            100.0 * n as f64 * f64::EPSILON * c0.max(1.0)
        ),
    })
}

/// One decomposition with the decisions judged by `t` (on the balanced model `bal`, whose
/// diagonal similarity is `scale`). `reuse`: the controllability staircase and the
/// observability staircase of its controllable part at `t`, when already computed (by the
/// default minimal realization of `bal`, with the same calls).
fn decompose(
    ss: &StateSpace<f64>,
    bal: &StateSpace<f64>,
    scale: &[f64],
    t: Tolerance,
    reuse: Option<(Staircase, Staircase)>,
) -> Result<KalmanDecomposition> {
    let n = ss.n_states();
    let factor = match t {
        Tolerance::Relative(f) => f,
        Tolerance::Absolute(_) => f64::NAN,
    };
    let at = match t {
        Tolerance::Absolute(x) => format!("tol={x:.3e}"),
        Tolerance::Relative(f) => format!("the default tol (relative factor {f:.3e})"),
    };
    let (sc, so) = match reuse {
        Some(pair) => pair,
        None => {
            let sc = staircase_with(&bal.a, &bal.b, Some(&bal.c), t, None)?;
            // the eigenvector-guided split of the default (PBH test, verified; see the staircase)
            let sc = super::staircase::with_eigenvector_split(&bal.a, &bal.b, Some(&bal.c), t, sc)?;
            let (a1, b1, c1) = leading_part(&sc.a, &sc.b, sc.c.as_ref().expect("carried"), sc.rank);
            let so = observability_with(&a1, Some(&b1), &c1, t, Some((&bal.a, &bal.c)))?;
            (sc, so)
        }
    };
    let nc = sc.rank;
    let r_basis = columns(&sc.q, 0, nc);
    let k1 = so.rank;
    let x2_balanced = r_basis.matmul(&columns(&so.q, so.rank, nc));

    let full_o = observability_with(&bal.a, Some(&bal.b), &bal.c, t, None)?;
    let n_balanced = columns(&full_o.q, full_o.rank, n);
    // In exact arithmetic R∩N ⊂ N and R + N fits in n dimensions. Three separate rank
    // decisions can disagree when a singular value sits near tol; then no consistent
    // decomposition exists at this tol, and saying so beats a wrong split.
    let (k2, dim_n) = (x2_balanced.cols(), n_balanced.cols());
    if k2 > dim_n || k1 + dim_n > n {
        return Err(ModelError::BadValue {
            arg: "tol",
            detail: format!(
                "the rank decisions disagree at {at}: the controllable part ({nc} states) has \
                 {k2} unobservable states but the whole model has {dim_n} (and {k1} controllable, observable \
                 ones); a singular value lies close to tol: inspect the staircase margins and pass a tol \
                 inside their gap"
            ),
        });
    }
    let k4 = dim_n - k2;
    let unscale = |m: &Matrix<f64>| -> Result<Matrix<f64>> {
        let mut x = m.clone();
        for i in 0..x.rows() {
            for j in 0..x.cols() {
                x.set(i, j, x.get(i, j) * scale[i]);
            }
        }
        leading_left_vectors(&x, m.cols())
    };
    let r_orig = unscale(&r_basis)?;
    let x2 = unscale(&x2_balanced)?;
    let n_orig = unscale(&n_balanced)?;
    // X_1 = R ⊖ (R∩N) and X_4 = N ⊖ (R∩N): remove the X_2 components, keep the dominant directions.
    let without_x2 = |m: &Matrix<f64>| {
        let along = x2.matmul(&x2.transpose().matmul(m));
        let mut p = m.clone();
        for (v, w) in p.as_mut_slice().iter_mut().zip(along.as_slice()) {
            *v -= w;
        }
        p
    };
    let x1 = leading_left_vectors(&without_x2(&r_orig), k1)?;
    let x4 = leading_left_vectors(&without_x2(&n_orig), k4)?;
    let x3 = complement(&hstack(&[&x1, &x2, &x4], n))?;
    let sizes = [x1.cols(), x2.cols(), x3.cols(), x4.cols()];
    let t = hstack(&[&x1, &x2, &x3, &x4], n);
    let condition = condition_number(&t)?;
    if !condition.is_finite() || condition > 1.0 / f64::EPSILON {
        return Err(ModelError::BadValue {
            arg: "tol",
            detail: format!(
                "the subspaces found are numerically dependent (condition number of T {condition:.3e}); \
                 the rank decisions are too close to call at this tol"
            ),
        });
    }

    let (mut a, mut b, mut c) = if n == 0 {
        (ss.a.clone(), ss.b.clone(), ss.c.clone())
    } else {
        let lu = to_faer(&t).partial_piv_lu();
        let at = lu.solve(to_faer(&ss.a.matmul(&t)));
        let bt = lu.solve(to_faer(&ss.b));
        (
            from_faer(at.as_ref()),
            from_faer(bt.as_ref()),
            ss.c.matmul(&t),
        )
    };
    // Zero what the pattern says is zero, and report the largest such entry.
    let [k1, k2, k3, _] = sizes;
    let part = |i: usize| {
        if i < k1 {
            0
        } else if i < k1 + k2 {
            1
        } else if i < k1 + k2 + k3 {
            2
        } else {
            3
        }
    };
    let a_zero = |pi: usize, pj: usize| match pj {
        0 => pi >= 2,
        1 => pi != 1,
        2 => false,
        _ => pi == 0 || pi == 2,
    };
    let mut residual: f64 = 0.0;
    let (mut zb, mut zc): (f64, f64) = (0.0, 0.0);
    let (na, nb, nc_norm) = (
        frobenius(&ss.a).max(f64::MIN_POSITIVE),
        frobenius(&ss.b).max(f64::MIN_POSITIVE),
        frobenius(&ss.c).max(f64::MIN_POSITIVE),
    );
    for i in 0..n {
        for j in 0..n {
            if a_zero(part(i), part(j)) {
                residual = residual.max(a.get(i, j).abs() / na);
                a.set(i, j, 0.0);
            }
        }
        if part(i) >= 2 {
            for j in 0..b.cols() {
                residual = residual.max(b.get(i, j).abs() / nb);
                zb = zb.hypot(*b.get(i, j)); // a 2-norm that cannot overflow
                b.set(i, j, 0.0);
            }
        }
    }
    for i in 0..c.rows() {
        for j in 0..n {
            if part(j) == 1 || part(j) == 3 {
                residual = residual.max(c.get(i, j).abs() / nc_norm);
                zc = zc.hypot(*c.get(i, j));
                c.set(i, j, 0.0);
            }
        }
    }
    if [&a, &b, &c]
        .iter()
        .any(|m| m.as_slice().iter().any(|v| !v.is_finite()))
    {
        return Err(ModelError::Overflow {
            what: "the Kalman decomposition".into(),
        });
    }
    let realization = StateSpace {
        a,
        b,
        c,
        d: ss.d.clone(),
    };
    let k = sizes[0];
    let (a11, b11, c11) = leading_part(&realization.a, &realization.b, &realization.c, k);
    let minimal = StateSpace {
        a: a11,
        b: b11,
        c: c11,
        d: ss.d.clone(),
    };
    let markov = markov_residual(bal, &minimal);
    let rel = |z: f64, norm: f64| if z == 0.0 { 0.0 } else { z / norm };
    Ok(KalmanDecomposition {
        realization,
        t,
        sizes,
        condition,
        pattern_residual: residual,
        zeroed_b: rel(zb, nb),
        zeroed_c: rel(zc, nc_norm),
        markov_residual: markov,
        staircases: [sc, so, full_o],
        factor,
    })
}
