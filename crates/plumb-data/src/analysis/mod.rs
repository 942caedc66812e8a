//! One least-squares analysis from a table: choose rows, build the design, fit, and what goes
//! with the fit.
//!
//! [`analyze`] is the single route from a loaded file to the numbers: the command line, the
//! summary, the per-exclusion effects and the workbench's diagnostics all call it, so that
//! each shows the same numbers for the same request. [`model_rows`] is its first step (the
//! rows and the design), which the workbench's live engine starts from.

mod extras;
mod prepare;

use plumb_core::regression::{influence, variance_inflation, CaseInfluence, Design, LinearFit};
use plumb_core::CoreError;
use thiserror::Error;

use crate::select::Selection;
use crate::table::Table;
use crate::DataError;

pub use extras::{DegreeStep, ExtrasRequest, PairExtras, ReadAt, Robust, RobustFit, BAND_POINTS};
pub use prepare::{model_rows, ModelRows};

/// What to fit, on which rows.
#[derive(Debug, Clone, PartialEq)]
pub struct FitRequest {
    /// Response column.
    pub y: String,
    /// Predictor columns (exactly one when `degree > 1`).
    pub x: Vec<String>,
    /// Include the intercept.
    pub intercept: bool,
    /// Polynomial degree of the single predictor (1 = straight line).
    pub degree: u32,
    /// Optional column of positive weights (weighted least squares).
    pub weights: Option<String>,
    /// 1-based data rows to leave out.
    pub exclude: Vec<usize>,
    /// Hypothetical values of some cells (the data file and the table keep the measured ones).
    pub what_if: Vec<WhatIf>,
    /// Confidence level of the intervals.
    pub level: f64,
}

impl Default for FitRequest {
    fn default() -> Self {
        Self {
            y: String::new(),
            x: Vec::new(),
            intercept: true,
            degree: 1,
            weights: None,
            exclude: Vec::new(),
            what_if: Vec::new(),
            level: 0.95,
        }
    }
}

/// A hypothetical value of one cell: row `row` of column `column` is taken to be `value`.
#[derive(Debug, Clone, PartialEq)]
pub struct WhatIf {
    /// 1-based data row.
    pub row: usize,
    /// Column name (the response, a predictor or the weights).
    pub column: String,
    /// The value used in its place.
    pub value: f64,
}

/// What to compute beside the fit.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Wanted {
    /// Case diagnostics of every row used.
    pub influence: bool,
    /// Overlays, cues, bands and the degree ladder of a one-predictor model.
    pub extras: Option<ExtrasRequest>,
}

/// A fit with the account of which rows it used and whatever else was asked for.
#[derive(Debug, Clone, PartialEq)]
pub struct Analysis {
    /// The rows used (with what-if values in place), dropped and excluded.
    pub selection: Selection,
    /// The fit on the rows used.
    pub fit: LinearFit,
    /// Variance inflation factor per term (`None` for the intercept), with two or more predictors.
    pub vif: Option<Vec<Option<f64>>>,
    /// Case diagnostics in `selection.rows` order (empty unless [`Wanted::influence`]).
    pub cases: Vec<CaseInfluence>,
    /// The extras of a one-predictor model (when asked for and defined).
    pub extras: Option<PairExtras>,
}

/// Why an analysis could not run, with the file named.
#[derive(Debug, Error)]
pub enum AnalysisError {
    /// Loading or selecting failed.
    #[error(transparent)]
    Data(#[from] DataError),
    /// The request itself does not make sense.
    #[error("{0}")]
    Request(String),
    /// The rows chosen cannot support the model.
    #[error("{file}: {source}")]
    Model {
        /// File name.
        file: String,
        /// What the core said.
        source: CoreError,
    },
}

/// Runs `request` on `table`: the rows it names (with its what-if values), the fit, and what
/// `wanted` asks for.
///
/// # Errors
/// See [`AnalysisError`]: every message names the file, and the column or row where it applies.
pub fn analyze(
    table: &Table,
    request: &FitRequest,
    wanted: Wanted,
) -> Result<Analysis, AnalysisError> {
    let rows = model_rows(table, request)?;
    let fit = rows.fit(table, request)?;
    let model_error = |source| AnalysisError::Model {
        file: table.source().display().to_string(),
        source,
    };
    let vif = (request.x.len() > 1)
        .then(|| variance_inflation(&rows.design, rows.weights()))
        .transpose()
        .map_err(model_error)?;
    let cases = if wanted.influence {
        influence(&rows.design, rows.weights(), &fit, &rows.options).map_err(model_error)?
    } else {
        Vec::new()
    };
    let extras = wanted
        .extras
        .and_then(|e| extras::pair_extras(&rows, &fit, request, e));
    Ok(Analysis {
        selection: rows.selection,
        fit,
        vif,
        cases,
        extras,
    })
}

/// The design of `request` for predictor values `x` (one predictor: a line or a polynomial).
fn one_predictor_design(request: &FitRequest, x: &[f64]) -> Result<Design, CoreError> {
    if request.degree > 1 {
        Design::polynomial(&request.x[0], x, request.degree, request.intercept)
    } else {
        Ok(Design::linear(
            &[(request.x[0].as_str(), x)],
            request.intercept,
        ))
    }
}
