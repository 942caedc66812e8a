//! What a calibration line is for: reading unknown samples back with honest intervals
//! ([`read_back`]), detection and quantitation limits ([`detection_limits`]), the lack-of-fit
//! test against replicate standards ([`lack_of_fit`]), weights from the data ([`rule_weights`])
//! and the weightings side by side ([`compare_weightings`]).

mod choice;
mod curve;
mod inverse;
mod lack_of_fit;
mod limits;
mod weighting;

pub use choice::{compare_weightings, Candidate, WeightingFigures, WeightingRow};
pub use curve::{CalibrationCurve, SEARCH_POINTS};
pub use inverse::{read_back, Interval, ReadBack, ReadingWeight};
pub use lack_of_fit::{lack_of_fit, LackOfFit, LackOfFitError};
pub use limits::{detection_limits, DetectionLimits, SigmaSource};
pub use weighting::{key, level_variances, rule_weights, Key, WeightProfile, WeightRule};

/// Why a calibration figure cannot be computed.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum CalibrationError {
    /// The model has several predictors or a grouping: no single x to read back.
    #[error("the model is not a curve in one predictor (several predictors or a grouping), so readings cannot be read back to one x")]
    NotOneVariable,
    /// Limits need a straight line with an intercept.
    #[error("detection and quantitation limits are defined for a straight line with an intercept; fit degree 1 with an intercept")]
    NotALine,
    /// The line is flat.
    #[error("the calibration line's slope is zero, so no concentration follows from a reading")]
    FlatLine,
    /// No readings of the unknown.
    #[error("no readings were given for the unknown")]
    NoReadings,
    /// A reading is not a finite number.
    #[error("reading {} of the unknown is not a finite number", .0 + 1)]
    NonFiniteReading(usize),
    /// The curve does not take the reading anywhere near the standards.
    #[error("the calibration never reaches the reading {reading} within the standards' range widened by its width on each side; dilute or concentrate the sample, or extend the standards")]
    NoRoot {
        /// The mean reading.
        reading: f64,
    },
    /// The curve takes the reading at several x within the standards' range.
    #[error("the curve takes this reading at several concentrations within the standards ({}): it is not monotone there; fit a lower degree or narrow the range", .0.iter().map(|v| crate::short::trimmed(*v, 4)).collect::<Vec<_>>().join(", "))]
    SeveralRoots(Vec<f64>),
    /// A weighting rule would divide by zero (or, for 1/x, by a negative x).
    #[error("{rule} weighting is undefined at position {index} (value {value}): leave blanks and zero readings out of a weighted fit, or choose another weighting")]
    BadWeightBase {
        /// The rule.
        rule: &'static str,
        /// Position of the reading.
        index: usize,
        /// Its x (or y).
        value: f64,
    },
    /// 1/s² needs replicates at every level.
    #[error("the level x = {level} has a single reading (position {index}), so 1/s² has no variance there; measure every standard at least twice or choose another weighting")]
    UnreplicatedLevel {
        /// The level's x.
        level: f64,
        /// Position of its reading.
        index: usize,
    },
    /// 1/s² needs readings that vary at every level.
    #[error("the readings at x = {level} (first at position {index}) are all equal, so 1/s² would weigh them infinitely; choose another weighting")]
    NoSpreadAtLevel {
        /// The level's x.
        level: f64,
        /// Position of its first reading.
        index: usize,
    },
}

#[cfg(test)]
mod tests;
