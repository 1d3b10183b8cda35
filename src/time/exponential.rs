//! The matrix exponential `exp(A) = Σ_k A^k / k!` by scaling and squaring:
//! `exp(A) = r_m(A / 2^s)^(2^s)` with `r_m` the [m/m] Padé approximant.
//!
//! # Purpose
//! The exponential that every sampled-data conversion rests on (the zero-order hold is the
//! exponential of one block matrix, see [`super::zero_order_hold`]).
//!
//! # Method
//! Higham (2005), Algorithm 2.3: the smallest degree m ∈ {3, 5, 7, 9} whose bound θ_m
//! covers `‖A‖₁` is used unscaled; otherwise m = 13 on `A / 2^s`, s the smallest integer
//! with `‖A‖₁ / 2^s ≤ θ₁₃`, followed by s squarings. The approximant is
//! `r_m(A) = (V − U)⁻¹ (V + U)` with U the odd and V the even part of the Padé numerator,
//! evaluated with the fewest products (six for m = 13); the linear system is solved by LU
//! with partial pivoting.
//!
//! # Numerical aspects
//! The θ_m bound the relative backward error of the approximant by the unit roundoff
//! 2⁻⁵³ (Higham 2005, Table 2.3): the computed result is `exp(A + E)` with
//! `‖E‖ ≤ u ‖A‖` up to the rounding errors of the evaluation and the squarings. The
//! squarings can amplify rounding errors when `‖A‖` is much larger than the spectral
//! radius (non-normal A, "overscaling"); callers that exponentiate block matrices balance
//! the off-diagonal block by a power of two first (exact). The scaling by 2^s is exact.
//! Cost: (π_m + s) matrix products and one LU solve, π₁₃ = 6. Matrices of order at most
//! `SMALL` = 10 (the block matrices of small models) take a path without heap allocation:
//! the same degrees, scaling, formulas and pivoting on fixed-size arrays.
//!
//! # References
//! N. J. Higham, "The scaling and squaring method for the matrix exponential revisited",
//! SIAM J. Matrix Anal. Appl. 26 (2005) 1179–1193. C. Moler and C. Van Loan, "Nineteen
//! dubious ways to compute the exponential of a matrix, twenty-five years later", SIAM
//! Review 45 (2003).
//!
//! # Errors
//! `Shape` for a non-square matrix, `NonFinite` for NaN or inf entries, `Overflow` when
//! the norm or the result is not representable, `NoConvergence` if the Padé denominator is
//! singular (cannot happen within the θ bounds in exact arithmetic).

use super::dense::{norm1, require_finite_result};
use crate::error::{ModelError, Result};
use nalgebra::DMatrix;

/// θ_m of Higham (2005), Table 2.3, for m = 3, 5, 7, 9, 13.
const THETA: [(usize, f64); 5] = [
    (3, 1.495_585_217_958_292e-2),
    (5, 2.539_398_330_063_23e-1),
    (7, 9.504_178_996_162_932e-1),
    (9, 2.097_847_961_257_068e0),
    (13, 5.371_920_351_148_152e0),
];

/// Coefficients b_0..b_m of the [m/m] Padé numerator of exp, scaled to integers:
/// `b_j = (2m − j)! m! / ((2m)! j! (m − j)!)` times `(2m)!/m!`.
fn pade_coefficients(m: usize) -> &'static [f64] {
    match m {
        3 => &[120.0, 60.0, 12.0, 1.0],
        5 => &[30240.0, 15120.0, 3360.0, 420.0, 30.0, 1.0],
        7 => &[
            17297280.0, 8648640.0, 1995840.0, 277200.0, 25200.0, 1512.0, 56.0, 1.0,
        ],
        9 => &[
            17643225600.0,
            8821612800.0,
            2075673600.0,
            302702400.0,
            30270240.0,
            2162160.0,
            110880.0,
            3960.0,
            90.0,
            1.0,
        ],
        _ => &[
            64764752532480000.0,
            32382376266240000.0,
            7771770303897600.0,
            1187353796428800.0,
            129060195264000.0,
            10559470521600.0,
            670442572800.0,
            33522128640.0,
            1323241920.0,
            40840800.0,
            960960.0,
            16380.0,
            182.0,
            1.0,
        ],
    }
}

/// What [`exponential`] did: the Padé degree and the number of squarings.
#[derive(Debug, Clone, PartialEq)]
pub struct Exponential {
    pub value: DMatrix<f64>,
    pub pade_degree: usize,
    pub squarings: u32,
}

/// `exp(a)` by scaling and squaring (Higham 2005).
pub fn exponential(a: &DMatrix<f64>) -> Result<Exponential> {
    let n = a.nrows();
    if a.ncols() != n {
        return Err(ModelError::Shape {
            arg: "a",
            expected: "a square matrix".into(),
            found: format!("shape ({}, {})", n, a.ncols()),
        });
    }
    if n <= SMALL {
        return with_small_order!(n, exponential_na_small(a));
    }
    exponential_general(a)
}

/// [`exponential`] on the heap (any order).
fn exponential_general(a: &DMatrix<f64>) -> Result<Exponential> {
    let n = a.nrows();
    if !a.iter().all(|v| v.is_finite()) {
        return Err(ModelError::NonFinite { arg: "a" });
    }
    if n == 0 {
        return Ok(Exponential {
            value: DMatrix::zeros(0, 0),
            pade_degree: 0,
            squarings: 0,
        });
    }
    let norm = norm1(a);
    if !norm.is_finite() {
        return Err(ModelError::Overflow {
            what: "the 1-norm of the matrix to exponentiate".into(),
        });
    }
    for &(m, theta) in &THETA[..4] {
        if norm <= theta {
            let value = pade(a, m)?;
            require_finite_result("the matrix exponential", &value)?;
            return Ok(Exponential {
                value,
                pade_degree: m,
                squarings: 0,
            });
        }
    }
    let theta13 = THETA[4].1;
    let s = (norm / theta13).log2().ceil().max(0.0) as i32;
    let scaled = a * crate::matrix::pow2(-s);
    let mut value = pade(&scaled, 13)?;
    for _ in 0..s {
        value = &value * &value;
        if !value.iter().all(|v| v.is_finite()) {
            break;
        }
    }
    require_finite_result("the matrix exponential", &value)?;
    Ok(Exponential {
        value,
        pade_degree: 13,
        squarings: s as u32,
    })
}

/// The [m/m] Padé approximant `(V − U)⁻¹ (V + U)`.
fn pade(a: &DMatrix<f64>, m: usize) -> Result<DMatrix<f64>> {
    let n = a.nrows();
    let b = pade_coefficients(m);
    let ident = DMatrix::<f64>::identity(n, n);
    let a2 = a * a;
    let (u, v) = if m == 13 {
        let a4 = &a2 * &a2;
        let a6 = &a4 * &a2;
        let inner_u = &a6 * b[13] + &a4 * b[11] + &a2 * b[9];
        let u = a * (&a6 * inner_u + &a6 * b[7] + &a4 * b[5] + &a2 * b[3] + &ident * b[1]);
        let inner_v = &a6 * b[12] + &a4 * b[10] + &a2 * b[8];
        let v = &a6 * inner_v + &a6 * b[6] + &a4 * b[4] + &a2 * b[2] + &ident * b[0];
        (u, v)
    } else {
        // Powers A², A⁴, ... up to A^(m−1); U = A Σ b_{2k+1} A^{2k}, V = Σ b_{2k} A^{2k}.
        let mut powers = vec![ident.clone(), a2.clone()];
        while powers.len() < m.div_ceil(2) {
            let next = powers.last().expect("nonempty") * &a2;
            powers.push(next);
        }
        let mut u_even = DMatrix::<f64>::zeros(n, n);
        let mut v = DMatrix::<f64>::zeros(n, n);
        for (k, p) in powers.iter().enumerate() {
            u_even += p * b[2 * k + 1];
            v += p * b[2 * k];
        }
        (a * u_even, v)
    };
    let lhs = &v - &u;
    let rhs = &v + &u;
    lhs.lu().solve(&rhs).ok_or(ModelError::NoConvergence {
        routine: "the Padé approximant of the matrix exponential (singular denominator)",
    })
}

/// Largest order of the heap-free path ([`exponential_small`]).
pub(crate) const SMALL: usize = 10;

/// A square matrix of order N ≤ [`SMALL`] on the stack (rows of N entries).
#[derive(Clone, Copy)]
pub(crate) struct Small<const N: usize> {
    pub v: [[f64; N]; N],
}

impl<const N: usize> Small<N> {
    pub fn zeros() -> Self {
        Small { v: [[0.0; N]; N] }
    }

    fn identity() -> Self {
        let mut x = Small::zeros();
        for i in 0..N {
            x.v[i][i] = 1.0;
        }
        x
    }

    #[cfg(test)]
    fn from_na(a: &DMatrix<f64>) -> Self {
        let mut x = Small::zeros();
        for i in 0..N {
            for j in 0..N {
                x.v[i][j] = a[(i, j)];
            }
        }
        x
    }

    fn to_na(self) -> DMatrix<f64> {
        DMatrix::from_fn(N, N, |i, j| self.v[i][j])
    }

    fn all_finite(&self) -> bool {
        self.v.iter().flatten().all(|v| v.is_finite())
    }

    fn norm1(&self) -> f64 {
        (0..N)
            .map(|j| (0..N).map(|i| self.v[i][j].abs()).sum::<f64>())
            .fold(0.0, f64::max)
    }

    fn mul(&self, o: &Self) -> Self {
        let mut out = Small::zeros();
        for (row, a) in out.v.iter_mut().zip(&self.v) {
            for (x, orow) in a.iter().zip(&o.v) {
                for (r, y) in row.iter_mut().zip(orow) {
                    *r += x * y;
                }
            }
        }
        out
    }

    /// `Σ_k c_k X_k` (the terms in the order given).
    fn combination(terms: &[(f64, &Self)]) -> Self {
        let mut out = Small::zeros();
        for (c, x) in terms {
            for (o, v) in out.v.iter_mut().flatten().zip(x.v.iter().flatten()) {
                *o += v * c;
            }
        }
        out
    }
}

/// Calls `$f::<N>($args)` for the order `$n` ≤ [`SMALL`] (monomorphized sizes, so the
/// loops of the small products are unrolled); `$n` is checked by the caller.
macro_rules! with_small_order {
    ($n:expr, $f:ident ( $($arg:expr),* )) => {
        match $n {
            0 => $f::<0>($($arg),*),
            1 => $f::<1>($($arg),*),
            2 => $f::<2>($($arg),*),
            3 => $f::<3>($($arg),*),
            4 => $f::<4>($($arg),*),
            5 => $f::<5>($($arg),*),
            6 => $f::<6>($($arg),*),
            7 => $f::<7>($($arg),*),
            8 => $f::<8>($($arg),*),
            9 => $f::<9>($($arg),*),
            _ => $f::<10>($($arg),*),
        }
    };
}
pub(crate) use with_small_order;

fn exponential_na_small<const N: usize>(a: &DMatrix<f64>) -> Result<Exponential> {
    let mut x = Small::<N>::zeros();
    for i in 0..N {
        for j in 0..N {
            x.v[i][j] = a[(i, j)];
        }
    }
    let (value, pade_degree, squarings) = exponential_small(&x)?;
    Ok(Exponential {
        value: value.to_na(),
        pade_degree,
        squarings,
    })
}

/// `exp(a)`, its Padé degree and number of squarings, without heap allocation (order at
/// most [`SMALL`]); the algorithm and errors of [`exponential`].
pub(crate) fn exponential_small<const N: usize>(a: &Small<N>) -> Result<(Small<N>, usize, u32)> {
    if !a.all_finite() {
        return Err(ModelError::NonFinite { arg: "a" });
    }
    if N == 0 {
        return Ok((*a, 0, 0));
    }
    let norm = a.norm1();
    if !norm.is_finite() {
        return Err(ModelError::Overflow {
            what: "the 1-norm of the matrix to exponentiate".into(),
        });
    }
    let finite = |x: &Small<N>| {
        if x.all_finite() {
            Ok(())
        } else {
            Err(ModelError::Overflow {
                what: "the matrix exponential".into(),
            })
        }
    };
    for &(m, theta) in &THETA[..4] {
        if norm <= theta {
            let value = pade_small(a, m)?;
            finite(&value)?;
            return Ok((value, m, 0));
        }
    }
    let s = (norm / THETA[4].1).log2().ceil().max(0.0) as i32;
    let mut scaled = *a;
    let f = crate::matrix::pow2(-s);
    scaled.v.iter_mut().flatten().for_each(|v| *v *= f);
    let mut value = pade_small(&scaled, 13)?;
    for _ in 0..s {
        value = value.mul(&value);
        if !value.all_finite() {
            break;
        }
    }
    finite(&value)?;
    Ok((value, 13, s as u32))
}

/// [`pade`] on a [`Small`] matrix.
fn pade_small<const N: usize>(a: &Small<N>, m: usize) -> Result<Small<N>> {
    let b = pade_coefficients(m);
    let ident = Small::identity();
    let a2 = a.mul(a);
    let (u, v) = if m == 13 {
        let a4 = a2.mul(&a2);
        let a6 = a4.mul(&a2);
        let inner_u = Small::combination(&[(b[13], &a6), (b[11], &a4), (b[9], &a2)]);
        let t = a6.mul(&inner_u);
        let outer_u = Small::combination(&[
            (1.0, &t),
            (b[7], &a6),
            (b[5], &a4),
            (b[3], &a2),
            (b[1], &ident),
        ]);
        let u = a.mul(&outer_u);
        let inner_v = Small::combination(&[(b[12], &a6), (b[10], &a4), (b[8], &a2)]);
        let t = a6.mul(&inner_v);
        let v = Small::combination(&[
            (1.0, &t),
            (b[6], &a6),
            (b[4], &a4),
            (b[2], &a2),
            (b[0], &ident),
        ]);
        (u, v)
    } else {
        // Powers A², A⁴, ... up to A^(m−1); U = A Σ b_{2k+1} A^{2k}, V = Σ b_{2k} A^{2k}.
        let mut u_even = Small::zeros();
        let mut v = Small::zeros();
        let mut power = ident;
        for k in 0..m.div_ceil(2) {
            if k > 0 {
                power = if k == 1 { a2 } else { power.mul(&a2) };
            }
            for ((ue, vv), x) in u_even
                .v
                .iter_mut()
                .flatten()
                .zip(v.v.iter_mut().flatten())
                .zip(power.v.iter().flatten())
            {
                *ue += x * b[2 * k + 1];
                *vv += x * b[2 * k];
            }
        }
        (a.mul(&u_even), v)
    };
    let mut lhs = v;
    let mut rhs = v;
    for ((l, r), u) in lhs
        .v
        .iter_mut()
        .flatten()
        .zip(rhs.v.iter_mut().flatten())
        .zip(u.v.iter().flatten())
    {
        *l -= u;
        *r += u;
    }
    solve_small(lhs, rhs).ok_or(ModelError::NoConvergence {
        routine: "the Padé approximant of the matrix exponential (singular denominator)",
    })
}

/// `lhs⁻¹ rhs` by LU with partial pivoting; `None` for a zero (or non-finite) pivot.
fn solve_small<const N: usize>(mut lhs: Small<N>, mut rhs: Small<N>) -> Option<Small<N>> {
    for k in 0..N {
        let mut piv = k;
        for i in k + 1..N {
            if lhs.v[i][k].abs() > lhs.v[piv][k].abs() {
                piv = i;
            }
        }
        let p = lhs.v[piv][k];
        if p == 0.0 || !p.is_finite() {
            return None;
        }
        lhs.v.swap(k, piv);
        rhs.v.swap(k, piv);
        let (lk, rk) = (lhs.v[k], rhs.v[k]);
        for i in k + 1..N {
            let l = lhs.v[i][k] / p;
            for j in k + 1..N {
                lhs.v[i][j] -= l * lk[j];
            }
            for j in 0..N {
                rhs.v[i][j] -= l * rk[j];
            }
        }
    }
    for k in (0..N).rev() {
        let p = lhs.v[k][k];
        let mut row = rhs.v[k];
        for i in k + 1..N {
            let l = lhs.v[k][i];
            for (x, y) in row.iter_mut().zip(&rhs.v[i]) {
                *x -= l * y;
            }
        }
        rhs.v[k] = row.map(|x| x / p);
    }
    Some(rhs)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn factorial(k: usize) -> f64 {
        (1..=k).map(|x| x as f64).product()
    }

    #[test]
    fn pade_coefficients_follow_the_closed_form() {
        // b_j ∝ (2m − j)! / (j! (m − j)!) (identity: the [m/m] Padé numerator of exp).
        for m in [3, 5, 7, 9, 13] {
            let b = pade_coefficients(m);
            for j in 0..=m {
                let closed = factorial(2 * m - j) / (factorial(j) * factorial(m - j));
                let scale = factorial(2 * m) / factorial(m);
                let rel = (b[j] - closed / scale * b[0]).abs() / b[j];
                assert!(rel < 1e-14, "m={m} j={j} rel={rel}");
            }
        }
    }

    #[test]
    fn exponential_of_a_rotation_generator_is_a_rotation() {
        // exp([[0, w], [-w, 0]]) = [[cos w, sin w], [-sin w, cos w]] (identity).
        for w in [1e-3, 0.5, 2.0, 30.0] {
            let a = DMatrix::from_row_slice(2, 2, &[0.0, w, -w, 0.0]);
            let e = exponential(&a).unwrap().value;
            let expect = [w.cos(), w.sin(), -w.sin(), w.cos()];
            for (i, x) in expect.iter().enumerate() {
                assert!((e[(i / 2, i % 2)] - x).abs() < 1e-13 * w.max(1.0), "w={w}");
            }
        }
    }

    #[test]
    fn exponential_of_a_jordan_block() {
        // exp([[l, 1], [0, l]]) = e^l [[1, 1], [0, 1]] (identity).
        for l in [-40.0, -1.0, 0.0, 3.0] {
            let a = DMatrix::from_row_slice(2, 2, &[l, 1.0, 0.0, l]);
            let e = exponential(&a).unwrap().value;
            let el = f64::exp(l);
            for (got, want) in [
                (e[(0, 0)], el),
                (e[(0, 1)], el),
                (e[(1, 0)], 0.0),
                (e[(1, 1)], el),
            ] {
                assert!((got - want).abs() <= 1e-14 * el.max(1e-300) * 10.0, "l={l}");
            }
        }
    }

    #[test]
    fn small_and_general_paths_agree() {
        // The heap-free path against the general one on the same matrices (identity: the
        // same algorithm; only the order of rounding differs), every Padé degree.
        let mut seed = 5u64;
        let mut next = || {
            seed = seed
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            ((seed >> 11) as f64 / (1u64 << 53) as f64) - 0.5
        };
        fn check<const N: usize>(base: &DMatrix<f64>) {
            for scale in [1e-3, 0.1, 0.5, 1.5, 4.0, 40.0] {
                let a = base * (scale / norm1(base));
                let (small, degree, squarings) =
                    exponential_small(&Small::<N>::from_na(&a)).unwrap();
                let general = exponential_general(&a).unwrap();
                assert_eq!(
                    (degree, squarings),
                    (general.pade_degree, general.squarings)
                );
                let diff = (small.to_na() - &general.value).abs().max();
                assert!(
                    diff <= 1e-13 * general.value.abs().max(),
                    "n={N} {scale}: {diff}"
                );
            }
        }
        let mut base = |n: usize| DMatrix::from_fn(n, n, |_, _| next());
        check::<1>(&base(1));
        check::<2>(&base(2));
        check::<5>(&base(5));
        check::<SMALL>(&base(SMALL));
    }

    #[test]
    fn overflow_and_bad_input_are_refused() {
        let a = DMatrix::from_row_slice(1, 1, &[1000.0]);
        assert!(matches!(exponential(&a), Err(ModelError::Overflow { .. })));
        let a = DMatrix::from_row_slice(1, 1, &[f64::NAN]);
        assert!(matches!(exponential(&a), Err(ModelError::NonFinite { .. })));
        let a = DMatrix::from_row_slice(1, 1, &[-1000.0]);
        assert_eq!(exponential(&a).unwrap().value[(0, 0)], 0.0);
    }
}
