//! Block companion realizations of a p × m transfer matrix.
//!
//! Identity: `C (sI − A)⁻¹ B + D = G(s)` entry by entry, where `G_ij = n_ij / d_ij`.
//!
//! # Purpose
//! `block_controller`: for each input column j, the least common multiple `d_j` (monic) of
//! the denominators of the column's entries with a nonzero numerator; every such entry is
//! split into its direct term and strictly proper part `c_ij / d̂_ij` (`d̂_ij` monic) and
//! written over the common denominator as `(c_ij · d_j / d̂_ij) / d_j`. The column is then
//! one single-input controllable canonical block: `A_j` the companion matrix of `d_j`
//! (ones on the superdiagonal, last row `−[a_0, ..., a_{n_j−1}]`), `B_j = e_{n_j}`, row i of
//! `C_j` the coefficients `[c_0, ..., c_{n_j−1}]` of `c_ij · d_j / d̂_ij`, `D_ij` the direct
//! term. `A = blkdiag(A_j)`, `B = blkdiag(B_j)`, `C = [C_1 ... C_m]`.
//! `block_observer` is the dual construction per output row i: the `block_controller`
//! realization of `Gᵀ`, transposed (observable canonical blocks, B the stacked rows of
//! numerator coefficients, `C = blkdiag(e_{n_i}ᵀ)`).
//! Entries are taken as given (not reduced first); an entry with a zero numerator adds no
//! denominator, and a column (row) of zeros adds no state. The order is the sum of the
//! degrees of the least common multiples; it may exceed the McMillan degree (a pole shared
//! by two columns is realized twice), which a minimal realization removes.
//!
//! # Method
//! Exact rationals: the least common multiple by Euclid's algorithm
//! ([`crate::poly_lcm::lcm`]) and exact division, so the realization is exact.
//! Float64: Euclid's algorithm is unstable in floating point, so common factors are found
//! from the roots. The roots of each monic denominator are the eigenvalues of its companion
//! matrix (balanced by powers of two, faer's Hessenberg–QR), exact zero roots (trailing zero
//! coefficients) split off first and each complex pair made exactly conjugate. Two roots
//! `r`, `q` count as equal when `|r − q| <= tol · max(|r|, |q|)` (single linkage, so a
//! cluster may chain); `tol` defaults to [`DEFAULT_MERGE_TOL`]. Each cluster stands for one
//! root at the mean of its members (real for a cluster that is its own conjugate; a
//! conjugate pair of clusters gives a real quadratic factor), with the multiplicity of the
//! denominator that has most roots in it. `d_j` is the product of the clusters with the
//! maximal multiplicities and `d_j / d̂_ij` the product of the leftover ones. When the whole
//! group shares one denominator (e.g. a common denominator), or one denominator alone
//! already has all the maximal multiplicities, that denominator's own coefficients are `d_j`.
//!
//! # Numerical aspects
//! With one shared denominator no arithmetic happens beyond the monic normalisation and the
//! proper split (as for a SISO companion form). Otherwise the realized entry is
//! `n_ij / Π (s − c)^{m}` over the cluster centres, so its accuracy is that of the computed
//! roots: relative errors of order eps for simple, well-separated roots, eps^(1/k) for a
//! k-fold root (the mean over a cluster of a k-fold root is again accurate to order eps, but
//! only if its k computed roots fall into one cluster: for k >= 2 their spread, about
//! eps^(1/k)|r|, can exceed the default tol, and the root is then realized more times than
//! needed: correct, not minimal). A larger `tol` merges more (distinct roots within tol are
//! realized as one, changing the entry by about tol relative near that pole). The check is
//! a posteriori: `denominator_residual = max_ij ‖d̂_ij · (d_j / d̂_ij) − d_j‖_∞ / ‖d_j‖_∞`,
//! reported with the result (zero for a shared denominator).
//!
//! # References
//! T. Kailath, *Linear Systems*, Prentice Hall 1980, §6.4 (block companion realizations of
//! transfer matrices). A. Edelman and H. Murakami, "Polynomial roots from companion matrix
//! eigenvalues", Math. Comp. 64 (1995).
//!
//! # Errors
//! `Shape` (entry counts), `BadValue` naming `den` for a zero denominator, naming `num` for
//! an improper entry or `tol` for a tolerance outside [0, 1), `NonFinite` for NaN or
//! infinity, `TooLarge` (naming `den`) for an order above [`super::MAX_ORDER`] or more than
//! [`MAX_GROUP_ROOTS`] roots in one column (row), refused before the roots are computed, `NoConvergence` if the
//! eigenvalue iteration fails, `Overflow` if finite data overflow.

use crate::error::{require_finite, ModelError, Result};
use crate::matrix::Matrix;
use crate::poly::{split_proper, strip_leading_zeros, ProperSplit};
use crate::poly_lcm;
use crate::scalar::Scalar;
use crate::state_space::StateSpace;
use faer::prelude::*;
use num_rational::BigRational;
use std::str::FromStr;

/// Default relative tolerance for counting two computed roots as one.
pub const DEFAULT_MERGE_TOL: f64 = 1e-8;
/// Largest total degree of the denominators of one column (row): the root merging compares
/// every pair of roots.
pub const MAX_GROUP_ROOTS: usize = 2 * super::MAX_ORDER;

/// The two block forms.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum BlockForm {
    BlockController,
    BlockObserver,
}

pub const BLOCK_FORM_NAMES: &str = "'block_controller', 'block_observer'";

impl FromStr for BlockForm {
    type Err = ModelError;
    fn from_str(s: &str) -> Result<Self> {
        match s {
            "block_controller" => Ok(BlockForm::BlockController),
            "block_observer" => Ok(BlockForm::BlockObserver),
            other => Err(ModelError::BadOption {
                arg: "form",
                found: other.to_string(),
                allowed: BLOCK_FORM_NAMES,
            }),
        }
    }
}

/// Diagnostics of the float construction.
#[derive(Debug, Clone, PartialEq)]
pub struct TransferMatrixInfo {
    /// Orders of the blocks (one per input for block_controller, per output for block_observer).
    pub block_orders: Vec<usize>,
    /// The relative root-merging tolerance used.
    pub merge_tol: f64,
    /// `max_ij ‖d̂_ij · q_ij − d_j‖_∞ / ‖d_j‖_∞` (see the module notes).
    pub denominator_residual: f64,
}

/// The least common multiple of a group and each member's quotient by it.
struct GroupDenominator<T> {
    lcm: Vec<T>,
    /// `lcm / d̂_ij` per member (None for zero-numerator members).
    quotients: Vec<Option<Vec<T>>>,
}

/// Splits every entry (row-major p × m); `None` marks a zero numerator.
fn split_entries<T: Scalar>(
    p: usize,
    m: usize,
    num: &[Vec<T>],
    den: &[Vec<T>],
) -> Result<Vec<Option<ProperSplit<T>>>> {
    if num.len() != p * m {
        return Err(ModelError::Shape {
            arg: "num",
            expected: format!("{} entries ({p} x {m})", p * m),
            found: format!("{}", num.len()),
        });
    }
    if den.len() != p * m {
        return Err(ModelError::Shape {
            arg: "den",
            expected: format!("{} entries ({p} x {m})", p * m),
            found: format!("{}", den.len()),
        });
    }
    let mut out = Vec::with_capacity(p * m);
    for (k, (nk, dk)) in num.iter().zip(den).enumerate() {
        let (i, j) = (k / m, k % m);
        let d = strip_leading_zeros(dk);
        if d.is_empty() {
            return Err(ModelError::BadValue {
                arg: "den",
                detail: format!("entry ({i}, {j}) is empty or identically zero"),
            });
        }
        let n = strip_leading_zeros(nk);
        if n.is_empty() {
            out.push(None);
            continue;
        }
        if n.len() > d.len() {
            return Err(ModelError::BadValue {
                arg: "num",
                detail: format!(
                    "entry ({i}, {j}) is improper (numerator degree {} exceeds denominator degree {}); \
                     a state-space realization needs deg num <= deg den in every entry",
                    n.len() - 1,
                    d.len() - 1
                ),
            });
        }
        super::check_order(
            d.len() - 1,
            super::MAX_ORDER,
            "a transfer-matrix realization",
        )?;
        out.push(Some(split_proper(n, d)?));
    }
    Ok(out)
}

/// Refuses, before any root finding or Euclid step, requests whose order must exceed
/// [`super::MAX_ORDER`] (each group's order is at least its largest denominator degree) or
/// whose root merging would compare more than [`MAX_GROUP_ROOTS`] roots.
fn check_sizes<T: Scalar>(
    rows: usize,
    cols: usize,
    splits: &[Option<ProperSplit<T>>],
) -> Result<()> {
    let mut lower = 0;
    for j in 0..cols {
        let degrees = (0..rows).filter_map(|i| splits[i * cols + j].as_ref().map(|s| s.order()));
        let (mut max, mut sum) = (0, 0);
        for d in degrees {
            max = max.max(d);
            sum += d;
        }
        lower += max;
        if sum > MAX_GROUP_ROOTS {
            return Err(ModelError::TooLarge {
                arg: "den",
                detail: format!("the denominators of one column (row) have {sum} roots in all, above the limit {MAX_GROUP_ROOTS}"),
            });
        }
    }
    super::check_order(lower, super::MAX_ORDER, "a transfer-matrix realization")
}

/// The transposed entry list (for the observer form).
fn transposed<T: Clone>(p: usize, m: usize, x: &[T]) -> Vec<T> {
    let mut out = Vec::with_capacity(p * m);
    for j in 0..m {
        for i in 0..p {
            out.push(x[i * m + j].clone());
        }
    }
    out
}

/// Column j of the row-major p × m entry list.
fn column<T: Clone>(
    p: usize,
    m: usize,
    x: &[Option<ProperSplit<T>>],
    j: usize,
) -> Vec<Option<ProperSplit<T>>> {
    (0..p).map(|i| x[i * m + j].clone()).collect()
}

/// The block controller realization, given each column's common denominator.
fn assemble<T: Scalar>(
    p: usize,
    m: usize,
    splits: &[Option<ProperSplit<T>>],
    groups: &[GroupDenominator<T>],
) -> Result<StateSpace<T>> {
    let orders: Vec<usize> = groups.iter().map(|g| g.lcm.len() - 1).collect();
    let n: usize = orders.iter().sum();
    super::check_order(n, super::MAX_ORDER, "a transfer-matrix realization")?;
    let mut a = Matrix::zeros(n, n);
    let mut b = Matrix::zeros(n, m);
    let mut c = Matrix::zeros(p, n);
    let mut d = Matrix::zeros(p, m);
    let mut offset = 0;
    for (j, g) in groups.iter().enumerate() {
        let nj = orders[j];
        for k in 0..nj.saturating_sub(1) {
            a.set(offset + k, offset + k + 1, T::one());
        }
        for k in 0..nj {
            // a_k = coefficient of s^k of the monic lcm.
            a.set(offset + nj - 1, offset + k, g.lcm[nj - k].neg());
        }
        if nj > 0 {
            b.set(offset + nj - 1, j, T::one());
        }
        for i in 0..p {
            let (Some(split), Some(q)) = (&splits[i * m + j], &g.quotients[i]) else {
                continue;
            };
            d.set(i, j, split.direct.clone());
            let row = poly_lcm::mul(&split.strict_num, q);
            // `row` has length nj (or is empty for a constant entry); highest power first.
            for (k, v) in row.iter().rev().enumerate().take(nj) {
                c.set(i, offset + k, v.clone());
            }
        }
        offset += nj;
    }
    Ok(StateSpace { a, b, c, d })
}

// ---------------------------------------------------------------- exact rationals

fn exact_group(
    members: &[Option<ProperSplit<BigRational>>],
) -> Result<GroupDenominator<BigRational>> {
    let mut lcm = vec![BigRational::from_integer(1.into())];
    for s in members.iter().flatten() {
        lcm = poly_lcm::lcm(&lcm, &s.den);
        super::check_order(
            lcm.len() - 1,
            super::MAX_ORDER,
            "a transfer-matrix realization",
        )?;
    }
    let quotients = members
        .iter()
        .map(|s| s.as_ref().map(|s| poly_lcm::div_rem(&lcm, &s.den).0))
        .collect();
    Ok(GroupDenominator { lcm, quotients })
}

/// Exact block realization of the p × m matrix of `num[k] / den[k]` (row-major entries).
///
/// # Errors
/// See the module documentation.
pub fn realize_transfer_matrix_exact(
    p: usize,
    m: usize,
    num: &[Vec<BigRational>],
    den: &[Vec<BigRational>],
    form: BlockForm,
) -> Result<StateSpace<BigRational>> {
    let splits = split_entries(p, m, num, den)?;
    let (rows, cols, splits) = match form {
        BlockForm::BlockController => (p, m, splits),
        BlockForm::BlockObserver => (m, p, transposed(p, m, &splits)),
    };
    check_sizes(rows, cols, &splits)?;
    let groups = (0..cols)
        .map(|j| exact_group(&column(rows, cols, &splits, j)))
        .collect::<Result<Vec<_>>>()?;
    let ss = assemble(rows, cols, &splits, &groups)?;
    Ok(if form == BlockForm::BlockObserver {
        ss.dual()
    } else {
        ss
    })
}

// ---------------------------------------------------------------- float64

/// Roots of a monic polynomial: exact zeros first, then the companion eigenvalues, complex
/// pairs made exactly conjugate (each root of the upper half plane followed by its conjugate).
pub(crate) fn roots(monic: &[f64]) -> Result<Vec<(f64, f64)>> {
    let fail = ModelError::NoConvergence {
        routine: "the eigenvalue iteration for the denominator roots",
    };
    let zeros = monic.iter().rev().take_while(|c| **c == 0.0).count();
    let rest = &monic[..monic.len() - zeros];
    let mut out = vec![(0.0, 0.0); zeros];
    let n = rest.len() - 1;
    if n == 1 {
        out.push((-rest[1], 0.0));
    } else if n >= 2 {
        let mut comp = Matrix::zeros(n, n);
        for i in 0..n - 1 {
            comp.set(i, i + 1, 1.0);
        }
        for k in 0..n {
            comp.set(n - 1, k, -rest[n - k]);
        }
        let (bal, _) = crate::balance::balance(&comp);
        let eig = Mat::from_fn(n, n, |i, j| *bal.get(i, j))
            .eigen()
            .map_err(|_| fail.clone())?;
        let values: Vec<(f64, f64)> = eig
            .S()
            .column_vector()
            .iter()
            .map(|z| (z.re, z.im))
            .collect();
        if values
            .iter()
            .any(|(re, im)| !re.is_finite() || !im.is_finite())
        {
            return Err(fail);
        }
        let upper = values.iter().filter(|v| v.1 > 0.0).count();
        let lower = values.iter().filter(|v| v.1 < 0.0).count();
        if upper != lower {
            return Err(fail);
        }
        for &(re, im) in &values {
            if im == 0.0 {
                out.push((re, 0.0));
            } else if im > 0.0 {
                out.push((re, im));
                out.push((re, -im));
            }
        }
    }
    Ok(out)
}

fn find(parent: &mut [usize], mut x: usize) -> usize {
    while parent[x] != x {
        parent[x] = parent[parent[x]];
        x = parent[x];
    }
    x
}

fn float_group(
    members: &[Option<ProperSplit<f64>>],
    tol: f64,
) -> Result<(GroupDenominator<f64>, f64)> {
    let present: Vec<usize> = (0..members.len())
        .filter(|&i| members[i].is_some())
        .collect();
    let den = |i: usize| &members[i].as_ref().expect("present").den;
    // One shared denominator: place its coefficients as they are.
    if present.windows(2).all(|w| den(w[0]) == den(w[1])) {
        let lcm = present
            .first()
            .map(|&i| den(i).clone())
            .unwrap_or_else(|| vec![1.0]);
        let quotients = members
            .iter()
            .map(|s| s.as_ref().map(|_| vec![1.0]))
            .collect();
        return Ok((GroupDenominator { lcm, quotients }, 0.0));
    }
    // All roots: (member, value, index of its conjugate).
    let mut all: Vec<(usize, (f64, f64))> = Vec::new();
    let mut conj: Vec<usize> = Vec::new();
    for &i in &present {
        let r = roots(den(i))?;
        let base = all.len();
        let mut k = 0;
        while k < r.len() {
            if r[k].1 == 0.0 {
                conj.push(base + k);
                all.push((i, r[k]));
                k += 1;
            } else {
                conj.push(base + k + 1);
                conj.push(base + k);
                all.push((i, r[k]));
                all.push((i, r[k + 1]));
                k += 2;
            }
        }
    }
    let total = all.len();
    let mut parent: Vec<usize> = (0..total).collect();
    for x in 0..total {
        for y in x + 1..total {
            let ((ar, ai), (br, bi)) = (all[x].1, all[y].1);
            let dist = (ar - br).hypot(ai - bi);
            let scale = ar.hypot(ai).max(br.hypot(bi));
            if dist <= tol * scale || dist == 0.0 {
                let (rx, ry) = (find(&mut parent, x), find(&mut parent, y));
                if rx != ry {
                    parent[rx.max(ry)] = rx.min(ry);
                }
            }
        }
    }
    let roots_of: Vec<usize> = (0..total).map(|x| find(&mut parent, x)).collect();
    // Each cluster, by its root index (the smallest member): members, whether it is its own
    // conjugate, and whether it stands for a conjugate pair of clusters (then it owns it
    // when its smallest member comes first).
    struct Cluster {
        centre: (f64, f64),
        counts: Vec<usize>,
        max: usize,
        quadratic: bool,
    }
    let mut clusters: Vec<Cluster> = Vec::new();
    for rep in 0..total {
        if roots_of[rep] != rep {
            continue;
        }
        let members_of: Vec<usize> = (0..total).filter(|&x| roots_of[x] == rep).collect();
        let partner = roots_of[conj[rep]];
        if partner < rep {
            continue; // counted with its conjugate cluster
        }
        let self_conjugate = partner == rep;
        let count = members_of.len() as f64;
        let mean_re = members_of.iter().map(|&x| all[x].1 .0).sum::<f64>() / count;
        let mean_im = members_of.iter().map(|&x| all[x].1 .1).sum::<f64>() / count;
        let mut counts = vec![0usize; members.len()];
        for &x in &members_of {
            counts[all[x].0] += 1;
        }
        let max = counts.iter().copied().max().unwrap_or(0);
        clusters.push(Cluster {
            centre: if self_conjugate {
                (mean_re, 0.0)
            } else {
                (mean_re, mean_im)
            },
            counts,
            max,
            quadratic: !self_conjugate,
        });
    }
    let product = |mult: &dyn Fn(&Cluster) -> usize| {
        let real: Vec<(f64, usize)> = clusters
            .iter()
            .filter(|c| !c.quadratic)
            .map(|c| (c.centre.0, mult(c)))
            .collect();
        let pairs: Vec<((f64, f64), usize)> = clusters
            .iter()
            .filter(|c| c.quadratic)
            .map(|c| (c.centre, mult(c)))
            .collect();
        poly_lcm::product_of_factors(&real, &pairs)
    };
    // A member holding every maximal multiplicity gives the lcm its own coefficients.
    let full = present
        .iter()
        .copied()
        .find(|&i| clusters.iter().all(|c| c.counts[i] == c.max));
    let lcm = match full {
        Some(i) => den(i).clone(),
        None => product(&|c: &Cluster| c.max),
    };
    let mut quotients = Vec::with_capacity(members.len());
    let mut residual: f64 = 0.0;
    let lcm_norm = lcm.iter().fold(0.0f64, |acc, v| acc.max(v.abs()));
    for (i, s) in members.iter().enumerate() {
        let Some(s) = s else {
            quotients.push(None);
            continue;
        };
        let q = if Some(i) == full {
            vec![1.0]
        } else {
            product(&|c: &Cluster| c.max - c.counts[i])
        };
        let back = poly_lcm::mul(&s.den, &q);
        if back.len() != lcm.len() {
            return Err(ModelError::NoConvergence {
                routine: "the root merging of the denominators",
            });
        }
        let diff = back
            .iter()
            .zip(&lcm)
            .fold(0.0f64, |acc, (x, y)| acc.max((x - y).abs()));
        residual = residual.max(diff / lcm_norm);
        quotients.push(Some(q));
    }
    Ok((GroupDenominator { lcm, quotients }, residual))
}

/// Float64 block realization of the p × m matrix of `num[k] / den[k]` (row-major entries),
/// with the diagnostics of the root merging.
///
/// # Errors
/// See the module documentation.
pub fn realize_transfer_matrix_f64(
    p: usize,
    m: usize,
    num: &[Vec<f64>],
    den: &[Vec<f64>],
    form: BlockForm,
    tol: Option<f64>,
) -> Result<(StateSpace<f64>, TransferMatrixInfo)> {
    for v in num {
        require_finite("num", v)?;
    }
    for v in den {
        require_finite("den", v)?;
    }
    let tol = tol.unwrap_or(DEFAULT_MERGE_TOL);
    if !(tol >= 0.0 && tol < 1.0) {
        return Err(ModelError::BadValue {
            arg: "tol",
            detail: format!("the root-merging tolerance must be in [0, 1), found {tol}"),
        });
    }
    let splits = split_entries(p, m, num, den)?;
    if splits
        .iter()
        .flatten()
        .any(|s| s.den.iter().chain(&s.strict_num).any(|v| !v.is_finite()) || !s.direct.is_finite())
    {
        return Err(ModelError::Overflow {
            what: "normalising num/den by the leading denominator coefficients".into(),
        });
    }
    let (rows, cols, splits) = match form {
        BlockForm::BlockController => (p, m, splits),
        BlockForm::BlockObserver => (m, p, transposed(p, m, &splits)),
    };
    check_sizes(rows, cols, &splits)?;
    let mut groups = Vec::with_capacity(cols);
    let mut residual: f64 = 0.0;
    for j in 0..cols {
        let (g, r) = float_group(&column(rows, cols, &splits, j), tol)?;
        residual = residual.max(r);
        groups.push(g);
    }
    let block_orders = groups.iter().map(|g| g.lcm.len() - 1).collect();
    let ss = assemble(rows, cols, &splits, &groups)?;
    if [&ss.a, &ss.b, &ss.c, &ss.d]
        .iter()
        .any(|x| x.as_slice().iter().any(|v| !v.is_finite()))
        || !residual.is_finite()
    {
        return Err(ModelError::Overflow {
            what: "the block realization of the transfer matrix".into(),
        });
    }
    let ss = if form == BlockForm::BlockObserver {
        ss.dual()
    } else {
        ss
    };
    Ok((
        ss,
        TransferMatrixInfo {
            block_orders,
            merge_tol: tol,
            denominator_residual: residual,
        },
    ))
}

#[cfg(test)]
mod tests {
    use super::*;
    use num_bigint::BigInt;

    fn q(v: &[i64]) -> Vec<BigRational> {
        v.iter()
            .map(|&k| BigRational::from_integer(BigInt::from(k)))
            .collect()
    }

    /// `C (sI − A)⁻¹ B + D` at a real point s by solving with Gaussian elimination (small n).
    fn evaluate(ss: &StateSpace<f64>, s: f64) -> Vec<f64> {
        let n = ss.a.rows();
        let (p, m) = (ss.c.rows(), ss.b.cols());
        let mut out = ss.d.as_slice().to_vec();
        for j in 0..m {
            let mut mat: Vec<Vec<f64>> = (0..n)
                .map(|i| {
                    let mut row: Vec<f64> = (0..n)
                        .map(|k| if i == k { s } else { 0.0 } - ss.a.get(i, k))
                        .collect();
                    row.push(*ss.b.get(i, j));
                    row
                })
                .collect();
            for col in 0..n {
                let piv = (col..n)
                    .max_by(|&x, &y| mat[x][col].abs().total_cmp(&mat[y][col].abs()))
                    .unwrap();
                mat.swap(col, piv);
                for r in 0..n {
                    if r != col {
                        let f = mat[r][col] / mat[col][col];
                        for k in col..=n {
                            mat[r][k] -= f * mat[col][k];
                        }
                    }
                }
            }
            let x: Vec<f64> = (0..n).map(|i| mat[i][n] / mat[i][i]).collect();
            for i in 0..p {
                out[i * m + j] += (0..n).map(|k| ss.c.get(i, k) * x[k]).sum::<f64>();
            }
        }
        out
    }

    fn polyval(c: &[f64], s: f64) -> f64 {
        c.iter().fold(0.0, |acc, v| acc * s + v)
    }

    #[test]
    fn exact_block_controller_uses_the_column_lcm() {
        // G = [[1/(s+1), 1/(s+2)], [1/(s+2), (s+3)/(s+3)]] (entries not reduced).
        let num = vec![q(&[1]), q(&[1]), q(&[1]), q(&[1, 3])];
        let den = vec![q(&[1, 1]), q(&[1, 2]), q(&[1, 2]), q(&[1, 3])];
        let ss =
            realize_transfer_matrix_exact(2, 2, &num, &den, BlockForm::BlockController).unwrap();
        // Column 1: lcm (s+1)(s+2); column 2: lcm (s+2)(s+3).
        assert_eq!(ss.a.rows(), 4);
        assert_eq!(ss.a.get(1, 0), &q(&[-2])[0]);
        assert_eq!(ss.a.get(1, 1), &q(&[-3])[0]);
        assert_eq!(ss.a.get(3, 2), &q(&[-6])[0]);
        assert_eq!(ss.a.get(3, 3), &q(&[-5])[0]);
        // Row 1 of column 1: (s+2) -> [2, 1]; row 2: (s+1) -> [1, 1].
        assert_eq!(ss.c.as_slice()[0..2], q(&[2, 1])[..]);
        assert_eq!(ss.c.as_slice()[4..6], q(&[1, 1])[..]);
        // Entry (1, 1) = 1 + 0/(s+3): direct term 1, strictly proper part zero.
        assert_eq!(ss.d.get(1, 1), &q(&[1])[0]);
        assert_eq!(ss.c.as_slice()[6..8], q(&[0, 0])[..]);
        let obs =
            realize_transfer_matrix_exact(2, 2, &num, &den, BlockForm::BlockObserver).unwrap();
        assert_eq!(obs.a.rows(), 4);
    }

    #[test]
    fn float_merges_common_roots_and_matches_the_entries() {
        // Column 1: (s+1)(s+2) and (s+2)(s^2+s+1); column 2 zero numerator and 2/(s+4).
        let num = vec![vec![1.0, 0.0], vec![0.0], vec![3.0, 1.0], vec![2.0]];
        let den = vec![
            vec![1.0, 3.0, 2.0],
            vec![1.0, 5.0],
            vec![1.0, 3.0, 3.0, 2.0],
            vec![1.0, 4.0],
        ];
        for form in [BlockForm::BlockController, BlockForm::BlockObserver] {
            let (ss, info) = realize_transfer_matrix_f64(2, 2, &num, &den, form, None).unwrap();
            assert!(info.denominator_residual < 1e-14, "{info:?}");
            let s = 0.7;
            let g = evaluate(&ss, s);
            for k in 0..4 {
                let want = polyval(&num[k], s) / polyval(&den[k], s);
                assert!(
                    (g[k] - want).abs() <= 1e-13 * (1.0 + want.abs()),
                    "{form:?} entry {k}: {} vs {want}",
                    g[k]
                );
            }
            if form == BlockForm::BlockController {
                assert_eq!(info.block_orders, vec![4, 1]);
            } else {
                assert_eq!(info.block_orders, vec![2, 4]);
            }
        }
    }

    #[test]
    fn bad_entries_are_refused() {
        let e = realize_transfer_matrix_f64(
            1,
            1,
            &[vec![1.0, 0.0, 0.0]],
            &[vec![1.0, 1.0]],
            BlockForm::BlockController,
            None,
        );
        assert!(matches!(e, Err(ModelError::BadValue { arg: "num", .. })));
        let e = realize_transfer_matrix_f64(
            1,
            1,
            &[vec![1.0]],
            &[vec![0.0]],
            BlockForm::BlockController,
            None,
        );
        assert!(matches!(e, Err(ModelError::BadValue { arg: "den", .. })));
        let e = realize_transfer_matrix_f64(
            1,
            1,
            &[vec![f64::NAN]],
            &[vec![1.0]],
            BlockForm::BlockController,
            None,
        );
        assert!(matches!(e, Err(ModelError::NonFinite { arg: "num" })));
        let e = realize_transfer_matrix_f64(
            1,
            2,
            &[vec![1.0]],
            &[vec![1.0]],
            BlockForm::BlockController,
            None,
        );
        assert!(matches!(e, Err(ModelError::Shape { .. })));
        assert!("block".parse::<BlockForm>().is_err());
    }
}
