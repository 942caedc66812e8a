//! Two methods that measure the same thing, compared on the same rows: the Passing–Bablok and
//! Deming lines, and the limits of agreement of their differences.

use plumb_core::agreement::{
    bland_altman, passing_bablok, AgreementError, AgreementLimits, BlandAltmanOptions,
    DifferenceScale, PassingBablok,
};
use plumb_core::alternative::{deming, DemingFit};
use plumb_core::regression::TInference;

use super::{model_rows, AnalysisError, FitRequest, WhatIf};
use crate::select::Selection;
use crate::table::Table;

/// The comparison asked for.
#[derive(Debug, Clone, PartialEq)]
pub struct AgreementRequest {
    /// The established (reference) method's column: x.
    pub reference: String,
    /// The new (test) method's column: y.
    pub test: String,
    /// 1-based data rows to leave out.
    pub exclude: Vec<usize>,
    /// Hypothetical values of some cells.
    pub what_if: Vec<WhatIf>,
    /// Confidence level of every interval.
    pub level: f64,
    /// Deming's error-variance ratio, Var(error of test)/Var(error of reference).
    pub deming_ratio: f64,
    /// Differences as percentages of the pair's mean.
    pub percent: bool,
}

impl Default for AgreementRequest {
    fn default() -> Self {
        Self {
            reference: String::new(),
            test: String::new(),
            exclude: Vec::new(),
            what_if: Vec::new(),
            level: 0.95,
            deming_ratio: 1.0,
            percent: false,
        }
    }
}

/// A Deming line with t-based intervals from its jackknife standard errors.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct DemingLine {
    /// The fit.
    pub fit: DemingFit,
    /// `b ± t_{n−2}·SE(b)`.
    pub slope_interval: (f64, f64),
    /// `a ± t_{n−2}·SE(a)`.
    pub intercept_interval: (f64, f64),
}

/// How the two methods compare.
#[derive(Debug, Clone, PartialEq)]
pub struct AgreementReport {
    /// The rows used (column 0 the test method, column 1 the reference), dropped and excluded.
    pub selection: Selection,
    /// Passing–Bablok regression of test on reference.
    pub passing_bablok: Result<PassingBablok, String>,
    /// Deming regression with the ratio asked for.
    pub deming: Result<DemingLine, String>,
    /// Bias and limits of agreement.
    pub limits: Result<AgreementLimits, String>,
    /// Confidence level.
    pub level: f64,
}

impl AgreementReport {
    /// The reference method's values on the rows used.
    pub fn reference(&self) -> &[f64] {
        &self.selection.columns[1]
    }

    /// The test method's values on the rows used.
    pub fn test(&self) -> &[f64] {
        &self.selection.columns[0]
    }
}

/// Compares `request.test` with `request.reference` on their complete rows.
///
/// # Errors
/// Unknown or non-numeric columns, the same column twice, a level outside (0, 1); each
/// message names the file and column. A method that cannot be computed on these rows is not
/// an error: its entry says why.
pub fn agree(table: &Table, request: &AgreementRequest) -> Result<AgreementReport, AnalysisError> {
    if request.reference == request.test {
        return Err(AnalysisError::Request(format!(
            "{}: '{}' is named as both methods; compare two different columns",
            table.source().display(),
            request.test
        )));
    }
    if !(request.level > 0.0 && request.level < 1.0) {
        return Err(AnalysisError::Request(format!(
            "confidence level {} is not between 0 and 1 (try 0.95)",
            request.level
        )));
    }
    let fit = FitRequest {
        y: request.test.clone(),
        x: vec![request.reference.clone()],
        exclude: request.exclude.clone(),
        what_if: request.what_if.clone(),
        level: request.level,
        ..FitRequest::default()
    };
    let rows = model_rows(table, &fit)?;
    let selection = rows.selection;
    let (y, x) = (&selection.columns[0], &selection.columns[1]);
    let passing_bablok = passing_bablok(x, y, request.level).map_err(|e| e.to_string());
    let deming = deming(x, y, request.deming_ratio)
        .map(|d| with_intervals(d, request.level))
        .map_err(|e| e.to_string());
    let options = BlandAltmanOptions {
        confidence: request.level,
        scale: if request.percent {
            DifferenceScale::PercentOfMean
        } else {
            DifferenceScale::Absolute
        },
        ..BlandAltmanOptions::default()
    };
    let limits = bland_altman(x, y, &options).map_err(|e| match e {
        AgreementError::ZeroMean { row } => format!(
            "{}, row {}: the two methods' mean is 0 there, so the difference cannot be a percentage of it; use plain differences or exclude the row",
            table.source().display(),
            selection.rows[row]
        ),
        other => other.to_string(),
    });
    Ok(AgreementReport {
        selection,
        passing_bablok,
        deming,
        limits,
        level: request.level,
    })
}

fn with_intervals(fit: DemingFit, level: f64) -> DemingLine {
    let t = TInference::new(level, fit.n as f64 - 2.0);
    DemingLine {
        slope_interval: t.interval(fit.slope, fit.slope_se),
        intercept_interval: t.interval(fit.intercept, fit.intercept_se),
        fit,
    }
}
