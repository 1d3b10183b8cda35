//! Jordan (parallel) form: one block per distinct pole, a chain per repeated pole.
//!
//! Identity: `c(s)/a(s) = Σ_k Σ_{j=1}^{m_k} r_{k,j} / (s − λ_k)^j` (partial fractions),
//! realized block by block with `B` the last unit vector of each block and `C` the
//! residues: for a real pole the Jordan block (λ on the diagonal, ones above it) with
//! `C = [r_m, ..., r_1]`; for a complex pair `σ ± jω` (ω > 0) the real block
//! `M = [[σ, ω], [−ω, σ]]` on the diagonal, `I₂` above it, and `C` the pairs
//! `(−2 Im r_j, 2 Re r_j)` in the same order. Exact mode factors the denominator over the
//! rationals: a factor `f` of degree d and multiplicity m gives m companion blocks of `f`
//! (ones on the superdiagonal, last row `−f`'s coefficients) chained by a one from the
//! first state of each block into the last row of the block before, `B` the last unit
//! vector, and `C` the numerators `p_j` of `Σ_j p_j(s) / f(s)^j` (ascending coefficients,
//! highest order first); for `f = s − λ` this is the Jordan block.
//!
//! # Purpose
//! The form an engineer derives by hand for repeated poles, e.g.
//! `(s + 2)/((s + 1)²(s + 3)) = (1/4)/(s+1) + (1/2)/(s+1)² − (1/4)/(s+3)`.
//!
//! # Method
//! Float: the roots of the monic denominator ([`super::roots`], Aberth iteration in
//! double-double) are grouped by single linkage: two roots within `tol` relative to the
//! larger are one cluster, taken as one repeated pole. A cluster of m roots is centred on
//! its mean, then on the nearby root of `a^(m−1)` by Newton's method in double-double (a
//! multiple root of `a` is a simple root of `a^(m−1)`). The residues are the Taylor
//! coefficients at λ of `c(s)/q(s)`, `q = Π_{μ≠λ} (s − μ)^{m_μ}` over the other clusters.
//! Exact: Yun's square-free decomposition (gcds over the rationals), rational roots of each
//! square-free factor by rounding `L·x` (L the leading coefficient of the primitive
//! integer factor, x a refined float root) and an exact test, quadratic factors likewise
//! from pairs of float roots; partial fractions by the inverse of the cofactor modulo
//! `f^m` (extended Euclid) and the f-adic digits of the result; every step exact.
//!
//! # Numerical aspects
//! Default `tol`: `1e-6` relative (the rounding of an exactly repeated root of multiplicity
//! m spreads the computed roots by about `eps^(2/m)` here, so up to m ≈ 5 is caught).
//! Reported: each cluster's spread (largest relative distance of a computed root from the
//! centre), the condition number of the transformation from the balanced companion form
//! (confluent Vandermonde basis, unit columns), and the verification: the largest relative
//! deviation of the realization's transfer function from `c/a` at sample points on the
//! imaginary axis, refused above `max(tol, √eps)`. Exact mode: a factor without rational
//! roots of degree ≥ 4 is split only into quadratic factors found this way; a remaining
//! factor of degree ≥ 4 may still be reducible over the rationals (e.g. a product of two
//! irreducible cubics): it stays one exact companion chain.
//!
//! # References
//! T. Kailath, *Linear Systems*, Prentice Hall 1980, §2.1 and §6.4 (parallel and Jordan
//! forms). D. Y. Y. Yun, "On square-free decomposition algorithms", SYMSAC 1976. D. E.
//! Knuth, *TAOCP* vol. 2, §4.6.2 (factoring, rational roots).
//!
//! # Errors
//! `BadValue` for a tol that is not finite and positive; `NoModalForm`-like refusals are
//! `BadValue { arg: "tol" }` when merging changes the transfer function beyond the limit;
//! `Overflow` when a residue leaves the float range; `NoConvergence` from the eigensolver.

use super::modal::{basis_condition, format_pole, relative_gap};
use super::roots::{self, Cdd, Dd};
use crate::error::{ModelError, Result};
use crate::matrix::{pow2, Matrix};
use crate::poly::ProperSplit;
use crate::poly_lcm;
use crate::scalar::Scalar;
use crate::state_space::StateSpace;
use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::{Signed, ToPrimitive};

fn big_from_f64(x: f64) -> Option<BigInt> {
    <BigInt as num_traits::FromPrimitive>::from_f64(x)
}

/// The documented default of `tol` (relative).
pub const DEFAULT_TOL: f64 = 1e-6;

/// One block of the float Jordan form.
#[derive(Debug, Clone, PartialEq)]
pub struct PoleCluster {
    /// The pole (upper member of a complex pair).
    pub pole: (f64, f64),
    pub multiplicity: usize,
    /// Largest relative distance of a computed root of the cluster from `pole`.
    pub spread: f64,
    /// `residues[j − 1]` is the coefficient of `1/(s − pole)^j`.
    pub residues: Vec<(f64, f64)>,
}

#[derive(Debug, Clone, PartialEq)]
pub struct JordanInfo {
    pub clusters: Vec<PoleCluster>,
    pub tol: f64,
    /// Condition number of the transformation from the balanced companion form.
    pub condition: f64,
    /// Largest relative deviation of the result's transfer function from `c/a`.
    pub transfer_error: f64,
}

/// Taylor coefficients `a^(j)(z)/j!`, j = 0..=k, of `coeffs` (highest power first) at z.
fn taylor(coeffs: &[f64], z: Cdd, k: usize) -> Vec<Cdd> {
    let mut work: Vec<Cdd> = coeffs.iter().map(|&c| Cdd::new(c, 0.0)).collect();
    let mut out = Vec::with_capacity(k + 1);
    for _ in 0..=k {
        if work.is_empty() {
            out.push(Cdd::ZERO);
            continue;
        }
        // Synthetic division by (s − z): the last value is the remainder.
        let mut acc = Cdd::ZERO;
        let mut quotient = Vec::with_capacity(work.len().saturating_sub(1));
        for (i, c) in work.iter().enumerate() {
            acc = acc.mul(z).add(*c);
            if i + 1 < work.len() {
                quotient.push(acc);
            }
        }
        out.push(acc);
        work = quotient;
    }
    out
}

/// Complex product/quotient helpers on (re, im) pairs.
fn cmul(a: (f64, f64), b: (f64, f64)) -> (f64, f64) {
    (a.0 * b.0 - a.1 * b.1, a.0 * b.1 + a.1 * b.0)
}
fn cdiv(a: (f64, f64), b: (f64, f64)) -> (f64, f64) {
    let z = Cdd::new(a.0, a.1).div(Cdd::new(b.0, b.1));
    z.to_pair()
}

/// Single-linkage clusters of `values` under the relative gap `tol`.
fn clusters(values: &[(f64, f64)], tol: f64) -> Vec<Vec<usize>> {
    let n = values.len();
    let mut parent: Vec<usize> = (0..n).collect();
    fn find(p: &mut [usize], mut x: usize) -> usize {
        while p[x] != x {
            p[x] = p[p[x]];
            x = p[x];
        }
        x
    }
    for i in 0..n {
        for j in i + 1..n {
            if relative_gap(values[i], values[j]) <= tol {
                let (a, b) = (find(&mut parent, i), find(&mut parent, j));
                if a != b {
                    parent[a.max(b)] = a.min(b);
                }
            }
        }
    }
    let mut groups: Vec<Vec<usize>> = Vec::new();
    let mut index = vec![usize::MAX; n];
    for i in 0..n {
        let r = find(&mut parent, i);
        if index[r] == usize::MAX {
            index[r] = groups.len();
            groups.push(Vec::new());
        }
        groups[index[r]].push(i);
    }
    groups
}

/// The centre of a cluster of multiplicity m ≥ 2: Newton's method on `a^(m−1)` from the
/// mean, kept only if it stays within the cluster's reach.
fn centre(den: &[f64], mean: (f64, f64), m: usize, reach: f64, real: bool) -> (f64, f64) {
    let mut z = Cdd::new(mean.0, mean.1);
    for _ in 0..30 {
        let t = taylor(den, z, m);
        let (num, dnm) = (t[m - 1], t[m].mul_f64(m as f64));
        if dnm == Cdd::ZERO || !num.is_finite() || !dnm.is_finite() {
            return mean;
        }
        let mut step = num.div(dnm);
        if real {
            step.im = Dd::ZERO;
        }
        z = z.sub(step);
        let size = z.abs_f64().max(f64::MIN_POSITIVE);
        if step.abs_f64() <= 1e-30 * size {
            break;
        }
    }
    let out = z.to_pair();
    let moved = (out.0 - mean.0).hypot(out.1 - mean.1);
    if out.0.is_finite() && out.1.is_finite() && moved <= reach {
        (out.0, if real { 0.0 } else { out.1 })
    } else {
        mean
    }
}

/// Taylor coefficients at λ of `c(s) / Π_l (s − μ_l)^{m_l}`, the first `m` of them: the
/// residues `r_m, ..., r_1` of the pole λ of multiplicity m (order m first).
fn cluster_residues(
    strict_num: &[f64],
    lambda: (f64, f64),
    m: usize,
    others: &[((f64, f64), usize)],
) -> Option<Vec<(f64, f64)>> {
    let tc: Vec<(f64, f64)> = taylor(strict_num, Cdd::new(lambda.0, lambda.1), m - 1)
        .into_iter()
        .map(|z| z.to_pair())
        .collect();
    // Π_l (λ − μ_l + t)^{−m_l} = prefactor · Π_l (1 + t u_l)^{−m_l}, u_l = 1/(λ − μ_l).
    let mut mantissa = (1.0, 0.0);
    let mut exponent = 0i32;
    let mut series = vec![(0.0, 0.0); m];
    series[0] = (1.0, 0.0);
    for &(mu, ml) in others {
        let d = (lambda.0 - mu.0, lambda.1 - mu.1);
        let u = cdiv((1.0, 0.0), d);
        for _ in 0..ml {
            mantissa = cmul(mantissa, u);
            let big = mantissa.0.abs().max(mantissa.1.abs());
            if big > 0.0 && big.is_finite() {
                let e = big.log2().floor() as i32;
                mantissa = (mantissa.0 * pow2(-e), mantissa.1 * pow2(-e));
                exponent += e;
            }
        }
        // (1 + t u)^{−ml} = Σ_j binom(−ml, j) u^j t^j
        let mut factor = vec![(0.0, 0.0); m];
        let mut coef = (1.0, 0.0);
        for (j, slot) in factor.iter_mut().enumerate() {
            *slot = coef;
            let k = j as f64;
            coef = cmul(coef, u);
            coef = (
                coef.0 * (-(ml as f64) - k) / (k + 1.0),
                coef.1 * (-(ml as f64) - k) / (k + 1.0),
            );
        }
        let mut next = vec![(0.0, 0.0); m];
        for i in 0..m {
            for j in 0..m - i {
                let p = cmul(series[i], factor[j]);
                next[i + j].0 += p.0;
                next[i + j].1 += p.1;
            }
        }
        series = next;
    }
    let mut out = Vec::with_capacity(m);
    for k in 0..m {
        let mut acc = (0.0, 0.0);
        for i in 0..=k {
            let p = cmul(tc[i], series[k - i]);
            acc.0 += p.0;
            acc.1 += p.1;
        }
        let v = cmul(acc, mantissa);
        let f = pow2(exponent);
        let v = (v.0 * f, v.1 * f);
        if !v.0.is_finite() || !v.1.is_finite() {
            return None;
        }
        out.push(v);
    }
    Some(out)
}

/// `c(s)/a(s)` at s, through the reversed polynomials where `|s| > 1`.
fn strictly_proper_value(split: &ProperSplit<f64>, s: (f64, f64)) -> (f64, f64) {
    let z = Cdd::new(s.0, s.1);
    if s.0.hypot(s.1) <= 1.0 {
        roots::horner(&split.strict_num, z)
            .div(roots::horner(&split.den, z))
            .to_pair()
    } else {
        let w = Cdd::new(1.0, 0.0).div(z);
        let mut rn = split.strict_num.clone();
        rn.reverse();
        let mut rd = split.den.clone();
        rd.reverse();
        w.mul(roots::horner(&rn, w))
            .div(roots::horner(&rd, w))
            .to_pair()
    }
}

/// The float Jordan form of `split` with clusters merged within `tol` (None: the default).
pub fn jordan_from_split(
    split: &ProperSplit<f64>,
    tol: Option<f64>,
) -> Result<(StateSpace<f64>, JordanInfo)> {
    let tol = tol.unwrap_or(DEFAULT_TOL);
    if !(tol.is_finite() && tol > 0.0) {
        return Err(ModelError::BadValue {
            arg: "tol",
            detail: format!("must be a finite positive number (relative), found {tol}"),
        });
    }
    let n = split.order();
    if n == 0 {
        let info = JordanInfo {
            clusters: Vec::new(),
            tol,
            condition: 1.0,
            transfer_error: 0.0,
        };
        return Ok((super::gain_only(&split.direct), info));
    }
    let refined = roots::refined_roots(&split.den, 200)?;
    let values: Vec<(f64, f64)> = refined.roots.iter().map(|z| z.to_pair()).collect();
    let groups = clusters(&values, tol);

    // Representative clusters: self-conjugate ones are real poles; of a mirrored pair of
    // clusters the one with positive mean imaginary part.
    let mut reps: Vec<((f64, f64), usize, f64)> = Vec::new(); // (pole, multiplicity, spread)
    let mut all_poles: Vec<((f64, f64), usize)> = Vec::new();
    for g in &groups {
        let m = g.len();
        let mean = (
            g.iter().map(|&k| values[k].0).sum::<f64>() / m as f64,
            g.iter().map(|&k| values[k].1).sum::<f64>() / m as f64,
        );
        let first = values[g[0]];
        let self_conjugate = g.iter().any(|&k| values[k] == (first.0, -first.1));
        let real = self_conjugate || first.1 == 0.0;
        if !real && mean.1 < 0.0 {
            continue;
        }
        let mean = if real { (mean.0, 0.0) } else { mean };
        let radius = g
            .iter()
            .map(|&k| (values[k].0 - mean.0).hypot(values[k].1 - mean.1))
            .fold(0.0, f64::max);
        let pole = if m >= 2 {
            let reach = 2.0 * radius.max(tol * mean.0.hypot(mean.1));
            centre(&split.den, mean, m, reach, real)
        } else {
            values[g[0]]
        };
        let size = pole.0.hypot(pole.1);
        let spread = g
            .iter()
            .map(|&k| {
                let d = (values[k].0 - pole.0).hypot(values[k].1 - pole.1);
                if size > 0.0 {
                    d / size
                } else {
                    d
                }
            })
            .fold(0.0, f64::max);
        reps.push((pole, m, spread));
        all_poles.push((pole, m));
        if !real {
            all_poles.push(((pole.0, -pole.1), m));
        }
    }
    let count: usize = all_poles.iter().map(|p| p.1).sum();
    if count != n {
        return Err(ModelError::NoConvergence {
            routine: "the pairing of the pole clusters of the Jordan form",
        });
    }
    // Documented order: ascending real part, ties by ascending frequency.
    reps.sort_by(|x, y| x.0 .0.total_cmp(&y.0 .0).then(x.0 .1.total_cmp(&y.0 .1)));

    let zero_numerator = split.strict_num.iter().all(|c| *c == 0.0);
    let mut a = Matrix::zeros(n, n);
    let mut b = Matrix::zeros(n, 1);
    let mut c = Matrix::zeros(1, n);
    let mut info_clusters = Vec::with_capacity(reps.len());
    let mut at = 0;
    for &(pole, m, spread) in &reps {
        let others: Vec<((f64, f64), usize)> =
            all_poles.iter().filter(|p| p.0 != pole).copied().collect();
        let taylor_coeffs = if zero_numerator {
            vec![(0.0, 0.0); m]
        } else {
            cluster_residues(&split.strict_num, pole, m, &others).ok_or_else(|| {
                ModelError::Overflow {
                    what: format!(
                        "the residues of the Jordan form at the pole {}",
                        format_pole(pole)
                    ),
                }
            })?
        };
        // taylor_coeffs[i] is the residue of order m − i; a real pole's residues are real.
        let residues: Vec<(f64, f64)> = (1..=m)
            .map(|j| taylor_coeffs[m - j])
            .map(|r| if pole.1 == 0.0 { (r.0, 0.0) } else { r })
            .collect();
        if pole.1 == 0.0 {
            for i in 0..m {
                a.set(at + i, at + i, pole.0);
                if i + 1 < m {
                    a.set(at + i, at + i + 1, 1.0);
                }
                c.set(0, at + i, taylor_coeffs[i].0);
            }
            b.set(at + m - 1, 0, 1.0);
            at += m;
        } else {
            for i in 0..m {
                let o = at + 2 * i;
                a.set(o, o, pole.0);
                a.set(o, o + 1, pole.1);
                a.set(o + 1, o, -pole.1);
                a.set(o + 1, o + 1, pole.0);
                if i + 1 < m {
                    a.set(o, o + 2, 1.0);
                    a.set(o + 1, o + 3, 1.0);
                }
                let r = taylor_coeffs[i];
                c.set(0, o, -2.0 * r.1);
                c.set(0, o + 1, 2.0 * r.0);
            }
            b.set(at + 2 * m - 1, 0, 1.0);
            at += 2 * m;
        }
        info_clusters.push(PoleCluster {
            pole,
            multiplicity: m,
            spread,
            residues,
        });
    }
    if c.as_slice().iter().any(|v| !v.is_finite()) {
        return Err(ModelError::Overflow {
            what: "the residues of the Jordan form".into(),
        });
    }

    // Verification on the imaginary axis at the poles' magnitudes (and at 1).
    let mut points: Vec<f64> = info_clusters
        .iter()
        .map(|cl| cl.pole.0.hypot(cl.pole.1) * 1.37)
        .filter(|x| *x > 0.0)
        .collect();
    points.push(1.0);
    let (mut worst, mut scale) = (0.0f64, 0.0f64);
    for &y in &points {
        let s = (0.0, y);
        let reference = strictly_proper_value(split, s);
        let mut value = (0.0, 0.0);
        for cl in &info_clusters {
            let poles: Vec<((f64, f64), f64)> = if cl.pole.1 == 0.0 {
                vec![(cl.pole, 1.0)]
            } else {
                vec![(cl.pole, 1.0), ((cl.pole.0, -cl.pole.1), -1.0)]
            };
            for (p, conj) in poles {
                let inv = cdiv((1.0, 0.0), (s.0 - p.0, s.1 - p.1));
                let mut power = inv;
                for r in &cl.residues {
                    let r = (r.0, conj * r.1);
                    let t = cmul(r, power);
                    value.0 += t.0;
                    value.1 += t.1;
                    power = cmul(power, inv);
                }
            }
        }
        if reference.0.is_finite() && reference.1.is_finite() {
            worst = worst.max((value.0 - reference.0).hypot(value.1 - reference.1));
            scale = scale.max(reference.0.hypot(reference.1));
        }
    }
    let transfer_error = if scale > 0.0 { worst / scale } else { worst };
    let limit = tol.max(f64::EPSILON.sqrt());
    if !(transfer_error <= limit) {
        return Err(ModelError::BadValue {
            arg: "tol",
            detail: format!(
                "the Jordan form with poles merged within tol = {tol:.3e} deviates from num/den \
                 by {transfer_error:.3e} relative at the sample points (limit {limit:.3e}): \
                 poles nearly repeated at a distance above tol cancel; a larger tol merges them"
            ),
        });
    }
    let companion = super::controllable::controllable_canonical(split);
    let (_, scale_vec) = crate::balance::balance(&companion.a);
    let poles: Vec<((f64, f64), usize)> = info_clusters
        .iter()
        .map(|cl| (cl.pole, cl.multiplicity))
        .collect();
    let info = JordanInfo {
        clusters: info_clusters,
        tol,
        condition: basis_condition(&scale_vec, &poles),
        transfer_error,
    };
    Ok((
        StateSpace {
            a,
            b,
            c,
            d: companion.d,
        },
        info,
    ))
}

// ---------------------------------------------------------------------------------------
// exact mode
// ---------------------------------------------------------------------------------------

type Q = BigRational;

/// One factor of the exact Jordan form: `factor` monic (highest power first), its
/// multiplicity, and `numerators[j − 1]` the numerator (highest power first, degree below
/// the factor's) of `1 / factor^j`.
#[derive(Debug, Clone, PartialEq)]
pub struct ExactFactor {
    pub factor: Vec<Q>,
    pub multiplicity: usize,
    pub numerators: Vec<Vec<Q>>,
}

fn derivative(p: &[Q]) -> Vec<Q> {
    let n = p.len().saturating_sub(1);
    (0..n)
        .map(|i| p[i].mul(&Q::from_i64((n - i) as i64)))
        .collect()
}

fn exact_div(a: &[Q], b: &[Q]) -> Vec<Q> {
    let (q, r) = poly_lcm::div_rem(a, b);
    debug_assert!(r.is_empty());
    q
}

fn rem(a: &[Q], b: &[Q]) -> Vec<Q> {
    poly_lcm::div_rem(a, b).1
}

/// Square-free decomposition `a = Π g_i^i` of a monic `a` (Yun), as (g_i, i) with deg > 0.
fn square_free(a: &[Q]) -> Vec<(Vec<Q>, usize)> {
    let mut out = Vec::new();
    if a.len() <= 1 {
        return out;
    }
    let da = derivative(a);
    let mut c = poly_lcm::gcd(a, &poly_lcm::trim(&da));
    let mut w = exact_div(a, &c);
    let mut i = 1;
    while w.len() > 1 {
        let y = poly_lcm::gcd(&w, &c);
        let z = exact_div(&w, &y);
        if z.len() > 1 {
            out.push((poly_lcm::monic(&z), i));
        }
        i += 1;
        c = exact_div(&c, &y);
        w = y;
    }
    out
}

fn to_f64(q: &Q) -> Option<f64> {
    q.to_f64().filter(|v| v.is_finite())
}

/// The leading coefficient of `p` made primitive over the integers (times the lcm of the
/// denominators, divided by the content) — L with every rational root's `L·x` an integer.
fn integer_lead(p: &[Q]) -> BigInt {
    use num_integer::Integer;
    let mut l = BigInt::one();
    for c in p {
        l = l.lcm(c.denom());
    }
    let ints: Vec<BigInt> = p
        .iter()
        .map(|c| (c * Q::from_integer(l.clone())).to_integer())
        .collect();
    let mut g = BigInt::zero();
    for v in &ints {
        g = g.gcd(v);
    }
    if g.is_zero() {
        return BigInt::one();
    }
    (&ints[0] / &g).abs()
}

fn eval(p: &[Q], x: &Q) -> Q {
    p.iter().fold(Q::zero(), |acc, c| acc.mul(x).add(c))
}

/// Splits a monic square-free factor into its rational linear factors and the rest, which
/// is further split into quadratic factors found from pairs of float roots.
fn split_factor(g: &[Q]) -> Result<Vec<Vec<Q>>> {
    let mut rest = g.to_vec();
    let mut found: Vec<Vec<Q>> = Vec::new();
    let floats: Option<Vec<f64>> = rest.iter().map(to_f64).collect();
    let Some(fl) = floats else {
        return Ok(vec![rest]);
    };
    if fl.len() <= 1 {
        return Ok(vec![rest]);
    }
    let approx = roots::refined_roots(&fl, 200)?;
    let z: Vec<(f64, f64)> = approx.roots.iter().map(|v| v.to_pair()).collect();
    let lead = integer_lead(&rest);
    let lf = lead.to_f64().unwrap_or(f64::INFINITY);
    let denominator = Q::from_integer(lead.clone());
    let candidate = |x: f64| -> Vec<Q> {
        let t = (lf * x).round();
        match big_from_f64(t) {
            Some(t) => [-1i64, 0, 1]
                .iter()
                .map(|d| Q::new(&t + BigInt::from(*d), lead.clone()))
                .collect(),
            None => Vec::new(),
        }
    };
    let mut used = vec![false; z.len()];
    for (k, &(re, im)) in z.iter().enumerate() {
        if im != 0.0 || rest.len() <= 2 {
            continue;
        }
        for x in candidate(re) {
            if rest.len() > 2 && eval(&rest, &x).is_zero() {
                let lin = vec![Q::one(), x.neg()];
                rest = exact_div(&rest, &lin);
                found.push(lin);
                used[k] = true;
                break;
            }
        }
    }
    // The last linear factor, if the rest is linear.
    // Quadratic factors from pairs of unused roots (conjugate or both real).
    if rest.len() > 4 {
        'outer: for i in 0..z.len() {
            for j in i + 1..z.len() {
                if used[i] || used[j] || rest.len() <= 4 {
                    continue;
                }
                let (x, y) = (z[i], z[j]);
                let pair = (x.1 == 0.0 && y.1 == 0.0) || (x.0 == y.0 && x.1 == -y.1);
                if !pair {
                    continue;
                }
                let sum = x.0 + y.0;
                let prod = x.0 * y.0 - x.1 * y.1;
                let (ts, tp) = ((lf * sum).round(), (lf * prod).round());
                let (Some(ts), Some(tp)) = (big_from_f64(ts), big_from_f64(tp)) else {
                    continue;
                };
                let quad = vec![
                    Q::one(),
                    Q::from_integer(-ts) / &denominator,
                    Q::from_integer(tp) / &denominator,
                ];
                let (qq, r) = poly_lcm::div_rem(&rest, &quad);
                if r.is_empty() {
                    rest = qq;
                    found.push(quad);
                    used[i] = true;
                    used[j] = true;
                    if rest.len() <= 4 {
                        break 'outer;
                    }
                }
            }
        }
    }
    if rest.len() > 1 {
        found.push(rest);
    }
    Ok(found)
}

/// Extended Euclid: s with `s·q ≡ 1 (mod f)` for coprime q and f (f monic, deg ≥ 1).
fn inverse_mod(q: &[Q], f: &[Q]) -> Vec<Q> {
    // Invariants: r0 = s0 q (mod f), r1 = s1 q (mod f).
    let (mut r0, mut r1) = (f.to_vec(), rem(q, f));
    let (mut s0, mut s1): (Vec<Q>, Vec<Q>) = (Vec::new(), vec![Q::one()]);
    while r1.len() > 1 {
        let (quot, r) = poly_lcm::div_rem(&r0, &r1);
        let prod = poly_lcm::mul(&quot, &s1);
        let s2 = sub(&s0, &prod);
        r0 = r1;
        r1 = r;
        s0 = s1;
        s1 = s2;
    }
    // r1 is a nonzero constant: s1 q ≡ r1.
    let k = r1[0].clone();
    rem(&s1.iter().map(|c| c.div_exact(&k)).collect::<Vec<_>>(), f)
}

fn sub(a: &[Q], b: &[Q]) -> Vec<Q> {
    let n = a.len().max(b.len());
    let mut out = vec![Q::zero(); n];
    for (i, v) in a.iter().enumerate() {
        out[n - a.len() + i] = out[n - a.len() + i].add(v);
    }
    for (i, v) in b.iter().enumerate() {
        out[n - b.len() + i] = out[n - b.len() + i].sub(v);
    }
    poly_lcm::trim(&out)
}

fn add(a: &[Q], b: &[Q]) -> Vec<Q> {
    sub(a, &b.iter().map(|v| v.neg()).collect::<Vec<_>>())
}

fn power(f: &[Q], m: usize) -> Vec<Q> {
    (0..m).fold(vec![Q::one()], |acc, _| poly_lcm::mul(&acc, f))
}

/// The exact Jordan form of `split` (denominator factored over the rationals).
pub fn jordan_exact(split: &ProperSplit<Q>) -> Result<(StateSpace<Q>, Vec<ExactFactor>)> {
    let n = split.order();
    if n == 0 {
        return Ok((super::gain_only(&split.direct), Vec::new()));
    }
    let mut factors: Vec<(Vec<Q>, usize)> = Vec::new();
    for (g, mult) in square_free(&split.den) {
        for f in split_factor(&g)? {
            factors.push((f, mult));
        }
    }
    // Linear factors first by ascending root, then by degree (stable otherwise).
    factors.sort_by(|x, y| match (x.0.len(), y.0.len()) {
        (2, 2) => y.0[1].cmp(&x.0[1]),
        (a, b) => a.cmp(&b),
    });
    let numerator = poly_lcm::trim(&split.strict_num);
    let mut out = Vec::with_capacity(factors.len());
    let mut check = Vec::new();
    for (f, m) in &factors {
        let fm = power(f, *m);
        let cofactor = exact_div(&split.den, &fm);
        let u = if numerator.is_empty() {
            Vec::new()
        } else {
            rem(
                &poly_lcm::mul(&numerator, &inverse_mod(&cofactor, &fm)),
                &fm,
            )
        };
        check = add(&check, &poly_lcm::mul(&u, &cofactor));
        // f-adic digits: u = Σ_k p_k f^k, p_k the numerator of order m − k.
        let mut digits = Vec::with_capacity(*m);
        let mut rest = u;
        for _ in 0..*m {
            let (q, r) = poly_lcm::div_rem(&rest, f);
            digits.push(r);
            rest = q;
        }
        let numerators: Vec<Vec<Q>> = (1..=*m).map(|j| digits[*m - j].clone()).collect();
        out.push(ExactFactor {
            factor: f.clone(),
            multiplicity: *m,
            numerators,
        });
    }
    if check != numerator {
        return Err(ModelError::NoConvergence {
            routine: "the exact partial-fraction check of the Jordan form",
        });
    }
    let mut a = Matrix::zeros(n, n);
    let mut b = Matrix::zeros(n, 1);
    let mut c = Matrix::zeros(1, n);
    let mut at = 0;
    for fac in &out {
        let d = fac.factor.len() - 1;
        let m = fac.multiplicity;
        for k in 0..m {
            let o = at + k * d;
            for i in 0..d {
                if i + 1 < d {
                    a.set(o + i, o + i + 1, Q::one());
                }
                // last row: −f_0, ..., −f_{d−1} (f highest power first: f[d − j] is f_j)
                a.set(o + d - 1, o + i, fac.factor[d - i].neg());
            }
            if k + 1 < m {
                a.set(o + d - 1, o + d, Q::one());
            }
            // C: ascending coefficients of the numerator of order m − k.
            let p = &fac.numerators[m - k - 1];
            for (i, coef) in p.iter().rev().enumerate() {
                c.set(0, o + i, coef.clone());
            }
        }
        b.set(at + m * d - 1, 0, Q::one());
        at += m * d;
    }
    let d = Matrix::from_row_major(1, 1, vec![split.direct.clone()]).expect("1x1");
    Ok((StateSpace { a, b, c, d }, out))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::poly::split_proper;

    fn q(p: i64, d: i64) -> Q {
        Q::new(BigInt::from(p), BigInt::from(d))
    }

    #[test]
    fn hand_derivation_of_a_double_pole() {
        // (s + 2)/((s + 1)²(s + 3)) = (1/4)/(s+1) + (1/2)/(s+1)² − (1/4)/(s+3) (hand)
        let num = vec![q(1, 1), q(2, 1)];
        let den = vec![q(1, 1), q(5, 1), q(7, 1), q(3, 1)];
        let split = split_proper(&num, &den).unwrap();
        let (ss, factors) = jordan_exact(&split).unwrap();
        assert_eq!(factors[0].factor, vec![q(1, 1), q(3, 1)]);
        assert_eq!(factors[0].numerators, vec![vec![q(-1, 4)]]);
        assert_eq!(factors[1].factor, vec![q(1, 1), q(1, 1)]);
        assert_eq!(factors[1].numerators, vec![vec![q(1, 4)], vec![q(1, 2)]]);
        assert_eq!(
            ss.a.as_slice(),
            &[
                q(-3, 1),
                q(0, 1),
                q(0, 1),
                q(0, 1),
                q(-1, 1),
                q(1, 1),
                q(0, 1),
                q(0, 1),
                q(-1, 1)
            ]
        );
        assert_eq!(ss.b.as_slice(), &[q(1, 1), q(0, 1), q(1, 1)]);
        assert_eq!(ss.c.as_slice(), &[q(-1, 4), q(1, 2), q(1, 4)]);
    }

    #[test]
    fn float_form_of_the_same_example() {
        let split = split_proper(&[1.0, 2.0], &[1.0, 5.0, 7.0, 3.0]).unwrap();
        let (ss, info) = jordan_from_split(&split, None).unwrap();
        assert_eq!(info.clusters.len(), 2);
        assert_eq!(info.clusters[1].multiplicity, 2);
        let c = ss.c.as_slice();
        for (got, want) in c.iter().zip([-0.25, 0.5, 0.25]) {
            assert!((got - want).abs() < 1e-14, "{c:?}");
        }
        assert!(info.transfer_error < 1e-14);
    }
}
