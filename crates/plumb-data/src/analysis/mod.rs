//! One least-squares analysis from a table: choose rows, build the design, fit, and what goes
//! with the fit.
//!
//! [`analyze`] is the single route from a loaded file to the numbers: the command line, the
//! summary, the per-exclusion effects and the workbench's diagnostics all call it, so that
//! each shows the same numbers for the same request. [`model_rows`] is its first step (the
//! rows and the design), which the workbench's live engine starts from.

mod agreement;
mod calibration;
mod checks;
mod compare;
mod extras;
mod groups;
mod prepare;
mod terms;
mod unknowns;

use plumb_core::calibration::WeightRule;
use plumb_core::regression::{
    added_variable, influence, influence_with_dfbetas, variance_inflation_of_fit, AddedVariable,
    CaseInfluence, Dfbetas, LinearFit, Transform,
};
use plumb_core::CoreError;
use thiserror::Error;

use crate::select::Selection;
use crate::table::Table;
use crate::DataError;

pub use agreement::{agree, AgreementReport, AgreementRequest, DemingLine};
pub use calibration::{
    calibrate, calibration_ready, weighting_label, CalibrationReport, CalibrationRequest, Unknown,
};
pub use checks::{assumption_checks, Checks, NormalityTest, OrderChecks, RowOrder};
pub use compare::{compare, Comparison, FitFigures};
pub use extras::{
    Curve, DegreeStep, ExtrasRequest, PairExtras, ReadAt, Robust, RobustFit, BAND_POINTS,
    POWER_STEP_P,
};
pub use groups::{GroupRow, GroupTests};
pub use prepare::{model_rows, FactorTerms, ModelRows};
pub use terms::{
    level_term, transform_name, transform_named, Factor, Levels, ResponseScale, MAX_LEVELS,
};
pub use unknowns::{parse_unknowns, unknowns_from_table};

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
    /// Or weights from a rule on the response and the single predictor (1/x, 1/x², 1/y², 1/s²).
    pub weight_rule: Option<WeightRule>,
    /// 1-based data rows to leave out.
    pub exclude: Vec<usize>,
    /// Hypothetical values of some cells (the data file and the table keep the measured ones).
    pub what_if: Vec<WhatIf>,
    /// Confidence level of the intervals.
    pub level: f64,
    /// A grouping column entering as indicator terms (and, optionally, slopes per level).
    pub factor: Option<Factor>,
    /// The scale of the response.
    pub response: ResponseScale,
    /// Transforms of predictors, by column (the others enter as they are).
    pub x_transforms: Vec<(String, Transform)>,
}

impl FitRequest {
    /// The transform of predictor `x`.
    pub fn x_transform(&self, x: &str) -> Transform {
        self.x_transforms
            .iter()
            .find(|(c, _)| c == x)
            .map_or(Transform::Identity, |(_, t)| *t)
    }

    /// The term name of each predictor: its column, with its transform written around it.
    pub fn x_term_names(&self) -> Vec<String> {
        self.x
            .iter()
            .map(|x| self.x_transform(x).label(x))
            .collect()
    }
}

impl Default for FitRequest {
    fn default() -> Self {
        Self {
            y: String::new(),
            x: Vec::new(),
            intercept: true,
            degree: 1,
            weights: None,
            weight_rule: None,
            exclude: Vec::new(),
            what_if: Vec::new(),
            level: 0.95,
            factor: None,
            response: ResponseScale::Identity,
            x_transforms: Vec::new(),
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
    /// With `influence`: the DFBETAS of every row used too (the command line's influence
    /// report; the workbench never draws them, so it does not pay for them).
    pub dfbetas: bool,
    /// Overlays, cues, bands and the degree ladder of a one-predictor model.
    pub extras: Option<ExtrasRequest>,
    /// The added-variable view of every predictor term (not the intercept or the factor's
    /// terms).
    pub added_variables: bool,
}

/// A fit with the account of which rows it used and whatever else was asked for.
#[derive(Debug, Clone, PartialEq)]
pub struct Analysis {
    /// The rows used (with what-if values in place), dropped and excluded, and the model's
    /// design and scales on them.
    pub rows: ModelRows,
    /// The fit on the rows used.
    pub fit: LinearFit,
    /// Variance inflation factor per term (`None` for the intercept), with two or more predictors.
    pub vif: Option<Vec<Option<f64>>>,
    /// Case diagnostics in `selection.rows` order (empty unless [`Wanted::influence`]).
    pub cases: Vec<CaseInfluence>,
    /// The DFBETAS of those cases (with [`Wanted::dfbetas`]).
    pub dfbetas: Option<Dfbetas>,
    /// The extras of a one-predictor model (when asked for and defined).
    pub extras: Option<PairExtras>,
    /// With a grouping factor and a numeric predictor: the equal-slopes and common-line tests
    /// and the table of the groups.
    pub groups: Option<GroupTests>,
    /// The added-variable views (when asked for), by predictor term.
    pub added: Vec<AddedVariable>,
}

impl Analysis {
    /// The rows used, dropped and excluded.
    pub fn selection(&self) -> &Selection {
        &self.rows.selection
    }

    /// The response as the model sees it, e.g. `absorbance` or `ln(conc)`: the scale R²,
    /// σ̂ and the residuals refer to.
    pub fn response_label(&self, y: &str) -> String {
        self.rows.response_transform.label(y)
    }
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
    let vif = (request.x.len() > 1 || request.factor.is_some())
        .then(|| variance_inflation_of_fit(&rows.design, rows.weights(), &fit))
        .transpose()
        .map_err(model_error)?;
    // The ladder's designs come and go before the case diagnostics are made.
    let ladder = wanted
        .extras
        .map(|_| extras::ladder(&rows, &fit, request))
        .unwrap_or_default();
    let (cases, dfbetas) = match (wanted.influence, wanted.dfbetas) {
        (false, _) => (Vec::new(), None),
        (true, false) => (
            influence(&rows.design, rows.weights(), &fit, &rows.options).map_err(model_error)?,
            None,
        ),
        (true, true) => {
            let (c, d) = influence_with_dfbetas(&rows.design, rows.weights(), &fit, &rows.options)
                .map_err(model_error)?;
            (c, Some(d))
        }
    };
    let extras = wanted
        .extras
        .and_then(|e| extras::pair_extras(&rows, &fit, &cases, request, e, ladder));
    let groups = groups::group_tests(table, &rows, &fit, request)?;
    let added = if wanted.added_variables {
        predictor_terms(&rows)
            .map(|j| added_variable(&rows.design, rows.y(), rows.weights(), j))
            .collect::<Result<_, _>>()
            .map_err(model_error)?
    } else {
        Vec::new()
    };
    Ok(Analysis {
        rows,
        fit,
        vif,
        cases,
        dfbetas,
        extras,
        groups,
        added,
    })
}

/// Positions of the design's predictor terms: not the intercept, not a factor's terms (which
/// come last).
fn predictor_terms(rows: &ModelRows) -> std::ops::Range<usize> {
    let design = &rows.design;
    let factor_terms = rows.levels.as_ref().map_or(0, |l| {
        (l.names.len() - 1) * (1 + usize::from(l.separate_slopes))
    });
    usize::from(design.has_intercept())..design.n_terms() - factor_terms
}
