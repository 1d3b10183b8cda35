//! Zeros, poles and gain of a SISO transfer function, and the realization of given ones.
//!
//! `G(s) = k · Π (s − z_i) / Π (s − p_j)` with `k` the ratio of the leading coefficients of
//! `num` and `den` (after their leading zeros are dropped).
//!
//! # Purpose
//! [`zeros_poles_gain`]: the roots of `num` (zeros) and of `den` (poles), each sorted by
//! ascending real part, then imaginary part, and the gain k. [`polynomial_from_roots`] and
//! [`realize_zeros_poles_gain`]: the way back, with real coefficients.
//!
//! # Method
//! Roots are the eigenvalues of the companion matrix of the monic polynomial, balanced by
//! powers of two (Parlett & Reinsch 1969; Edelman & Murata 1995), by faer's real
//! Hessenberg–QR eigensolver; exact zero roots are split off first, and complex roots come
//! out as exact conjugate pairs. The way back multiplies linear factors `s − r` for real
//! roots and real quadratic factors `s² − 2σ s + (σ² + ω²)` for each pair `σ ± jω`, so
//! the coefficients are real by construction.
//!
//! # Numerical aspects
//! Companion eigenvalues are backward stable for the polynomial with balancing (Edelman &
//! Murata 1995), but roots of a polynomial are themselves ill conditioned when they are
//! clustered or spread over decades; for a model given in state-space form,
//! [`super::pencil::invariant_zeros`] avoids the polynomial. Two complex values are taken
//! as a conjugate pair when their real parts and imaginary magnitudes agree to
//! `64 eps |z|`; the pair's mean is used.
//!
//! # References
//! A. Edelman and H. Murata, "Polynomial roots from companion matrix eigenvalues",
//! Math. Comp. 64 (1995) 763–776. B. N. Parlett and C. Reinsch, Numer. Math. 13 (1969).
//!
//! # Errors
//! `NonFinite`, `ZeroPolynomial` (`num` empty, `den` empty or zero), `Improper` (more
//! zeros than poles), `TooLarge` (order beyond 1024), `BadValue` naming `zeros` or `poles`
//! for a complex value without its conjugate, `Overflow`, `NoConvergence`.

use super::sort_complex;
use crate::error::{require_finite, ModelError, Result};
use crate::poly::strip_leading_zeros;
use crate::realize::transfer_matrix::roots;
use crate::realize::{realize_f64, Form};
use crate::state_space::StateSpace;

/// Largest polynomial degree accepted.
pub const MAX_DEGREE: usize = 1024;

/// Zeros and poles as (re, im), sorted, and the gain.
#[derive(Debug, Clone, PartialEq)]
pub struct ZerosPolesGain {
    pub zeros: Vec<(f64, f64)>,
    pub poles: Vec<(f64, f64)>,
    pub gain: f64,
}

fn sorted_roots(arg: &'static str, p: &[f64]) -> Result<Vec<(f64, f64)>> {
    if p.len() <= 1 {
        return Ok(Vec::new());
    }
    if p.len() - 1 > MAX_DEGREE {
        return Err(ModelError::TooLarge {
            arg,
            detail: format!("degree {} is beyond the limit {MAX_DEGREE}", p.len() - 1),
        });
    }
    let monic: Vec<f64> = p.iter().map(|c| c / p[0]).collect();
    if !monic.iter().all(|c| c.is_finite()) {
        return Err(ModelError::Overflow {
            what: format!("{arg} divided by its leading coefficient"),
        });
    }
    let mut r = roots(&monic)?;
    sort_complex(&mut r);
    Ok(r)
}

/// The zeros, poles and gain of `num / den` (coefficients highest power first).
pub fn zeros_poles_gain(num: &[f64], den: &[f64]) -> Result<ZerosPolesGain> {
    require_finite("num", num)?;
    require_finite("den", den)?;
    if num.is_empty() {
        return Err(ModelError::ZeroPolynomial { arg: "num" });
    }
    let den = strip_leading_zeros(den);
    if den.is_empty() {
        return Err(ModelError::ZeroPolynomial { arg: "den" });
    }
    let num = strip_leading_zeros(num);
    if num.len() > den.len() {
        return Err(ModelError::Improper {
            num_degree: num.len() - 1,
            den_degree: den.len() - 1,
        });
    }
    let poles = sorted_roots("den", den)?;
    if num.is_empty() {
        return Ok(ZerosPolesGain {
            zeros: Vec::new(),
            poles,
            gain: 0.0,
        });
    }
    let gain = num[0] / den[0];
    if !gain.is_finite() || gain == 0.0 {
        return Err(ModelError::Overflow {
            what: "the gain (ratio of the leading coefficients)".into(),
        });
    }
    Ok(ZerosPolesGain {
        zeros: sorted_roots("num", num)?,
        poles,
        gain,
    })
}

/// The monic real polynomial with the given roots (complex ones in conjugate pairs),
/// highest power first.
pub fn polynomial_from_roots(arg: &'static str, re: &[f64], im: &[f64]) -> Result<Vec<f64>> {
    if re.len() != im.len() {
        return Err(ModelError::Shape {
            arg,
            expected: "real and imaginary parts of one length".into(),
            found: format!("{} and {}", re.len(), im.len()),
        });
    }
    require_finite(arg, re)?;
    require_finite(arg, im)?;
    if re.len() > MAX_DEGREE {
        return Err(ModelError::TooLarge {
            arg,
            detail: format!("{} values (limit {MAX_DEGREE})", re.len()),
        });
    }
    let mut upper: Vec<(f64, f64)> = Vec::new();
    let mut lower: Vec<(f64, f64)> = Vec::new();
    let mut poly = vec![1.0];
    for (&r, &i) in re.iter().zip(im) {
        if i == 0.0 {
            poly = times(&poly, &[1.0, -r]);
        } else if i > 0.0 {
            upper.push((r, i));
        } else {
            lower.push((r, -i));
        }
    }
    sort_complex(&mut upper);
    sort_complex(&mut lower);
    let unmatched = |z: (f64, f64), sign: f64| ModelError::BadValue {
        arg,
        detail: format!(
            "the complex value {}{:+}j has no conjugate partner; complex values must come in \
             conjugate pairs so that the model is real",
            z.0,
            sign * z.1
        ),
    };
    if upper.len() != lower.len() {
        let (extra, sign) = if upper.len() > lower.len() {
            (upper[lower.len()], 1.0)
        } else {
            (lower[upper.len()], -1.0)
        };
        // Name a value that really has no partner, not merely the first after the shorter list.
        let pick = if sign > 0.0 {
            upper.iter().find(|z| !lower.iter().any(|w| close(**z, *w)))
        } else {
            lower.iter().find(|z| !upper.iter().any(|w| close(**z, *w)))
        };
        return Err(unmatched(*pick.unwrap_or(&extra), sign));
    }
    for (u, l) in upper.iter().zip(&lower) {
        if !close(*u, *l) {
            return Err(unmatched(*u, 1.0));
        }
        let (s, w) = ((u.0 + l.0) / 2.0, (u.1 + l.1) / 2.0);
        poly = times(&poly, &[1.0, -2.0 * s, s * s + w * w]);
    }
    if !poly.iter().all(|c| c.is_finite()) {
        return Err(ModelError::Overflow {
            what: format!("the polynomial with the given {arg}"),
        });
    }
    Ok(poly)
}

fn close(u: (f64, f64), l: (f64, f64)) -> bool {
    let size = u.0.hypot(u.1).max(l.0.hypot(l.1));
    let slack = 64.0 * f64::EPSILON * size;
    (u.0 - l.0).abs() <= slack && (u.1 - l.1).abs() <= slack
}

fn times(p: &[f64], q: &[f64]) -> Vec<f64> {
    let mut out = vec![0.0; p.len() + q.len() - 1];
    for (i, a) in p.iter().enumerate() {
        for (j, b) in q.iter().enumerate() {
            out[i + j] += a * b;
        }
    }
    out
}

/// The realization in `form` of `gain · Π(s − z) / Π(s − p)`.
pub fn realize_zeros_poles_gain(
    zeros: (&[f64], &[f64]),
    poles: (&[f64], &[f64]),
    gain: f64,
    form: Form,
) -> Result<StateSpace<f64>> {
    require_finite("gain", &[gain])?;
    let num = polynomial_from_roots("zeros", zeros.0, zeros.1)?;
    let den = polynomial_from_roots("poles", poles.0, poles.1)?;
    if num.len() > den.len() {
        return Err(ModelError::Improper {
            num_degree: num.len() - 1,
            den_degree: den.len() - 1,
        });
    }
    let scaled: Vec<f64> = num.iter().map(|c| c * gain).collect();
    if !scaled.iter().all(|c| c.is_finite()) {
        return Err(ModelError::Overflow {
            what: "gain times the numerator polynomial".into(),
        });
    }
    Ok(realize_f64(&scaled, &den, form)?.0)
}
