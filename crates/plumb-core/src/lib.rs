//! Pure statistics for Plumbline.
//!
//! Everything here works on slices and `nalgebra` matrices: no file access, no user interface,
//! no data-frame library. Each statistic's doc comment states its formula.
//!
//! * [`regression`]: least squares (ordinary and weighted) by Householder QR with column
//!   pivoting, rank detection that names the aliased term, and the inference that goes with it.
//! * [`distributions`]: tail probabilities and quantiles of Student's t and F, computed from
//!   the regularized incomplete beta function so that small p-values keep their relative accuracy.
//! * [`accurate`]: compensated sums and dot products used where cancellation would cost digits.

pub mod accurate;
pub mod agreement;
pub mod alternative;
pub mod association;
pub mod calibration;
pub mod checks;
pub mod cues;
pub mod describe;
pub mod distributions;
mod error;
pub mod moments;
pub mod optimize;
pub mod regression;
pub mod sampling;
mod short;

pub use error::{CoreError, Result};
