//! Greatest common divisors in `Z[x_0, ..., x_{v-1}]`.
//!
//! # Purpose
//! `gcd(a, b)`: the polynomial g with `g | a`, `g | b` and every common divisor dividing
//! g, normalised to a positive leading coefficient (lexicographic order); integer content
//! included, so `gcd(6x, 4x²) = 2x`. It brings the parametric results to lowest terms.
//!
//! # Method
//! Recursive, one variable at a time (Z[x_0..] is a unique factorisation domain, Gauss's
//! lemma): a variable that occurs in only one argument cannot occur in the GCD, so that
//! argument is replaced by its content in that variable (the GCD of its coefficients as a
//! polynomial in it). On a variable x that occurs in both, each argument is split into its
//! content and primitive part in x; the GCD is `gcd(contents) · pp(g)`, where g ends the
//! primitive pseudo-remainder sequence of the primitive parts (every remainder made
//! primitive, which keeps coefficient growth in check). Shortcuts: a constant or a monomial
//! argument (the common case of physical parameters in a denominator, `1/J`, `1/(L C)`)
//! needs only integer GCDs and minimum exponents.
//!
//! # Numerical aspects
//! Exact. The primitive sequence costs content computations at each step; it suits the
//! small polynomials of model entries and results. The parametric routines estimate their
//! work before they start (see [`super::transfer`]).
//!
//! # References
//! D. E. Knuth, *The Art of Computer Programming*, vol. 2, §4.6.1 (primitive
//! pseudo-remainder sequences, Gauss's lemma); K. O. Geddes, S. R. Czapor, G. Labahn,
//! *Algorithms for Computer Algebra*, ch. 7 (from memory).
//!
//! # Errors
//! None (total on its inputs).

use super::polynomial::Polynomial;
use num_integer::Integer;

/// `p` with a positive leading coefficient.
pub fn normalized(p: Polynomial) -> Polynomial {
    if p.leads_negative() {
        p.neg()
    } else {
        p
    }
}

/// The GCD of a and b, positive leading coefficient; `gcd(0, 0) = 0`.
pub fn gcd(a: &Polynomial, b: &Polynomial) -> Polynomial {
    if a.is_zero() {
        return normalized(b.clone());
    }
    if b.is_zero() {
        return normalized(a.clone());
    }
    if a.as_constant().is_some() || b.as_constant().is_some() {
        return Polynomial::constant(a.integer_content().gcd(&b.integer_content()));
    }
    if a.is_monomial() {
        return monomial_gcd(a, b);
    }
    if b.is_monomial() {
        return monomial_gcd(b, a);
    }
    let vars = a.variables_used().max(b.variables_used());
    // Variables in one argument only: the GCD is free of them, so it is the GCD of the
    // other argument with every coefficient of this one as a polynomial in them.
    let only_a: Vec<usize> = (0..vars)
        .filter(|&v| a.degree_in(v) > 0 && b.degree_in(v) == 0)
        .collect();
    if !only_a.is_empty() {
        return gcd_with_coefficients(b, a, &only_a);
    }
    let only_b: Vec<usize> = (0..vars)
        .filter(|&v| b.degree_in(v) > 0 && a.degree_in(v) == 0)
        .collect();
    if !only_b.is_empty() {
        return gcd_with_coefficients(a, b, &only_b);
    }
    // Every variable occurs in both: recurse on the one of smallest degree.
    let v = (0..vars)
        .filter(|&v| a.degree_in(v) > 0)
        .min_by_key(|&v| a.degree_in(v).max(b.degree_in(v)))
        .expect("a is not constant");
    // gcd(a, b) = gcd(cont a, cont b) · gcd(pp a, pp b) (Gauss's lemma). Only the smaller
    // argument is split: gcd(big, pp small) = gcd(pp big, pp small) because pp small has no
    // divisor free of x_v, and the content of the GCD is gcd(cont small, every coefficient
    // of big), stopping at 1, so big's own content is never computed.
    let (big, small) = if a.term_count() >= b.term_count() {
        (a, b)
    } else {
        (b, a)
    };
    let content_small = content_in(small, v);
    let primitive_small = small.try_div(&content_small).expect("content divides");
    let mut content = content_small;
    for c in big.coefficients_in(v) {
        if content.is_one() {
            break;
        }
        if !c.is_zero() {
            content = gcd(&content, &c);
        }
    }
    let g = primitive_sequence_end(big.clone(), primitive_small, v);
    let g = g.try_div(&content_in(&g, v)).expect("content divides");
    normalized(g.mul(&content))
}

/// `gcd(small, big)` where `vars` occur in `big` only: `gcd(small, c_1, c_2, ...)` over the
/// coefficients `c_e` of `big` as a polynomial in `vars` (each free of them), smallest
/// first. The running GCD divides `small`, so every step is a GCD with a small polynomial,
/// and the loop stops once it is 1: the lowest-terms step of the parametric results meets
/// large numerators against small denominator factors, where computing the numerator's
/// full content first would cost GCDs among its large coefficients.
fn gcd_with_coefficients(small: &Polynomial, big: &Polynomial, vars: &[usize]) -> Polynomial {
    let mut groups: std::collections::HashMap<Vec<u32>, Vec<(Vec<u32>, num_bigint::BigInt)>> =
        std::collections::HashMap::new();
    for (e, c) in big.terms() {
        let key: Vec<u32> = vars
            .iter()
            .map(|&v| e.get(v).copied().unwrap_or(0))
            .collect();
        let mut rest = e.clone();
        for &v in vars {
            if v < rest.len() {
                rest[v] = 0;
            }
        }
        groups.entry(key).or_default().push((rest, c.clone()));
    }
    let mut coefficients: Vec<Polynomial> =
        groups.into_values().map(Polynomial::from_terms).collect();
    coefficients.sort_by_key(Polynomial::term_count);
    let mut g = normalized(small.clone());
    for c in &coefficients {
        g = gcd(&g, c);
        if g.is_one() {
            break;
        }
    }
    g
}

/// `gcd(c·x^e, p)`: the integer GCD times the smallest power of each variable in p.
fn monomial_gcd(monomial: &Polynomial, p: &Polynomial) -> Polynomial {
    let (e, c) = monomial.leading().expect("nonzero");
    let integer = c.gcd(&p.integer_content());
    let mut common = e.clone();
    for (f, _) in p.terms() {
        for (i, x) in common.iter_mut().enumerate() {
            *x = (*x).min(f.get(i).copied().unwrap_or(0));
        }
    }
    Polynomial::monomial(common, integer)
}

/// The GCD of the coefficients of p as a polynomial in `x_v` (free of `x_v`, positive lead).
pub fn content_in(p: &Polynomial, v: usize) -> Polynomial {
    let mut g = Polynomial::zero();
    for c in p.coefficients_in(v) {
        if c.is_zero() {
            continue;
        }
        g = gcd(&g, &c);
        if g.is_one() {
            break;
        }
    }
    g
}

/// Coefficient lists (lowest power of `x_v` first) without trailing zeros.
fn trimmed(mut c: Vec<Polynomial>) -> Vec<Polynomial> {
    while c.last().is_some_and(|x| x.is_zero()) {
        c.pop();
    }
    c
}

/// A pseudo-remainder of f by g in `x_v` (a nonzero multiple of the true remainder's
/// content does not matter here: the sequence takes primitive parts).
fn pseudo_remainder(f: &[Polynomial], g: &[Polynomial]) -> Vec<Polynomial> {
    let dg = g.len() - 1;
    let lead = &g[dg];
    let mut r = f.to_vec();
    while r.len() > dg && !r.is_empty() {
        let top = r.len() - 1;
        let lr = r[top].clone();
        let shift = top - dg;
        for x in r.iter_mut() {
            *x = x.mul(lead);
        }
        for (i, gi) in g.iter().enumerate() {
            r[shift + i] = r[shift + i].sub(&lr.mul(gi));
        }
        r.pop(); // the top coefficient is now zero
        r = trimmed(r);
    }
    r
}

/// The last nonzero member of the primitive pseudo-remainder sequence of two primitive
/// polynomials in `x_v` (both of positive degree): their GCD up to a unit.
fn primitive_sequence_end(a: Polynomial, b: Polynomial, v: usize) -> Polynomial {
    let (mut f, mut g) = (a.coefficients_in(v), b.coefficients_in(v));
    if f.len() < g.len() {
        std::mem::swap(&mut f, &mut g);
    }
    loop {
        let r = pseudo_remainder(&f, &g);
        if r.is_empty() {
            return Polynomial::from_coefficients_in(v, &g);
        }
        if r.len() == 1 {
            return Polynomial::one();
        }
        let r_poly = Polynomial::from_coefficients_in(v, &r);
        let content = content_in(&r_poly, v);
        let primitive = r_poly.try_div(&content).expect("content divides");
        f = g;
        g = primitive.coefficients_in(v);
    }
}

/// The least common multiple, positive leading coefficient (`lcm(0, x) = 0`).
pub fn lcm(a: &Polynomial, b: &Polynomial) -> Polynomial {
    if a.is_zero() || b.is_zero() {
        return Polynomial::zero();
    }
    let g = gcd(a, b);
    normalized(a.mul(&b.try_div(&g).expect("gcd divides")))
}

/// True when the polynomial's only divisors are units (used by tests).
#[cfg(test)]
fn coprime(a: &Polynomial, b: &Polynomial) -> bool {
    gcd(a, b).is_one()
}

#[cfg(test)]
mod tests {
    use super::*;
    use num_bigint::BigInt;

    fn x(i: usize) -> Polynomial {
        Polynomial::variable(i)
    }
    fn k(c: i64) -> Polynomial {
        Polynomial::constant(BigInt::from(c))
    }

    #[test]
    fn gcd_of_products_is_the_common_factor() {
        // (identity) gcd(g·u, g·w) = g when u and w are coprime.
        let g = x(0).mul(&x(1)).add(&x(2)).sub(&k(3));
        let u = x(0).pow(2).add(&x(1));
        let w = x(1).pow(2).sub(&x(2).mul(&x(0))).add(&k(1));
        assert!(coprime(&u, &w));
        assert_eq!(gcd(&g.mul(&u), &g.mul(&w)), g);
        assert_eq!(gcd(&g.mul(&u).neg(), &g.mul(&w)), g);
        // with integer content and a squared factor
        let six = BigInt::from(6);
        let a = g.pow(2).mul(&u).scale(&six);
        let b = g.mul(&w).scale(&BigInt::from(4));
        assert_eq!(gcd(&a, &b), g.scale(&BigInt::from(2)));
    }

    #[test]
    fn large_argument_against_a_small_factor() {
        // (identity) gcd((x0 + 1)·u, (x0 + 1)·w) = x0 + 1 for coprime u, w, where u is a dense
        // polynomial in four variables (the shape of a parametric numerator against a
        // denominator factor): the bounded-content path answers without u's full content.
        let base = x(0).add(&k(1));
        let mut u = k(1);
        for i in 0..4 {
            u = u.mul(
                &x(i)
                    .pow(3)
                    .add(&x((i + 1) % 4).mul(&k(2 + i as i64)))
                    .add(&k(7)),
            );
        }
        assert!(u.term_count() > 50);
        assert_eq!(gcd(&base.mul(&u), &base), base);
        assert_eq!(gcd(&base, &base.mul(&u).scale(&BigInt::from(3))), base);
        assert!(gcd(&u, &base.mul(&x(1).add(&k(5)))).is_one());
        let c = x(1).mul(&x(2)).sub(&k(2));
        assert_eq!(gcd(&c.mul(&u), &c.pow(2).mul(&x(3).add(&k(1)))), c);
    }

    #[test]
    fn monomial_and_constant_shortcuts() {
        // (identity) gcd(6 x² y, 4 x y³ + 2 x³) = 2x; gcd(6, 4x + 2) = 2.
        let a = x(0).pow(2).mul(&x(1)).scale(&BigInt::from(6));
        let b = x(0)
            .mul(&x(1).pow(3))
            .scale(&BigInt::from(4))
            .add(&x(0).pow(3).scale(&BigInt::from(2)));
        assert_eq!(gcd(&a, &b), x(0).scale(&BigInt::from(2)));
        assert_eq!(gcd(&k(6), &x(0).scale(&BigInt::from(4)).add(&k(2))), k(2));
        assert_eq!(gcd(&Polynomial::zero(), &x(0).neg()), x(0));
    }

    #[test]
    fn variables_in_one_argument_only() {
        // (identity) gcd((x+1) y + (x+1), (x+1)(x−1)) = x + 1.
        let f = x(0).add(&k(1));
        let a = f.mul(&x(1)).add(&f);
        let b = f.mul(&x(0).sub(&k(1)));
        assert_eq!(gcd(&a, &b), f);
    }

    #[test]
    fn lcm_divides_back() {
        let a = x(0).add(&x(1)).mul(&x(2));
        let b = x(0).add(&x(1)).mul(&x(0));
        let l = lcm(&a, &b);
        assert_eq!(l, x(0).add(&x(1)).mul(&x(0)).mul(&x(2)));
        assert!(l.try_div(&a).is_some() && l.try_div(&b).is_some());
    }
}
