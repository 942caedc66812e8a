//! The first step of every analysis: the complete rows of the columns a request needs, its
//! what-if values put in place, the transforms applied, the grouping factor's levels read, and
//! the design matrix built from them.

use std::sync::Arc;

use rayon::prelude::*;

use plumb_core::calibration::{rule_weights, CalibrationError};
use plumb_core::regression::{boxcox, fit, BoxCox, Design, FitOptions, LinearFit, Transform};
use plumb_core::CoreError;

use super::terms::{self, Levels, ResponseScale};
use super::{AnalysisError, FitRequest};
use crate::select::Selection;
use crate::table::Table;

/// Which of the factor's terms a design carries.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FactorTerms {
    /// None: one line (or curve) for every group.
    None,
    /// The indicators: parallel lines.
    Parallel,
    /// The indicators and a slope per level.
    Separate,
}

/// The rows of a request and its design, ready to fit.
#[derive(Debug, Clone, PartialEq)]
pub struct ModelRows {
    /// The rows used, in the data's own units (what-if values in place): column 0 is the
    /// response, then the predictors in request order, then the weights when there are any.
    pub selection: Selection,
    /// The design matrix on those rows (predictors transformed, factor terms added), shared
    /// with the live engine that follows it.
    pub design: Arc<Design>,
    /// Fit options (the confidence level).
    pub options: FitOptions,
    /// The response on the scale the model is fitted on (shared like the design).
    pub y: Arc<[f64]>,
    /// That scale: the response's transform (Box–Cox at λ̂ when estimated).
    pub response_transform: Transform,
    /// The Box–Cox estimate, when λ was estimated.
    pub boxcox: Option<BoxCox>,
    /// Each predictor's transform, in request order.
    pub x_transforms: Vec<Transform>,
    /// Each predictor on the model's scale, in request order (the selection's own column
    /// when untransformed).
    pub predictors: Vec<Arc<[f64]>>,
    /// The grouping factor's levels on the rows used.
    pub levels: Option<Levels>,
    /// The polynomial degree of the single predictor.
    pub degree: u32,
    weights: Option<Vec<f64>>,
}

impl ModelRows {
    /// The response on the model's scale.
    pub fn y(&self) -> &[f64] {
        &self.y
    }

    /// The weights on the rows used: the request's weights column, or its weighting rule
    /// applied to these rows' values (as measured, what-if values in place).
    pub fn weights(&self) -> Option<&[f64]> {
        self.weights.as_deref()
    }

    /// The least-squares fit of these rows.
    ///
    /// # Errors
    /// A weight that is not positive (named by row), or what the solver refuses.
    pub fn fit(&self, table: &Table, request: &FitRequest) -> Result<LinearFit, AnalysisError> {
        self.fit_design(table, request, &self.design)
    }

    /// The fit of `design` (built on these rows) to this response.
    pub(super) fn fit_design(
        &self,
        table: &Table,
        request: &FitRequest,
        design: &Design,
    ) -> Result<LinearFit, AnalysisError> {
        let file = table.source().display().to_string();
        fit(design, self.y(), self.weights(), &self.options).map_err(|e| match e {
            CoreError::BadWeight { index, value } => AnalysisError::Request(format!(
                "{file}, column '{}', row {}: weight {value} is not positive; weights must be positive and finite",
                request.weights.as_deref().unwrap_or("(weighting rule)"),
                self.selection.rows[index]
            )),
            source => AnalysisError::Model { file, source },
        })
    }

    /// The design on these rows with `which` of the factor's terms.
    ///
    /// # Errors
    /// A polynomial degree the design refuses.
    pub fn design_with(
        &self,
        names: &[String],
        intercept: bool,
        which: FactorTerms,
    ) -> Result<Design, CoreError> {
        let mut design = if self.degree > 1 {
            Design::polynomial(&names[0], &self.predictors[0], self.degree, intercept)?
        } else {
            let cols: Vec<(&str, Arc<[f64]>)> = names
                .iter()
                .zip(&self.predictors)
                .map(|(n, c)| (n.as_str(), Arc::clone(c)))
                .collect();
            Design::linear_shared(&cols, intercept)
        };
        if let (Some(levels), true) = (&self.levels, which != FactorTerms::None) {
            let mut levels = levels.clone();
            levels.separate_slopes = which == FactorTerms::Separate;
            if self.degree > 1 {
                // Factor terms enter the general design (the polynomial basis is for one
                // predictor alone).
                design = Design::linear(
                    &design
                        .terms()
                        .iter()
                        .zip(design.columns())
                        .filter(|(t, _)| t.kind != plumb_core::regression::TermKind::Intercept)
                        .map(|(t, c)| (t.name.as_str(), &c[..]))
                        .collect::<Vec<_>>(),
                    intercept,
                );
            }
            let first = names.first().map(|n| (n.as_str(), &self.predictors[0][..]));
            terms::push_factor_terms(&mut design, &levels, first);
        }
        Ok(design)
    }

    /// The design row at predictor values `x` (in the data's units, one per predictor) for
    /// level `level` of the factor: what the design would hold for such a row. `None` where
    /// a transform is undefined at `x`.
    pub fn row_at(&self, x: &[f64], level: Option<usize>) -> Option<Vec<f64>> {
        let xt: Vec<f64> = x
            .iter()
            .zip(&self.x_transforms)
            .map(|(&v, t)| t.apply(v))
            .collect::<Option<_>>()?;
        let mut row = Vec::with_capacity(self.design.n_terms());
        if self.design.has_intercept() {
            row.push(1.0);
        }
        if self.degree > 1 {
            row.extend((1..=self.degree).map(|k| xt[0].powi(k as i32)));
        } else {
            row.extend(&xt);
        }
        if let Some(levels) = &self.levels {
            let level = level.unwrap_or(0);
            let at = |k: usize| f64::from(u8::from(level == k));
            row.extend((1..levels.names.len()).map(at));
            if levels.separate_slopes {
                row.extend((1..levels.names.len()).map(|k| at(k) * xt[0]));
            }
        }
        (row.len() == self.design.n_terms()).then_some(row)
    }

    /// A response on the model's scale back in the data's units (a band end beyond the
    /// transform's range is taken to the edge of the data's domain).
    pub fn response_back(&self, t: f64) -> Option<f64> {
        self.response_transform.inverse_clamped(t)
    }
}

/// The complete rows of `request`'s columns (minus its exclusions, with its what-if values in
/// place, the grouping factor's missing cells dropped), transformed, and the design on them.
///
/// # Errors
/// A request that does not make sense (no predictor, a polynomial in several predictors, the
/// response used as a predictor, a what-if on a column the model does not use), values a
/// transform cannot take (named by row), a grouping with too few rows in a level, or what
/// [`Table::complete_rows`] and the design refuse; every message names the file.
pub fn model_rows(table: &Table, request: &FitRequest) -> Result<ModelRows, AnalysisError> {
    check(request)?;
    let file = table.source().display().to_string();
    let mut names: Vec<&str> = vec![request.y.as_str()];
    names.extend(request.x.iter().map(String::as_str));
    if let Some(w) = &request.weights {
        names.push(w);
    }
    let mut selection = table.complete_rows(&names, &request.exclude)?;
    put_what_ifs(&mut selection, &names, request)?;
    let levels = request
        .factor
        .as_ref()
        .map(|f| terms::levels(table, f, &mut selection))
        .transpose()?;
    let x_transforms: Vec<Transform> = request.x.iter().map(|x| request.x_transform(x)).collect();
    // On all cores; the first refusal in the request's order is the one reported.
    let predictors = request
        .x
        .par_iter()
        .zip(&x_transforms)
        .zip(&selection.columns[1..])
        .map(|((name, &t), values)| terms::transformed(&file, name, t, values, &selection.rows))
        .collect::<Vec<_>>()
        .into_iter()
        .collect::<Result<Vec<_>, _>>()?;
    let mut rows = ModelRows {
        design: Arc::new(Design::new(0, false)),
        options: FitOptions {
            level: request.level,
            ..FitOptions::default()
        },
        y: Arc::from(Vec::new()),
        response_transform: Transform::Identity,
        boxcox: None,
        x_transforms,
        predictors,
        levels,
        degree: request.degree,
        weights: weights_of(&file, &selection, request)?,
        selection,
    };
    let model_error = |source| AnalysisError::Model {
        file: file.clone(),
        source,
    };
    let term_names = request.x_term_names();
    let which = match &request.factor {
        None => FactorTerms::None,
        Some(f) if f.separate_slopes => FactorTerms::Separate,
        Some(_) => FactorTerms::Parallel,
    };
    rows.design = Arc::new(
        rows.design_with(&term_names, request.intercept, which)
            .map_err(model_error)?,
    );
    put_response(&mut rows, &file, request).map_err(|e| match e {
        Prepared::Request(e) => e,
        Prepared::Core(source) => model_error(source),
    })?;
    Ok(rows)
}

enum Prepared {
    Request(AnalysisError),
    Core(CoreError),
}

/// The response on the model's scale (Box–Cox λ estimated on the design when asked).
fn put_response(rows: &mut ModelRows, file: &str, request: &FitRequest) -> Result<(), Prepared> {
    let raw = &rows.selection.columns[0];
    let t = match request.response {
        ResponseScale::Identity => Transform::Identity,
        ResponseScale::Fixed(t) => t,
        ResponseScale::BoxCox => {
            // Positivity is checked (by row) before λ is sought.
            terms::transformed(file, &request.y, Transform::Ln, raw, &rows.selection.rows)
                .map_err(Prepared::Request)?;
            let b = boxcox(&rows.design, raw, rows.options.level).map_err(Prepared::Core)?;
            rows.boxcox = Some(b);
            b.transform()
        }
    };
    rows.y = terms::transformed(file, &request.y, t, raw, &rows.selection.rows)
        .map_err(Prepared::Request)?;
    rows.response_transform = t;
    Ok(())
}

/// The weights of the selected rows: the weights column (selected last), or the rule applied
/// to the response and the single predictor as measured.
fn weights_of(
    file: &str,
    selection: &Selection,
    request: &FitRequest,
) -> Result<Option<Vec<f64>>, AnalysisError> {
    if request.weights.is_some() {
        return Ok(selection.columns.last().map(|c| c.to_vec()));
    }
    let Some(rule) = request.weight_rule else {
        return Ok(None);
    };
    let (y, x) = (&selection.columns[0], &selection.columns[1]);
    rule_weights(rule, x, y)
        .map(Some)
        .map_err(|e| AnalysisError::Request(weight_rule_message(file, request, selection, &e)))
}

/// The weighting rule's complaint with the file, column and data row named.
fn weight_rule_message(
    file: &str,
    request: &FitRequest,
    selection: &Selection,
    e: &CalibrationError,
) -> String {
    let row = |i: usize| selection.rows[i];
    match *e {
        CalibrationError::BadWeightBase { rule, index, value } => {
            let column = if rule.contains('y') { &request.y } else { &request.x[0] };
            format!(
                "{file}, column '{column}', row {}: {rule} weighting needs a value other than {value} there; leave blanks and zero readings out (exclude the row) or choose another weighting",
                row(index)
            )
        }
        CalibrationError::UnreplicatedLevel { level, index } => format!(
            "{file}, column '{}', row {}: the level {level} is measured once, so 1/s² has no variance there; every level needs at least two readings for 1/s² weighting (or choose another weighting)",
            request.x[0],
            row(index)
        ),
        CalibrationError::NoSpreadAtLevel { level, index } => format!(
            "{file}, column '{}', level {level} (first at row {}): its readings are all equal, so 1/s² would weigh them infinitely; choose another weighting",
            request.y,
            row(index)
        ),
        ref other => format!("{file}: {other}"),
    }
}

fn check(request: &FitRequest) -> Result<(), AnalysisError> {
    if request.weight_rule.is_some() {
        if request.weights.is_some() {
            return Err(AnalysisError::Request(
                "give either a weights column or a weighting rule, not both".into(),
            ));
        }
        if request.x.len() != 1 {
            return Err(AnalysisError::Request(format!(
                "a weighting rule (1/x, 1/x², 1/y², 1/s²) works on one predictor; {} were given",
                request.x.len()
            )));
        }
    }
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
    if let Some(f) = &request.factor {
        if f.column == request.y || request.x.contains(&f.column) {
            return Err(AnalysisError::Request(format!(
                "column '{}' cannot both group the rows and be a variable of the model",
                f.column
            )));
        }
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
            // The selection was just gathered: its column is not shared yet, so no copy.
            Arc::make_mut(&mut selection.columns[column])[k] = w.value;
        }
    }
    Ok(())
}
