//! Transfer matrix of a model whose entries are rational functions of named parameters.
//!
//! `C (sI − A)⁻¹ B + D = (C adj(sI − A) B + det(sI − A) D) / det(sI − A)`, with
//! `det(sI − A) = s^n + c_1 s^(n−1) + ... + c_n` and every `c_k` and numerator coefficient
//! a rational function of the parameters in lowest terms.
//!
//! # Purpose
//! Checks of hand derivations with symbols (inertias, stiffnesses, resistances): the
//! transfer matrix of a state-space model with parametric entries, as polynomials in s
//! whose coefficients are functions of the parameters.
//!
//! # Method
//! Denominators are cleared first, as the exact rational route does
//! ([`crate::recover::rational`]): `X = M_X / L_X` for X = A, B, C, D, with `L_X` the least
//! common multiple (polynomial LCM, [`lcm`]) of the entry denominators and `M_X` a matrix
//! of integer polynomials. The Faddeev–LeVerrier recursion ([`faddeev_leverrier`]) then runs
//! over `Z[parameters]` on `M_A`: its only divisions are by the integers k, and they are
//! exact, so every intermediate is an integer polynomial. Homogeneity puts the scale back,
//! `c_k(A) = c_k(M_A) / L_A^k`, `N_k(A) = N_k(M_A) / L_A^k`, and
//! `C N_{k−1} B + c_k D = (M_C N_{k−1} M_B · L_D L_A + c_k(M_A) M_D · L_C L_B) /
//! (L_C L_B L_D L_A^k)`.
//!
//! What is reduced: each coefficient (of s^j in the denominator and in each numerator entry)
//! is a fraction of integer polynomials brought to lowest terms (their GCD, integer content
//! included, is 1; the denominator has a positive leading coefficient). The common factor
//! with `L_A^k` is peeled off one factor `L_A` at a time, each step one GCD with `L_A` alone,
//! as [`crate::recover::rational`] does with integers. Nothing is cancelled in s: a common
//! root of numerator and denominator (a pole-zero cancellation) stays, as in
//! `transfer_function(exact=True)`, so the order is n.
//!
//! # Numerical aspects
//! Exact. Results are generic in the parameters: valid wherever no entry denominator of the
//! model vanishes. Cost: about n⁴ products of polynomials whose size grows with k; the
//! number of terms of `c_k` is bounded by both the dense count `Π_i (k·d_i + 1)` (`d_i` the
//! largest degree of parameter i in `M_A`) and the count of monomials of total degree at most
//! `k·t` (`t` the largest total degree), and the work by n³ products per step of that many
//! terms with the terms of an entry of `M_A`; for sparse matrices the path count
//! `(k + 1) R^k` (R the largest row sum of the entries' term counts) is the smaller bound.
//! The estimate, an upper bound, is made before the work starts and a request whose bound
//! passes ten times [`PARAMETRIC_TIME_BUDGET_SECONDS`] is refused; the clock is also checked after every step
//! of the recursion, and a run whose projected time passes four times the budget is stopped
//! and refused (never a partial result).
//!
//! # References
//! D. K. Faddeev and V. N. Faddeeva, *Computational Methods of Linear Algebra*, Freeman 1963;
//! F. R. Gantmacher, *The Theory of Matrices*, vol. 1, ch. IV (the recursion over any
//! commutative ring containing the rationals, from memory).
//!
//! # Errors
//! `TooLarge` for an order above [`MAX_PARAMETRIC_ORDER`] or an estimate beyond the budget
//! (the message names the order, the parameters' degrees and the estimated terms).

use super::gcd::{gcd, lcm};
use super::polynomial::Polynomial;
use super::rational_function::RationalFunction;
use crate::error::{ModelError, Result};
use crate::matrix::Matrix;
use crate::scalar::Scalar;
use crate::state_space::StateSpace;

/// Largest order of a parametric model.
pub const MAX_PARAMETRIC_ORDER: usize = 64;

/// Longest estimated time before a parametric request is refused.
pub const PARAMETRIC_TIME_BUDGET_SECONDS: f64 = 30.0;

/// Seconds per term product (multiply, hash and add big integers of a few words), measured
/// in a release build on this machine class with a margin of about two.
const SECONDS_PER_TERM_PRODUCT: f64 = 2.0e-7;

/// A matrix of integer polynomials over a common polynomial denominator.
struct Cleared {
    m: Matrix<Polynomial>,
    denominator: Polynomial,
}

fn clear_denominators(x: &Matrix<RationalFunction>) -> Cleared {
    let mut denominator = Polynomial::one();
    for q in x.as_slice() {
        if !q.denominator().is_one() && denominator != *q.denominator() {
            denominator = lcm(&denominator, q.denominator());
        }
    }
    let data = x
        .as_slice()
        .iter()
        .map(|q| {
            if q.denominator() == &denominator {
                q.numerator().clone()
            } else {
                q.numerator()
                    .mul(&denominator.try_div(q.denominator()).expect("lcm divides"))
            }
        })
        .collect();
    Cleared {
        m: Matrix::from_row_major(x.rows(), x.cols(), data).expect("same shape"),
        denominator,
    }
}

/// The number of monomials of total degree at most `degree` in `vars` variables, capped.
fn monomials_up_to(degree: u64, vars: usize) -> f64 {
    // C(degree + vars, vars), computed in floats (an estimate only)
    let mut c = 1.0f64;
    for i in 1..=vars {
        c *= (degree as f64 + i as f64) / i as f64;
        if c > 1e30 {
            return 1e30;
        }
    }
    c
}

/// The bound on the terms of a polynomial of degrees at most `k·d_i` in each variable and
/// total degree at most `k·t`.
fn term_bound(k: usize, degrees: &[u32], total: u32) -> f64 {
    let dense: f64 = degrees
        .iter()
        .map(|&d| (k as f64) * d as f64 + 1.0)
        .product::<f64>()
        .min(1e30);
    dense.min(monomials_up_to(k as u64 * total as u64, degrees.len()))
}

/// Degree profile of the entries of some matrices: per-variable maxima, the largest total
/// degree and the largest number of terms.
fn profile<'a>(
    matrices: impl IntoIterator<Item = &'a Matrix<Polynomial>>,
) -> (Vec<u32>, u32, usize) {
    let matrices: Vec<_> = matrices.into_iter().collect();
    let vars = matrices
        .iter()
        .flat_map(|m| m.as_slice().iter().map(|p| p.variables_used()))
        .max()
        .unwrap_or(0);
    let mut degrees = vec![0u32; vars];
    let (mut total, mut terms) = (0u32, 0usize);
    for p in matrices.iter().flat_map(|m| m.as_slice()) {
        for (i, d) in degrees.iter_mut().enumerate() {
            *d = (*d).max(p.degree_in(i));
        }
        total = total.max(p.total_degree());
        terms = terms.max(p.term_count());
    }
    (degrees, total, terms)
}

/// The largest row sum of the entries' term counts: `(A^k)_ij` has at most its k-th power
/// terms (a path count), which bounds sparse matrices far below the degree counts.
fn row_term_sum(a: &Matrix<Polynomial>) -> f64 {
    (0..a.rows())
        .map(|i| {
            (0..a.cols())
                .map(|j| a.get(i, j).term_count())
                .sum::<usize>()
        })
        .max()
        .unwrap_or(0)
        .max(1) as f64
}

/// Estimated seconds and the bound on the terms of the largest result coefficient.
fn estimate(a: &Cleared, b: &Cleared, c: &Cleared) -> (f64, f64) {
    let n = a.m.rows();
    let (p, m) = (c.m.rows(), b.m.cols());
    let (degrees, total, a_terms) = profile([&a.m]);
    let (_, _, bc_terms) = profile([&b.m, &c.m]);
    let row_sum = row_term_sum(&a.m);
    // N_k = A^k + c_1 A^(k−1) + ... + c_k I: both bounds apply (k + 1 such terms)
    let bound = |k: usize| {
        term_bound(k, &degrees, total).min((k as f64 + 1.0) * row_sum.powi(k as i32).min(1e30))
    };
    let mut products = 0.0f64;
    for k in 1..=n {
        let previous = bound(k - 1);
        // A N_{k−1}: n³ products of an entry of M_A with an entry of N_{k−1}
        products += (n as f64).powi(3) * a_terms as f64 * previous;
        // C N_{k−1} B: p·n·(n + m) products
        products += (p * n * (n + m)) as f64 * bc_terms as f64 * previous;
    }
    let largest = bound(n) * (bc_terms.max(1) as f64).powi(2);
    (products * SECONDS_PER_TERM_PRODUCT, largest)
}

fn refuse(n: usize, detail: String) -> ModelError {
    ModelError::TooLarge {
        arg: "a",
        detail: format!("the parametric transfer function at order {n}: {detail}"),
    }
}

/// `numer / Π base^exponent` in lowest terms (every base of positive leading coefficient).
///
/// The common factor with a power of a base is peeled off one base factor at a time: each
/// step is one GCD with the base alone (not with its power), and a base's steps stop as
/// soon as one removes nothing. Over several bases the removals add up (unique
/// factorisation), so the result is in lowest terms.
fn reduced(numer: Polynomial, bases: &[(&Polynomial, usize)]) -> RationalFunction {
    if numer.is_zero() {
        return RationalFunction::zero();
    }
    let mut rest = numer;
    let mut denom = Polynomial::one();
    for &(base, exponent) in bases {
        if base.is_one() {
            continue;
        }
        let mut left = exponent;
        while left > 0 {
            let step = gcd(&rest, base);
            if step.is_one() {
                break;
            }
            rest = rest.try_div(&step).expect("gcd divides");
            denom = denom.mul(&base.try_div(&step).expect("gcd divides"));
            left -= 1;
        }
        denom = denom.mul(&base.pow(left));
    }
    RationalFunction::from_reduced(rest, denom)
}

/// The recursion of [`faddeev_leverrier`] with the clock checked after every step: the
/// estimate before the work is an upper bound for dense entries, and this stops a request
/// whose actual growth still passes the budget (a refusal, never a partial result).
fn recursion_within_budget(
    a: &Matrix<Polynomial>,
) -> Result<(Vec<Polynomial>, Vec<Matrix<Polynomial>>)> {
    let n = a.rows();
    let started = std::time::Instant::now();
    let mut coeffs = vec![Polynomial::one()];
    let mut adjugates = Vec::with_capacity(n);
    if n == 0 {
        return Ok((coeffs, adjugates));
    }
    let mut current = Matrix::identity(n);
    for k in 1..=n {
        let mut product = a.matmul(&current);
        let ck = product
            .trace()
            .neg()
            .div_exact(&Polynomial::from_i64(k as i64));
        adjugates.push(current);
        if k < n {
            for i in 0..n {
                let v = product.get(i, i).add(&ck);
                product.set(i, i, v);
            }
        }
        coeffs.push(ck);
        current = product;
        let elapsed = started.elapsed().as_secs_f64();
        if k < n && elapsed * (n as f64 / k as f64) > 4.0 * PARAMETRIC_TIME_BUDGET_SECONDS {
            return Err(refuse(
                n,
                format!(
                    "the recursion took {elapsed:.1} s for step {k} of {n}, and the remaining steps grow; \
                     stopped before the budget of {PARAMETRIC_TIME_BUDGET_SECONDS:.0} s is far exceeded"
                ),
            ));
        }
    }
    Ok((coeffs, adjugates))
}

/// Numerator (p, m, n+1 row-major) and monic denominator (n+1) of the transfer matrix.
///
/// # Errors
/// `TooLarge` as described in the module documentation.
pub fn parametric_transfer_function(
    ss: &StateSpace<RationalFunction>,
) -> Result<(Vec<RationalFunction>, Vec<RationalFunction>)> {
    let (n, p, m) = (ss.n_states(), ss.n_outputs(), ss.n_inputs());
    if n > MAX_PARAMETRIC_ORDER {
        return Err(refuse(
            n,
            format!("the order exceeds the limit {MAX_PARAMETRIC_ORDER}"),
        ));
    }
    let [a, b, c, d] = [&ss.a, &ss.b, &ss.c, &ss.d].map(clear_denominators);
    let (seconds, largest) = estimate(&a, &b, &c);
    // The estimate is an upper bound (sparse models stay far below it): refused before the
    // work when even a tenth of it passes the budget; the per-step clock covers the rest.
    if seconds > 10.0 * PARAMETRIC_TIME_BUDGET_SECONDS || largest > 1e8 {
        let (degrees, total, _) = profile([&a.m]);
        return Err(refuse(
            n,
            format!(
                "over a common denominator the entries of a have degrees {degrees:?} in the parameters \
                 (total degree {total}), so a coefficient may hold up to {largest:.3e} terms and the \
                 recursion an estimated {seconds:.0} s (an upper bound), beyond ten times the \
                 budget of {PARAMETRIC_TIME_BUDGET_SECONDS:.0} s; fewer parameters, or numbers \
                 substituted for some of them, stay within it"
            ),
        ));
    }
    let (coeffs, adjugates) = recursion_within_budget(&a.m)?;
    let la = &a.denominator;
    let den = coeffs
        .iter()
        .enumerate()
        .map(|(k, ck)| reduced(ck.clone(), &[(la, k)]))
        .collect();
    let mut num = vec![RationalFunction::zero(); p * m * (n + 1)];
    for i in 0..p {
        for j in 0..m {
            num[(i * m + j) * (n + 1)] = ss.d.get(i, j).clone();
        }
    }
    let (lb, lc, ld) = (&b.denominator, &c.denominator, &d.denominator);
    let cnb_factor = ld.mul(la);
    let d_factor = lc.mul(lb);
    for (k, nk) in adjugates.iter().enumerate() {
        let cnb = c.m.matmul(&nk.matmul(&b.m));
        for i in 0..p {
            for j in 0..m {
                let mut numer = cnb.get(i, j).mul(&cnb_factor);
                numer.add_mul(&coeffs[k + 1].mul(&d_factor), d.m.get(i, j));
                num[(i * m + j) * (n + 1) + k + 1] =
                    reduced(numer, &[(la, k + 1), (lc, 1), (lb, 1), (ld, 1)]);
            }
        }
    }
    Ok((num, den))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::recover::faddeev_leverrier::{faddeev_leverrier, transfer_function};
    use num_bigint::BigInt;

    fn x(i: usize) -> Polynomial {
        Polynomial::variable(i)
    }
    fn int(k: i64) -> Polynomial {
        Polynomial::constant(BigInt::from(k))
    }
    fn rf(n: Polynomial, d: Polynomial) -> RationalFunction {
        RationalFunction::new(n, d).unwrap()
    }
    fn poly(n: Polynomial) -> RationalFunction {
        RationalFunction::from_polynomial(n)
    }
    fn matrix(r: usize, c: usize, data: Vec<RationalFunction>) -> Matrix<RationalFunction> {
        Matrix::from_row_major(r, c, data).unwrap()
    }

    /// A two-mass drive: states (θ1 − θ2, ω1, ω2), torque in, both speeds out.
    /// Parameters x0 = J1, x1 = J2, x2 = k, x3 = b.
    fn two_mass_drive() -> StateSpace<RationalFunction> {
        let (j1, j2, k, b) = (x(0), x(1), x(2), x(3));
        let zero = RationalFunction::zero;
        let one = RationalFunction::one;
        let a = matrix(
            3,
            3,
            vec![
                zero(),
                one(),
                one().neg(),
                rf(k.neg(), j1.clone()),
                rf(b.neg(), j1.clone()),
                rf(b.clone(), j1.clone()),
                rf(k.clone(), j2.clone()),
                rf(b.clone(), j2.clone()),
                rf(b.neg(), j2.clone()),
            ],
        );
        let bm = matrix(3, 1, vec![zero(), rf(int(1), j1), zero()]);
        let c = matrix(2, 3, vec![zero(), one(), zero(), zero(), zero(), one()]);
        let d = matrix(2, 1, vec![zero(), zero()]);
        StateSpace::new(a, bm, c, d).unwrap()
    }

    #[test]
    fn two_mass_drive_by_hand() {
        // Hand derivation (Newton's second law per mass, shaft torque k(θ1 − θ2) + b(ω1 − ω2)):
        // det(sI − A) = s (s² + b (1/J1 + 1/J2) s + k (1/J1 + 1/J2)); motor speed
        // ω1 / T = (s² + (b/J2) s + k/J2) / (J1 det), load speed ω2 / T = (b s + k) / (J1 J2 det).
        let ss = two_mass_drive();
        let (num, den) = parametric_transfer_function(&ss).unwrap();
        let (j1, j2, k, b) = (x(0), x(1), x(2), x(3));
        let sum = j1.add(&j2);
        let prod = j1.mul(&j2);
        assert_eq!(
            den,
            vec![
                RationalFunction::one(),
                rf(b.mul(&sum), prod.clone()),
                rf(k.mul(&sum), prod.clone()),
                RationalFunction::zero()
            ]
        );
        let motor = &num[0..4];
        let load = &num[4..8];
        assert_eq!(
            motor,
            &[
                RationalFunction::zero(),
                rf(int(1), j1.clone()),
                rf(b.clone(), prod.clone()),
                rf(k.clone(), prod.clone())
            ]
        );
        assert_eq!(
            load,
            &[
                RationalFunction::zero(),
                RationalFunction::zero(),
                rf(b, prod.clone()),
                rf(k, prod)
            ]
        );
    }

    #[test]
    fn agrees_with_the_recursion_over_rational_functions() {
        // (identity) the recursion run directly over Q(parameters), every operation reduced,
        // gives the same reduced coefficients; entries with polynomial denominators, a
        // nonzero D and a repeated denominator.
        let (p, q, r) = (x(0), x(1), x(2));
        let a = matrix(
            3,
            3,
            vec![
                rf(p.clone(), q.add(&int(1))),
                poly(int(2)),
                rf(int(1), p.add(&r)),
                poly(r.clone()),
                rf(q.clone(), int(3)),
                poly(int(0)),
                rf(int(-1), q.add(&int(1))),
                poly(p.mul(&q)),
                rf(r.clone(), p.clone()),
            ],
        );
        let b = matrix(
            3,
            2,
            vec![
                poly(int(1)),
                rf(int(1), r.clone()),
                poly(int(0)),
                poly(q.clone()),
                rf(p.clone(), int(2)),
                poly(int(0)),
            ],
        );
        let c = matrix(
            1,
            3,
            vec![poly(int(1)), rf(int(1), p.clone()), poly(r.clone())],
        );
        let d = matrix(1, 2, vec![rf(q.clone(), p.clone()), poly(int(0))]);
        let ss = StateSpace::new(a, b, c, d).unwrap();
        let (num, den) = parametric_transfer_function(&ss).unwrap();
        let (num_ref, den_ref) = transfer_function(&ss);
        assert_eq!(den, den_ref);
        assert_eq!(num, num_ref);
    }

    #[test]
    fn substitution_commutes_with_the_recursion() {
        // (identity) evaluating the parametric characteristic polynomial at integers equals
        // the integer recursion on the evaluated matrix.
        let (p, q) = (x(0), x(1));
        let entries = vec![
            p.clone(),
            q.add(&int(2)),
            int(1),
            p.mul(&q),
            int(-3),
            q.clone(),
            p.pow(2),
            int(0),
            p.add(&q),
        ];
        let a = matrix(3, 3, entries.iter().cloned().map(poly).collect());
        let ss = StateSpace::new(
            a,
            matrix(3, 1, vec![poly(int(1)), poly(int(0)), poly(int(0))]),
            matrix(1, 3, vec![poly(int(0)), poly(int(0)), poly(int(1))]),
            matrix(1, 1, vec![poly(int(0))]),
        )
        .unwrap();
        let (_, den) = parametric_transfer_function(&ss).unwrap();
        let point = [BigInt::from(3), BigInt::from(-2)];
        let numeric =
            Matrix::from_row_major(3, 3, entries.iter().map(|e| e.evaluate(&point)).collect())
                .unwrap();
        let (coeffs, _) = faddeev_leverrier(&numeric);
        for (c, expected) in den.iter().zip(&coeffs) {
            assert!(c.is_polynomial());
            assert_eq!(&c.numerator().evaluate(&point), expected);
        }
    }

    #[test]
    fn refuses_beyond_the_budget_before_the_work() {
        // order 40, every entry a dense polynomial of degree 3 in 6 parameters
        let n = 40;
        let vars: Vec<Polynomial> = (0..6).map(x).collect();
        let dense = vars.iter().fold(int(1), |acc, v| acc.add(v)).pow(3);
        let a = matrix(n, n, vec![poly(dense); n * n]);
        let ss = StateSpace::new(
            a,
            matrix(n, 1, vec![RationalFunction::one(); n]),
            matrix(1, n, vec![RationalFunction::one(); n]),
            matrix(1, 1, vec![RationalFunction::zero()]),
        )
        .unwrap();
        let started = std::time::Instant::now();
        match parametric_transfer_function(&ss) {
            Err(ModelError::TooLarge { arg: "a", .. }) => {}
            other => panic!("expected TooLarge, got {other:?}"),
        }
        assert!(started.elapsed().as_secs_f64() < 1.0);
    }

    #[test]
    fn order_zero_is_the_direct_term() {
        let ss = StateSpace::new(
            Matrix::zeros(0, 0),
            Matrix::zeros(0, 1),
            Matrix::zeros(1, 0),
            matrix(1, 1, vec![rf(x(0), x(1))]),
        )
        .unwrap();
        let (num, den) = parametric_transfer_function(&ss).unwrap();
        assert_eq!(den, vec![RationalFunction::one()]);
        assert_eq!(num, vec![rf(x(0), x(1))]);
    }
}
