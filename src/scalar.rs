//! The arithmetic the generic algorithms need, implemented for `f64`, for exact rationals
//! (`BigRational`) and for big integers (`BigInt`, where every division is known to be exact).

use num_bigint::BigInt;
use num_integer::Integer;
use num_rational::BigRational;
use num_traits::{One, Zero};
use std::fmt::Debug;

/// A commutative ring with the exact divisions the recursions perform.
///
/// Methods take references so big numbers are not cloned on every operation.
pub trait Scalar: Clone + PartialEq + Debug + Send + Sync + 'static {
    fn zero() -> Self;
    fn one() -> Self;
    fn from_i64(k: i64) -> Self;
    fn is_zero(&self) -> bool;
    fn add(&self, other: &Self) -> Self;
    fn sub(&self, other: &Self) -> Self;
    fn mul(&self, other: &Self) -> Self;
    fn neg(&self) -> Self;
    /// `self += a * b`
    fn add_mul(&mut self, a: &Self, b: &Self);
    /// Division. For `BigInt` the caller guarantees the quotient is an integer.
    fn div_exact(&self, other: &Self) -> Self;
}

impl Scalar for f64 {
    fn zero() -> Self {
        0.0
    }
    fn one() -> Self {
        1.0
    }
    fn from_i64(k: i64) -> Self {
        k as f64
    }
    fn is_zero(&self) -> bool {
        *self == 0.0
    }
    fn add(&self, o: &Self) -> Self {
        self + o
    }
    fn sub(&self, o: &Self) -> Self {
        self - o
    }
    fn mul(&self, o: &Self) -> Self {
        self * o
    }
    fn neg(&self) -> Self {
        -self
    }
    // Deliberately not fused: results stay identical on every CPU.
    fn add_mul(&mut self, a: &Self, b: &Self) {
        *self += a * b;
    }
    fn div_exact(&self, o: &Self) -> Self {
        self / o
    }
}

impl Scalar for BigRational {
    fn zero() -> Self {
        Zero::zero()
    }
    fn one() -> Self {
        One::one()
    }
    fn from_i64(k: i64) -> Self {
        BigRational::from_integer(BigInt::from(k))
    }
    fn is_zero(&self) -> bool {
        Zero::is_zero(self)
    }
    fn add(&self, o: &Self) -> Self {
        self + o
    }
    fn sub(&self, o: &Self) -> Self {
        self - o
    }
    fn mul(&self, o: &Self) -> Self {
        self * o
    }
    fn neg(&self) -> Self {
        -self
    }
    fn add_mul(&mut self, a: &Self, b: &Self) {
        if !Zero::is_zero(a) && !Zero::is_zero(b) {
            *self += a * b;
        }
    }
    fn div_exact(&self, o: &Self) -> Self {
        self / o
    }
}

impl Scalar for BigInt {
    fn zero() -> Self {
        Zero::zero()
    }
    fn one() -> Self {
        One::one()
    }
    fn from_i64(k: i64) -> Self {
        BigInt::from(k)
    }
    fn is_zero(&self) -> bool {
        Zero::is_zero(self)
    }
    fn add(&self, o: &Self) -> Self {
        self + o
    }
    fn sub(&self, o: &Self) -> Self {
        self - o
    }
    fn mul(&self, o: &Self) -> Self {
        self * o
    }
    fn neg(&self) -> Self {
        -self
    }
    fn add_mul(&mut self, a: &Self, b: &Self) {
        if !Zero::is_zero(a) && !Zero::is_zero(b) {
            *self += a * b;
        }
    }
    fn div_exact(&self, o: &Self) -> Self {
        let (q, r) = self.div_rem(o);
        debug_assert!(Zero::is_zero(&r), "inexact integer division");
        q
    }
}
