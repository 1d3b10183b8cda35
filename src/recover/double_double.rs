//! Double-double arithmetic: an unevaluated sum `hi + lo` of two float64 numbers, carrying
//! about 106 significant bits.
//!
//! Error-free transformations of Knuth (two-sum) and Dekker (splitting, two-product), so no
//! fused multiply-add is needed and results are identical on every CPU. Only the operations
//! the certified recursion needs: sums, products by a float64, division by a small integer.
//!
//! References: T. J. Dekker, "A floating-point technique for extending the available
//! precision", Numer. Math. 18 (1971); D. E. Knuth, *TAOCP* vol. 2, §4.2.2.

/// `hi + lo` with `|lo| <= ulp(hi)/2` after normalisation. `FMA` selects how the exact
/// product error is found: Dekker's splitting, or one fused multiply-add. Both give the same
/// exact error term (barring overflow of the splitting above about 1e300), so results are
/// bit-identical; the FMA variant is only used where the CPU has the instruction.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Dd<const FMA: bool> {
    pub hi: f64,
    pub lo: f64,
}

/// Double-double with Dekker's splitting (any CPU).
pub type DoubleDouble = Dd<false>;
/// Double-double with fused multiply-add for the product error (CPUs with FMA).
pub type DoubleDoubleFma = Dd<true>;

/// Relative error bound of one operation below, with margin: 2⁻¹⁰⁰ (the "sloppy" sum of
/// Dekker's scheme is good to a few units of 2⁻¹⁰⁶ relative to the summands' magnitudes).
pub const UNIT_ROUNDOFF: f64 = 7.888609052210118e-31;

#[inline(always)]
pub(crate) fn two_sum(a: f64, b: f64) -> (f64, f64) {
    let s = a + b;
    let bb = s - a;
    (s, (a - (s - bb)) + (b - bb))
}

#[inline(always)]
pub(crate) fn fast_two_sum(a: f64, b: f64) -> (f64, f64) {
    let s = a + b;
    (s, b - (s - a))
}

#[inline(always)]
pub(crate) fn split(a: f64) -> (f64, f64) {
    let c = 134_217_729.0 * a; // 2^27 + 1
    let hi = c - (c - a);
    (hi, a - hi)
}

#[inline(always)]
pub(crate) fn two_prod<const FMA: bool>(a: f64, b: f64) -> (f64, f64) {
    let p = a * b;
    if FMA {
        (p, a.mul_add(b, -p))
    } else {
        let (ah, al) = split(a);
        let (bh, bl) = split(b);
        (p, ((ah * bh - p) + ah * bl + al * bh) + al * bl)
    }
}

impl<const FMA: bool> Dd<FMA> {
    #[inline(always)]
    pub fn from_f64(x: f64) -> Self {
        Dd { hi: x, lo: 0.0 }
    }

    /// Nearest float64 (`hi` after normalisation; within half an ulp of hi + lo).
    #[inline(always)]
    pub fn to_f64(self) -> f64 {
        self.hi + self.lo
    }

    #[inline(always)]
    pub fn add(self, other: Self) -> Self {
        let (s, e) = two_sum(self.hi, other.hi);
        let (hi, lo) = fast_two_sum(s, e + (self.lo + other.lo));
        Dd { hi, lo }
    }

    /// `self + a * b` with a float64 `a`.
    #[inline(always)]
    pub fn add_mul_f64(self, a: f64, b: Self) -> Self {
        let (p, e) = two_prod::<FMA>(a, b.hi);
        let (s, e2) = two_sum(self.hi, p);
        let (hi, lo) = fast_two_sum(s, e2 + (e + a * b.lo + self.lo));
        Dd { hi, lo }
    }

    #[inline(always)]
    pub fn neg(self) -> Self {
        Dd {
            hi: -self.hi,
            lo: -self.lo,
        }
    }

    /// Division by a small positive integer k.
    #[inline(always)]
    pub fn div_small(self, k: f64) -> Self {
        let q1 = self.hi / k;
        let (p, e) = two_prod::<FMA>(q1, k);
        let r = ((self.hi - p) - e) + self.lo;
        let (hi, lo) = fast_two_sum(q1, r / k);
        Dd { hi, lo }
    }

    #[inline(always)]
    pub fn abs_f64(self) -> f64 {
        self.hi.abs()
    }

    #[inline(always)]
    pub fn is_finite(self) -> bool {
        self.hi.is_finite() && self.lo.is_finite()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn third_is_accurate_to_about_106_bits() {
        let third = DoubleDouble::from_f64(1.0).div_small(3.0);
        let back = DoubleDouble::default().add_mul_f64(3.0, third);
        assert!((back.hi - 1.0).abs() + back.lo.abs() < 1e-31);
    }

    #[test]
    fn both_product_error_methods_agree_bit_for_bit() {
        let mut x = DoubleDouble::from_f64(0.1);
        let mut y = DoubleDoubleFma::from_f64(0.1);
        for k in 1..50 {
            let a = 1.0 / k as f64 - 0.37;
            x = x.add_mul_f64(a, x).div_small(3.0);
            y = y.add_mul_f64(a, y).div_small(3.0);
            assert_eq!((x.hi, x.lo), (y.hi, y.lo));
        }
    }

    #[test]
    fn products_keep_the_low_part() {
        // (1 + 2^-30)^2 = 1 + 2^-29 + 2^-60: the 2^-60 term is lost in float64 alone.
        let x = DoubleDouble::from_f64(1.0 + 2f64.powi(-30));
        let sq = DoubleDouble::default().add_mul_f64(1.0 + 2f64.powi(-30), x);
        assert_eq!(sq.hi, 1.0 + 2f64.powi(-29));
        assert_eq!(sq.lo, 2f64.powi(-60));
    }
}
