//! Identification of state-space models from data.
//!
//! | routine | module |
//! | --- | --- |
//! | realization from Markov parameters (Ho–Kalman / SVD of the block Hankel matrix) | [`ho_kalman`] |

pub mod ho_kalman;
