//! With a grouping factor and a numeric predictor: do the groups share one line, parallel
//! lines, or lines of their own? Three fits on the same rows —
//!
//! * one line for every group (`y ~ x`),
//! * parallel lines (`y ~ x` plus an indicator per level but the reference),
//! * separate lines (parallel plus `x` times each indicator) —
//!
//! and two partial F tests between them: **equal slopes** (parallel against separate) and
//! **common line** (one line against separate). The table of the groups gives each level's
//! rows, and its slope with its SE and interval from the separate-lines fit (the reference's
//! slope is `β_x`; another level's is `β_x + β_{x×level}`, with `SE = √(cᵀΣc)`).

use plumb_core::regression::{compare_nested, Coefficient, LinearFit, NestedComparison};

use super::prepare::{FactorTerms, ModelRows};
use super::terms::level_term;
use super::{AnalysisError, FitRequest};
use crate::table::Table;

/// The groups' tests and table.
#[derive(Debug, Clone, PartialEq)]
pub struct GroupTests {
    /// The factor's column.
    pub column: String,
    /// The predictor whose slope the groups may not share (its term name).
    pub predictor: String,
    /// Parallel lines against separate lines: do the slopes differ?
    pub equal_slopes: NestedComparison,
    /// One line against separate lines: do the groups differ at all?
    pub common_line: NestedComparison,
    /// One row per level, the reference first.
    pub table: Vec<GroupRow>,
}

/// One level of the factor.
#[derive(Debug, Clone, PartialEq)]
pub struct GroupRow {
    /// Level name.
    pub level: String,
    /// Rows used in the level.
    pub n: usize,
    /// The level's own slope (separate-lines fit), with SE, t, p and interval.
    pub slope: Coefficient,
}

/// The tests and table when the request groups the rows and has a numeric predictor
/// (`None` otherwise).
///
/// # Errors
/// A fit of one of the three models that the solver refuses (the grouped model was fitted
/// already, so this is rare: a level whose predictor is constant, for its own slope).
pub(super) fn group_tests(
    table: &Table,
    rows: &ModelRows,
    fitted: &LinearFit,
    request: &FitRequest,
) -> Result<Option<GroupTests>, AnalysisError> {
    let Some(levels) = &rows.levels else {
        return Ok(None);
    };
    let names = request.x_term_names();
    let model_error = |source| AnalysisError::Model {
        file: table.source().display().to_string(),
        source,
    };
    let fit_with = |which: FactorTerms| -> Result<LinearFit, AnalysisError> {
        if which == current(rows) {
            return Ok(fitted.clone());
        }
        let design = rows
            .design_with(&names, request.intercept, which)
            .map_err(model_error)?;
        rows.fit_design(table, request, &design)
    };
    let single = fit_with(FactorTerms::None)?;
    let parallel = fit_with(FactorTerms::Parallel)?;
    let separate = fit_with(FactorTerms::Separate)?;
    let x_name = &names[0];
    let slope_at = |name: &str| separate.coefficients.iter().position(|c| c.term == name);
    let x_pos = slope_at(x_name).expect("the predictor is a term");
    let table_rows = levels
        .names
        .iter()
        .enumerate()
        .map(|(k, level)| {
            let mut c = vec![0.0; separate.coefficients.len()];
            c[x_pos] = 1.0;
            if k > 0 {
                let interaction = format!("{x_name}×{}", level_term(&levels.column, level));
                c[slope_at(&interaction).expect("a slope term per level")] = 1.0;
            }
            GroupRow {
                level: level.clone(),
                n: levels.of_row.iter().filter(|&&l| l == k).count(),
                slope: separate.combination(&format!("slope in {level}"), &c),
            }
        })
        .collect();
    Ok(Some(GroupTests {
        column: levels.column.clone(),
        predictor: x_name.clone(),
        equal_slopes: compare_nested(&parallel, &separate),
        common_line: compare_nested(&single, &separate),
        table: table_rows,
    }))
}

fn current(rows: &ModelRows) -> FactorTerms {
    match &rows.levels {
        None => FactorTerms::None,
        Some(l) if l.separate_slopes => FactorTerms::Separate,
        Some(_) => FactorTerms::Parallel,
    }
}
