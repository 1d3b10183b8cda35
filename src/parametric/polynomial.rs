//! Sparse multivariate polynomials with integer coefficients, `Z[x_0, ..., x_{v-1}]`.
//!
//! # Purpose
//! The coefficient ring of the parametric recursion: every entry of a cleared model matrix
//! is such a polynomial in the named parameters, and so is every intermediate of the
//! Faddeev–LeVerrier recursion over it (its only divisions, by the integers k, are exact).
//!
//! # Method
//! A polynomial is a list of terms `(exponents, coefficient)`, no zero coefficient, sorted
//! by the lexicographic order of the exponent vectors, largest first. Exponent vectors carry
//! no trailing zeros, so the constant monomial is the empty vector and a polynomial needs no
//! knowledge of how many parameters there are; the derived order of `Vec<u32>` on such
//! vectors is exactly the lexicographic order of the zero-padded vectors. Products collect
//! terms in a hash map and sort once; sums merge the sorted lists. Exact division
//! ([`Polynomial::try_div`]) is the multivariate division by the lexicographic leading term,
//! which leaves no remainder exactly when the divisor divides the dividend.
//!
//! # Numerical aspects
//! Exact (big-integer coefficients). Exponents are `u32`; callers bound the input degrees
//! (see [`super::MAX_INPUT_EXPONENT`]) so that no product can overflow them.
//!
//! # References
//! D. A. Cox, J. Little, D. O'Shea, *Ideals, Varieties, and Algorithms*, ch. 2 (monomial
//! orders and the division algorithm) (from memory).
//!
//! # Errors
//! None: the arithmetic is total; [`Polynomial::try_div`] returns `None` when the division
//! is not exact.

use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{One, Signed, Zero};
use std::collections::HashMap;

/// Exponents of one monomial, without trailing zeros.
pub type Exponents = Vec<u32>;

/// A polynomial over the integers in any number of variables.
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub struct Polynomial {
    /// Sorted by exponents, lexicographically largest first; no zero coefficients.
    terms: Vec<(Exponents, BigInt)>,
}

fn trim(mut e: Exponents) -> Exponents {
    while e.last() == Some(&0) {
        e.pop();
    }
    e
}

fn add_exponents(a: &[u32], b: &[u32]) -> Exponents {
    let (long, short) = if a.len() >= b.len() { (a, b) } else { (b, a) };
    let mut e = long.to_vec();
    for (x, y) in e.iter_mut().zip(short) {
        *x += y;
    }
    e
}

/// `a / b` for monomials, `None` when b does not divide a.
fn divide_exponents(a: &[u32], b: &[u32]) -> Option<Exponents> {
    if b.len() > a.len() {
        return None;
    }
    let mut e = a.to_vec();
    for (x, y) in e.iter_mut().zip(b) {
        if *x < *y {
            return None;
        }
        *x -= y;
    }
    Some(trim(e))
}

impl Polynomial {
    pub fn zero() -> Self {
        Polynomial { terms: Vec::new() }
    }

    pub fn one() -> Self {
        Self::constant(BigInt::one())
    }

    pub fn constant(c: BigInt) -> Self {
        Self::monomial(Vec::new(), c)
    }

    /// `c · x^e` (zero when c is zero).
    pub fn monomial(e: Exponents, c: BigInt) -> Self {
        if c.is_zero() {
            return Self::zero();
        }
        Polynomial {
            terms: vec![(trim(e), c)],
        }
    }

    /// The variable `x_index`.
    pub fn variable(index: usize) -> Self {
        let mut e = vec![0; index + 1];
        e[index] = 1;
        Self::monomial(e, BigInt::one())
    }

    /// From terms in any order, repeated monomials summed, zeros dropped.
    pub fn from_terms(terms: impl IntoIterator<Item = (Exponents, BigInt)>) -> Self {
        let mut map: HashMap<Exponents, BigInt> = HashMap::new();
        for (e, c) in terms {
            *map.entry(trim(e)).or_default() += c;
        }
        Self::from_map(map)
    }

    fn from_map(map: HashMap<Exponents, BigInt>) -> Self {
        let mut terms: Vec<_> = map.into_iter().filter(|(_, c)| !c.is_zero()).collect();
        terms.sort_unstable_by(|x, y| y.0.cmp(&x.0));
        Polynomial { terms }
    }

    pub fn terms(&self) -> &[(Exponents, BigInt)] {
        &self.terms
    }

    /// The number of terms.
    pub fn term_count(&self) -> usize {
        self.terms.len()
    }

    pub fn is_zero(&self) -> bool {
        self.terms.is_empty()
    }

    pub fn is_one(&self) -> bool {
        self.terms.len() == 1 && self.terms[0].0.is_empty() && self.terms[0].1.is_one()
    }

    /// The value when the polynomial is a constant.
    pub fn as_constant(&self) -> Option<BigInt> {
        match self.terms.as_slice() {
            [] => Some(BigInt::zero()),
            [(e, c)] if e.is_empty() => Some(c.clone()),
            _ => None,
        }
    }

    pub fn is_monomial(&self) -> bool {
        self.terms.len() == 1
    }

    /// The lexicographically leading term.
    pub fn leading(&self) -> Option<&(Exponents, BigInt)> {
        self.terms.first()
    }

    /// The highest power of `x_index` that occurs (0 for the zero polynomial).
    pub fn degree_in(&self, index: usize) -> u32 {
        self.terms
            .iter()
            .map(|(e, _)| e.get(index).copied().unwrap_or(0))
            .max()
            .unwrap_or(0)
    }

    /// The highest total degree that occurs.
    pub fn total_degree(&self) -> u32 {
        self.terms
            .iter()
            .map(|(e, _)| e.iter().sum::<u32>())
            .max()
            .unwrap_or(0)
    }

    /// Number of variables the terms mention (one past the last that occurs).
    pub fn variables_used(&self) -> usize {
        self.terms.iter().map(|(e, _)| e.len()).max().unwrap_or(0)
    }

    /// Bits of the largest coefficient.
    pub fn max_coefficient_bits(&self) -> u64 {
        self.terms.iter().map(|(_, c)| c.bits()).max().unwrap_or(0)
    }

    /// The GCD of the coefficients, positive (zero for the zero polynomial).
    pub fn integer_content(&self) -> BigInt {
        let mut g = BigInt::zero();
        for (_, c) in &self.terms {
            g = g.gcd(c);
            if g.is_one() {
                break;
            }
        }
        g
    }

    /// True when the leading coefficient is negative.
    pub fn leads_negative(&self) -> bool {
        self.terms.first().is_some_and(|(_, c)| c.is_negative())
    }

    pub fn neg(&self) -> Self {
        Polynomial {
            terms: self.terms.iter().map(|(e, c)| (e.clone(), -c)).collect(),
        }
    }

    pub fn scale(&self, k: &BigInt) -> Self {
        if k.is_zero() {
            return Self::zero();
        }
        Polynomial {
            terms: self.terms.iter().map(|(e, c)| (e.clone(), c * k)).collect(),
        }
    }

    /// Exact division of every coefficient by the integer k (the caller knows it divides).
    pub fn divide_by_integer(&self, k: &BigInt) -> Self {
        Polynomial {
            terms: self.terms.iter().map(|(e, c)| (e.clone(), c / k)).collect(),
        }
    }

    /// `x^e · self`.
    pub fn shift(&self, e: &[u32]) -> Self {
        Polynomial {
            terms: self
                .terms
                .iter()
                .map(|(f, c)| (add_exponents(f, e), c.clone()))
                .collect(),
        }
    }

    fn merge(&self, other: &Self, negate_other: bool) -> Self {
        let (a, b) = (&self.terms, &other.terms);
        let mut out = Vec::with_capacity(a.len() + b.len());
        let (mut i, mut j) = (0, 0);
        let sign = |c: &BigInt| if negate_other { -c } else { c.clone() };
        while i < a.len() && j < b.len() {
            match a[i].0.cmp(&b[j].0) {
                std::cmp::Ordering::Greater => {
                    out.push(a[i].clone());
                    i += 1
                }
                std::cmp::Ordering::Less => {
                    out.push((b[j].0.clone(), sign(&b[j].1)));
                    j += 1
                }
                std::cmp::Ordering::Equal => {
                    let c = if negate_other {
                        &a[i].1 - &b[j].1
                    } else {
                        &a[i].1 + &b[j].1
                    };
                    if !c.is_zero() {
                        out.push((a[i].0.clone(), c));
                    }
                    i += 1;
                    j += 1
                }
            }
        }
        out.extend(a[i..].iter().cloned());
        out.extend(b[j..].iter().map(|(e, c)| (e.clone(), sign(c))));
        Polynomial { terms: out }
    }

    pub fn add(&self, other: &Self) -> Self {
        self.merge(other, false)
    }

    pub fn sub(&self, other: &Self) -> Self {
        self.merge(other, true)
    }

    pub fn mul(&self, other: &Self) -> Self {
        if self.is_zero() || other.is_zero() {
            return Self::zero();
        }
        // A monomial factor keeps the order (lex is a monomial order): no sort needed.
        if let [(e, c)] = other.terms.as_slice() {
            return self.shift(e).scale(c);
        }
        if let [(e, c)] = self.terms.as_slice() {
            return other.shift(e).scale(c);
        }
        let mut map: HashMap<Exponents, BigInt> =
            HashMap::with_capacity(self.terms.len() * other.terms.len());
        for (ea, ca) in &self.terms {
            for (eb, cb) in &other.terms {
                *map.entry(add_exponents(ea, eb)).or_default() += ca * cb;
            }
        }
        Self::from_map(map)
    }

    pub fn pow(&self, k: usize) -> Self {
        let mut out = Self::one();
        for _ in 0..k {
            out = out.mul(self);
        }
        out
    }

    /// `self / divisor` when the division is exact, else `None` (division by zero: `None`).
    pub fn try_div(&self, divisor: &Self) -> Option<Self> {
        let (lead_e, lead_c) = divisor.leading()?;
        if let Some(k) = divisor.as_constant() {
            return self
                .terms
                .iter()
                .all(|(_, c)| c.is_multiple_of(&k))
                .then(|| self.divide_by_integer(&k));
        }
        let mut rest = self.clone();
        let mut quotient = Vec::new();
        while let Some((e, c)) = rest.leading() {
            let qe = divide_exponents(e, lead_e)?;
            let (qc, r) = c.div_rem(lead_c);
            if !r.is_zero() {
                return None;
            }
            rest = rest.sub(&divisor.shift(&qe).scale(&qc));
            quotient.push((qe, qc));
        }
        // Quotient terms arrive in decreasing order (each step's leading term is smaller).
        Some(Polynomial { terms: quotient })
    }

    /// The coefficients of `self` as a polynomial in `x_index` (lowest power first), each
    /// free of `x_index`.
    pub fn coefficients_in(&self, index: usize) -> Vec<Polynomial> {
        let degree = self.degree_in(index) as usize;
        let mut parts: Vec<Vec<(Exponents, BigInt)>> = vec![Vec::new(); degree + 1];
        for (e, c) in &self.terms {
            let power = e.get(index).copied().unwrap_or(0) as usize;
            let mut f = e.clone();
            if index < f.len() {
                f[index] = 0;
            }
            parts[power].push((trim(f), c.clone()));
        }
        parts
            .into_iter()
            .map(|mut terms| {
                terms.sort_unstable_by(|x, y| y.0.cmp(&x.0));
                Polynomial { terms }
            })
            .collect()
    }

    /// `Σ_k coefficients[k] · x_index^k`.
    pub fn from_coefficients_in(index: usize, coefficients: &[Polynomial]) -> Self {
        let mut out = Self::zero();
        for (k, c) in coefficients.iter().enumerate() {
            if c.is_zero() {
                continue;
            }
            let mut e = vec![0; index + 1];
            e[index] = k as u32;
            out = out.add(&c.shift(&trim(e)));
        }
        out
    }

    /// The value at integer or rational points is not needed by the core; the value at a
    /// point of integers is, for tests: `Σ c · Π x_i^{e_i}`.
    pub fn evaluate(&self, point: &[BigInt]) -> BigInt {
        let mut total = BigInt::zero();
        for (e, c) in &self.terms {
            let mut t = c.clone();
            for (i, &k) in e.iter().enumerate() {
                let x = point.get(i).cloned().unwrap_or_default();
                t *= num_traits::pow(x, k as usize);
            }
            total += t;
        }
        total
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn x(i: usize) -> Polynomial {
        Polynomial::variable(i)
    }
    fn k(c: i64) -> Polynomial {
        Polynomial::constant(BigInt::from(c))
    }

    #[test]
    fn ring_identities() {
        // (identity) (x + y)^2 − (x − y)^2 = 4xy; (x + 1)(x − 1) = x² − 1.
        let (a, b) = (x(0), x(1));
        let lhs = a.add(&b).pow(2).sub(&a.sub(&b).pow(2));
        assert_eq!(lhs, a.mul(&b).scale(&BigInt::from(4)));
        assert_eq!(a.add(&k(1)).mul(&a.sub(&k(1))), a.mul(&a).sub(&k(1)));
        assert!(a.sub(&a).is_zero());
    }

    #[test]
    fn exact_division_and_its_refusal() {
        // (identity) (x² y + 3 z)(x − 2y + 1) / (x − 2y + 1) = x² y + 3 z; x / y is inexact.
        let p = x(0).pow(2).mul(&x(1)).add(&x(2).scale(&BigInt::from(3)));
        let q = x(0).sub(&x(1).scale(&BigInt::from(2))).add(&k(1));
        assert_eq!(p.mul(&q).try_div(&q), Some(p.clone()));
        assert_eq!(x(0).try_div(&x(1)), None);
        assert_eq!(p.mul(&q).add(&k(1)).try_div(&q), None);
        assert_eq!(
            p.scale(&BigInt::from(6)).try_div(&k(3)),
            Some(p.scale(&BigInt::from(2)))
        );
        assert_eq!(p.try_div(&Polynomial::zero()), None);
    }

    #[test]
    fn coefficients_round_trip() {
        let p = x(0)
            .pow(3)
            .mul(&x(1))
            .add(&x(1).pow(2))
            .sub(&x(2).mul(&x(0)));
        for v in 0..3 {
            let parts = p.coefficients_in(v);
            assert!(parts.iter().all(|c| c.degree_in(v) == 0));
            assert_eq!(Polynomial::from_coefficients_in(v, &parts), p);
        }
    }

    #[test]
    fn terms_stay_sorted_and_trimmed() {
        let p = Polynomial::from_terms(vec![
            (vec![0, 0, 0], BigInt::from(2)),
            (vec![1, 0], BigInt::from(1)),
            (vec![0, 1], BigInt::from(-1)),
            (vec![0, 1, 0], BigInt::from(1)),
        ]);
        // 2 + x: the y terms cancel, trailing zeros trimmed
        assert_eq!(
            p.terms(),
            &[(vec![1], BigInt::from(1)), (vec![], BigInt::from(2))]
        );
        let q = p.mul(&x(1).add(&x(0)));
        let sorted = q.terms().windows(2).all(|w| w[0].0 > w[1].0);
        assert!(sorted);
    }
}
