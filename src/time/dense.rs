//! Small dense helpers shared by the time-base modules: conversions between the core's
//! row-major [`Matrix`] and nalgebra, norms, argument checks, a checked inverse.

use crate::error::{ModelError, Result};
use crate::matrix::Matrix;
use crate::state_space::StateSpace;
use nalgebra::DMatrix;

pub(crate) fn to_na(m: &Matrix<f64>) -> DMatrix<f64> {
    DMatrix::from_row_slice(m.rows(), m.cols(), m.as_slice())
}

pub(crate) fn from_na(m: &DMatrix<f64>) -> Matrix<f64> {
    let (r, c) = m.shape();
    let mut data = Vec::with_capacity(r * c);
    for i in 0..r {
        for j in 0..c {
            data.push(m[(i, j)]);
        }
    }
    Matrix::from_row_major(r, c, data).expect("shape")
}

/// The 1-norm (largest absolute column sum); `inf` only when it overflows.
pub(crate) fn norm1(m: &DMatrix<f64>) -> f64 {
    (0..m.ncols())
        .map(|j| m.column(j).iter().map(|v| v.abs()).sum::<f64>())
        .fold(0.0, f64::max)
}

/// Frobenius norm, safe against overflow of the squares.
pub(crate) fn norm_fro(m: &DMatrix<f64>) -> f64 {
    crate::matrix::frobenius_norm(m.as_slice())
}

pub(crate) fn all_finite(m: &DMatrix<f64>) -> bool {
    m.iter().all(|v| v.is_finite())
}

/// Refuses a result that is not finite, naming what it is.
pub(crate) fn require_finite_result(what: &str, m: &DMatrix<f64>) -> Result<()> {
    if all_finite(m) {
        Ok(())
    } else {
        Err(ModelError::Overflow { what: what.into() })
    }
}

/// Shapes and finiteness of a float model.
pub(crate) fn check_model(ss: &StateSpace<f64>) -> Result<()> {
    let (n, m, p) = (ss.a.rows(), ss.b.cols(), ss.c.rows());
    let fits = ss.a.cols() == n
        && ss.b.rows() == n
        && ss.c.cols() == n
        && ss.d.rows() == p
        && ss.d.cols() == m;
    if !fits {
        // The shape error of the constructor (copies only on this path).
        StateSpace::new(ss.a.clone(), ss.b.clone(), ss.c.clone(), ss.d.clone())?;
    }
    for (arg, m) in [("a", &ss.a), ("b", &ss.b), ("c", &ss.c), ("d", &ss.d)] {
        crate::error::require_finite(arg, m.as_slice())?;
    }
    Ok(())
}

/// A sample time must be a positive finite number of seconds.
pub(crate) fn check_sample_time(t: f64) -> Result<()> {
    if t.is_finite() && t > 0.0 {
        Ok(())
    } else {
        Err(ModelError::BadValue {
            arg: "sample_time",
            detail: format!("must be a positive finite number of seconds, found {t}"),
        })
    }
}

/// `m⁻¹` and its 1-norm condition number; refused (naming `what`) when m is singular to
/// working precision, i.e. when the condition number exceeds `1 / (n eps)`.
pub(crate) fn checked_inverse(m: &DMatrix<f64>, what: &str) -> Result<(DMatrix<f64>, f64)> {
    let n = m.nrows();
    if n == 0 {
        return Ok((DMatrix::zeros(0, 0), 1.0));
    }
    let singular = || ModelError::BadValue {
        arg: "a",
        detail: format!("{what} is singular to working precision"),
    };
    let inv = m.clone().lu().try_inverse().ok_or_else(singular)?;
    let cond = norm1(m) * norm1(&inv);
    if !cond.is_finite() || cond * (n as f64) * f64::EPSILON > 1.0 || !all_finite(&inv) {
        return Err(singular());
    }
    Ok((inv, cond))
}

/// The eigenvalues of a real square matrix (re, im) from its real Schur form.
pub(crate) fn eigenvalues(a: &DMatrix<f64>) -> Result<Vec<(f64, f64)>> {
    let n = a.nrows();
    if n == 0 {
        return Ok(Vec::new());
    }
    let schur =
        a.clone()
            .try_schur(f64::EPSILON, 100 * n + 100)
            .ok_or(ModelError::NoConvergence {
                routine: "the real Schur form of a",
            })?;
    let (_, t) = schur.unpack();
    let mut out = Vec::with_capacity(n);
    let mut i = 0;
    while i < n {
        if i + 1 < n && t[(i + 1, i)] != 0.0 {
            let (p, q, r, s) = (t[(i, i)], t[(i, i + 1)], t[(i + 1, i)], t[(i + 1, i + 1)]);
            let half = 0.5 * (p + s);
            let disc = 0.25 * (p - s) * (p - s) + q * r;
            if disc >= 0.0 {
                out.push((half + disc.sqrt(), 0.0));
                out.push((half - disc.sqrt(), 0.0));
            } else {
                out.push((half, (-disc).sqrt()));
                out.push((half, -(-disc).sqrt()));
            }
            i += 2;
        } else {
            out.push((t[(i, i)], 0.0));
            i += 1;
        }
    }
    Ok(out)
}

/// `x · 2^e` for every entry (exact unless it under- or overflows).
pub(crate) fn scale_pow2(m: &mut DMatrix<f64>, e: i32) {
    let f = crate::matrix::pow2(e);
    if e != 0 {
        m.iter_mut().for_each(|v| *v *= f);
    }
}

/// Power-of-two exponent e with `2^e · big` near `target` (0 when big is 0).
pub(crate) fn exponent_towards(big: f64, target: f64) -> i32 {
    if big == 0.0 || target == 0.0 || !big.is_finite() {
        return 0;
    }
    (target / big).log2().round().clamp(-1000.0, 1000.0) as i32
}
