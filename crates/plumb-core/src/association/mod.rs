//! Measures of association between two variables, and their matrix over many columns.
//!
//! Each measure returns a [`Pairwise`] result: the coefficient with its p-value, or the reason
//! it is undefined (too few rows, a constant column, all values tied).

mod adjust;
mod distance;
mod kendall;
mod matrix;
mod order;
mod pearson;
mod rank;
mod spearman;
mod structure;
mod trend;

pub use adjust::{adjust_p_values, Adjustment};
pub use distance::{
    distance_correlation, distance_correlation_coefficient, DISTANCE_MAX_N, DISTANCE_PERMUTATIONS,
};
pub use kendall::kendall_tau_b;
pub use matrix::{correlation_matrix, CorrelationMatrix, MatrixSize, Method, MATRIX_MAX_COLUMNS};
pub use order::similarity_order;
pub use pearson::{pearson, pearson_from_moments};
pub use rank::average_ranks;
pub use spearman::spearman;
pub use structure::{
    structure_check, structure_scan, structure_scan_counted, StructureCheck, StructureScan,
    STRUCTURE_ALPHA, STRUCTURE_BUDGET, STRUCTURE_GAP,
};
pub use trend::{drifts_together, trend_guard, TrendGuard, TREND_FADES, TREND_STRONG};

/// A coefficient of association with its two-sided p-value.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Association {
    /// The coefficient, in [−1, 1].
    pub r: f64,
    /// Two-sided p-value of "no association".
    pub p_value: f64,
    /// Pairs used.
    pub n: usize,
    /// Confidence interval of the coefficient, where the method gives one.
    pub ci: Option<(f64, f64)>,
}

/// Why a coefficient cannot be computed.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Undefined {
    /// Fewer than the minimum number of complete pairs.
    TooFewPairs {
        /// Pairs available.
        n: usize,
        /// Pairs needed.
        needed: usize,
    },
    /// One variable takes a single value (or, for rank methods, all its values tie).
    Constant {
        /// Which variable: 0 for the first, 1 for the second.
        which: usize,
    },
    /// More pairs than the method accepts.
    TooLarge {
        /// Pairs available.
        n: usize,
        /// Largest accepted.
        max: usize,
    },
}

impl std::fmt::Display for Undefined {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            Self::TooFewPairs { n, needed } => {
                write!(
                    f,
                    "undefined because only {n} complete pairs (at least {needed} needed)"
                )
            }
            Self::TooLarge { n, max } => write!(
                f,
                "undefined because {n} pairs exceed this method's limit of {max} (its cost grows as n²)"
            ),
            Self::Constant { which } => write!(
                f,
                "undefined because the {} variable does not vary over the complete pairs",
                if *which == 0 { "first" } else { "second" }
            ),
        }
    }
}

/// Result of one pairwise computation.
pub type Pairwise = std::result::Result<Association, Undefined>;

fn check_pairs(x: &[f64], y: &[f64], needed: usize) -> std::result::Result<(), Undefined> {
    assert_eq!(x.len(), y.len(), "paired slices differ in length");
    if x.len() < needed {
        return Err(Undefined::TooFewPairs { n: x.len(), needed });
    }
    for (which, v) in [x, y].into_iter().enumerate() {
        if v.iter().all(|&a| a == v[0]) {
            return Err(Undefined::Constant { which });
        }
    }
    Ok(())
}
