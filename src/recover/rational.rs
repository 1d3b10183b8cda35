//! Exact Faddeev–LeVerrier on rational data, run over the integers.
//!
//! # Purpose
//! The characteristic polynomial, adjugate sequence and transfer matrix of a model with
//! rational entries, exactly, at a cost that stays reasonable when the entries carry large
//! denominators.
//!
//! # Method
//! The recursion over `BigRational` reduces every intermediate sum to lowest terms, one
//! big-integer GCD per operation, and the GCDs dominate (a 6×6 matrix of 4000-bit fractions
//! ran for minutes). Instead each matrix is written `X = M_X / L_X` with `L_X` the least
//! common multiple of its denominators and `M_X` an integer matrix, and homogeneity puts
//! the scale back: `c_k(A) = c_k(M_A) / L_A^k`, `N_k(A) = N_k(M_A) / L_A^k`. The
//! coefficients `c_k(M_A)` come from the multi-modular Hessenberg method ([`modular`]), and
//! the numerator terms `M_C N_k(M_A) M_B` from the Markov parameters modulo the same primes
//! (see [`transfer_function_rational`]). The adjugates need the
//! recursion on `M_A` in big integers (every division by k is exact there). Each result is
//! reduced to lowest terms once, at the end.
//!
//! # Numerical aspects
//! Exact; the results equal the `BigRational` recursion's bit for bit (both are the unique
//! reduced fractions). Cost: the modular route takes about n³ word operations per 61 bits
//! of the coefficients' Hadamard bound; the recursion about n⁴ big-integer multiplications
//! of operands up to n·(bits of `M_A`) bits. Neither forms a GCD until the final
//! reduction, which peels common factors one denominator at a time (see `reduced`).
//! Measured against the `BigRational` recursion (release build): the integer recursion was
//! 50 to 450 times faster on random p/q entries at orders 10 to 40, and the modular route
//! is faster again. The common denominator can be far longer than any entry (the lcm of n²
//! unrelated denominators), so the time is estimated from the order and the bit length of
//! the cleared integers before the work starts, and a request beyond
//! [`EXACT_TIME_BUDGET_SECONDS`] is refused with `TooLarge`; the lcm is abandoned as soon
//! as it passes the budget, so a refusal is quick.
//!
//! # Errors
//! `TooLarge` beyond the time budget (the message names the argument and the bit counts).
//!
//! # References
//! The recursion: see [`super::faddeev_leverrier`]. Clearing denominators before an exact
//! computation: D. E. Knuth, *The Art of Computer Programming*, vol. 2, §4.5.1 (from memory).

use crate::error::{ModelError, Result};
use crate::matrix::Matrix;
use crate::recover::faddeev_leverrier::faddeev_leverrier;
use crate::recover::modular;
use crate::state_space::StateSpace;
use num_bigint::BigInt;
use num_integer::Integer;
use num_rational::BigRational;
use num_traits::{One, Zero};

/// An integer matrix over a common denominator: the value is `m / denominator`.
struct Cleared {
    m: Matrix<BigInt>,
    denominator: BigInt,
}

/// Estimated seconds of the exact recursion at order n on integers of `bits` bits, with
/// `reductions` results to bring to lowest terms: about n⁴ big-integer operations with a
/// fixed overhead each; the multiplications themselves, n³ per step k on operands of
/// `bits` and about k·`bits` bits, costed at Karatsuba's exponent 1.585; and per result one
/// remainder and a GCD the size of the denominator, quadratic in its length. Calibrated on
/// this machine class: a 6×6 matrix of 148,000-bit integers takes about 2.3 s for the
/// recursion and 0.1 s per reduced adjugate entry; a 40×40 matrix of 16-bit integers 0.15 s.
pub fn estimated_seconds(n: usize, bits: u64, reductions: usize) -> f64 {
    let n = n as f64;
    let words = (bits as f64 / 64.0).max(1.0);
    n.powi(4) * 5.0e-8
        + 0.5 * n.powi(5) * words.powf(1.585) * 3.0e-9
        + reductions as f64 * words * words * 2.0e-8
}

/// Longest time the exact recursion may be expected to take before it is refused.
pub const EXACT_TIME_BUDGET_SECONDS: f64 = 30.0;

/// The largest integer size (bits, at least 64) whose estimated `seconds` stay within the
/// budget; `seconds` grows with the size.
fn largest_bits_within_budget(seconds: impl Fn(u64) -> f64) -> u64 {
    let (mut low, mut high) = (64u64, 1u64 << 40);
    while low + 1 < high {
        let mid = low + (high - low) / 2;
        if seconds(mid) <= EXACT_TIME_BUDGET_SECONDS {
            low = mid
        } else {
            high = mid
        }
    }
    low
}

/// The largest integer size (bits) within the budget at order n.
fn bit_budget(n: usize, reductions: usize) -> u64 {
    largest_bits_within_budget(|bits| estimated_seconds(n, bits, reductions))
}

fn too_costly(arg: &'static str, n: usize, bits: u64, budget: u64) -> ModelError {
    ModelError::TooLarge {
        arg,
        detail: format!(
            "over a common denominator its entries need integers of at least {bits} bits, and the exact \
             recursion at order {n} is limited to {budget} bits (an estimated {EXACT_TIME_BUDGET_SECONDS:.0} s); \
             fractions with fewer distinct or shorter denominators, or float data (correctly rounded with \
             method='auto'), stay within it"
        ),
    }
}

/// `x = M / L` with L the least common multiple of the denominators, refused as soon as an
/// entry of M would exceed `budget` bits (so a huge L is never formed in full).
fn clear_denominators(
    arg: &'static str,
    x: &Matrix<BigRational>,
    n: usize,
    budget: u64,
) -> Result<Cleared> {
    let mut denominator = BigInt::one();
    for q in x.as_slice() {
        denominator = denominator.lcm(q.denom());
        if denominator.bits() > budget {
            return Err(too_costly(arg, n, denominator.bits(), budget));
        }
    }
    let data: Vec<BigInt> = x
        .as_slice()
        .iter()
        .map(|q| q.numer() * (&denominator / q.denom()))
        .collect();
    if let Some(bits) = data.iter().map(|v| v.bits()).max().filter(|&b| b > budget) {
        return Err(too_costly(arg, n, bits, budget));
    }
    Ok(Cleared {
        m: Matrix::from_row_major(x.rows(), x.cols(), data).expect("same shape"),
        denominator,
    })
}

/// `numer / Π base^exponent` in lowest terms (every base positive).
///
/// A direct GCD of `numer` with the whole denominator costs time quadratic in their
/// length, which grows like k times that of L for `L^k`. Instead the common factor is
/// peeled off one base at a time: for a prime p with `v_p(L) = e`, step i removes
/// `min(max(v_p(numer) − (i−1)e, 0), e)` factors of p, so k steps remove
/// `min(v_p(numer), k·e)` in all, which is `v_p(gcd(numer, L^k))`; over several bases the
/// removals add up in the same way. Each step is one remainder and one GCD of numbers the
/// size of a single base, and a base's steps stop as soon as one removes nothing.
fn reduced(numer: BigInt, bases: &[(&BigInt, usize)]) -> BigRational {
    let mut rest = numer;
    let mut denom = BigInt::one();
    if rest.is_zero() {
        return BigRational::from_integer(rest);
    }
    for &(base, exponent) in bases {
        if base.is_one() {
            continue;
        }
        let mut left = exponent;
        while left > 0 {
            let step = (&rest % base).gcd(base);
            if step.is_one() {
                break;
            }
            rest /= &step;
            denom *= base / &step;
            left -= 1;
        }
        for _ in 0..left {
            denom *= base;
        }
    }
    // Lowest terms by construction: a prime of a base left in the denominator was removed
    // from `rest` wherever it divided it (the steps for that base stopped only when `rest`
    // had no factor in common with the base, or after taking the whole power).
    BigRational::new_raw(rest, denom)
}

/// Seconds to bring `reductions` modular-route results of up to `bound_bits` bits to
/// lowest terms: about a GCD the size of each denominator, costed as in
/// [`estimated_seconds`], the denominators averaging 1/n of the bound.
fn reduction_seconds(n: usize, bound_bits: u64, reductions: usize) -> f64 {
    let words = (bound_bits as f64 / 64.0).max(1.0);
    reductions as f64 * words * words * 2.0e-8 / (n.max(1) as f64)
}

/// Estimated seconds of the modular route: `count` characteristic polynomials of order n on
/// entries of `bits` bits, and `reductions` results brought to lowest terms.
fn modular_seconds(n: usize, bits: u64, count: usize, reductions: usize) -> f64 {
    let bound = modular::coefficient_bits_for(n, bits);
    modular::estimated_seconds(n, bound, bits, count) + reduction_seconds(n, bound, reductions)
}

/// The largest integer size (bits) within the budget for the modular route at order n.
fn modular_bit_budget(n: usize, count: usize, reductions: usize) -> u64 {
    largest_bits_within_budget(|bits| modular_seconds(n, bits, count, reductions))
}

/// Coefficients `[1, c_1, ..., c_n]` and adjugates `N_0 .. N_{n−1}` of a rational matrix.
///
/// The coefficients alone come from the multi-modular Hessenberg method ([`modular`]) on
/// the cleared integer matrix; the adjugates need the integer recursion. Refused with
/// [`ModelError::TooLarge`] when the estimated time exceeds [`EXACT_TIME_BUDGET_SECONDS`].
pub fn faddeev_leverrier_rational(
    a: &Matrix<BigRational>,
    with_adjugates: bool,
) -> Result<(Vec<BigRational>, Vec<Matrix<BigRational>>)> {
    let n = a.rows();
    if !with_adjugates {
        let budget = modular_bit_budget(n, 1, n).max(bit_budget(n, n));
        let cleared = clear_denominators("a", a, n, budget)?;
        let bits = modular::max_entry_bits(&cleared.m);
        let (modular_s, recursion_s) = (
            modular_seconds(n, bits, 1, n),
            estimated_seconds(n, bits, n),
        );
        if modular_s.min(recursion_s) > EXACT_TIME_BUDGET_SECONDS {
            return Err(too_costly("a", n, bits, budget));
        }
        let coeffs = if modular_s <= recursion_s {
            modular::characteristic_polynomial(&cleared.m)
        } else {
            faddeev_leverrier(&cleared.m).0
        };
        let l = &cleared.denominator;
        return Ok((
            coeffs
                .into_iter()
                .enumerate()
                .map(|(k, c)| reduced(c, &[(l, k)]))
                .collect(),
            Vec::new(),
        ));
    }
    let reductions = n * n * n + n;
    let cleared = clear_denominators("a", a, n, bit_budget(n, reductions))?;
    let l = &cleared.denominator;
    let (coeffs, adjugates) = faddeev_leverrier(&cleared.m);
    let coeffs = coeffs
        .into_iter()
        .enumerate()
        .map(|(k, c)| reduced(c, &[(l, k)]))
        .collect();
    let adjugates = adjugates
        .into_iter()
        .enumerate()
        .map(|(k, nk)| {
            let data = nk
                .into_vec()
                .into_iter()
                .map(|v| reduced(v, &[(l, k)]))
                .collect();
            Matrix::from_row_major(n, n, data).expect("n x n")
        })
        .collect();
    Ok((coeffs, adjugates))
}

/// Numerator (p, m, n+1 row-major) and monic denominator of `C (sI−A)⁻¹ B + D`, exactly.
///
/// Over common denominators, `C N_k(A) B = M_C N_k(M_A) M_B / (L_C L_A^k L_B)`: the exact
/// coefficients `c_k(M_A)` and terms `M_C N_k(M_A) M_B` come from the multi-modular route
/// ([`modular::transfer_terms`]) or, for a few states with very long entries, from the
/// integer recursion, whichever the cost estimates find cheaper. Refused like
/// [`faddeev_leverrier_rational`]; B, C and D are held to the same bit budget.
pub fn transfer_function_rational(
    ss: &StateSpace<BigRational>,
) -> Result<(Vec<BigRational>, Vec<BigRational>)> {
    let (n, p, m) = (ss.n_states(), ss.n_outputs(), ss.n_inputs());
    let reductions = (p * m + 1) * (n + 1);
    let budget = modular_bit_budget(n, p * m + 1, reductions).max(bit_budget(n, n * (p * m + 1)));
    let a = clear_denominators("a", &ss.a, n, budget)?;
    let b = clear_denominators("b", &ss.b, n, budget)?;
    let c = clear_denominators("c", &ss.c, n, budget)?;
    let d = clear_denominators("d", &ss.d, n, budget)?;
    // Few states with long entries favour the recursion (n⁴ big multiplications), more
    // states the modular route (n³ word operations per prime): take the cheaper estimate.
    let bits = modular::numerator_term_bits(&a.m, &b.m, &c.m);
    let entry_bits = [&a.m, &b.m, &c.m]
        .iter()
        .map(|x| modular::max_entry_bits(x))
        .max()
        .unwrap_or(0);
    let modular_s = modular::estimated_seconds_transfer(n, bits, entry_bits, p, m)
        + reduction_seconds(n, bits, reductions);
    let recursion_s = estimated_seconds(n, entry_bits, n * (p * m + 1));
    if modular_s.min(recursion_s) > EXACT_TIME_BUDGET_SECONDS {
        return Err(too_costly("a", n, entry_bits, budget));
    }
    let cleared = [&a, &b, &c, &d];
    let (coeffs, terms) = if recursion_s < modular_s {
        terms_by_recursion(n, cleared)
    } else {
        modular::transfer_terms(&a.m, &b.m, &c.m)
    };
    Ok(assemble(ss, cleared, &coeffs, &terms))
}

/// `c_k(M_A)` and `M_C N_k(M_A) M_B` (laid out as [`modular::transfer_terms`]) by the
/// integer recursion.
fn terms_by_recursion(n: usize, [a, b, c, _]: [&Cleared; 4]) -> (Vec<BigInt>, Vec<BigInt>) {
    let (p, m) = (c.m.rows(), b.m.cols());
    let (coeffs, adjugates) = faddeev_leverrier(&a.m);
    let mut terms = vec![BigInt::zero(); p * m * n];
    for (k, nk) in adjugates.iter().enumerate() {
        let cnb = c.m.matmul(&nk.matmul(&b.m));
        for i in 0..p {
            for j in 0..m {
                terms[(i * m + j) * n + k] = cnb.get(i, j).clone();
            }
        }
    }
    (coeffs, terms)
}

/// The reduced fractions of the denominator and of `C N_k B + c_{k+1} D`.
fn assemble(
    ss: &StateSpace<BigRational>,
    [a, b, c, d]: [&Cleared; 4],
    coeffs: &[BigInt],
    terms: &[BigInt],
) -> (Vec<BigRational>, Vec<BigRational>) {
    let (n, p, m) = (ss.n_states(), ss.n_outputs(), ss.n_inputs());
    let (la, lb, lc, ld) = (
        &a.denominator,
        &b.denominator,
        &c.denominator,
        &d.denominator,
    );
    let den: Vec<BigRational> = coeffs
        .iter()
        .enumerate()
        .map(|(k, v)| reduced(v.clone(), &[(la, k)]))
        .collect();
    let mut num = vec![BigRational::zero(); p * m * (n + 1)];
    // Over the common denominator Lc·Lb·Ld·La^(k+1):
    // C N_k B + c_{k+1} D = (M_C N_k M_B · Ld·La + c_{k+1}(M_A) · M_D · Lc·Lb) / (Lc Lb Ld La^(k+1)).
    let cnb_factor = ld * la;
    let d_factor = lc * lb;
    for i in 0..p {
        for j in 0..m {
            let entry = i * m + j;
            num[entry * (n + 1)] = ss.d.get(i, j).clone();
            for k in 0..n {
                let numer = &terms[entry * n + k] * &cnb_factor
                    + &coeffs[k + 1] * &d_factor * d.m.get(i, j);
                num[entry * (n + 1) + k + 1] =
                    reduced(numer, &[(la, k + 1), (lc, 1), (lb, 1), (ld, 1)]);
            }
        }
    }
    (num, den)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::recover::faddeev_leverrier::transfer_function;

    fn q(p: i64, d: i64) -> BigRational {
        BigRational::new(BigInt::from(p), BigInt::from(d))
    }

    fn matrix(r: usize, c: usize, entries: &[(i64, i64)]) -> Matrix<BigRational> {
        Matrix::from_row_major(r, c, entries.iter().map(|&(p, d)| q(p, d)).collect()).unwrap()
    }

    #[test]
    fn agrees_with_the_rational_recursion() {
        // (identity) both compute the same reduced fractions.
        let a = matrix(
            3,
            3,
            &[
                (1, 3),
                (-2, 7),
                (0, 1),
                (5, 2),
                (1, 1),
                (-1, 6),
                (3, 11),
                (0, 1),
                (-4, 9),
            ],
        );
        let b = matrix(3, 2, &[(1, 2), (0, 1), (1, 5), (-3, 4), (0, 1), (2, 3)]);
        let c = matrix(1, 3, &[(7, 5), (-1, 3), (1, 8)]);
        let d = matrix(1, 2, &[(1, 7), (-2, 9)]);
        let ss = StateSpace::new(a.clone(), b, c, d).unwrap();
        let (num, den) = transfer_function_rational(&ss).unwrap();
        let (num_ref, den_ref) = transfer_function(&ss);
        assert_eq!(num, num_ref);
        assert_eq!(den, den_ref);
        let (coeffs, adj) = faddeev_leverrier_rational(&a, true).unwrap();
        let (coeffs_ref, adj_ref) = faddeev_leverrier(&a);
        assert_eq!(coeffs, coeffs_ref);
        assert_eq!(adj, adj_ref);
    }

    #[test]
    fn both_routes_agree_with_the_rational_recursion() {
        // (identity) order 7, two outputs and three inputs, a zero column of B, a zero row
        // of C, and a D entry equal to 1: every entry, by either route, equals the
        // BigRational recursion's C N_k B + c_k D.
        let mut seed = 99u64;
        let mut next = move |modulus: i64| {
            seed = seed
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            ((seed >> 33) as i64) % modulus
        };
        let mut fraction = |zero: bool| {
            if zero {
                q(0, 1)
            } else {
                q(next(41) - 20, next(12) + 1)
            }
        };
        let (n, p, m) = (7, 2, 3);
        let a =
            Matrix::from_row_major(n, n, (0..n * n).map(|_| fraction(false)).collect()).unwrap();
        let b = Matrix::from_row_major(n, m, (0..n * m).map(|k| fraction(k % m == 1)).collect())
            .unwrap();
        let c = Matrix::from_row_major(p, n, (0..p * n).map(|k| fraction(k / n == 1)).collect())
            .unwrap();
        let mut d =
            Matrix::from_row_major(p, m, (0..p * m).map(|_| fraction(false)).collect()).unwrap();
        d.set(0, 0, q(1, 1));
        let ss = StateSpace::new(a, b, c, d).unwrap();
        let (num_ref, den_ref) = transfer_function(&ss);
        let (num, den) = transfer_function_rational(&ss).unwrap();
        assert_eq!((&num, &den), (&num_ref, &den_ref));
        // both routes, whichever the cost estimate picks
        let cleared: Vec<Cleared> = [("a", &ss.a), ("b", &ss.b), ("c", &ss.c), ("d", &ss.d)]
            .into_iter()
            .map(|(arg, x)| clear_denominators(arg, x, n, 10_000).unwrap())
            .collect();
        let parts = [&cleared[0], &cleared[1], &cleared[2], &cleared[3]];
        let (coeffs, terms) = terms_by_recursion(n, parts);
        assert_eq!(
            assemble(&ss, parts, &coeffs, &terms),
            (num_ref.clone(), den_ref.clone())
        );
        let (coeffs, terms) = modular::transfer_terms(&cleared[0].m, &cleared[1].m, &cleared[2].m);
        assert_eq!(assemble(&ss, parts, &coeffs, &terms), (num_ref, den_ref));
    }

    #[test]
    fn two_by_two_by_hand() {
        // (identity) det(sI − A) = s² − tr(A) s + det(A): A = [[1/2, 1/3], [1/4, 1/5]]
        // gives tr = 7/10, det = 1/10 − 1/12 = 1/60.
        let a = matrix(2, 2, &[(1, 2), (1, 3), (1, 4), (1, 5)]);
        let (coeffs, _) = faddeev_leverrier_rational(&a, false).unwrap();
        assert_eq!(coeffs, vec![q(1, 1), q(-7, 10), q(1, 60)]);
    }

    #[test]
    fn refuses_beyond_the_budget_before_forming_the_denominator() {
        // 64 × 64 entries 1/p for distinct primes-ish denominators: the common denominator
        // would need far more bits than the order-64 budget; refused, and quickly.
        let n = 64;
        let data = (0..n * n).map(|i| q(1, 2 * i as i64 + 3)).collect();
        let a = Matrix::from_row_major(n, n, data).unwrap();
        let started = std::time::Instant::now();
        match faddeev_leverrier_rational(&a, false) {
            Err(ModelError::TooLarge { arg: "a", .. }) => {}
            other => panic!("expected TooLarge, got {other:?}"),
        }
        assert!(started.elapsed().as_secs_f64() < 1.0);
    }

    #[test]
    fn budget_shrinks_with_order() {
        assert!(bit_budget(6, 6) > 500_000);
        assert!(bit_budget(64, 64) < 2_000);
        assert!(bit_budget(6, 6 * 36 + 6) < bit_budget(6, 6));
    }
}
