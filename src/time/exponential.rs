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
//! Cost: (π_m + s) matrix products and one LU solve, π₁₃ = 6.
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
    fn overflow_and_bad_input_are_refused() {
        let a = DMatrix::from_row_slice(1, 1, &[1000.0]);
        assert!(matches!(exponential(&a), Err(ModelError::Overflow { .. })));
        let a = DMatrix::from_row_slice(1, 1, &[f64::NAN]);
        assert!(matches!(exponential(&a), Err(ModelError::NonFinite { .. })));
        let a = DMatrix::from_row_slice(1, 1, &[-1000.0]);
        assert_eq!(exponential(&a).unwrap().value[(0, 0)], 0.0);
    }
}
