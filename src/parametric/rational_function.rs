//! Rational functions of the parameters, `Q(x_0, ..., x_{v-1})`, kept in lowest terms.
//!
//! # Purpose
//! The entries of a parametric model (`k / J1`, `1 / (R1 + R2)`) and of its canonical forms:
//! a quotient `num / den` of integer polynomials ([`Polynomial`]) with `gcd(num, den) = 1`
//! (integer content included) and `den` of positive leading coefficient, so that equal
//! values have equal representations. Zero is `0 / 1`.
//!
//! # Method
//! Sums over one denominator, or over a denominator 1, need no GCD beyond the one with that
//! denominator; products cancel crosswise (`gcd(n1, d2)`, `gcd(n2, d1)`) so the factors stay
//! small. Everything else forms the plain sum and reduces by [`gcd`].
//!
//! # Numerical aspects
//! Exact. A value is generic in the parameters: `k / J1` stands for the function, and a
//! later substitution that makes a denominator vanish is outside what it describes.
//!
//! # References
//! D. E. Knuth, *The Art of Computer Programming*, vol. 2, §4.5.1 (crosswise cancellation
//! in products of fractions, from memory).
//!
//! # Errors
//! [`RationalFunction::new`] returns `None` for a zero denominator. The [`Scalar`] division
//! by zero is a caller's bug (the realizations divide by a checked nonzero coefficient).

use super::gcd::{gcd, normalized};
use super::polynomial::Polynomial;
use crate::scalar::Scalar;
use num_bigint::BigInt;

/// `num / den` in lowest terms, `den` with a positive leading coefficient.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct RationalFunction {
    num: Polynomial,
    den: Polynomial,
}

impl RationalFunction {
    /// `num / den` brought to lowest terms; `None` when `den` is zero.
    pub fn new(num: Polynomial, den: Polynomial) -> Option<Self> {
        if den.is_zero() {
            return None;
        }
        if num.is_zero() {
            return Some(Self::from_polynomial(num));
        }
        let g = gcd(&num, &den);
        let (mut num, mut den) = if g.is_one() {
            (num, den)
        } else {
            (
                num.try_div(&g).expect("gcd divides"),
                den.try_div(&g).expect("gcd divides"),
            )
        };
        if den.leads_negative() {
            num = num.neg();
            den = den.neg();
        }
        Some(RationalFunction { num, den })
    }

    /// A polynomial over the denominator 1.
    pub fn from_polynomial(num: Polynomial) -> Self {
        RationalFunction {
            num,
            den: Polynomial::one(),
        }
    }

    /// Assumes the pair is already in lowest terms with a positive leading denominator.
    pub(crate) fn from_reduced(num: Polynomial, den: Polynomial) -> Self {
        debug_assert!(!den.is_zero() && !den.leads_negative());
        RationalFunction { num, den }
    }

    pub fn numerator(&self) -> &Polynomial {
        &self.num
    }

    pub fn denominator(&self) -> &Polynomial {
        &self.den
    }

    pub fn is_polynomial(&self) -> bool {
        self.den.is_one()
    }

    /// `1 / self`; `None` for zero.
    pub fn inverse(&self) -> Option<Self> {
        if self.num.is_zero() {
            return None;
        }
        let (num, den) = if self.num.leads_negative() {
            (self.den.neg(), self.num.neg())
        } else {
            (self.den.clone(), self.num.clone())
        };
        Some(RationalFunction { num, den })
    }

    fn sum(&self, other: &Self, negate: bool) -> Self {
        let other_num = if negate {
            other.num.neg()
        } else {
            other.num.clone()
        };
        if self.den == other.den {
            let num = self.num.add(&other_num);
            return if self.den.is_one() {
                Self::from_polynomial(num)
            } else {
                Self::new(num, self.den.clone()).expect("nonzero")
            };
        }
        // Over a denominator 1 on one side the sum is already in lowest terms:
        // gcd(n1 + n2 d1, d1) = gcd(n1, d1) = 1.
        if other.den.is_one() {
            let num = self.num.add(&other_num.mul(&self.den));
            return Self::from_reduced(num, self.den.clone());
        }
        if self.den.is_one() {
            let num = other_num.add(&self.num.mul(&other.den));
            return Self::from_reduced(num, other.den.clone());
        }
        Self::new(
            self.num.mul(&other.den).add(&other_num.mul(&self.den)),
            self.den.mul(&other.den),
        )
        .expect("nonzero")
    }

    fn product(&self, other: &Self) -> Self {
        if self.num.is_zero() || other.num.is_zero() {
            return Self::from_polynomial(Polynomial::zero());
        }
        let cross = |n: &Polynomial, d: &Polynomial| {
            if d.is_one() {
                (n.clone(), d.clone())
            } else {
                let g = gcd(n, d);
                (
                    n.try_div(&g).expect("divides"),
                    d.try_div(&g).expect("divides"),
                )
            }
        };
        let (n1, d2) = cross(&self.num, &other.den);
        let (n2, d1) = cross(&other.num, &self.den);
        Self::from_reduced(n1.mul(&n2), normalized(d1.mul(&d2)))
    }
}

impl Scalar for RationalFunction {
    fn zero() -> Self {
        Self::from_polynomial(Polynomial::zero())
    }
    fn one() -> Self {
        Self::from_polynomial(Polynomial::one())
    }
    fn from_i64(k: i64) -> Self {
        Self::from_polynomial(Polynomial::constant(BigInt::from(k)))
    }
    fn is_zero(&self) -> bool {
        self.num.is_zero()
    }
    fn add(&self, other: &Self) -> Self {
        self.sum(other, false)
    }
    fn sub(&self, other: &Self) -> Self {
        self.sum(other, true)
    }
    fn mul(&self, other: &Self) -> Self {
        self.product(other)
    }
    fn neg(&self) -> Self {
        RationalFunction {
            num: self.num.neg(),
            den: self.den.clone(),
        }
    }
    fn add_mul(&mut self, a: &Self, b: &Self) {
        if !a.is_zero() && !b.is_zero() {
            *self = self.sum(&a.product(b), false);
        }
    }
    fn div_exact(&self, other: &Self) -> Self {
        self.product(
            &other
                .inverse()
                .expect("division by a nonzero rational function"),
        )
    }
}

impl Scalar for Polynomial {
    fn zero() -> Self {
        Polynomial::zero()
    }
    fn one() -> Self {
        Polynomial::one()
    }
    fn from_i64(k: i64) -> Self {
        Polynomial::constant(BigInt::from(k))
    }
    fn is_zero(&self) -> bool {
        Polynomial::is_zero(self)
    }
    fn add(&self, other: &Self) -> Self {
        Polynomial::add(self, other)
    }
    fn sub(&self, other: &Self) -> Self {
        Polynomial::sub(self, other)
    }
    fn mul(&self, other: &Self) -> Self {
        Polynomial::mul(self, other)
    }
    fn neg(&self) -> Self {
        Polynomial::neg(self)
    }
    fn add_mul(&mut self, a: &Self, b: &Self) {
        if !a.is_zero() && !b.is_zero() {
            *self = Polynomial::add(self, &a.mul(b));
        }
    }
    /// Exact division (the recursion divides by the integer k, which always divides).
    fn div_exact(&self, other: &Self) -> Self {
        self.try_div(other).expect("exact polynomial division")
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn x(i: usize) -> Polynomial {
        Polynomial::variable(i)
    }
    fn rf(n: Polynomial, d: Polynomial) -> RationalFunction {
        RationalFunction::new(n, d).unwrap()
    }

    #[test]
    fn field_identities() {
        // (identity) k/J − k/J = 0; (k/J)·(J/k) = 1; 1/(x+y) + 1/(x−y) = 2x/(x²−y²).
        let (k, j) = (x(0), x(1));
        let q = rf(k.clone(), j.clone());
        assert!(q.sub(&q).is_zero());
        assert_eq!(q.mul(&q.inverse().unwrap()), RationalFunction::one());
        let (a, b) = (x(2), x(3));
        let one = Polynomial::one();
        let lhs = rf(one.clone(), a.add(&b)).add(&rf(one, a.sub(&b)));
        let rhs = rf(a.scale(&BigInt::from(2)), a.mul(&a).sub(&b.mul(&b)));
        assert_eq!(lhs, rhs);
    }

    #[test]
    fn lowest_terms_and_sign() {
        // (identity) (2xy) / (−4y²) = −x / (2y).
        let q = rf(
            x(0).mul(&x(1)).scale(&BigInt::from(2)),
            x(1).pow(2).scale(&BigInt::from(-4)),
        );
        assert_eq!(q.numerator(), &x(0).neg());
        assert_eq!(q.denominator(), &x(1).scale(&BigInt::from(2)));
        assert!(RationalFunction::new(x(0), Polynomial::zero()).is_none());
    }
}
