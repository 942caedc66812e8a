//! Method comparison: two columns that measure the same quantity, `x` by the reference (or
//! old) method and `y` by the new one.
//!
//! * [`passing_bablok`]: the Passing–Bablok line `y = a + b·x` (Passing & Bablok 1983), a
//!   shifted median of pairwise slopes that treats both columns alike, with its confidence
//!   interval, a cusum check of linearity ([`Linearity`]) and Kendall's τ as a check of the
//!   positive association the method assumes. Selected in O(n log n) per count, so that
//!   100 000 pairs take a fraction of a second; [`passing_bablok_brute`] forms every slope and
//!   is the reference the fast route is tested against.
//! * [`bland_altman`]: the agreement view (Bland & Altman 1986, 1999): the mean difference
//!   (bias), the limits of agreement, their confidence intervals, and the regression of the
//!   differences on the means (proportional bias), with the points for the plot.

mod bland_altman;
mod cusum;
mod inversions;
mod pair_order;
mod passing_bablok;
#[cfg(test)]
mod passing_bablok_tests;
mod slope_rank;
mod slope_ties;

pub use bland_altman::{
    bland_altman, AgreementLimits, BlandAltmanOptions, DifferenceScale, ProportionalBias,
};
pub use cusum::{cusum_linearity, kolmogorov_upper_tail, Linearity, KOLMOGOROV_5_PERCENT};
pub use passing_bablok::{
    passing_bablok, passing_bablok_brute, AssociationCheck, IntervalUndefined, PassingBablok,
    SlopeInterval, PASSING_BABLOK_BRUTE_MAX_N,
};

/// Why a method comparison cannot be computed on these columns.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum AgreementError {
    /// Too few pairs.
    #[error("only {n} pairs were given; a method comparison needs at least {needed}")]
    TooFewPairs {
        /// Pairs given.
        n: usize,
        /// Pairs needed.
        needed: usize,
    },
    /// A value is NaN or infinite.
    #[error("column {column} holds a value that is not a finite number at position {row} (0-based); remove or correct that row")]
    NonFinite {
        /// `"x"` (reference method) or `"y"` (new method).
        column: &'static str,
        /// 0-based position within the slice.
        row: usize,
    },
    /// A column takes a single value.
    #[error("column {column} takes the single value {value} in every row, so the two methods cannot be compared; check that the right columns were chosen")]
    Constant {
        /// `"x"` or `"y"`.
        column: &'static str,
        /// The value it takes.
        value: f64,
    },
    /// Differences as a percentage of the mean need a mean that is not zero.
    #[error("the mean of the two methods is 0 at position {row} (0-based), so the difference cannot be expressed as a percentage of it; use absolute differences or drop that row")]
    ZeroMean {
        /// 0-based position.
        row: usize,
    },
    /// Every pair of points is identical or joined by a slope of exactly −1.
    #[error("every pair of points is either identical or joined by a slope of exactly −1, so no slope is left to take the median of")]
    NoSlopes,
    /// The shifted median falls outside the slopes (most slopes are below −1).
    #[error("{below_minus_one} of {slopes} pairwise slopes are below −1, which pushes the shifted median past the last slope; the method assumes the two columns rise together (check the sign of one column)")]
    ShiftOutOfRange {
        /// Slopes kept (identical pairs and slopes of −1 left out).
        slopes: u64,
        /// Slopes below −1.
        below_minus_one: u64,
    },
    /// The slope is infinite: more than half the pairs share their x.
    #[error("the slope is infinite because most pairs of points share their x value; x barely varies compared with y")]
    VerticalLine,
    /// More pairs than the brute-force reference accepts.
    #[error("{n} pairs exceed the brute-force limit of {max} (it forms all n(n−1)/2 slopes); use passing_bablok instead")]
    TooLarge {
        /// Pairs given.
        n: usize,
        /// Largest accepted.
        max: usize,
    },
    /// A level or option is out of range.
    #[error("{0}")]
    InvalidOption(String),
}

/// Checks paired columns: equal lengths (a caller bug otherwise), at least `needed` pairs, and
/// finite values, reporting the first bad position.
fn check_pairs(x: &[f64], y: &[f64], needed: usize) -> Result<(), AgreementError> {
    assert_eq!(x.len(), y.len(), "paired slices differ in length");
    if x.len() < needed {
        return Err(AgreementError::TooFewPairs { n: x.len(), needed });
    }
    for (column, v) in [("x", x), ("y", y)] {
        if let Some(row) = v.iter().position(|a| !a.is_finite()) {
            return Err(AgreementError::NonFinite { column, row });
        }
    }
    Ok(())
}

/// Refuses a level outside (0, 1).
fn check_level(what: &str, level: f64) -> Result<(), AgreementError> {
    if level > 0.0 && level < 1.0 {
        Ok(())
    } else {
        Err(AgreementError::InvalidOption(format!(
            "the {what} {level} is not between 0 and 1 (try 0.95)"
        )))
    }
}
