//! Gramians and balancing of stable models.
//!
//! | routine | module |
//! | --- | --- |
//! | Lyapunov and Stein equations (Bartels–Stewart over a real Schur form), Gramians | [`lyapunov`] |
//! | Hankel singular values, balanced realization and truncation (square-root method) | [`balance`] |

pub mod balance;
pub mod frequency_peak;
pub mod hammarling;
pub mod lyapunov;
