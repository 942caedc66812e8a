//! Alternative lines and curves for one pair `(x, y)`, to lay over the least-squares fit:
//! Theil–Sen (robust to outliers in y), Deming (errors in both variables) and LOESS (local
//! regression, no global shape assumed).

mod deming;
mod loess;
mod theil_sen;

pub use deming::{deming, DemingFit};
pub use loess::{loess, LoessFit, LOESS_MAX_N};
pub use theil_sen::{theil_sen, TheilSenFit, THEIL_SEN_MAX_N};

/// Why an alternative fit cannot be computed.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum AlternativeError {
    /// Too few pairs.
    #[error("undefined because only {n} pairs (at least {needed} needed)")]
    TooFewPairs {
        /// Pairs available.
        n: usize,
        /// Pairs needed.
        needed: usize,
    },
    /// x does not vary (or, for Theil–Sen, no two x differ).
    #[error("undefined because x does not vary")]
    ConstantX,
    /// More pairs than the method accepts.
    #[error(
        "undefined because {n} pairs exceed this method's limit of {max} (its cost grows as n²)"
    )]
    TooLarge {
        /// Pairs available.
        n: usize,
        /// Largest accepted.
        max: usize,
    },
    /// A parameter is out of range.
    #[error("{0}")]
    InvalidOption(String),
}

fn check(x: &[f64], y: &[f64], needed: usize) -> Result<(), AlternativeError> {
    assert_eq!(x.len(), y.len(), "paired slices differ in length");
    if x.len() < needed {
        return Err(AlternativeError::TooFewPairs { n: x.len(), needed });
    }
    if x.iter().all(|&v| v == x[0]) {
        return Err(AlternativeError::ConstantX);
    }
    Ok(())
}
