//! statewright's core: state-space realizations in the canonical forms, transfer-function
//! recovery by the Faddeev–LeVerrier recursion (exact and float), and Krylov matrices.
//!
//! The core knows nothing of Python; the binding layer lives in [`python`] behind the
//! `python` cargo feature. Every public routine returns [`ModelError`] for bad input and
//! never panics on it.

pub mod balance;
pub mod batch;
pub mod error;
pub mod gramian;
pub mod identify;
pub mod krylov;
pub mod matrix;
pub mod parametric;
pub mod poly;
pub mod poly_lcm;
pub mod realize;
pub mod recover;
pub mod scalar;
pub mod state_space;
pub mod structure;

#[cfg(feature = "python")]
pub mod python;

pub use error::{ModelError, Result};
pub use matrix::Matrix;
pub use realize::Form;
pub use recover::Method;
pub use state_space::StateSpace;

#[cfg(test)]
mod tests;
