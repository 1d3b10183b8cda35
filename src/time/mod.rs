//! Time bases: continuous-time models to discrete-time models and back, the matrix
//! exponential and logarithm behind them, and frequency responses.
//!
//! | routine | module |
//! | --- | --- |
//! | matrix exponential (scaling and squaring, Padé approximants) | [`exponential`] |
//! | principal matrix logarithm (inverse scaling and squaring) | [`logarithm`] |
//! | zero-order hold and its inverse | [`zero_order_hold`] |
//! | first-order (triangle) hold and its inverse | [`first_order_hold`] |
//! | impulse invariance and its inverse | [`impulse_invariant`] |
//! | bilinear map (optionally prewarped), forward and backward differences, exact or float | [`bilinear`] |
//! | conversion by method name, both directions | [`conversion`] |
//! | frequency response by Hessenberg solves (frequencies in SIMD lanes) | [`frequency_response`] |
//! | batches of conversions and frequency responses over rayon | [`batch`] |
//!
//! Conventions: a discrete-time model advances `x[k+1] = A x[k] + B u[k]` once per
//! `sample_time` seconds; its frequency response at ω rad/s is `G(exp(jωT))`.

pub mod batch;
pub mod bilinear;
pub mod conversion;
pub mod exponential;
pub mod first_order_hold;
mod frequency_lanes;
pub mod frequency_response;
pub mod impulse_invariant;
pub mod logarithm;
pub mod zero_order_hold;

mod dense;

pub use conversion::{to_continuous, to_discrete, Conversion, DiscretizationMethod};
