//! Polynomial products, exact division, greatest common divisors and least common multiples
//! over a field (exact rationals), and the product of linear and quadratic factors (floats).
//!
//! Identity: `gcd(a, b) · lcm(a, b) = a · b` for monic `a`, `b`, with `gcd` and `lcm` monic.
//!
//! # Purpose
//! The common denominator of a column (or row) of a transfer matrix: the least common
//! multiple of the entries' denominators, and the quotients `lcm / d_ij` that the
//! numerators are multiplied by.
//!
//! # Method
//! Euclid's algorithm on monic remainders (each remainder divided by its leading
//! coefficient, which keeps the rational coefficients from growing needlessly);
//! `lcm(a, b) = a · (b / gcd(a, b))` with an exact polynomial division.
//!
//! # Numerical aspects
//! Meant for exact arithmetic: over `BigRational` every step is exact. In floating point
//! Euclid's algorithm is unstable (whether a remainder "is zero" is a tolerance decision on
//! numbers that carry large cancellation errors), so the float transfer-matrix path merges
//! roots instead (see [`crate::realize::transfer_matrix`]); [`product_of_factors`] is its
//! helper.
//!
//! # References
//! D. E. Knuth, *The Art of Computer Programming*, vol. 2, 3rd ed., Addison-Wesley 1997,
//! §4.6.1 (polynomial division and greatest common divisors).
//!
//! # Errors
//! None: the callers guarantee nonzero divisors (a zero divisor is refused before).

use crate::scalar::Scalar;

/// Coefficients, highest power first, without leading zeros; empty for the zero polynomial.
pub fn trim<T: Scalar>(p: &[T]) -> Vec<T> {
    crate::poly::strip_leading_zeros(p).to_vec()
}

/// `p / p[0]`; the caller guarantees `p` is trimmed and nonzero.
pub fn monic<T: Scalar>(p: &[T]) -> Vec<T> {
    let lead = p[0].clone();
    p.iter().map(|c| c.div_exact(&lead)).collect()
}

/// The product `a · b` (empty if either is empty).
pub fn mul<T: Scalar>(a: &[T], b: &[T]) -> Vec<T> {
    if a.is_empty() || b.is_empty() {
        return Vec::new();
    }
    let mut out = vec![T::zero(); a.len() + b.len() - 1];
    for (i, x) in a.iter().enumerate() {
        for (j, y) in b.iter().enumerate() {
            out[i + j].add_mul(x, y);
        }
    }
    out
}

/// Quotient and remainder of `a / b` for a trimmed nonzero `b`; the remainder is trimmed.
pub fn div_rem<T: Scalar>(a: &[T], b: &[T]) -> (Vec<T>, Vec<T>) {
    let a = trim(a);
    if a.len() < b.len() {
        return (Vec::new(), a);
    }
    let mut r = a;
    let shift = r.len() - b.len();
    let mut q = vec![T::zero(); shift + 1];
    for k in 0..=shift {
        let coef = r[k].div_exact(&b[0]);
        if !coef.is_zero() {
            for (i, bi) in b.iter().enumerate() {
                r[k + i] = r[k + i].sub(&coef.mul(bi));
            }
        }
        q[k] = coef;
    }
    let rem = trim(&r[shift + 1..]);
    (q, rem)
}

/// The monic greatest common divisor (Euclid); `[1]` when coprime. Inputs trimmed, nonzero.
pub fn gcd<T: Scalar>(a: &[T], b: &[T]) -> Vec<T> {
    let (mut x, mut y) = (monic(a), monic(b));
    if x.len() < y.len() {
        std::mem::swap(&mut x, &mut y);
    }
    while !y.is_empty() {
        let (_, r) = div_rem(&x, &y);
        x = y;
        y = if r.is_empty() { r } else { monic(&r) };
    }
    x
}

/// The monic least common multiple `a · (b / gcd(a, b))`. Inputs trimmed, nonzero.
pub fn lcm<T: Scalar>(a: &[T], b: &[T]) -> Vec<T> {
    let g = gcd(a, b);
    let (q, _) = div_rem(&monic(b), &g);
    mul(&monic(a), &q)
}

/// `Π (s − r_k)^{m_k} · Π (s² − 2 Re z s + |z|²)^{m_z}` for real roots `r` and complex
/// roots `z` (one of each conjugate pair), as real coefficients, highest power first.
pub fn product_of_factors(real: &[(f64, usize)], pairs: &[((f64, f64), usize)]) -> Vec<f64> {
    let mut p = vec![1.0];
    for &(r, mult) in real {
        for _ in 0..mult {
            p = mul(&p, &[1.0, -r]);
        }
    }
    for &((re, im), mult) in pairs {
        for _ in 0..mult {
            p = mul(&p, &[1.0, -2.0 * re, re * re + im * im]);
        }
    }
    p
}

#[cfg(test)]
mod tests {
    use super::*;
    use num_bigint::BigInt;
    use num_rational::BigRational;

    fn q(v: &[i64]) -> Vec<BigRational> {
        v.iter()
            .map(|&k| BigRational::from_integer(BigInt::from(k)))
            .collect()
    }

    #[test]
    fn gcd_and_lcm_of_products_of_linear_factors() {
        // (s+1)(s+2) and (s+1)(s+3): gcd s+1, lcm (s+1)(s+2)(s+3).
        let a = q(&[1, 3, 2]);
        let b = q(&[1, 4, 3]);
        assert_eq!(gcd(&a, &b), q(&[1, 1]));
        assert_eq!(lcm(&a, &b), q(&[1, 6, 11, 6]));
        // Non-monic inputs and a coprime pair.
        assert_eq!(gcd(&q(&[2, 4]), &q(&[3, 3])), q(&[1]));
        assert_eq!(lcm(&q(&[2, 2]), &q(&[5, 5])), q(&[1, 1]));
        // gcd · lcm = a · b (monic).
        let (x, y) = (q(&[1, 0, -1]), q(&[1, 2, 1]));
        assert_eq!(mul(&gcd(&x, &y), &lcm(&x, &y)), mul(&x, &y));
    }

    #[test]
    fn division_with_remainder() {
        let (qq, r) = div_rem(&q(&[1, 0, 0, -1]), &q(&[1, -1]));
        assert_eq!(qq, q(&[1, 1, 1]));
        assert!(r.is_empty());
        let (qq, r) = div_rem(&q(&[1, 0, 1]), &q(&[1, 1]));
        assert_eq!(qq, q(&[1, -1]));
        assert_eq!(r, q(&[2]));
    }

    #[test]
    fn product_of_real_and_complex_factors() {
        let p = product_of_factors(&[(-1.0, 2)], &[((-1.0, 2.0), 1)]);
        // (s+1)^2 (s^2 + 2 s + 5)
        assert_eq!(p, vec![1.0, 4.0, 10.0, 12.0, 5.0]);
    }
}
