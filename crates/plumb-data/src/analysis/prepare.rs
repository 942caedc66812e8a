//! The first step of every analysis: the complete rows of the columns a request needs, its
//! what-if values put in place, and the design matrix built from them.

use plumb_core::regression::{fit, Design, FitOptions, LinearFit};
use plumb_core::CoreError;

use super::{one_predictor_design, AnalysisError, FitRequest};
use crate::select::Selection;
use crate::table::Table;

/// The rows of a request and its design, ready to fit.
#[derive(Debug, Clone, PartialEq)]
pub struct ModelRows {
    /// The rows used (what-if values in place): column 0 is the response, then the predictors
    /// in request order, then the weights when there are any.
    pub selection: Selection,
    /// The design matrix on those rows.
    pub design: Design,
    /// Fit options (the confidence level).
    pub options: FitOptions,
    has_weights: bool,
}

impl ModelRows {
    /// The response on the rows used.
    pub fn y(&self) -> &[f64] {
        &self.selection.columns[0]
    }

    /// The weights on the rows used, when the request names a weights column.
    pub fn weights(&self) -> Option<&[f64]> {
        self.has_weights.then(|| {
            self.selection
                .columns
                .last()
                .expect("weights column selected")
                .as_slice()
        })
    }

    /// The least-squares fit of these rows.
    ///
    /// # Errors
    /// A weight that is not positive (named by row), or what the solver refuses.
    pub fn fit(&self, table: &Table, request: &FitRequest) -> Result<LinearFit, AnalysisError> {
        let file = table.source().display().to_string();
        fit(&self.design, self.y(), self.weights(), &self.options).map_err(|e| match e {
            CoreError::BadWeight { index, value } => AnalysisError::Request(format!(
                "{file}, column '{}', row {}: weight {value} is not positive; weights must be positive and finite",
                request.weights.as_deref().unwrap_or_default(),
                self.selection.rows[index]
            )),
            source => AnalysisError::Model { file, source },
        })
    }
}

/// The complete rows of `request`'s columns (minus its exclusions, with its what-if values in
/// place) and the design built on them.
///
/// # Errors
/// A request that does not make sense (no predictor, a polynomial in several predictors, the
/// response used as a predictor, a what-if on a column the model does not use), or what
/// [`Table::complete_rows`] and the design refuse; every message names the file.
pub fn model_rows(table: &Table, request: &FitRequest) -> Result<ModelRows, AnalysisError> {
    check(request)?;
    let mut names: Vec<&str> = vec![request.y.as_str()];
    names.extend(request.x.iter().map(String::as_str));
    if let Some(w) = &request.weights {
        names.push(w);
    }
    let mut selection = table.complete_rows(&names, &request.exclude)?;
    put_what_ifs(&mut selection, &names, request)?;
    let design = if request.degree > 1 {
        one_predictor_design(request, &selection.columns[1]).map_err(|source| {
            AnalysisError::Model {
                file: table.source().display().to_string(),
                source,
            }
        })?
    } else {
        let predictors: Vec<(&str, &[f64])> = request
            .x
            .iter()
            .zip(&selection.columns[1..])
            .map(|(n, c)| (n.as_str(), c.as_slice()))
            .collect();
        Design::linear(&predictors, request.intercept)
    };
    Ok(ModelRows {
        selection,
        design,
        options: FitOptions {
            level: request.level,
            ..FitOptions::default()
        },
        has_weights: request.weights.is_some(),
    })
}

fn check(request: &FitRequest) -> Result<(), AnalysisError> {
    if request.x.is_empty() {
        return Err(AnalysisError::Request(
            "name at least one predictor column (--x COLUMN)".into(),
        ));
    }
    if request.degree > 1 && request.x.len() != 1 {
        return Err(AnalysisError::Request(format!(
            "a polynomial of degree {} takes exactly one predictor; {} were given",
            request.degree,
            request.x.len()
        )));
    }
    if let Some(dup) = request.x.iter().find(|x| **x == request.y) {
        return Err(AnalysisError::Request(format!(
            "column '{dup}' is both the response and a predictor; choose different columns"
        )));
    }
    Ok(())
}

/// Puts each what-if value in place of the measured one. A what-if on a row the selection
/// does not use (excluded, or incomplete) changes nothing.
fn put_what_ifs(
    selection: &mut Selection,
    names: &[&str],
    request: &FitRequest,
) -> Result<(), AnalysisError> {
    for w in &request.what_if {
        let Some(column) = names.iter().position(|n| *n == w.column) else {
            return Err(AnalysisError::Request(format!(
                "a what-if value names column '{}', which the model does not use",
                w.column
            )));
        };
        if !w.value.is_finite() {
            return Err(AnalysisError::Request(format!(
                "the what-if value of row {} in column '{}' is not a finite number",
                w.row, w.column
            )));
        }
        if let Ok(k) = selection.rows.binary_search(&w.row) {
            selection.columns[column][k] = w.value;
        }
    }
    Ok(())
}
