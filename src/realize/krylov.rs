//! Controllability form: coordinates in which the controllability matrix is the identity.
//!
//! A has ones on the subdiagonal and last column `[-a_0, ..., -a_{n-1}]ᵀ`, `B = e_1`, so
//! `A^(k-1) B = e_k` and `[B, AB, ..., A^(n-1)B] = I`; C then lists the Markov parameters
//! `[h_1, ..., h_n]` (`h_k = C A^(k-1) B`). The observability form is its dual (observability
//! matrix the identity, B the Markov parameters).
//!
//! For float data the Markov parameters are computed exactly from the dyadic coefficients
//! and rounded once ([`markov_parameters_f64`]). Both forms are ill-conditioned at high
//! order: their coordinates are the Krylov basis, whose columns align with the dominant
//! modes, so small changes of the coefficients change the entries a lot.

use crate::error::{ModelError, Result};
use crate::matrix::Matrix;
use crate::poly::{strip_leading_zeros, ProperSplit};
use crate::recover::dyadic::{decompose, round_ratio};
use crate::scalar::Scalar;
use crate::state_space::StateSpace;
use num_bigint::BigInt;

pub fn controllability<T: Scalar>(split: &ProperSplit<T>) -> StateSpace<T> {
    let n = split.order();
    if n == 0 {
        return super::gain_only(&split.direct);
    }
    let mut a = Matrix::zeros(n, n);
    for i in 1..n {
        a.set(i, i - 1, T::one());
    }
    for i in 0..n {
        a.set(i, n - 1, split.a(i).neg());
    }
    let mut b = Matrix::zeros(n, 1);
    b.set(0, 0, T::one());
    let h = split.markov_parameters();
    let c = Matrix::from_row_major(1, n, h).expect("1xn");
    let d = Matrix::from_row_major(1, 1, vec![split.direct.clone()]).expect("1x1");
    StateSpace { a, b, c, d }
}

/// The Markov parameters `h_1, ..., h_n` of the float `num / den` (highest power first,
/// `deg num <= deg den = n`), each correctly rounded from its exact value.
///
/// # Method
/// The float coefficients are dyadic rationals: scaled by powers of two they are integers
/// `N_j`, `D_i` (`D_0 ≠ 0` the leading denominator coefficient). From `den · G = num`,
/// `h_j = (N_j − Σ_{i=1..j} D_i h_{j−i}) / D_0` with `h_0 = N_0 / D_0` the direct term;
/// with `H_j = h_j D_0^{j+1}` this is the integer recurrence
/// `H_j = N_j D_0^j − Σ_{i=1..j} D_i D_0^{i−1} H_{j−i}` (`H_0 = N_0`), and each
/// `h_j = H_j / D_0^{j+1}` is rounded once ([`crate::recover::dyadic::round_ratio`]).
/// O(n²) big-integer products; `H_j` has about j times the bits of the data.
///
/// # Numerical aspects
/// The result is the exact Markov sequence of the given floats, rounded: the plain float
/// recurrence loses up to 1e8 ulps by order 30 on ordinary data. The controllability and
/// observability forms themselves are ill-conditioned at high order (their state is the
/// Krylov basis `A^k B`, whose columns align), so exact entries do not make the form a good
/// coordinate system; they make it the exact form of the data, rounded.
///
/// # Errors
/// `Overflow` when a Markov parameter is beyond the float64 range; `TooLarge` above order
/// [`MAX_EXACT_MARKOV_ORDER`].
pub fn markov_parameters_f64(num: &[f64], den: &[f64]) -> Result<Vec<f64>> {
    let den = strip_leading_zeros(den);
    let n = den.len().saturating_sub(1);
    if n > MAX_EXACT_MARKOV_ORDER {
        return Err(ModelError::TooLarge {
            arg: "den",
            detail: format!(
                "order {n} exceeds the limit {MAX_EXACT_MARKOV_ORDER} of the controllability and \
                 observability forms (their exact Markov parameters; the forms are hopelessly \
                 ill-conditioned at such orders)"
            ),
        });
    }
    let num = strip_leading_zeros(num);
    // num padded to n + 1 coefficients (deg num <= n is checked by the split).
    let mut padded = vec![0.0; (n + 1).saturating_sub(num.len())];
    padded.extend_from_slice(num);
    let (dn, de) = integers(den);
    let (nn, ne) = integers(&padded);
    let d0 = &dn[0];
    let mut pow = vec![BigInt::from(1u8)];
    for k in 1..=n + 1 {
        let next = &pow[k - 1] * d0;
        pow.push(next);
    }
    let mut big_h: Vec<BigInt> = vec![nn[0].clone()];
    let mut out = Vec::with_capacity(n);
    for j in 1..=n {
        let mut hj = &nn[j] * &pow[j];
        for i in 1..=j {
            if dn[i].sign() != num_bigint::Sign::NoSign
                && big_h[j - i].sign() != num_bigint::Sign::NoSign
            {
                hj -= &dn[i] * &pow[i - 1] * &big_h[j - i];
            }
        }
        // h_j = H_j / D_0^(j+1) · 2^(ne − de)
        let value = round_ratio(&hj, &pow[j + 1], ne - de).ok_or_else(|| ModelError::Overflow {
            what: "the Markov parameters of num/den (controllability / observability form)".into(),
        })?;
        out.push(value);
        big_h.push(hj);
    }
    Ok(out)
}

/// Largest order of the controllability / observability forms (exact Markov parameters).
pub const MAX_EXACT_MARKOV_ORDER: usize = 1024;

/// Floats as integers times one power of two: `x_i = X_i · 2^e` (e the smallest exponent).
fn integers(values: &[f64]) -> (Vec<BigInt>, i64) {
    let parts: Vec<(i8, u64, i64)> = values.iter().map(|&v| decompose(v)).collect();
    let e = parts
        .iter()
        .filter(|p| p.0 != 0)
        .map(|p| p.2)
        .min()
        .unwrap_or(0);
    let ints = parts
        .iter()
        .map(|&(sign, mant, exp)| {
            if sign == 0 {
                BigInt::from(0u8)
            } else {
                let m = BigInt::from(mant) << ((exp - e) as u64);
                if sign < 0 {
                    -m
                } else {
                    m
                }
            }
        })
        .collect();
    (ints, e)
}
