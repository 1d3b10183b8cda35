//! The similarity transformation between two minimal realizations.
//!
//! # Purpose
//! The nonsingular T with `A_2 = T⁻¹ A_1 T`, `B_2 = T⁻¹ B_1`, `C_2 = C_1 T`, `D_2 = D_1`
//! (so `r2 == r1.transform(T)`), which exists and is unique when both realizations are
//! minimal and have the same transfer function (the state-space isomorphism theorem).
//!
//! # Method
//! T solves the linear equations `A_1 T − T A_2 = 0`, `T B_2 = B_1`, `C_1 T = C_2`; written
//! for the n² entries of T (Kronecker form) they are solved in the least-squares sense by a
//! Householder QR factorisation (each equation group scaled by the norm of its data). The
//! solution is then verified: relative residuals
//! `‖A_1 T − T A_2‖/(‖A‖ ‖T‖)`, `‖T B_2 − B_1‖/‖B‖`, `‖C_1 T − C_2‖/(‖C‖ ‖T‖)` and
//! `‖D_1 − D_2‖/‖D‖` must not exceed tol. No controllability matrix is formed (its
//! conditioning degrades with the spread of the eigenvalues).
//!
//! # Numerical aspects
//! Default tol = √eps ≈ 1.5e-8 on those relative residuals (half the digits). Minimality
//! of both realizations is checked first with the staircase at its default tol. Cost is
//! O(n⁶) for the QR of the n²-column system, so n is limited to 40.
//!
//! # References
//! C.-T. Chen, *Linear System Theory and Design*, 3rd ed., Oxford 1999, §7.2 (uniqueness
//! of minimal realizations up to similarity).

use super::condition_number;
use super::minimal::check_model;
use super::staircase::{check_tol, frobenius, is_controllable, is_observable};
use crate::error::{ModelError, Result};
use crate::matrix::Matrix;
use crate::state_space::StateSpace;
use faer::prelude::*;

/// Largest state dimension accepted (the Kronecker system has n² unknowns).
pub const MAX_ORDER: usize = 40;

pub struct Similarity {
    pub t: Matrix<f64>,
    /// Relative residuals of the A, B, C and D equations.
    pub residuals: [f64; 4],
    pub tol: f64,
}

fn check_minimal(ss: &StateSpace<f64>, arg: &'static str) -> Result<()> {
    let c = is_controllable(&ss.a, &ss.b, None)?;
    let o = is_observable(&ss.a, &ss.c, None)?;
    if !(c && o) {
        let what = match (c, o) {
            (false, false) => "neither controllable nor observable",
            (false, true) => "not controllable",
            _ => "not observable",
        };
        return Err(ModelError::BadValue {
            arg,
            detail: format!(
                "the realization is not minimal ({what}); reduce it with minimal_realization first"
            ),
        });
    }
    Ok(())
}

pub fn similarity(
    r1: &StateSpace<f64>,
    r2: &StateSpace<f64>,
    tol: Option<f64>,
) -> Result<Similarity> {
    check_model(r1)?;
    check_model(r2)?;
    check_tol(tol)?;
    let tol = tol.unwrap_or(f64::EPSILON.sqrt());
    let (n, m, p) = (r1.n_states(), r1.n_inputs(), r1.n_outputs());
    if (r2.n_states(), r2.n_inputs(), r2.n_outputs()) != (n, m, p) {
        return Err(ModelError::Shape {
            arg: "r2",
            expected: format!("{n} states, {m} inputs and {p} outputs like r1"),
            found: format!(
                "{} states, {} inputs and {} outputs",
                r2.n_states(),
                r2.n_inputs(),
                r2.n_outputs()
            ),
        });
    }
    if n > MAX_ORDER {
        return Err(ModelError::TooLarge {
            arg: "r1",
            detail: format!("similarity is limited to {MAX_ORDER} states, found {n}"),
        });
    }
    check_minimal(r1, "r1")?;
    check_minimal(r2, "r2")?;

    let d_residual = {
        let diff: f64 =
            r1.d.as_slice()
                .iter()
                .zip(r2.d.as_slice())
                .map(|(x, y)| (x - y) * (x - y))
                .sum::<f64>()
                .sqrt();
        let scale = frobenius(&r1.d).max(frobenius(&r2.d));
        if scale > 0.0 {
            diff / scale
        } else {
            diff
        }
    };
    let t = if n == 0 {
        Matrix::zeros(0, 0)
    } else {
        let sa = frobenius(&r1.a)
            .max(frobenius(&r2.a))
            .max(f64::MIN_POSITIVE);
        let sb = frobenius(&r1.b)
            .max(frobenius(&r2.b))
            .max(f64::MIN_POSITIVE);
        let sc = frobenius(&r1.c)
            .max(frobenius(&r2.c))
            .max(f64::MIN_POSITIVE);
        let unknowns = n * n; // T[i][j] at i*n + j
        let rows = n * n + n * m + p * n;
        let mut sys = Mat::<f64>::zeros(rows, unknowns);
        let mut rhs = Mat::<f64>::zeros(rows, 1);
        // (A1 T − T A2)_ij = Σ_k A1_ik T_kj − Σ_k T_ik A2_kj
        for i in 0..n {
            for j in 0..n {
                let row = i * n + j;
                for k in 0..n {
                    sys[(row, k * n + j)] += r1.a.get(i, k) / sa;
                    sys[(row, i * n + k)] -= r2.a.get(k, j) / sa;
                }
            }
        }
        // (T B2)_il = B1_il
        for i in 0..n {
            for l in 0..m {
                let row = n * n + i * m + l;
                for k in 0..n {
                    sys[(row, i * n + k)] = r2.b.get(k, l) / sb;
                }
                rhs[(row, 0)] = r1.b.get(i, l) / sb;
            }
        }
        // (C1 T)_lj = C2_lj
        for l in 0..p {
            for j in 0..n {
                let row = n * n + n * m + l * n + j;
                for k in 0..n {
                    sys[(row, k * n + j)] = r1.c.get(l, k) / sc;
                }
                rhs[(row, 0)] = r2.c.get(l, j) / sc;
            }
        }
        let x = sys.qr().solve_lstsq(&rhs);
        Matrix::from_row_major(n, n, (0..unknowns).map(|k| x[(k, 0)]).collect()).expect("n x n")
    };
    if t.as_slice().iter().any(|v| !v.is_finite()) {
        return Err(ModelError::BadValue {
            arg: "r2",
            detail: "the realizations are not similar (no finite transformation)".into(),
        });
    }
    let rel = |x: &Matrix<f64>, y: &Matrix<f64>, scale: f64| {
        let diff: f64 = x
            .as_slice()
            .iter()
            .zip(y.as_slice())
            .map(|(u, v)| (u - v) * (u - v))
            .sum::<f64>()
            .sqrt();
        if scale > 0.0 {
            diff / scale
        } else {
            diff
        }
    };
    let nt = frobenius(&t);
    let residuals = [
        rel(
            &r1.a.matmul(&t),
            &t.matmul(&r2.a),
            frobenius(&r1.a).max(frobenius(&r2.a)) * nt,
        ),
        rel(&t.matmul(&r2.b), &r1.b, frobenius(&r1.b)),
        rel(
            &r1.c.matmul(&t),
            &r2.c,
            frobenius(&r2.c).max(frobenius(&r1.c) * nt),
        ),
        d_residual,
    ];
    let cond = condition_number(&t)?;
    if residuals.iter().any(|r| !(*r <= tol)) || !(cond < 1.0 / f64::EPSILON) {
        return Err(ModelError::BadValue {
            arg: "r2",
            detail: format!(
                "not similar to r1 within tol={tol:.3e} (relative residuals A {:.2e}, B {:.2e}, C {:.2e}, D {:.2e}; \
                 condition number of T {cond:.2e})",
                residuals[0], residuals[1], residuals[2], residuals[3]
            ),
        });
    }
    Ok(Similarity { t, residuals, tol })
}
