//! Errors raised by the statistics core when the data cannot support the requested analysis.

use thiserror::Error;

/// What went wrong, in terms a user can act on. Caller bugs (mismatched slice lengths)
/// are `assert!`s instead; these variants are about the data.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum CoreError {
    /// Fewer usable observations than the model has parameters plus one.
    #[error(
        "{n} complete rows for {p} parameters: at least {} rows are needed to estimate the error variance",
        p + 1
    )]
    TooFewRows {
        /// Observations available.
        n: usize,
        /// Parameters in the model.
        p: usize,
    },
    /// A predictor takes a single value over the rows used.
    #[error("predictor '{term}' is constant ({value}) over the rows used, so its slope cannot be estimated next to the intercept; drop it or check the data")]
    ConstantPredictor {
        /// Term name.
        term: String,
        /// The single value it takes.
        value: f64,
    },
    /// A term is (numerically) a linear combination of other terms.
    #[error("term '{term}' is aliased: it equals {combination} within tolerance {tolerance:e}; drop one of these terms")]
    Aliased {
        /// The term that adds nothing new.
        term: String,
        /// Human-readable linear combination of the other terms that reproduces it.
        combination: String,
        /// The relative tolerance used to decide.
        tolerance: f64,
    },
    /// The response does not vary, so R² is undefined.
    #[error("the response is constant ({value}) over the rows used: there is nothing to explain")]
    ConstantResponse {
        /// The single value.
        value: f64,
    },
    /// A value that is not a finite number reached the computation.
    #[error("{what} holds a non-finite value at position {index}")]
    NonFinite {
        /// Which input.
        what: String,
        /// 0-based position within the slice handed to the core.
        index: usize,
    },
    /// A weight is negative, zero or not finite.
    #[error("weight at position {index} is {value}: weights must be positive and finite")]
    BadWeight {
        /// 0-based position.
        index: usize,
        /// Offending value.
        value: f64,
    },
    /// An option is outside its valid range.
    #[error("{0}")]
    InvalidOption(String),
}

/// Result alias for the core.
pub type Result<T> = std::result::Result<T, CoreError>;
