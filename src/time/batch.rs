//! Batches of models of one shape: frequency responses and conversions to continuous time
//! of N models in one call, in parallel.
//!
//! # Purpose
//! A fleet of identified models (one per unit, sensor or operating point) analysed in one
//! call: `frequency_response_batch` gives an (N, k, p, m) array, `to_continuous_batch` the
//! stacked continuous models and each model's verification residual.
//!
//! # Method
//! Each model is computed by the routine of a single call
//! ([`super::frequency_response::HessenbergModel`] sequentially over its frequencies, or
//! [`super::conversion::to_continuous`]), so batch results equal a loop of single calls
//! bit for bit. Models are spread over the rayon thread pool.
//!
//! # Errors
//! The smallest failing model index, as `ModelError::Batch { index, source }` (every model
//! is tried, so the index does not depend on thread timing); no partial result.
//! `TooLarge` when the result would exceed [`crate::batch::MAX_OUTPUT_VALUES`] values.

use super::conversion::{to_continuous, DiscretizationMethod};
use super::frequency_response::{failure_error, points, HessenbergModel};
use crate::error::{ModelError, Result};
use crate::matrix::Matrix;
use crate::state_space::StateSpace;
use nalgebra::Complex;
use rayon::prelude::*;

/// The shapes of a batch: N models with n states, m inputs and p outputs, row-major stacks.
#[derive(Debug, Clone, Copy)]
pub struct BatchShape {
    pub count: usize,
    pub n: usize,
    pub m: usize,
    pub p: usize,
}

/// Stacked float models (a (N, n, n), b (N, n, m), c (N, p, n), d (N, p, m)).
pub struct ModelStack<'a> {
    pub shape: BatchShape,
    pub a: &'a [f64],
    pub b: &'a [f64],
    pub c: &'a [f64],
    pub d: &'a [f64],
}

impl ModelStack<'_> {
    fn check(&self) -> Result<()> {
        let BatchShape { count, n, m, p } = self.shape;
        for (arg, data, per) in [
            ("a", self.a, n * n),
            ("b", self.b, n * m),
            ("c", self.c, p * n),
            ("d", self.d, p * m),
        ] {
            if data.len() != count * per {
                return Err(ModelError::Shape {
                    arg,
                    expected: format!("{count} models of {per} entries"),
                    found: format!("{} entries", data.len()),
                });
            }
        }
        Ok(())
    }

    fn model(&self, i: usize) -> StateSpace<f64> {
        let BatchShape { n, m, p, .. } = self.shape;
        let part = |data: &[f64], r: usize, c: usize| {
            Matrix::from_row_major(r, c, data[i * r * c..(i + 1) * r * c].to_vec()).expect("shape")
        };
        StateSpace {
            a: part(self.a, n, n),
            b: part(self.b, n, m),
            c: part(self.c, p, n),
            d: part(self.d, p, m),
        }
    }
}

fn check_size(values: usize) -> Result<()> {
    if values > crate::batch::MAX_OUTPUT_VALUES {
        return Err(ModelError::TooLarge {
            arg: "a",
            detail: format!(
                "the result would hold {values} values (limit {}); split the batch",
                crate::batch::MAX_OUTPUT_VALUES
            ),
        });
    }
    Ok(())
}

/// The smallest-index error of a batch, or the values in model order.
fn gather<T>(results: Vec<Result<T>>) -> Result<Vec<T>> {
    let mut out = Vec::with_capacity(results.len());
    for (index, r) in results.into_iter().enumerate() {
        match r {
            Ok(v) => out.push(v),
            Err(source) => {
                return Err(ModelError::Batch {
                    index,
                    source: Box::new(source),
                })
            }
        }
    }
    Ok(out)
}

/// Frequency responses of every model: (N, k, p, m) row-major.
pub fn frequency_response_batch(
    models: &ModelStack<'_>,
    frequencies: &[f64],
    sample_time: Option<f64>,
) -> Result<Vec<Complex<f64>>> {
    models.check()?;
    let BatchShape { count, m, p, .. } = models.shape;
    let total = count
        .checked_mul(frequencies.len())
        .and_then(|x| x.checked_mul(2 * p * m))
        .unwrap_or(usize::MAX);
    check_size(total)?;
    let s = points(frequencies, sample_time)?;
    if s.iter().any(|z| !z.re.is_finite()) {
        return Err(ModelError::BadValue {
            arg: "frequencies",
            detail: "frequency * sample_time overflows".into(),
        });
    }
    let results: Vec<Result<Vec<Complex<f64>>>> = (0..count)
        .into_par_iter()
        .map(|i| {
            let model = HessenbergModel::new(&models.model(i))?;
            model
                .evaluate_many(&s, false)
                .map_err(|(k, f)| failure_error(k, f, frequencies, s[k]))
        })
        .collect();
    Ok(gather(results)?.concat())
}

/// Stacked continuous models and each model's verification residual (0 for methods that
/// verify nothing).
pub struct ContinuousBatch {
    pub a: Vec<f64>,
    pub b: Vec<f64>,
    pub c: Vec<f64>,
    pub d: Vec<f64>,
    pub residuals: Vec<f64>,
}

/// [`to_continuous`] of every model with one sample time and method.
pub fn to_continuous_batch(
    models: &ModelStack<'_>,
    sample_time: f64,
    method: DiscretizationMethod,
    prewarp_frequency: Option<f64>,
) -> Result<ContinuousBatch> {
    models.check()?;
    let count = models.shape.count;
    let results: Vec<Result<_>> = (0..count)
        .into_par_iter()
        .map(|i| to_continuous(&models.model(i), sample_time, method, prewarp_frequency))
        .collect();
    let converted = gather(results)?;
    let mut out = ContinuousBatch {
        a: Vec::with_capacity(models.a.len()),
        b: Vec::with_capacity(models.b.len()),
        c: Vec::with_capacity(models.c.len()),
        d: Vec::with_capacity(models.d.len()),
        residuals: Vec::with_capacity(count),
    };
    for conv in converted {
        let r = conv.realization;
        out.a.extend_from_slice(r.a.as_slice());
        out.b.extend_from_slice(r.b.as_slice());
        out.c.extend_from_slice(r.c.as_slice());
        out.d.extend_from_slice(r.d.as_slice());
        let residual = conv
            .info
            .iter()
            .find(|(k, _)| *k == "residual")
            .map_or(0.0, |(_, v)| *v);
        out.residuals.push(residual);
    }
    Ok(out)
}
