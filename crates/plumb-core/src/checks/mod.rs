//! Checks of a fit's assumptions, each a number with its p-value: constant variance
//! ([`breusch_pagan`]), independence along a row order ([`durbin_watson`], [`sign_runs`]) and
//! normal residuals ([`shapiro_wilk`], [`anderson_darling`]).

mod normality;
mod order;
mod spread;

pub use normality::{anderson_darling, shapiro_wilk, Normality, SHAPIRO_WILK_MAX_N};
pub use order::{durbin_watson, sign_runs, SignRuns};
pub use spread::{breusch_pagan, BreuschPagan};

/// Why a check cannot be computed on these residuals.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum CheckError {
    /// Too few residuals for the check.
    #[error("needs at least {needed} residuals, {n} given")]
    TooFew {
        /// Residuals given.
        n: usize,
        /// Residuals needed.
        needed: usize,
    },
    /// The residuals (or their squares) do not vary.
    #[error("the residuals do not vary, so there is nothing to check")]
    NoSpread,
    /// A residual or regressor is not finite.
    #[error("a value at position {0} is not finite")]
    NonFinite(usize),
}

fn finite(v: &[f64]) -> Result<(), CheckError> {
    match v.iter().position(|x| !x.is_finite()) {
        Some(i) => Err(CheckError::NonFinite(i)),
        None => Ok(()),
    }
}
