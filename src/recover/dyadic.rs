//! Exact Faddeev–LeVerrier on float64 data, rounded once.
//!
//! # Purpose
//! The characteristic polynomial, adjugate sequence and transfer matrix of float64 data,
//! each result correctly rounded (round to nearest, ties to even) from the exact value
//! for the exact input.
//!
//! # Method
//! Every finite float64 is a dyadic rational `mant · 2^exp`. A matrix is written as
//! `M · 2^e` with M an integer matrix (e the smallest exponent of its nonzero entries), and
//! homogeneity, `c_k(M·2^e) = c_k(M)·2^(ek)`, `N_k(M·2^e) = N_k(M)·2^(ek)`, puts the scale
//! back. The characteristic polynomial of M is computed exactly by the multi-modular
//! Hessenberg method ([`super::modular`]), and with it the numerator terms
//! `C N_k(M) B = Σ_{l ≤ k} c_l C M^(k−l) B` from the Markov parameters, modulo the same
//! primes. The adjugate sequence itself needs the Faddeev–LeVerrier recursion on M in big
//! integers (all divisions exact). Each result is one integer times a power of two,
//! rounded once.
//!
//! # Numerical aspects
//! No rounding error at all before the final rounding, whatever the eigenvalue spread.
//! Cost grows with the bit length: entries of M carry up to 53 bits plus the spread of the
//! exponents, and c_k has about k times as many bits. The modular route costs about n³ word
//! operations per 61 bits of the largest coefficient: a SISO transfer function with spread
//! poles takes 2 to 26 ms at orders 16 to 40, 4 to 13 times less than the big-integer
//! recursion (`cargo run --release --example time_exact`). A request
//! whose estimated time exceeds the exact-arithmetic budget
//! ([`super::rational::EXACT_TIME_BUDGET_SECONDS`]) is refused with `TooLarge` before any
//! work. Results in the subnormal range are rounded once, to the subnormal grid itself.

use crate::error::{ModelError, Result};
use crate::matrix::Matrix;
use crate::recover::faddeev_leverrier::faddeev_leverrier;
use crate::recover::modular;
use crate::recover::rational::{self, EXACT_TIME_BUDGET_SECONDS};
use crate::state_space::StateSpace;
use num_bigint::{BigInt, Sign};
use num_integer::Integer;
use num_traits::{ToPrimitive, Zero};

/// An integer matrix M with a power-of-two scale: the value is `M · 2^shift`.
pub struct DyadicMatrix {
    pub m: Matrix<BigInt>,
    pub shift: i64,
}

/// `x = sign · mant · 2^exp` with mant odd (or x = 0).
pub(crate) fn decompose(x: f64) -> (i8, u64, i64) {
    if x == 0.0 {
        return (0, 0, 0);
    }
    let bits = x.to_bits();
    let sign = if bits >> 63 == 1 { -1 } else { 1 };
    let biased = ((bits >> 52) & 0x7ff) as i64;
    let frac = bits & ((1u64 << 52) - 1);
    let (mut mant, mut exp) = if biased == 0 {
        (frac, -1074)
    } else {
        (frac | (1u64 << 52), biased - 1075)
    };
    let tz = mant.trailing_zeros();
    mant >>= tz;
    exp += tz as i64;
    (sign, mant, exp)
}

impl DyadicMatrix {
    pub fn from_f64(x: &Matrix<f64>) -> Self {
        let parts: Vec<(i8, u64, i64)> = x.as_slice().iter().map(|&v| decompose(v)).collect();
        let shift = parts
            .iter()
            .filter(|p| p.0 != 0)
            .map(|p| p.2)
            .min()
            .unwrap_or(0);
        let data = parts
            .iter()
            .map(|&(sign, mant, exp)| match sign {
                0 => <BigInt as Zero>::zero(),
                s => {
                    let v = BigInt::from(mant) << ((exp - shift) as usize);
                    if s < 0 {
                        -v
                    } else {
                        v
                    }
                }
            })
            .collect();
        DyadicMatrix {
            m: Matrix::from_row_major(x.rows(), x.cols(), data).expect("same shape"),
            shift,
        }
    }
}

/// `value · 2^exp` rounded to the nearest float64 (ties to even); `None` on overflow.
///
/// Rounded once, also in the subnormal range: the number of bits kept is 53 for a normal
/// result and `bits + exp + 1074` (the bits above the subnormal quantum 2⁻¹⁰⁷⁴) below
/// 2⁻¹⁰²², so the scaling that follows is exact.
pub fn round_scaled(value: &BigInt, exp: i64) -> Option<f64> {
    if Zero::is_zero(value) {
        return Some(0.0);
    }
    let negative = value.sign() == Sign::Minus;
    let magnitude = value.magnitude();
    let bits = magnitude.bits() as i64;
    // The value is in [2^(bits-1+exp), 2^(bits+exp)); bits above 2^-1074 for a subnormal.
    let keep = 53.min(bits + exp + 1074);
    let (top, exp) = if bits <= keep {
        (magnitude.to_u64().expect("<= 53 bits"), exp)
    } else {
        let drop = (bits - keep) as u64; // >= 1; keep <= 0 leaves top = 0 before rounding
        let top_big = magnitude >> drop;
        let mut top = top_big.to_u64().expect("<= 53 bits");
        let remainder = magnitude - (top_big << drop);
        let half = num_bigint::BigUint::from(1u8) << (drop - 1);
        if remainder > half || (remainder == half && top & 1 == 1) {
            top += 1;
        }
        (top, exp + drop as i64)
    };
    // top < 2^54 and top · 2^exp is a float64 (or overflows): every step of ldexp is exact.
    let x = ldexp(top as f64, exp);
    if x.is_infinite() {
        return None;
    }
    Some(if negative { -x } else { x })
}

/// `(p / q) · 2^exp` rounded to the nearest float64 (ties to even), once, also in the
/// subnormal range; `None` on overflow. `q` must be nonzero.
///
/// The quotient is formed with at least 54 bits and a sticky bit for the remainder, so the
/// rounding of [`round_scaled`] (which drops at least two bits) decides as the exact value.
pub fn round_ratio(p: &BigInt, q: &BigInt, exp: i64) -> Option<f64> {
    if Zero::is_zero(p) {
        return Some(0.0);
    }
    let negative = (p.sign() == Sign::Minus) != (q.sign() == Sign::Minus);
    let (p, q) = (
        BigInt::from(p.magnitude().clone()),
        BigInt::from(q.magnitude().clone()),
    );
    let shift = 55 - (p.bits() as i64 - q.bits() as i64);
    let (num, den) = if shift >= 0 {
        (p << shift as u64, q)
    } else {
        (p, q << (-shift) as u64)
    };
    let (quot, rem) = num.div_rem(&den);
    let sticky = u8::from(!Zero::is_zero(&rem));
    let m = (quot << 1u8) + BigInt::from(sticky);
    let m = if negative { -m } else { m };
    round_scaled(&m, exp - shift - 1)
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
    round_scaled(value, exp).ok_or_else(|| ModelError::Overflow {
        what: what.to_string(),
    })
}

/// Refuse an exact evaluation whose estimated time exceeds the budget, before any work.
fn check_budget(n: usize, seconds: f64, bits: u64) -> Result<()> {
    if seconds <= EXACT_TIME_BUDGET_SECONDS {
        return Ok(());
    }
    Err(ModelError::TooLarge {
        arg: "a",
        detail: format!(
            "the exact evaluation (method='exact', or the fallback of method='auto' when the double-double \
             bound cannot certify the result) of this order-{n} model works with {bits}-bit integers (float \
             entries spanning many binary orders) and would take an estimated {seconds:.0} s, beyond its \
             {EXACT_TIME_BUDGET_SECONDS:.0} s budget; method='recursion' returns the unchecked float64 result"
        ),
    })
}

/// Correctly rounded characteristic polynomial and (optionally) adjugate sequence of `a`.
///
/// The coefficients alone come from the multi-modular Hessenberg method ([`modular`]); the
/// adjugates need the big-integer recursion. Either is refused beyond the time budget.
pub fn faddeev_leverrier_dyadic(
    a: &Matrix<f64>,
    with_adjugates: bool,
) -> Result<(Vec<f64>, Vec<Matrix<f64>>)> {
    let dy = DyadicMatrix::from_f64(a);
    let n = a.rows();
    let e = dy.shift;
    let entry_bits = modular::max_entry_bits(&dy.m);
    let (coeffs, adjugates) = if with_adjugates {
        check_budget(n, rational::estimated_seconds(n, entry_bits, 0), entry_bits)?;
        faddeev_leverrier(&dy.m)
    } else {
        let bits = modular::coefficient_bits(&dy.m);
        check_budget(
            n,
            modular::estimated_seconds(n, bits, entry_bits, 1),
            entry_bits,
        )?;
        (modular::characteristic_polynomial(&dy.m), Vec::new())
    };
    let rounded: Vec<f64> = coeffs
        .iter()
        .enumerate()
        .map(|(k, c)| round_or_overflow(c, e * k as i64, "characteristic polynomial"))
        .collect::<Result<_>>()?;
    let mut adj = Vec::new();
    for (k, nk) in adjugates.iter().enumerate() {
        let data = nk
            .as_slice()
            .iter()
            .map(|v| round_or_overflow(v, e * k as i64, "adjugate sequence"))
            .collect::<Result<Vec<f64>>>()?;
        adj.push(Matrix::from_row_major(n, n, data).expect("n x n"));
    }
    Ok((rounded, adj))
}

/// Correctly rounded transfer matrix numerator (p, m, n+1) and denominator of `ss`.
///
/// The exact coefficients and terms `C N_k(M_A) B` come from [`modular::transfer_terms`] on
/// the integer matrices; each numerator coefficient `C N_k B + c_{k+1} D` is assembled over
/// a common power of two and rounded once.
pub fn transfer_function_dyadic(ss: &StateSpace<f64>) -> Result<(Vec<f64>, Vec<f64>)> {
    let a = DyadicMatrix::from_f64(&ss.a);
    let b = DyadicMatrix::from_f64(&ss.b);
    let c = DyadicMatrix::from_f64(&ss.c);
    let d = DyadicMatrix::from_f64(&ss.d);
    let (n, p, m) = (ss.n_states(), ss.n_outputs(), ss.n_inputs());
    let bits = modular::coefficient_bits(&a.m).max(modular::numerator_term_bits(&a.m, &b.m, &c.m));
    let entry_bits = [&a.m, &b.m, &c.m]
        .iter()
        .map(|x| modular::max_entry_bits(x))
        .max()
        .unwrap_or(0);
    check_budget(
        n,
        modular::estimated_seconds_transfer(n, bits, entry_bits, p, m),
        entry_bits,
    )?;

    let (coeffs, terms) = modular::transfer_terms(&a.m, &b.m, &c.m);
    let den = coeffs
        .iter()
        .enumerate()
        .map(|(k, v)| round_or_overflow(v, a.shift * k as i64, "denominator"))
        .collect::<Result<Vec<f64>>>()?;
    let mut num = vec![0.0; p * m * (n + 1)];
    for i in 0..p {
        for j in 0..m {
            let entry = i * m + j;
            num[entry * (n + 1)] = round_or_overflow(d.m.get(i, j), d.shift, "numerator")?;
            for k in 0..n {
                // C N_k B carries 2^(c + b + a·k); c_{k+1} D carries 2^(a·(k+1) + d).
                let s1 = c.shift + b.shift + a.shift * k as i64;
                let s2 = a.shift * (k as i64 + 1) + d.shift;
                let low = s1.min(s2);
                let exact = (&terms[entry * n + k] << ((s1 - low) as usize))
                    + ((&coeffs[k + 1] * d.m.get(i, j)) << ((s2 - low) as usize));
                num[entry * (n + 1) + k + 1] = round_or_overflow(&exact, low, "numerator")?;
            }
        }
    }
    Ok((num, den))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::recover::faddeev_leverrier::transfer_function;
    use num_rational::BigRational;

    use crate::tests::Lcg;

    /// Zero, a small integer, a subnormal, or a random mantissa at a random exponent.
    fn random_entry(rng: &mut Lcg, exponent_range: i32) -> f64 {
        let sign = if rng.next() & 1 == 1 { -1.0 } else { 1.0 };
        match rng.next() % 8 {
            0 | 1 => 0.0,
            2 => sign * (rng.next() % 5) as f64,
            3 => sign * 5e-324 * (1 + rng.next() % 1000) as f64,
            _ => {
                let mantissa = 1.0 + (rng.next() % (1 << 52)) as f64 / (1u64 << 52) as f64;
                let e = (rng.next() % (2 * exponent_range as u64 + 1)) as i32 - exponent_range;
                sign * mantissa * 2f64.powi(e)
            }
        }
    }

    fn exact(x: &Matrix<f64>) -> Matrix<BigRational> {
        x.map(|&v| BigRational::from_float(v).expect("finite"))
    }

    /// The exact rational rounded to the nearest float64 (its denominator is a power of two).
    fn round(q: &BigRational) -> Option<f64> {
        let shift = q.denom().bits() as i64 - 1;
        round_scaled(q.numer(), -shift)
    }

    #[test]
    fn agrees_with_the_rational_recursion_rounded() {
        // (identity) the modular route (coefficients and Markov-parameter terms), and the
        // coefficients alone, equal the BigRational Faddeev–LeVerrier recursion on the same
        // dyadic data, rounded once; overflow on one side means overflow on the other.
        let mut rng = Lcg(4242);
        for case in 0..400 {
            let n = (rng.next() % 6) as usize;
            let (p, m) = (1 + (rng.next() % 3) as usize, 1 + (rng.next() % 3) as usize);
            let range = [4, 60, 300][case % 3];
            let mut draw = |r: usize, c: usize| {
                Matrix::from_row_major(
                    r,
                    c,
                    (0..r * c).map(|_| random_entry(&mut rng, range)).collect(),
                )
                .unwrap()
            };
            let ss = StateSpace::new(draw(n, n), draw(n, m), draw(p, n), draw(p, m)).unwrap();
            let exact_ss =
                StateSpace::new(exact(&ss.a), exact(&ss.b), exact(&ss.c), exact(&ss.d)).unwrap();
            let (num_ref, den_ref) = transfer_function(&exact_ss);
            let expect: Option<(Vec<f64>, Vec<f64>)> = (|| {
                Some((
                    num_ref.iter().map(round).collect::<Option<_>>()?,
                    den_ref.iter().map(round).collect::<Option<_>>()?,
                ))
            })();
            match (transfer_function_dyadic(&ss), expect) {
                (Ok(got), Some(want)) => assert_eq!(got, want, "case {case}: {ss:?}"),
                (Err(ModelError::Overflow { .. }), None) => {}
                (got, want) => panic!("case {case}: {got:?} vs {want:?}"),
            }
            let coeffs: Option<Vec<f64>> = den_ref.iter().map(round).collect();
            match (faddeev_leverrier_dyadic(&ss.a, false), coeffs) {
                (Ok((got, _)), Some(want)) => assert_eq!(got, want, "case {case}"),
                (Err(ModelError::Overflow { .. }), None) => {}
                (got, want) => panic!("case {case}: {got:?} vs {want:?}"),
            }
        }
    }
}
