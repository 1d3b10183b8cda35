//! Exact Faddeev–LeVerrier on float64 data, rounded once.
//!
//! # Purpose
//! The characteristic polynomial, adjugate sequence and transfer matrix of float64 data,
//! each result correctly rounded (round to nearest, ties to even) from the exact value
//! for the exact input.
//!
//! # Method
//! Every finite float64 is a dyadic rational `mant · 2^exp`. A matrix is written as
//! `M · 2^e` with M an integer matrix (e the smallest exponent of its nonzero entries).
//! The recursion runs on M in big integers (all divisions exact), and the homogeneity
//! `c_k(M·2^e) = c_k(M)·2^(ek)`, `N_k(M·2^e) = N_k(M)·2^(ek)` puts the scale back.
//! Each result is one integer times a power of two, rounded once.
//!
//! # Numerical aspects
//! No rounding error at all before the final rounding, whatever the eigenvalue spread.
//! Cost grows with the bit length: entries of M carry up to 53 bits plus the spread of the
//! exponents, and c_k has about k times as many bits; order 20 with spread data takes
//! milliseconds. Results in the subnormal range may be rounded twice (to 53 bits, then to
//! the subnormal grid).

use crate::error::{ModelError, Result};
use crate::matrix::Matrix;
use crate::recover::faddeev_leverrier::faddeev_leverrier;
use crate::scalar::Scalar;
use crate::state_space::StateSpace;
use num_bigint::{BigInt, Sign};
use num_traits::{ToPrimitive, Zero};

/// An integer matrix M with a power-of-two scale: the value is `M · 2^shift`.
pub struct DyadicMatrix {
    pub m: Matrix<BigInt>,
    pub shift: i64,
}

/// `x = sign · mant · 2^exp` with mant odd (or x = 0).
fn decompose(x: f64) -> (i8, u64, i64) {
    if x == 0.0 {
        return (0, 0, 0);
    }
    let bits = x.to_bits();
    let sign = if bits >> 63 == 1 { -1 } else { 1 };
    let biased = ((bits >> 52) & 0x7ff) as i64;
    let frac = bits & ((1u64 << 52) - 1);
    let (mut mant, mut exp) = if biased == 0 { (frac, -1074) } else { (frac | (1u64 << 52), biased - 1075) };
    let tz = mant.trailing_zeros();
    mant >>= tz;
    exp += tz as i64;
    (sign, mant, exp)
}

impl DyadicMatrix {
    pub fn from_f64(x: &Matrix<f64>) -> Self {
        let parts: Vec<(i8, u64, i64)> = x.as_slice().iter().map(|&v| decompose(v)).collect();
        let shift = parts.iter().filter(|p| p.0 != 0).map(|p| p.2).min().unwrap_or(0);
        let data = parts
            .iter()
            .map(|&(sign, mant, exp)| match sign {
                0 => <BigInt as Zero>::zero(),
                s => {
                    let v = BigInt::from(mant) << ((exp - shift) as usize);
                    if s < 0 { -v } else { v }
                }
            })
            .collect();
        DyadicMatrix { m: Matrix::from_row_major(x.rows(), x.cols(), data).expect("same shape"), shift }
    }
}

/// `value · 2^exp` rounded to the nearest float64 (ties to even); `None` on overflow.
pub fn round_scaled(value: &BigInt, exp: i64) -> Option<f64> {
    if Zero::is_zero(value) {
        return Some(0.0);
    }
    let negative = value.sign() == Sign::Minus;
    let magnitude = value.magnitude();
    let bits = magnitude.bits() as i64;
    let (top, exp) = if bits <= 53 {
        (magnitude.to_u64().expect("<= 53 bits"), exp)
    } else {
        let drop = (bits - 53) as u64;
        let mut top = (magnitude >> drop).to_u64().expect("53 bits");
        let remainder = magnitude - (num_bigint::BigUint::from(top) << drop);
        let half = num_bigint::BigUint::from(1u8) << (drop - 1);
        if remainder > half || (remainder == half && top & 1 == 1) {
            top += 1;
        }
        (top, exp + drop as i64)
    };
    let x = ldexp(top as f64, exp);
    if x.is_infinite() {
        return None;
    }
    Some(if negative { -x } else { x })
}

/// `x · 2^e` without intermediate overflow.
fn ldexp(mut x: f64, mut e: i64) -> f64 {
    while e > 1000 {
        x *= 2f64.powi(1000);
        e -= 1000;
        if x.is_infinite() {
            return x;
        }
    }
    while e < -1000 {
        x *= 2f64.powi(-1000);
        e += 1000;
        if x == 0.0 {
            return x;
        }
    }
    x * 2f64.powi(e as i32)
}

fn round_or_overflow(value: &BigInt, exp: i64, what: &str) -> Result<f64> {
    round_scaled(value, exp).ok_or_else(|| ModelError::Overflow { what: what.to_string() })
}

/// Correctly rounded characteristic polynomial and (optionally) adjugate sequence of `a`.
pub fn faddeev_leverrier_dyadic(a: &Matrix<f64>, with_adjugates: bool) -> Result<(Vec<f64>, Vec<Matrix<f64>>)> {
    let dy = DyadicMatrix::from_f64(a);
    let (coeffs, adjugates) = faddeev_leverrier(&dy.m);
    let e = dy.shift;
    let rounded: Vec<f64> = coeffs
        .iter()
        .enumerate()
        .map(|(k, c)| round_or_overflow(c, e * k as i64, "characteristic polynomial"))
        .collect::<Result<_>>()?;
    let mut adj = Vec::new();
    if with_adjugates {
        for (k, nk) in adjugates.iter().enumerate() {
            let data = nk
                .as_slice()
                .iter()
                .map(|v| round_or_overflow(v, e * k as i64, "adjugate sequence"))
                .collect::<Result<Vec<f64>>>()?;
            adj.push(Matrix::from_row_major(a.rows(), a.cols(), data).expect("n x n"));
        }
    }
    Ok((rounded, adj))
}

/// Correctly rounded transfer matrix numerator (p, m, n+1) and denominator of `ss`.
pub fn transfer_function_dyadic(ss: &StateSpace<f64>) -> Result<(Vec<f64>, Vec<f64>)> {
    let a = DyadicMatrix::from_f64(&ss.a);
    let b = DyadicMatrix::from_f64(&ss.b);
    let c = DyadicMatrix::from_f64(&ss.c);
    let d = DyadicMatrix::from_f64(&ss.d);
    let (n, p, m) = (ss.n_states(), ss.n_outputs(), ss.n_inputs());
    let (coeffs, adjugates) = faddeev_leverrier(&a.m);
    let den = coeffs
        .iter()
        .enumerate()
        .map(|(k, v)| round_or_overflow(v, a.shift * k as i64, "denominator"))
        .collect::<Result<Vec<f64>>>()?;
    let mut num = vec![0.0; p * m * (n + 1)];
    for i in 0..p {
        for j in 0..m {
            num[(i * m + j) * (n + 1)] = round_or_overflow(d.m.get(i, j), d.shift, "numerator")?;
        }
    }
    for (k, nk) in adjugates.iter().enumerate() {
        // C N_k B carries 2^(c.shift + b.shift + a.shift·k); c_{k+1} D carries 2^(a.shift·(k+1) + d.shift).
        let cnb = c.m.matmul(&nk.matmul(&b.m));
        let s1 = c.shift + b.shift + a.shift * k as i64;
        let s2 = a.shift * (k as i64 + 1) + d.shift;
        let low = s1.min(s2);
        for i in 0..p {
            for j in 0..m {
                let exact = (cnb.get(i, j) << ((s1 - low) as usize))
                    + ((coeffs[k + 1].mul(d.m.get(i, j))) << ((s2 - low) as usize));
                num[(i * m + j) * (n + 1) + k + 1] = round_or_overflow(&exact, low, "numerator")?;
            }
        }
    }
    Ok((num, den))
}
