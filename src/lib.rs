//! statewright's core: state-space realizations in the canonical forms, transfer-function
//! recovery by the Faddeev–LeVerrier recursion (exact and float), and Krylov matrices.
//!
//! The core knows nothing of Python; the binding layer lives in [`python`] behind the
//! `python` cargo feature. Every public routine returns [`ModelError`] for bad input and
//! never panics on it.

// Lints allowed crate-wide, each on purpose:
// - index loops mirror the formulas of the numerical methods (row i, column j);
// - `!(x >= lo && x < hi)` and `!(a < b)` are the NaN-rejecting comparisons (a NaN fails
//   every ordered comparison, so the negated form refuses it where `x < lo || x >= hi`
//   would let it through);
// - the batch kernels take flat buffers with their dimensions as separate arguments;
// - the double-double type names its error-free steps `add`, `neg` as methods, without
//   operator overloading, so the cost of each step stays visible.
#![allow(
    clippy::needless_range_loop,
    clippy::neg_cmp_op_on_partial_ord,
    clippy::manual_range_contains,
    clippy::too_many_arguments,
    clippy::should_implement_trait
)]

pub mod balance;
pub mod batch;
pub mod error;
pub mod gramian;
pub mod identify;
pub mod krylov;
pub mod matrix;
pub mod poly;
pub mod poly_lcm;
pub mod realize;
pub mod recover;
pub mod scalar;
pub mod state_space;
pub mod structure;
pub mod time;

#[cfg(feature = "python")]
pub mod python;

pub use error::{ModelError, Result};
pub use matrix::Matrix;
pub use realize::Form;
pub use recover::Method;
pub use state_space::StateSpace;

#[cfg(test)]
mod tests;
