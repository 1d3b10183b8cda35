//! Exact characteristic polynomial and transfer-matrix terms of integer data by
//! multi-modular arithmetic.
//!
//! # Purpose
//! `det(sI − M) = s^n + c_1 s^(n−1) + ... + c_n` exactly, and for integer B and C the terms
//! `C N_k B` of `C adj(sI − M) B = Σ_k C N_k B s^(n−1−k)`, for an integer matrix M whose
//! entries may carry thousands of bits (a float64 matrix with widely spread exponents,
//! scaled to integers). It replaces the big-integer Faddeev–LeVerrier recursion where the
//! adjugates themselves are not needed: that recursion costs n⁴ multiplications of numbers
//! that grow to n times the entries' length; this routine costs n³ word operations per
//! prime.
//!
//! # Method
//! 1. A bound: by Hadamard's inequality every principal k×k minor of M is at most the
//!    product of the 2-norms of its rows, so `|c_k| ≤ C(n,k) · Π (k largest row norms)`,
//!    and one bound serves every k because nonzero integer rows have norm ≥ 1
//!    ([`coefficient_bits`]; the same with columns, the smaller taken).
//! 2. Enough primes p just below 2^62 that their product exceeds twice the bound.
//! 3. For each prime: M mod p is reduced to upper Hessenberg form by a similarity
//!    (Gaussian elimination with row and column swaps, exact over the field Z/p), and the
//!    characteristic polynomial of the Hessenberg matrix H follows from the recurrence
//!    `p_0 = 1`, `p_k(s) = (s − h_kk) p_{k−1}(s) − Σ_{i<k} h_ik (h_{i+1,i} ⋯ h_{k,k−1}) p_{i−1}(s)`.
//!    For the transfer terms, before the reduction, the Markov parameters
//!    `h_l = C M^l B` (l < n) by matrix-vector products, and then
//!    `C N_k B = Σ_{l ≤ k} c_l h_{k−l}`, since `N_k = Σ_{l ≤ k} c_l M^(k−l)`; every entry of
//!    `N_k` is a signed sum of fewer than 2^n minors of M, so the same bound holds for it.
//!    Arithmetic is Montgomery multiplication on 64-bit words; the primes run in parallel
//!    when there is enough work to share.
//! 4. Chinese remaindering (Garner's mixed-radix form), then the symmetric residue.
//!
//! # Numerical aspects
//! Exact: no rounding anywhere, and no unlucky primes (the characteristic polynomial of
//! M mod p is the characteristic polynomial of M reduced mod p, whatever p). Cost about
//! `P · (10/3) n³` modular multiplications for P primes, `P ≈ (bound bits)/61`, plus
//! `P²/2` per coefficient for the reconstruction; [`estimated_seconds`] prices a request
//! so callers can refuse one beyond their time budget before any work is done.
//!
//! # References
//! H. Cohen, *A Course in Computational Algebraic Number Theory*, Springer 1993, §2.2.4
//! (Hessenberg method for the characteristic polynomial, from memory); P. L. Montgomery,
//! "Modular multiplication without trial division", Math. Comp. 44 (1985); H. L. Garner,
//! "The residue number system", IRE Trans. Electronic Computers EC-8 (1959); J. Hadamard
//! (1893) for the determinant bound.

use crate::matrix::Matrix;
use num_bigint::{BigInt, BigUint, Sign};
use num_traits::Zero;
use rayon::prelude::*;
use std::sync::Mutex;

/// Arithmetic modulo an odd prime `p < 2^62` in Montgomery form (`x` stored as `x·2^64 mod p`).
#[derive(Clone, Copy, Debug)]
struct Field {
    p: u64,
    /// `−p⁻¹ mod 2^64`.
    neg_inv: u64,
    /// `2^128 mod p`: multiplying by it enters Montgomery form.
    r2: u64,
}

impl Field {
    fn new(p: u64) -> Self {
        debug_assert!(p % 2 == 1 && p < 1 << 62);
        // Newton's iteration for p⁻¹ mod 2^64: correct bits double from 3 each step.
        let mut inv = p;
        for _ in 0..5 {
            inv = inv.wrapping_mul(2u64.wrapping_sub(p.wrapping_mul(inv)));
        }
        let r = ((1u128 << 64) % p as u128) as u64;
        let r2 = ((r as u128 * r as u128) % p as u128) as u64;
        Field {
            p,
            neg_inv: inv.wrapping_neg(),
            r2,
        }
    }

    /// `t · 2^−64 mod p` for `t < p · 2^64`.
    #[inline(always)]
    fn reduce(&self, t: u128) -> u64 {
        let m = (t as u64).wrapping_mul(self.neg_inv);
        // t + m·p < 2^124 + 2^126 fits; the low word cancels by the choice of m.
        let u = ((t + m as u128 * self.p as u128) >> 64) as u64;
        if u >= self.p {
            u - self.p
        } else {
            u
        }
    }

    #[inline(always)]
    fn mul(&self, a: u64, b: u64) -> u64 {
        self.reduce(a as u128 * b as u128)
    }

    #[inline(always)]
    fn add(&self, a: u64, b: u64) -> u64 {
        let s = a + b; // < 2^63: no overflow
        if s >= self.p {
            s - self.p
        } else {
            s
        }
    }

    #[inline(always)]
    fn sub(&self, a: u64, b: u64) -> u64 {
        if a >= b {
            a - b
        } else {
            a + self.p - b
        }
    }

    /// Into Montgomery form: `x·2^64 mod p`.
    fn enter(&self, x: u64) -> u64 {
        self.mul(x % self.p, self.r2)
    }

    /// Out of Montgomery form.
    fn leave(&self, x: u64) -> u64 {
        self.reduce(x as u128)
    }

    /// Inverse of a nonzero element (both in Montgomery form), by the extended Euclidean algorithm.
    fn inv(&self, x: u64) -> u64 {
        let (mut r0, mut r1) = (self.p as i128, self.leave(x) as i128);
        let (mut t0, mut t1) = (0i128, 1i128);
        while r1 != 0 {
            let q = r0 / r1;
            (r0, r1) = (r1, r0 - q * r1);
            (t0, t1) = (t1, t0 - q * t1);
        }
        debug_assert_eq!(r0, 1, "p is prime and x nonzero");
        self.enter(t0.rem_euclid(self.p as i128) as u64)
    }

    /// A big integer given by its sign and base-2^64 digits (least significant first), reduced.
    fn reduce_digits(&self, negative: bool, digits: &[u64]) -> u64 {
        let mut acc = 0u64;
        for &d in digits.iter().rev() {
            // acc·2^64 + d: multiplying by r2 in Montgomery form multiplies by 2^64.
            acc = self.add(self.mul(acc, self.r2), self.enter(d));
        }
        if negative {
            self.sub(0, acc)
        } else {
            acc
        }
    }
}

/// Primes below 2^62, largest first, found once and kept (they never change).
static PRIMES: Mutex<Vec<u64>> = Mutex::new(Vec::new());

/// `a·b mod m` for the primality test.
fn mul_mod(a: u64, b: u64, m: u64) -> u64 {
    ((a as u128 * b as u128) % m as u128) as u64
}

fn pow_mod(mut base: u64, mut exp: u64, m: u64) -> u64 {
    let mut result = 1u64;
    base %= m;
    while exp > 0 {
        if exp & 1 == 1 {
            result = mul_mod(result, base, m);
        }
        base = mul_mod(base, base, m);
        exp >>= 1;
    }
    result
}

/// Deterministic Miller–Rabin for 64-bit integers (the first twelve primes as bases
/// suffice below 3.3·10^24; Sorenson and Webster 2015, from memory).
fn is_prime(n: u64) -> bool {
    const BASES: [u64; 12] = [2, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37];
    if n < 2 {
        return false;
    }
    for &q in &BASES {
        if n.is_multiple_of(q) {
            return n == q;
        }
    }
    let s = (n - 1).trailing_zeros();
    let d = (n - 1) >> s;
    'bases: for &a in &BASES {
        let mut x = pow_mod(a, d, n);
        if x == 1 || x == n - 1 {
            continue;
        }
        for _ in 1..s {
            x = mul_mod(x, x, n);
            if x == n - 1 {
                continue 'bases;
            }
        }
        return false;
    }
    true
}

/// The `count` largest primes below 2^62.
fn primes(count: usize) -> Vec<u64> {
    // A poisoned lock still holds a valid prefix of primes.
    let mut cached = PRIMES
        .lock()
        .unwrap_or_else(|poisoned| poisoned.into_inner());
    let mut candidate = cached.last().map_or((1u64 << 62) - 1, |&p| p - 2);
    while cached.len() < count {
        if is_prime(candidate) {
            cached.push(candidate);
        }
        candidate -= 2;
    }
    cached[..count].to_vec()
}

/// Bits of a bound B with `|c_k| < 2^B` for every coefficient of `det(sI − M)`.
pub fn coefficient_bits(m: &Matrix<BigInt>) -> u64 {
    let n = m.rows();
    // A row of entries below 2^b has 2-norm below sqrt(n)·2^b: ⌈log2(n)/2⌉ bits more.
    let half_log_n = ceil_log2(n).div_ceil(2);
    let line_sum = |bits: &mut dyn Iterator<Item = u64>| -> u64 {
        bits.filter(|&b| b > 0).map(|b| b + half_log_n).sum()
    };
    let rows = line_sum(&mut (0..n).map(|i| (0..n).map(|j| m.get(i, j).bits()).max().unwrap_or(0)));
    let cols = line_sum(&mut (0..n).map(|j| (0..n).map(|i| m.get(i, j).bits()).max().unwrap_or(0)));
    with_sign_and_subsets(n, rows.min(cols))
}

/// The same bound for an order-n matrix whose every row has entries of up to `entry_bits`
/// bits, without forming it (what a cost estimate needs before the work).
pub fn coefficient_bits_for(n: usize, entry_bits: u64) -> u64 {
    with_sign_and_subsets(n, n as u64 * (entry_bits + ceil_log2(n).div_ceil(2)))
}

/// The row-norm product's bits plus n for the `C(n, k) < 2^n` minors of each coefficient
/// and one for the sign of the symmetric residue.
fn with_sign_and_subsets(n: usize, norm_product_bits: u64) -> u64 {
    norm_product_bits + n as u64 + 1
}

/// Modular multiplications (roughly) below which the primes run on the calling thread.
const PARALLEL_WORK: usize = 200_000;

/// Each prime carries a little more than 61 bits of the product.
const BITS_PER_PRIME: u64 = 61;

fn primes_needed(bits: u64) -> usize {
    (bits / BITS_PER_PRIME + 1) as usize
}

/// Estimated seconds to compute `count` characteristic polynomials of order-n integer
/// matrices whose coefficients need `bits` bits and whose entries have at most `entry_bits`
/// bits. Calibrated on this project's build machine class (one core; the primes run in
/// parallel, so this is an upper estimate on more cores): 3 ns per modular
/// multiplication, three of them per 64-bit word of an entry brought into a prime's
/// field (two multiplications and a division), and 5 ns per step of the reconstruction
/// (Garner's digits, then the big integer built from them).
pub fn estimated_seconds(n: usize, bits: u64, entry_bits: u64, count: usize) -> f64 {
    // A transfer function with no inputs or outputs is the characteristic polynomial alone.
    count as f64 * estimated_seconds_transfer(n, bits, entry_bits, 0, 0)
}

/// Estimated seconds of [`transfer_terms`] for p outputs and m inputs, priced like
/// [`estimated_seconds`]: per prime the characteristic polynomial, n³·m for the Markov
/// parameters and n²·p·m for the terms, then the reconstruction of `n + 1 + p·m·n` values.
pub fn estimated_seconds_transfer(n: usize, bits: u64, entry_bits: u64, p: usize, m: usize) -> f64 {
    let primes = primes_needed(bits) as f64;
    let (nf, pf, mf) = (n as f64, p as f64, m as f64);
    let words = (entry_bits as f64 / 64.0).ceil();
    let per_prime = 10.0 / 3.0 * nf.powi(3)
        + nf.powi(3) * mf
        + nf * nf * pf * mf
        + 3.0 * (nf * nf + nf * (pf + mf)) * words;
    let values = nf + 1.0 + pf * mf * nf;
    primes * per_prime * 3.0e-9 + values * primes * primes * 0.5 * 5.0e-9
}

/// Characteristic polynomial of an n×n matrix over Z/p (entries in Montgomery form, row
/// major, overwritten by its Hessenberg form); coefficients `[1, c_1, ..., c_n]`, plain.
fn characteristic_polynomial_mod(h: &mut [u64], n: usize, f: &Field) -> Vec<u64> {
    let at = |i: usize, j: usize| i * n + j;
    // Hessenberg reduction by stabilized elementary similarities.
    for j in 0..n.saturating_sub(2) {
        let Some(pivot) = (j + 1..n).find(|&i| h[at(i, j)] != 0) else {
            continue;
        };
        if pivot != j + 1 {
            for c in 0..n {
                h.swap(at(pivot, c), at(j + 1, c));
            }
            for r in 0..n {
                h.swap(at(r, pivot), at(r, j + 1));
            }
        }
        let inv = f.inv(h[at(j + 1, j)]);
        for r in j + 2..n {
            if h[at(r, j)] == 0 {
                continue;
            }
            let u = f.mul(h[at(r, j)], inv);
            // row r −= u · row j+1, then column j+1 += u · column r (the inverse, on the right).
            for c in j..n {
                h[at(r, c)] = f.sub(h[at(r, c)], f.mul(u, h[at(j + 1, c)]));
            }
            for rr in 0..n {
                h[at(rr, j + 1)] = f.add(h[at(rr, j + 1)], f.mul(u, h[at(rr, r)]));
            }
        }
    }
    // Recurrence over the leading principal submatrices; polys[k] ascending, degree k, monic.
    let one = f.enter(1);
    let mut polys: Vec<Vec<u64>> = Vec::with_capacity(n + 1);
    polys.push(vec![one]);
    for k in 1..=n {
        let (kk, prev) = (k - 1, &polys[k - 1]);
        let mut next = vec![0u64; k + 1];
        for (d, &v) in prev.iter().enumerate() {
            next[d + 1] = f.add(next[d + 1], v);
            next[d] = f.sub(next[d], f.mul(h[at(kk, kk)], v));
        }
        let mut chain = one;
        for i in (0..kk).rev() {
            chain = f.mul(chain, h[at(i + 1, i)]);
            if chain == 0 {
                break; // every further term carries this zero subdiagonal entry
            }
            let factor = f.mul(h[at(i, kk)], chain);
            if factor == 0 {
                continue;
            }
            for (d, &v) in polys[i].iter().enumerate() {
                next[d] = f.sub(next[d], f.mul(factor, v));
            }
        }
        polys.push(next);
    }
    polys[n].iter().rev().map(|&v| f.leave(v)).collect()
}

/// Garner's mixed-radix reconstruction of many values from their residues, each value
/// taken in the symmetric range `(−P/2, P/2]`, P the product of the primes.
/// `residues[j][v]` is value v modulo `primes[j]`.
fn reconstruct(primes: &[u64], residues: &[Vec<u64>]) -> Vec<BigInt> {
    let count = residues.first().map_or(0, |r| r.len());
    let fields: Vec<Field> = primes.iter().map(|&p| Field::new(p)).collect();
    // digits[v][j]: mixed-radix digits, value = d_0 + d_1 p_0 + d_2 p_0 p_1 + ...
    let mut digits = vec![Vec::with_capacity(primes.len()); count];
    for (j, f) in fields.iter().enumerate() {
        // p_i mod p_j in Montgomery form, so that a plain value times it stays plain.
        let radix: Vec<u64> = primes[..j].iter().map(|&p| f.enter(p)).collect();
        let prefix = radix.iter().fold(f.enter(1), |acc, &r| f.mul(acc, r));
        // (p_0 ⋯ p_{j−1})⁻¹, Montgomery form; multiplying a plain value by it gives a plain result.
        let inverse = f.inv(prefix);
        for (v, d) in digits.iter_mut().enumerate() {
            let mut partial = 0u64; // plain: d_0 + d_1 p_0 + ... mod p_j, by Horner
            for i in (0..j).rev() {
                let di = if d[i] >= f.p { d[i] - f.p } else { d[i] };
                partial = f.add(f.mul(partial, radix[i]), di);
            }
            let r = residues[j][v];
            d.push(f.mul(f.sub(r, partial), inverse));
        }
    }
    let product = primes.iter().fold(BigUint::from(1u8), |acc, &p| acc * p);
    let half = &product >> 1;
    digits
        .into_iter()
        .map(|d| {
            let mut x = BigUint::zero();
            for (i, &di) in d.iter().enumerate().rev() {
                x *= primes[i];
                x += di;
            }
            if x > half {
                BigInt::from_biguint(Sign::Minus, &product - x)
            } else {
                BigInt::from_biguint(Sign::Plus, x)
            }
        })
        .collect()
}

/// Sign and base-2^64 digits of every entry, computed once and reduced by every prime.
fn digits_of(m: &Matrix<BigInt>) -> Vec<(bool, Vec<u64>)> {
    m.as_slice()
        .iter()
        .map(|x| (x.sign() == Sign::Minus, x.magnitude().to_u64_digits()))
        .collect()
}

fn reduce_all(f: &Field, digits: &[(bool, Vec<u64>)]) -> Vec<u64> {
    digits
        .iter()
        .map(|(negative, d)| f.reduce_digits(*negative, d))
        .collect()
}

/// `per_prime` for every prime, in parallel when there is enough work to share.
fn over_primes(
    primes: &[u64],
    work_per_prime: usize,
    per_prime: impl Fn(&Field) -> Vec<u64> + Sync,
) -> Vec<Vec<u64>> {
    let run = |&p: &u64| per_prime(&Field::new(p));
    // Spreading a few microseconds of work over threads costs more than it saves.
    if primes.len().saturating_mul(work_per_prime) < PARALLEL_WORK {
        primes.iter().map(run).collect()
    } else {
        primes.par_iter().map(run).collect()
    }
}

/// Bit length of the largest entry (0 for an empty or zero matrix).
pub fn max_entry_bits(m: &Matrix<BigInt>) -> u64 {
    m.as_slice().iter().map(|v| v.bits()).max().unwrap_or(0)
}

/// `⌈log2 n⌉` (0 for n ≤ 1).
fn ceil_log2(n: usize) -> u64 {
    (usize::BITS - n.saturating_sub(1).leading_zeros()) as u64
}

/// Exact characteristic polynomial `[1, c_1, ..., c_n]` of a square integer matrix.
pub fn characteristic_polynomial(m: &Matrix<BigInt>) -> Vec<BigInt> {
    let n = m.rows();
    let primes = primes(primes_needed(coefficient_bits(m)));
    let digits = digits_of(m);
    let residues = over_primes(&primes, n * n * n, |f| {
        let mut h = reduce_all(f, &digits);
        characteristic_polynomial_mod(&mut h, n, f)
    });
    reconstruct(&primes, &residues)
}

/// Bits of a bound on `|c_i N_k b_j|` over every output i, input j and k, for the
/// adjugate sequence `N_k` of M: each entry of `N_k` is a signed sum of fewer than 2^n
/// minors of M, so the bound of [`coefficient_bits`] holds for it, and the products with
/// the rows of C and columns of B add their bits and `2⌈log2 n⌉` for the n² terms.
pub fn numerator_term_bits(m: &Matrix<BigInt>, b: &Matrix<BigInt>, c: &Matrix<BigInt>) -> u64 {
    coefficient_bits(m) + max_entry_bits(b) + max_entry_bits(c) + 2 * ceil_log2(m.rows())
}

/// Exact `[1, c_1, ..., c_n]` and the terms `c_i N_k b_j` of `C adj(sI − M) B`, with `M`
/// square (n×n), B n×m and C p×n integer matrices; the terms are laid out
/// `terms[(i·m + j)·n + k]`, k = 0..n−1 (the coefficient of `s^(n−1−k)`).
///
/// Per prime, besides the characteristic polynomial: the Markov parameters
/// `h_l = C M^l B`, l < n (n matrix-vector products per input), and
/// `c_i N_k b_j = Σ_{l ≤ k} c_l h_{k−l}`, since `N_k = Σ_{l ≤ k} c_l M^(k−l)`.
pub fn transfer_terms(
    m: &Matrix<BigInt>,
    b: &Matrix<BigInt>,
    c: &Matrix<BigInt>,
) -> (Vec<BigInt>, Vec<BigInt>) {
    let (n, inputs, outputs) = (m.rows(), b.cols(), c.rows());
    let bits = coefficient_bits(m).max(numerator_term_bits(m, b, c));
    let primes = primes(primes_needed(bits));
    let (dm, db, dc) = (digits_of(m), digits_of(b), digits_of(c));
    let work = n * n * n * (4 + inputs) + n * n * outputs * inputs;
    let residues = over_primes(&primes, work, |f| {
        let mut h = reduce_all(f, &dm);
        let (bm, cm) = (reduce_all(f, &db), reduce_all(f, &dc));
        // markov[l·p·m + i·m + j] = (C M^l B)_ij, Montgomery form.
        let mut markov = vec![0u64; n * outputs * inputs];
        let mut v = bm; // M^l B, n × m
        let mut next = vec![0u64; n * inputs];
        for l in 0..n {
            for i in 0..outputs {
                for j in 0..inputs {
                    let dot = (0..n).fold(0, |acc, r| {
                        f.add(acc, f.mul(cm[i * n + r], v[r * inputs + j]))
                    });
                    markov[(l * outputs + i) * inputs + j] = dot;
                }
            }
            if l + 1 < n {
                for r in 0..n {
                    for j in 0..inputs {
                        next[r * inputs + j] = (0..n).fold(0, |acc, t| {
                            f.add(acc, f.mul(h[r * n + t], v[t * inputs + j]))
                        });
                    }
                }
                std::mem::swap(&mut v, &mut next);
            }
        }
        let coeffs = characteristic_polynomial_mod(&mut h, n, f); // plain
        let mut out = coeffs.clone();
        for i in 0..outputs {
            for j in 0..inputs {
                for k in 0..n {
                    // plain × Montgomery = plain
                    let term = (0..=k).fold(0, |acc, l| {
                        f.add(
                            acc,
                            f.mul(coeffs[l], markov[((k - l) * outputs + i) * inputs + j]),
                        )
                    });
                    out.push(term);
                }
            }
        }
        out
    });
    let mut values = reconstruct(&primes, &residues);
    let terms = values.split_off(n + 1);
    (values, terms)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::recover::faddeev_leverrier::faddeev_leverrier;

    use crate::tests::Lcg;

    /// A signed integer of up to `bits` bits.
    fn random_int(rng: &mut Lcg, bits: u32) -> BigInt {
        let mut x = BigInt::zero();
        for _ in 0..bits.div_ceil(50) {
            x = (x << 50) + BigInt::from(rng.next() >> 3);
        }
        x >>= (bits.div_ceil(50) * 50 - bits) as usize;
        if rng.next() & 1 == 1 {
            -x
        } else {
            x
        }
    }

    fn random_matrix(rng: &mut Lcg, n: usize, bits: u32, zero_every: u64) -> Matrix<BigInt> {
        let data = (0..n * n)
            .map(|_| {
                if zero_every > 0 && rng.next().is_multiple_of(zero_every) {
                    BigInt::zero()
                } else {
                    random_int(rng, bits)
                }
            })
            .collect();
        Matrix::from_row_major(n, n, data).unwrap()
    }

    #[test]
    fn montgomery_arithmetic_matches_u128_reference() {
        // (identity) x·y mod p computed two ways.
        let mut rng = Lcg(7);
        for &p in &primes(3) {
            let f = Field::new(p);
            for _ in 0..1000 {
                let (x, y) = (rng.next() % p, (rng.next() << 9) % p);
                let expect = mul_mod(x, y, p);
                assert_eq!(f.leave(f.mul(f.enter(x), f.enter(y))), expect);
                if x != 0 {
                    assert_eq!(f.leave(f.mul(f.inv(f.enter(x)), f.enter(x))), 1);
                }
            }
        }
    }

    #[test]
    fn primality_on_known_numbers() {
        // (identity) 2^61 − 1 is a Mersenne prime; 2^62 − 1 = 3 · 715827883 · 2147483647;
        // 3215031751 = 151·751·28351 is a strong pseudoprime to bases 2, 3, 5, 7 (from memory).
        assert!(is_prime((1u64 << 61) - 1));
        assert!(!is_prime((1u64 << 62) - 1));
        assert!(!is_prime(3_215_031_751));
        assert!(is_prime(1_000_000_007));
        let ps = primes(20);
        assert!(
            ps.windows(2).all(|w| w[0] > w[1]) && ps.iter().all(|&p| p > 1 << 61 && p < 1 << 62)
        );
    }

    #[test]
    fn reconstruction_round_trips_signed_values() {
        // (identity) residues of a known integer reconstruct it.
        let ps = primes(5);
        let values: Vec<BigInt> = vec![
            BigInt::zero(),
            BigInt::from(-1),
            BigInt::from(12345),
            -(BigInt::from(1u8) << 250usize) + BigInt::from(17),
            (BigInt::from(1u8) << 300usize) - BigInt::from(3),
        ];
        let residues: Vec<Vec<u64>> =
            ps.iter()
                .map(|&p| {
                    let f = Field::new(p);
                    values
                        .iter()
                        .map(|v| {
                            f.leave(f.reduce_digits(
                                v.sign() == Sign::Minus,
                                &v.magnitude().to_u64_digits(),
                            ))
                        })
                        .collect()
                })
                .collect();
        assert_eq!(reconstruct(&ps, &residues), values);
    }

    #[test]
    fn agrees_with_the_integer_recursion() {
        // (identity) the same exact characteristic polynomial by Faddeev–LeVerrier over BigInt.
        let mut rng = Lcg(2026);
        for &(n, bits, zeros) in &[
            (0, 8, 0),
            (1, 8, 0),
            (2, 3, 0),
            (5, 1, 2),
            (7, 60, 0),
            (9, 200, 3),
            (12, 64, 5),
            (16, 130, 0),
            (6, 2000, 0),
        ] {
            let m = random_matrix(&mut rng, n, bits, zeros);
            let (expect, _) = faddeev_leverrier(&m);
            assert_eq!(
                characteristic_polynomial(&m),
                expect,
                "n = {n}, bits = {bits}"
            );
        }
    }

    #[test]
    fn transfer_terms_agree_with_the_adjugate_sequence() {
        // (identity) c_i N_k b_j from the integer recursion's adjugates, for random integer
        // data with a zero column of B and long entries.
        let mut rng = Lcg(31);
        for &(n, p, m, bits) in &[
            (0, 1, 1, 8),
            (1, 2, 1, 8),
            (3, 1, 1, 4),
            (6, 2, 3, 70),
            (9, 3, 2, 300),
        ] {
            let a = random_matrix(&mut rng, n, bits, 4);
            let b = Matrix::from_row_major(
                n,
                m,
                (0..n * m)
                    .map(|k| {
                        if k % m == m - 1 && m > 1 {
                            BigInt::zero()
                        } else {
                            random_int(&mut rng, bits)
                        }
                    })
                    .collect(),
            )
            .unwrap();
            let c = Matrix::from_row_major(
                p,
                n,
                (0..p * n).map(|_| random_int(&mut rng, 40)).collect(),
            )
            .unwrap();
            let (expect_coeffs, adjugates) = faddeev_leverrier(&a);
            let (coeffs, terms) = transfer_terms(&a, &b, &c);
            assert_eq!(coeffs, expect_coeffs);
            assert_eq!(terms.len(), p * m * n);
            for (k, nk) in adjugates.iter().enumerate() {
                let cnb = c.matmul(&nk.matmul(&b));
                for i in 0..p {
                    for j in 0..m {
                        assert_eq!(
                            &terms[(i * m + j) * n + k],
                            cnb.get(i, j),
                            "n = {n}, k = {k}"
                        );
                    }
                }
            }
        }
    }

    #[test]
    fn singular_and_structured_matrices() {
        // (identity) a nilpotent shift has det(sI − N) = s^n; a zero matrix too; and the
        // companion matrix of s³ − 2s² − 5s + 6 gives that polynomial back.
        let n = 6;
        let shift = Matrix::from_row_major(
            n,
            n,
            (0..n * n)
                .map(|k| BigInt::from((k % n == k / n + 1) as i64))
                .collect(),
        )
        .unwrap();
        let mut expect = vec![BigInt::zero(); n + 1];
        expect[0] = BigInt::from(1);
        assert_eq!(characteristic_polynomial(&shift), expect);
        let zero = Matrix::from_row_major(n, n, vec![BigInt::zero(); n * n]).unwrap();
        assert_eq!(characteristic_polynomial(&zero), expect);
        let companion = Matrix::from_row_major(
            3,
            3,
            [2, 5, -6, 1, 0, 0, 0, 1, 0]
                .iter()
                .map(|&v| BigInt::from(v))
                .collect(),
        )
        .unwrap();
        assert_eq!(
            characteristic_polynomial(&companion),
            [1, -2, -5, 6]
                .iter()
                .map(|&v| BigInt::from(v))
                .collect::<Vec<_>>()
        );
    }

    #[test]
    fn bound_holds_at_hadamards_extreme() {
        // (identity) the 8×8 Sylvester–Hadamard matrix H (entries ±1) has |det H| = 8^4, the
        // equality case of Hadamard's inequality; scaled by 2^100 the determinant needs all
        // the bits the bound grants.
        let n = 8;
        let data = (0..n * n)
            .map(|k| {
                let (i, j): (usize, usize) = (k / n, k % n);
                let sign = if (i & j).count_ones() % 2 == 0 { 1 } else { -1 };
                BigInt::from(sign) << 100
            })
            .collect();
        let h = Matrix::from_row_major(n, n, data).unwrap();
        let (expect, _) = faddeev_leverrier(&h);
        let got = characteristic_polynomial(&h);
        assert_eq!(got, expect);
        assert_eq!(got[n].magnitude().bits(), 12 + 800 + 1);
        assert!(coefficient_bits(&h) > got.iter().map(|c| c.bits()).max().unwrap());
    }
}
