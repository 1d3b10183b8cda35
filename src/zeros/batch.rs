//! Invariant zeros of many models of one shape in one call, in parallel.
//!
//! # Purpose
//! For N models `(A_i, B_i, C_i, D_i)` stacked as (N, n, n), (N, n, m), (N, p, n),
//! (N, p, m): the zeros of each, in a padded (N, n) complex array (row i holds its
//! `counts[i]` zeros first, sorted as [`super::pencil::invariant_zeros`] sorts them, then
//! zeros of padding), and the counts. A model has at most n finite zeros.
//!
//! # Method
//! Each model goes through the same routine as a single call, so a batch equals a loop of
//! single calls bit for bit. Models are spread over the rayon pool; each writes its own row.
//!
//! # Errors
//! `ModelError::Batch { index, source }` for the smallest failing index (all models are
//! tried, so the index does not depend on thread timing); nothing is returned then.
//! `TooLarge` when the result would exceed [`crate::batch::MAX_OUTPUT_VALUES`].

use super::pencil::invariant_zeros;
use crate::batch::MAX_OUTPUT_VALUES;
use crate::error::{ModelError, Result};
use crate::matrix::Matrix;
use crate::state_space::StateSpace;
use rayon::prelude::*;
use std::sync::Mutex;

/// Padded zeros (row-major (N, n) real and imaginary parts) and per-model counts.
pub struct ZerosBatch {
    pub re: Vec<f64>,
    pub im: Vec<f64>,
    pub counts: Vec<usize>,
}

/// Dimensions of the stacked models.
#[derive(Debug, Clone, Copy)]
pub struct BatchShape {
    pub count: usize,
    pub n: usize,
    pub m: usize,
    pub p: usize,
}

pub fn invariant_zeros_batch(
    a: &[f64],
    b: &[f64],
    c: &[f64],
    d: &[f64],
    shape: BatchShape,
    tol: Option<f64>,
) -> Result<ZerosBatch> {
    let BatchShape { count, n, m, p } = shape;
    for (arg, data, per) in [
        ("a", a, n * n),
        ("b", b, n * m),
        ("c", c, p * n),
        ("d", d, p * m),
    ] {
        if data.len() != count * per {
            return Err(ModelError::Shape {
                arg,
                expected: format!("{count} models of {per} values"),
                found: format!("{} values", data.len()),
            });
        }
    }
    super::pencil::check_tol(tol)?;
    let total = count.saturating_mul(n.max(1));
    if total > MAX_OUTPUT_VALUES / 2 {
        return Err(ModelError::TooLarge {
            arg: "a",
            detail: format!("the result would hold {total} complex values; split the batch"),
        });
    }
    let width = n.max(1);
    let mut re = vec![0.0; count * width];
    let mut im = vec![0.0; count * width];
    let mut counts = vec![0usize; count];
    let failure: Mutex<Option<(usize, ModelError)>> = Mutex::new(None);
    let slice = |data: &[f64], per: usize, i: usize, r: usize, cl: usize| {
        Matrix::from_row_major(r, cl, data[i * per..(i + 1) * per].to_vec()).expect("model shape")
    };
    re.par_chunks_mut(width)
        .zip(im.par_chunks_mut(width))
        .zip(counts.par_iter_mut())
        .enumerate()
        .for_each(|(i, ((re_i, im_i), count_i))| {
            let ss = StateSpace {
                a: slice(a, n * n, i, n, n),
                b: slice(b, n * m, i, n, m),
                c: slice(c, p * n, i, p, n),
                d: slice(d, p * m, i, p, m),
            };
            match invariant_zeros(&ss, tol) {
                Ok(z) => {
                    for (k, (x, y)) in z.zeros.iter().enumerate() {
                        re_i[k] = *x;
                        im_i[k] = *y;
                    }
                    *count_i = z.zeros.len();
                }
                Err(e) => {
                    let mut slot = failure.lock().unwrap_or_else(|p| p.into_inner());
                    if slot.as_ref().is_none_or(|(j, _)| i < *j) {
                        *slot = Some((i, e));
                    }
                }
            }
        });
    if let Some((index, source)) = failure.into_inner().unwrap_or_else(|p| p.into_inner()) {
        return Err(ModelError::Batch {
            index,
            source: Box::new(source),
        });
    }
    Ok(ZerosBatch { re, im, counts })
}
