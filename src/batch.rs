//! Batches of models: many small realizations or transfer functions in one call, in parallel.
//!
//! # Purpose
//! `realize_batch`: N SISO transfer functions of one order n to N realizations in one form.
//! `transfer_function_batch`: N state-space models of one shape to N transfer matrices.
//!
//! # Method
//! Each model is computed by the same routine as a single call ([`crate::realize::realize_f64`],
//! [`crate::recover::transfer_function_f64`] with `Method::Auto`), so batch results equal a loop
//! of single calls bit for bit. Models are spread over the rayon thread pool; every output
//! array is allocated once, each model writes its own disjoint slice.
//!
//! # Errors
//! If any model fails, the batch fails with `ModelError::Batch { index, source }` for the
//! smallest failing index (all models are tried, so the index does not depend on thread
//! timing), and no output is returned.

use crate::error::require_finite;
use crate::error::{ModelError, Result};
use crate::matrix::Matrix;
use crate::realize::controllable::controllable_canonical_into;
use crate::realize::{realize_f64, Form, MAX_ORDER};
use crate::recover::certified_lanes::{LaneWork, LANES};
use crate::recover::dyadic::transfer_function_dyadic;
use crate::recover::{certified_accuracy, transfer_function_f64, Method};
use crate::state_space::StateSpace;
use rayon::prelude::*;
use std::sync::Mutex;

/// Largest number of output values one batch call may allocate (2³⁰ float64 = 8 GiB).
pub const MAX_OUTPUT_VALUES: usize = 1 << 30;

/// Stacked realizations: `a` is (N, n, n), `b` (N, n, 1), `c` (N, 1, n), `d` (N, 1, 1), row-major.
pub struct RealizationBatch {
    pub n: usize,
    pub a: Vec<f64>,
    pub b: Vec<f64>,
    pub c: Vec<f64>,
    pub d: Vec<f64>,
}

/// Stacked transfer matrices: `num` (N, p, m, n+1), `den` (N, n+1).
pub struct TransferBatch {
    pub num: Vec<f64>,
    pub den: Vec<f64>,
}

/// Keeps the failure with the smallest index.
struct FirstError(Mutex<Option<(usize, ModelError)>>);

impl FirstError {
    fn new() -> Self {
        FirstError(Mutex::new(None))
    }
    fn record(&self, index: usize, err: ModelError) {
        let mut slot = self.0.lock().unwrap_or_else(|p| p.into_inner());
        if slot.as_ref().is_none_or(|(i, _)| index < *i) {
            *slot = Some((index, err));
        }
    }
    fn into_result(self) -> Result<()> {
        match self.0.into_inner().unwrap_or_else(|p| p.into_inner()) {
            Some((index, source)) => Err(ModelError::Batch {
                index,
                source: Box::new(source),
            }),
            None => Ok(()),
        }
    }
}

fn check_size(arg: &'static str, values: usize) -> Result<()> {
    if values > MAX_OUTPUT_VALUES {
        return Err(ModelError::TooLarge {
            arg,
            detail: format!("the result would hold {values} values (limit {MAX_OUTPUT_VALUES}); split the batch"),
        });
    }
    Ok(())
}

/// `num` is (count, k) and `den` (count, n+1), row-major; every den must have a nonzero
/// leading coefficient (all models of the batch share the order n).
pub fn realize_batch(
    num: &[f64],
    k: usize,
    den: &[f64],
    n_plus_1: usize,
    count: usize,
    form: Form,
) -> Result<RealizationBatch> {
    if n_plus_1 == 0 {
        return Err(ModelError::ZeroPolynomial { arg: "den" });
    }
    if k == 0 {
        return Err(ModelError::ZeroPolynomial { arg: "num" });
    }
    if k > n_plus_1 {
        return Err(ModelError::Improper {
            num_degree: k - 1,
            den_degree: n_plus_1 - 1,
        });
    }
    let n = n_plus_1 - 1;
    let total = count.saturating_mul(n * n + 2 * n + 1);
    check_size("den", total)?;
    // Chunks must exist for every model even when n = 0, so each buffer has at least one slot
    // per model; the padding is dropped afterwards.
    let (na, nb) = ((n * n).max(1), n.max(1));
    let (mut a, mut b, mut c, mut d) = (
        vec![0.0; count * na],
        vec![0.0; count * nb],
        vec![0.0; count * nb],
        vec![0.0; count],
    );
    let failure = FirstError::new();
    a.par_chunks_mut(na)
        .zip(b.par_chunks_mut(nb))
        .zip(c.par_chunks_mut(nb))
        .zip(d.par_chunks_mut(1))
        .enumerate()
        .for_each(|(i, (((ai, bi), ci), di))| {
            let den_i = &den[i * n_plus_1..(i + 1) * n_plus_1];
            if den_i[0] == 0.0 {
                failure.record(i, ModelError::BadValue {
                    arg: "den",
                    detail: format!("the leading coefficient is zero; every model of a batch must have order {n}"),
                });
                return;
            }
            let num_i = &num[i * k..(i + 1) * k];
            if form == Form::ControllableCanonical && n <= MAX_ORDER {
                // The default form written in place (same bits as realize_f64).
                match controllable_canonical_into(num_i, den_i, ai, bi, ci) {
                    Ok(direct) => di[0] = direct,
                    Err(e) => failure.record(i, e),
                }
                return;
            }
            match realize_f64(num_i, den_i, form) {
                Ok((ss, _)) => {
                    if n > 0 {
                        ai.copy_from_slice(ss.a.as_slice());
                        bi.copy_from_slice(ss.b.as_slice());
                        ci.copy_from_slice(ss.c.as_slice());
                    }
                    di[0] = ss.d.as_slice()[0];
                }
                Err(e) => failure.record(i, e),
            }
        });
    failure.into_result()?;
    if n == 0 {
        (a, b, c) = (Vec::new(), Vec::new(), Vec::new());
    }
    Ok(RealizationBatch { n, a, b, c, d })
}

/// `a` (count, n, n), `b` (count, n, m), `c` (count, p, n), `d` (count, p, m), row-major.
#[allow(clippy::too_many_arguments)]
pub fn transfer_function_batch(
    a: &[f64],
    b: &[f64],
    c: &[f64],
    d: &[f64],
    count: usize,
    n: usize,
    m: usize,
    p: usize,
) -> Result<TransferBatch> {
    transfer_function_batch_with(a, b, c, d, count, (n, m, p), Method::Auto)
}

/// [`transfer_function_batch`] with a recovery method. `Method::Hessenberg` runs
/// [`crate::recover::hessenberg`] on one scratch space per thread (no allocation per
/// model); every other method runs the single-call routine per model.
pub fn transfer_function_batch_with(
    a: &[f64],
    b: &[f64],
    c: &[f64],
    d: &[f64],
    count: usize,
    (n, m, p): (usize, usize, usize),
    method: Method,
) -> Result<TransferBatch> {
    if method == Method::Hessenberg {
        return hessenberg_batch(a, b, c, d, count, (n, m, p)).map(|r| r.transfer);
    }
    if method == Method::Auto && n <= crate::recover::MAX_RECURSION_ORDER {
        return certified_batch(a, b, c, d, count, (n, m, p));
    }
    let per_num = p * m * (n + 1);
    let total = count.saturating_mul(per_num + n + 1);
    check_size("a", total)?;
    let slot = per_num.max(1); // as in realize_batch: one chunk per model even when p·m = 0
    let (mut num, mut den) = (vec![0.0; count * slot], vec![0.0; count * (n + 1)]);
    let failure = FirstError::new();
    num.par_chunks_mut(slot)
        .zip(den.par_chunks_mut(n + 1))
        .enumerate()
        .for_each(|(i, (num_i, den_i))| {
            let take = |data: &[f64], rows: usize, cols: usize| {
                Matrix::from_row_major(
                    rows,
                    cols,
                    data[i * rows * cols..(i + 1) * rows * cols].to_vec(),
                )
                .expect("slice")
            };
            let ss = StateSpace {
                a: take(a, n, n),
                b: take(b, n, m),
                c: take(c, p, n),
                d: take(d, p, m),
            };
            match transfer_function_f64(&ss, method) {
                Ok((nm, dn, _)) => {
                    num_i[..per_num].copy_from_slice(&nm);
                    den_i.copy_from_slice(&dn);
                }
                Err(e) => failure.record(i, e),
            }
        });
    failure.into_result()?;
    if per_num == 0 {
        num = Vec::new();
    }
    Ok(TransferBatch { num, den })
}

/// Models `from..to` of stacked matrices of `size` entries each.
fn stacked(x: &[f64], from: usize, to: usize, size: usize) -> &[f64] {
    &x[from * size..to * size]
}

/// `Method::Auto` over a batch, [`LANES`] models at a time in the SIMD lanes of
/// [`crate::recover::certified_lanes`] (one workspace per thread, nothing allocated per
/// model); a model the double-double bound does not certify goes to the exact route, as a
/// single call does. Equal bit for bit to single calls of
/// [`transfer_function_f64`]`(.., Method::Auto)`, errors included.
fn certified_batch(
    a: &[f64],
    b: &[f64],
    c: &[f64],
    d: &[f64],
    count: usize,
    (n, m, p): (usize, usize, usize),
) -> Result<TransferBatch> {
    let per_num = p * m * (n + 1);
    let total = count.saturating_mul(per_num + n + 1);
    check_size("a", total)?;
    let slot = per_num.max(1); // as in realize_batch: one chunk per model even when p·m = 0
    let (mut num, mut den) = (vec![0.0; count * slot], vec![0.0; count * (n + 1)]);
    let sizes = (n * n, n * m, p * n, p * m);
    let failure = FirstError::new();
    num.par_chunks_mut(slot * LANES)
        .zip(den.par_chunks_mut((n + 1) * LANES))
        .enumerate()
        .for_each_init(LaneWork::default, |work, (group, (num_g, den_g))| {
            let first = group * LANES;
            let models = den_g.len() / (n + 1);
            let part = |x, size| stacked(x, first, first + models, size);
            let (ag, bg, cg, dg) = (
                part(a, sizes.0),
                part(b, sizes.1),
                part(c, sizes.2),
                part(d, sizes.3),
            );
            work.run(ag, bg, cg, dg, models, (n, m, p));
            for t in 0..models {
                let model = |x, size| stacked(x, t, t + 1, size);
                let (at, bt, ct, dt) = (
                    model(ag, sizes.0),
                    model(bg, sizes.1),
                    model(cg, sizes.2),
                    model(dg, sizes.3),
                );
                // The checks of a single call, in its order.
                let bad = [("a", at), ("b", bt), ("c", ct), ("d", dt)]
                    .into_iter()
                    .find_map(|(arg, x)| require_finite(arg, x).err());
                if let Some(e) = bad {
                    failure.record(first + t, e);
                    continue;
                }
                let num_t = &mut num_g[t * slot..t * slot + per_num];
                let den_t = &mut den_g[t * (n + 1)..(t + 1) * (n + 1)];
                let r = work.lane(t);
                let values = [r.coeffs, r.numerator];
                if certified_accuracy(values, [r.coeff_bounds, r.numerator_bounds]).is_some() {
                    num_t.copy_from_slice(r.numerator);
                    den_t.copy_from_slice(r.coeffs);
                    continue;
                }
                let matrix = |rows: usize, cols: usize, x: &[f64]| {
                    Matrix::from_row_major(rows, cols, x.to_vec()).expect("slice")
                };
                let ss = StateSpace {
                    a: matrix(n, n, at),
                    b: matrix(n, m, bt),
                    c: matrix(p, n, ct),
                    d: matrix(p, m, dt),
                };
                match transfer_function_dyadic(&ss) {
                    Ok((nm, dn)) => {
                        num_t.copy_from_slice(&nm);
                        den_t.copy_from_slice(&dn);
                    }
                    Err(e) => failure.record(first + t, e),
                }
            }
        });
    failure.into_result()?;
    if per_num == 0 {
        num = Vec::new();
    }
    Ok(TransferBatch { num, den })
}

/// Stacked transfer matrices from the Hessenberg route with their error estimates.
pub struct HessenbergBatch {
    pub transfer: TransferBatch,
    /// (N, p, m, n+1) and (N, n+1): absolute estimates of each coefficient's error.
    pub num_estimate: Vec<f64>,
    pub den_estimate: Vec<f64>,
}

/// The Hessenberg route over a batch; equal bit for bit to single calls of
/// [`crate::recover::hessenberg::transfer_function`].
pub fn hessenberg_batch(
    a: &[f64],
    b: &[f64],
    c: &[f64],
    d: &[f64],
    count: usize,
    (n, m, p): (usize, usize, usize),
) -> Result<HessenbergBatch> {
    use crate::recover::hessenberg::{HessenbergResult, HessenbergWork};
    let per_num = p * m * (n + 1);
    let total = count.saturating_mul(2 * (per_num + n + 1));
    check_size("a", total)?;
    crate::recover::check_order_for_batch(n)?;
    let slot = per_num.max(1);
    let (mut num, mut den) = (vec![0.0; count * slot], vec![0.0; count * (n + 1)]);
    let (mut num_e, mut den_e) = (vec![0.0; count * slot], vec![0.0; count * (n + 1)]);
    let failure = FirstError::new();
    num.par_chunks_mut(slot)
        .zip(den.par_chunks_mut(n + 1))
        .zip(num_e.par_chunks_mut(slot))
        .zip(den_e.par_chunks_mut(n + 1))
        .enumerate()
        .for_each_init(
            HessenbergWork::default,
            |work, (i, (((num_i, den_i), num_ei), den_ei))| {
                let (ai, bi, ci, di) = (
                    &a[i * n * n..(i + 1) * n * n],
                    &b[i * n * m..(i + 1) * n * m],
                    &c[i * p * n..(i + 1) * p * n],
                    &d[i * p * m..(i + 1) * p * m],
                );
                for (arg, x) in [("a", ai), ("b", bi), ("c", ci), ("d", di)] {
                    if let Err(e) = crate::error::require_finite(arg, x) {
                        failure.record(i, e);
                        return;
                    }
                }
                let out = HessenbergResult {
                    den: den_i,
                    den_estimate: den_ei,
                    num: &mut num_i[..per_num],
                    num_estimate: &mut num_ei[..per_num],
                };
                if let Err(e) = work.transfer_function(ai, bi, ci, di, (n, m, p), out) {
                    failure.record(i, e);
                }
            },
        );
    failure.into_result()?;
    if per_num == 0 {
        (num, num_e) = (Vec::new(), Vec::new());
    }
    Ok(HessenbergBatch {
        transfer: TransferBatch { num, den },
        num_estimate: num_e,
        den_estimate: den_e,
    })
}
