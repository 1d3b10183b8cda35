//! Roots of a real float polynomial, refined to the accuracy of its own coefficients.
//!
//! Identity: `a(λ_k) = 0` for the monic `a(s) = s^n + a_{n−1} s^{n−1} + ... + a_0` taken
//! exactly as its float64 coefficients; the returned float64 roots are the exact roots of
//! those coefficients, rounded, whenever the roots are simple and not too ill-conditioned.
//!
//! # Purpose
//! The modal and Jordan forms put the poles on the diagonal of A and the residues in B and
//! C, so their accuracy is that of the roots. Eigenvalues of the (balanced) companion
//! matrix are backward stable with respect to the matrix, not to the polynomial: a small
//! pole next to a large one carries an absolute error of order `eps·‖A‖` (for
//! `s² + 1e8 s + 1` the slow pole comes out about 50 % off). Here the eigenvalues are only
//! the starting values.
//!
//! # Method
//! Starting values: eigenvalues of the companion matrix balanced by powers of two (faer,
//! Hessenberg–QR); exact zero roots (trailing zero coefficients) are split off exactly.
//! Refinement: the Aberth–Ehrlich iteration (simultaneous Newton steps with the implicit
//! deflation `N_k / (1 − N_k Σ_{j≠k} 1/(z_k − z_j))`, `N_k = a(z_k)/a'(z_k)`), with
//! `a` and `a'` evaluated by Horner's rule in complex double-double arithmetic (about 106
//! bits) and the iterates kept in double-double, so the attainable accuracy is about
//! `eps² · κ_k` (κ_k the root's condition number) before the final rounding to float64.
//! Where `|z| > 1` the reversed polynomial is evaluated at `w = 1/z`
//! (`a/a' = z q(w) / (n q(w) − w q'(w))`), so no power of z overflows. Conjugate symmetry
//! is kept exactly: only the roots with `Im ≥ 0` are iterated, real roots stay real.
//!
//! # Numerical aspects
//! A root is converged when the Newton correction falls below `2⁻¹⁰⁰ |z|`, or when it no
//! longer decreases after having fallen below `1e−10 |z|` (the evaluation's noise floor).
//! At most 200 sweeps. A multiple root converges only linearly and is reported as not
//! converged (the modal form refuses it, the Jordan form clusters it). The reported
//! `relative_error` of each root is its last relative correction: an estimate of the
//! distance to the exact root of the float coefficients before rounding.
//!
//! # References
//! O. Aberth, "Iteration methods for finding all zeros of a polynomial simultaneously",
//! Math. Comp. 27 (1973). L. W. Ehrlich, "A modified Newton method for polynomials",
//! Comm. ACM 10 (1967). T. J. Dekker, "A floating-point technique for extending the
//! available precision", Numer. Math. 18 (1971). S. Graillat, N. Louvet, Ph. Langlois,
//! "Compensated Horner scheme", Reliable Computing (2006).
//!
//! # Errors
//! `NoConvergence` when the eigenvalue iteration of the starting values fails or returns
//! an unpaired complex value.

use crate::error::{ModelError, Result};
use crate::matrix::Matrix;
use crate::recover::double_double::{self, fast_two_sum, two_sum};
use faer::prelude::*;

// ---------------------------------------------------------------------------------------
// double-double and complex double-double arithmetic (Dekker's splitting, no FMA needed)
// ---------------------------------------------------------------------------------------

/// `hi + lo`, about 106 significant bits.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Dd {
    pub hi: f64,
    pub lo: f64,
}

/// Dekker's product without FMA (the same splitting as the recovery's double-double type,
/// so both give the same bits on every machine).
#[inline(always)]
fn two_prod(a: f64, b: f64) -> (f64, f64) {
    double_double::two_prod::<false>(a, b)
}

impl Dd {
    pub const ZERO: Dd = Dd { hi: 0.0, lo: 0.0 };

    pub fn from(x: f64) -> Self {
        Dd { hi: x, lo: 0.0 }
    }
    pub fn to_f64(self) -> f64 {
        self.hi + self.lo
    }
    pub fn add(self, o: Self) -> Self {
        let (s, e) = two_sum(self.hi, o.hi);
        let (t, f) = two_sum(self.lo, o.lo);
        let (s, e) = fast_two_sum(s, e + t);
        let (hi, lo) = fast_two_sum(s, e + f);
        Dd { hi, lo }
    }
    pub fn neg(self) -> Self {
        Dd {
            hi: -self.hi,
            lo: -self.lo,
        }
    }
    pub fn sub(self, o: Self) -> Self {
        self.add(o.neg())
    }
    pub fn mul(self, o: Self) -> Self {
        let (p, e) = two_prod(self.hi, o.hi);
        let (hi, lo) = fast_two_sum(p, e + (self.hi * o.lo + self.lo * o.hi));
        Dd { hi, lo }
    }
    pub fn mul_f64(self, o: f64) -> Self {
        let (p, e) = two_prod(self.hi, o);
        let (hi, lo) = fast_two_sum(p, e + self.lo * o);
        Dd { hi, lo }
    }
    pub fn div(self, o: Self) -> Self {
        let q1 = self.hi / o.hi;
        let r = self.sub(o.mul_f64(q1));
        let q2 = r.hi / o.hi;
        let r = r.sub(o.mul_f64(q2));
        let q3 = r.hi / o.hi;
        let (hi, lo) = fast_two_sum(q1, q2);
        Dd { hi, lo }.add(Dd::from(q3))
    }
    pub fn is_finite(self) -> bool {
        self.hi.is_finite() && self.lo.is_finite()
    }
}

/// A complex number in double-double parts.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Cdd {
    pub re: Dd,
    pub im: Dd,
}

impl Cdd {
    pub const ZERO: Cdd = Cdd {
        re: Dd::ZERO,
        im: Dd::ZERO,
    };

    pub fn new(re: f64, im: f64) -> Self {
        Cdd {
            re: Dd::from(re),
            im: Dd::from(im),
        }
    }
    pub fn to_pair(self) -> (f64, f64) {
        (self.re.to_f64(), self.im.to_f64())
    }
    pub fn add(self, o: Self) -> Self {
        Cdd {
            re: self.re.add(o.re),
            im: self.im.add(o.im),
        }
    }
    pub fn sub(self, o: Self) -> Self {
        Cdd {
            re: self.re.sub(o.re),
            im: self.im.sub(o.im),
        }
    }
    pub fn add_real(self, x: f64) -> Self {
        Cdd {
            re: self.re.add(Dd::from(x)),
            im: self.im,
        }
    }
    pub fn mul(self, o: Self) -> Self {
        Cdd {
            re: self.re.mul(o.re).sub(self.im.mul(o.im)),
            im: self.re.mul(o.im).add(self.im.mul(o.re)),
        }
    }
    pub fn mul_f64(self, x: f64) -> Self {
        Cdd {
            re: self.re.mul_f64(x),
            im: self.im.mul_f64(x),
        }
    }
    /// `self / o`, scaled by a power of two first so the squared modulus cannot overflow.
    pub fn div(self, o: Self) -> Self {
        let big = o.re.hi.abs().max(o.im.hi.abs());
        let e = if big > 0.0 && big.is_finite() {
            -(big.log2().floor() as i32)
        } else {
            0
        };
        let f = crate::matrix::pow2(e);
        let (or, oi) = (o.re.mul_f64(f), o.im.mul_f64(f));
        let den = or.mul(or).add(oi.mul(oi));
        // self * conj(o) * f / |o f|^2 = self / o
        let nr = self.re.mul(or).add(self.im.mul(oi)).mul_f64(f);
        let ni = self.im.mul(or).sub(self.re.mul(oi)).mul_f64(f);
        Cdd {
            re: nr.div(den),
            im: ni.div(den),
        }
    }
    pub fn abs_f64(self) -> f64 {
        self.re.to_f64().hypot(self.im.to_f64())
    }
    pub fn is_finite(self) -> bool {
        self.re.is_finite() && self.im.is_finite()
    }
}

/// `Σ coeffs[i] x^(len−1−i)` and its derivative at x, by Horner's rule in double-double.
pub fn horner_pair(coeffs: &[f64], x: Cdd) -> (Cdd, Cdd) {
    let mut p = Cdd::ZERO;
    let mut dp = Cdd::ZERO;
    for &c in coeffs {
        dp = dp.mul(x).add(p);
        p = p.mul(x).add_real(c);
    }
    (p, dp)
}

/// `Σ coeffs[i] x^(len−1−i)` by Horner's rule in double-double.
pub fn horner(coeffs: &[f64], x: Cdd) -> Cdd {
    coeffs.iter().fold(Cdd::ZERO, |p, &c| p.mul(x).add_real(c))
}

/// A monic real polynomial prepared for evaluation away from overflow: `den` highest power
/// first (`den[0] = 1`), and its reversal for `|z| > 1`.
pub struct Polynomial {
    pub den: Vec<f64>,
    reversed: Vec<f64>,
}

impl Polynomial {
    pub fn new(den: &[f64]) -> Self {
        let mut reversed = den.to_vec();
        reversed.reverse();
        Polynomial {
            den: den.to_vec(),
            reversed,
        }
    }

    pub fn degree(&self) -> usize {
        self.den.len() - 1
    }

    /// The Newton correction `a(z)/a'(z)`; `None` where `a'(z)` vanishes or the evaluation
    /// leaves the float range.
    pub fn newton(&self, z: Cdd) -> Option<Cdd> {
        let n = self.degree() as f64;
        let r = if z.abs_f64() <= 1.0 {
            let (p, dp) = horner_pair(&self.den, z);
            if dp == Cdd::ZERO {
                return if p == Cdd::ZERO {
                    Some(Cdd::ZERO)
                } else {
                    None
                };
            }
            p.div(dp)
        } else {
            let w = Cdd::new(1.0, 0.0).div(z);
            let (q, dq) = horner_pair(&self.reversed, w);
            let den = q.mul_f64(n).sub(w.mul(dq));
            if den == Cdd::ZERO {
                return None;
            }
            z.mul(q).div(den)
        };
        r.is_finite().then_some(r)
    }

    /// The residue `c(z) / a'(z)` of the strictly proper `c/a` at a simple root z;
    /// `strict_num` holds `[c_{n−1}, ..., c_0]`. `None` where it leaves the float range.
    pub fn residue(&self, strict_num: &[f64], z: Cdd) -> Option<Cdd> {
        let n = self.degree();
        let r = if z.abs_f64() <= 1.0 {
            let c = horner(strict_num, z);
            let (_, dp) = horner_pair(&self.den, z);
            c.div(dp)
        } else {
            let w = Cdd::new(1.0, 0.0).div(z);
            let mut rev = strict_num.to_vec();
            rev.reverse();
            // c(z) = z^(n−1) c̃(w) and a'(z) = z^(n−1) (n q(w) − w q'(w)).
            let c = horner(&rev, w);
            let (q, dq) = horner_pair(&self.reversed, w);
            c.div(q.mul_f64(n as f64).sub(w.mul(dq)))
        };
        r.is_finite().then_some(r)
    }
}

/// Roots of a monic real polynomial: one entry per root, conjugate pairs both listed.
pub struct RefinedRoots {
    /// Each root in double-double.
    pub roots: Vec<Cdd>,
    /// Last relative Newton correction of each root (0 for exact zero roots).
    pub relative_error: Vec<f64>,
    /// Whether every root met the convergence test.
    pub converged: bool,
}

/// The Aberth correction `N / (1 − N S)` of root k, with `N` its Newton correction and
/// `S = Σ_{j≠k} 1/(z_k − z_j)` over the current approximations, in float64 (it only steers
/// the step; the Newton correction carries the accuracy). Falls back to `N` when
/// `1 − N S` is zero or not finite.
pub fn aberth_correction(newton: (f64, f64), k: usize, approx: &[(f64, f64)]) -> (f64, f64) {
    let (nr, ni) = newton;
    let (zr, zi) = approx[k];
    let (mut sr, mut si) = (0.0, 0.0);
    for (j, &(wr, wi)) in approx.iter().enumerate() {
        if j == k {
            continue;
        }
        let (dr, di) = (zr - wr, zi - wi);
        let d2 = dr * dr + di * di;
        if d2 == 0.0 || !d2.is_finite() {
            continue;
        }
        sr += dr / d2;
        si -= di / d2;
    }
    let (tr, ti) = (1.0 - (nr * sr - ni * si), -(nr * si + ni * sr));
    let t2 = tr * tr + ti * ti;
    if t2 > 0.0 && t2.is_finite() {
        ((nr * tr + ni * ti) / t2, (ni * tr - nr * ti) / t2)
    } else {
        (nr, ni)
    }
}

/// Starting values: eigenvalues of the balanced companion matrix of `den` (monic, highest
/// power first, no zero trailing coefficient), as (re, im) with pairs exactly conjugate.
pub fn starting_values(den: &[f64]) -> Result<Vec<(f64, f64)>> {
    let n = den.len() - 1;
    let mut a = Matrix::zeros(n, n);
    for i in 0..n.saturating_sub(1) {
        a.set(i, i + 1, 1.0);
    }
    for j in 0..n {
        a.set(n - 1, j, -den[n - j]);
    }
    let (balanced, _) = crate::balance::balance(&a);
    let fail = ModelError::NoConvergence {
        routine: "the eigenvalue iteration for the poles' starting values",
    };
    let values = Mat::from_fn(n, n, |i, j| *balanced.get(i, j))
        .eigenvalues()
        .map_err(|_| fail.clone())?;
    let mut out: Vec<(f64, f64)> = values.iter().map(|z| (z.re, z.im)).collect();
    if out.iter().any(|(r, i)| !r.is_finite() || !i.is_finite()) {
        return Err(fail);
    }
    // Pair the complex values exactly: each value with im > 0 takes the conjugate slot of
    // the nearest value with im < 0.
    let upper: Vec<(f64, f64)> = out.iter().copied().filter(|v| v.1 > 0.0).collect();
    let lower = out.iter().filter(|v| v.1 < 0.0).count();
    if upper.len() != lower {
        return Err(ModelError::NoConvergence {
            routine: "the eigenvalue pairing for the poles' starting values",
        });
    }
    out.retain(|v| v.1 == 0.0);
    for u in upper {
        out.push(u);
        out.push((u.0, -u.1));
    }
    Ok(out)
}

/// The roots of the monic `den` (highest power first), refined by the Aberth–Ehrlich
/// iteration in double-double (see the module doc). `max_sweeps` caps the iteration.
pub fn refined_roots(den: &[f64], max_sweeps: usize) -> Result<RefinedRoots> {
    let n = den.len() - 1;
    let zeros = den.iter().rev().take_while(|c| **c == 0.0).count().min(n);
    let core = &den[..den.len() - zeros];
    let mut roots: Vec<Cdd> = vec![Cdd::ZERO; zeros];
    let mut relative_error = vec![0.0; zeros];
    if core.len() <= 1 {
        return Ok(RefinedRoots {
            roots,
            relative_error,
            converged: true,
        });
    }
    let start = starting_values(core)?;
    let poly = Polynomial::new(core);
    let m = start.len();
    let mut z: Vec<Cdd> = start.iter().map(|&(r, i)| Cdd::new(r, i)).collect();
    // Representatives: real roots and the upper member of each pair; `mate[k]` is the
    // index of the conjugate (k itself for a real root).
    let mate: Vec<usize> = (0..m)
        .map(|k| {
            if start[k].1 == 0.0 {
                k
            } else if start[k].1 > 0.0 {
                k + 1
            } else {
                k - 1
            }
        })
        .collect();
    let reps: Vec<usize> = (0..m).filter(|&k| start[k].1 >= 0.0).collect();
    let mut done = vec![false; m];
    let mut last = vec![f64::INFINITY; m];
    let mut err = vec![f64::INFINITY; m];
    for _sweep in 0..max_sweeps {
        let mut active = false;
        let approx: Vec<(f64, f64)> = z.iter().map(|v| v.to_pair()).collect();
        for &k in &reps {
            if done[k] {
                continue;
            }
            active = true;
            let Some(nk) = poly.newton(z[k]) else {
                continue;
            };
            let (nr, ni) = nk.to_pair();
            let (mut cr, mut ci) = aberth_correction((nr, ni), k, &approx);
            if !cr.is_finite() || !ci.is_finite() {
                cr = nr;
                ci = ni;
            }
            if mate[k] == k {
                ci = 0.0;
            }
            let size = z[k].abs_f64();
            let step = cr.hypot(ci);
            z[k] = z[k].sub(Cdd::new(cr, ci));
            if mate[k] != k {
                let c = z[k];
                z[mate[k]] = Cdd {
                    re: c.re,
                    im: c.im.neg(),
                };
            }
            let rel = if size > 0.0 { step / size } else { step };
            err[k] = rel;
            if rel <= 2f64.powi(-100) || (rel <= 1e-10 && rel > 0.75 * last[k]) {
                done[k] = true;
            }
            last[k] = rel;
        }
        if !active {
            break;
        }
    }
    let converged = reps.iter().all(|&k| done[k]);
    for k in 0..m {
        // The error of a pair is kept on its upper (iterated) member.
        let e = if start[k].1 >= 0.0 {
            err[k]
        } else {
            err[mate[k]]
        };
        roots.push(z[k]);
        relative_error.push(e);
    }
    Ok(RefinedRoots {
        roots,
        relative_error,
        converged,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn slow_pole_of_a_stiff_quadratic_is_accurate() {
        // s² + 1e8 s + 1: roots −1e8·(1 − 1e-16 ...) and −1/1e8·(1 + 1e-16 ...): the product
        // of the roots is 1 and their sum −1e8 (identity, Vieta)
        let r = refined_roots(&[1.0, 1e8, 1.0], 200).unwrap();
        assert!(r.converged);
        let mut v: Vec<f64> = r.roots.iter().map(|z| z.re.to_f64()).collect();
        v.sort_by(f64::total_cmp);
        // small root: −1/(1e8 + small) = −1e-8 (1 + 1e-16 + ...) to the last bit
        let small = -2.0 / (1e8 + (1e16f64 - 4.0).sqrt());
        assert!(
            (v[1] - small).abs() <= 2.0 * f64::EPSILON * small.abs(),
            "{v:?}"
        );
        assert_eq!(r.roots.iter().filter(|z| z.im.hi != 0.0).count(), 0);
    }

    #[test]
    fn double_double_division_inverts_multiplication() {
        // (identity) (a / b) · b = a to about 2^-104
        let a = Dd::from(1.0).div(Dd::from(3.0));
        let back = a.mul(Dd::from(3.0)).sub(Dd::from(1.0));
        assert!(back.to_f64().abs() < 1e-31);
        let z = Cdd::new(3.0, -4.0);
        let w = Cdd::new(1.0, 0.0).div(z).mul(z);
        assert!((w.re.to_f64() - 1.0).abs() < 1e-30 && w.im.to_f64().abs() < 1e-30);
    }

    #[test]
    fn complex_pairs_stay_conjugate_and_exact_zero_roots_are_kept() {
        // s (s² + 2s + 5): roots 0, −1 ± 2j (hand)
        let r = refined_roots(&[1.0, 2.0, 5.0, 0.0], 200).unwrap();
        assert!(r.converged);
        let pairs: Vec<(f64, f64)> = r.roots.iter().map(|z| z.to_pair()).collect();
        assert!(pairs.contains(&(0.0, 0.0)));
        assert!(
            pairs.contains(&(-1.0, 2.0)) && pairs.contains(&(-1.0, -2.0)),
            "{pairs:?}"
        );
    }
}
