//! Two fits side by side: their headline figures, and the partial F test when one model is
//! nested in the other on the same rows and the same response scale (said so when not).

use plumb_core::regression::{compare_nested, is_nested, LinearFit, NestedComparison};

use super::{analyze, AnalysisError, FitRequest, Wanted};
use crate::table::Table;

/// The headline figures of one fit.
#[derive(Debug, Clone, PartialEq)]
pub struct FitFigures {
    /// The response as the model sees it (`y`, `ln(y)`, …).
    pub response: String,
    /// Term names.
    pub terms: Vec<String>,
    /// Rows used.
    pub n: usize,
    /// R² (on the response's scale).
    pub r_squared: f64,
    /// Adjusted R².
    pub adj_r_squared: f64,
    /// σ̂.
    pub residual_std_error: f64,
    /// AIC.
    pub aic: f64,
    /// BIC.
    pub bic: f64,
}

impl FitFigures {
    fn of(fit: &LinearFit, response: String) -> Self {
        Self {
            response,
            terms: fit.coefficients.iter().map(|c| c.term.clone()).collect(),
            n: fit.n,
            r_squared: fit.r_squared,
            adj_r_squared: fit.adj_r_squared,
            residual_std_error: fit.residual_std_error,
            aic: fit.aic,
            bic: fit.bic,
        }
    }
}

/// A kept fit and the current one.
#[derive(Debug, Clone, PartialEq)]
pub struct Comparison {
    /// The fit kept for comparison.
    pub kept: FitFigures,
    /// The fit of the current model.
    pub current: FitFigures,
    /// The smaller model against the larger, when one is nested in the other on the same rows
    /// and scale.
    pub nested: Option<NestedComparison>,
    /// What can be said about the pair: which is nested in which, or why there is no test.
    pub note: String,
}

/// Fits `kept` and `current` and compares them; `names` are how the note calls them (such as
/// `["the kept model", "the current one"]`).
///
/// # Errors
/// Either fit's error.
pub fn compare(
    table: &Table,
    kept: &FitRequest,
    current: &FitRequest,
    names: [&str; 2],
) -> Result<Comparison, AnalysisError> {
    let [first, second] = names;
    let a = analyze(table, kept, Wanted::default())?;
    let b = analyze(table, current, Wanted::default())?;
    let kept_figures = FitFigures::of(&a.fit, a.response_label(&kept.y));
    let current_figures = FitFigures::of(&b.fit, b.response_label(&current.y));
    let (nested, note) = if a.selection().rows != b.selection().rows {
        (
            None,
            format!(
                "not on the same rows ({} and {}): no test; exclusions or gaps in other columns differ",
                a.fit.n, b.fit.n
            ),
        )
    } else if kept_figures.response != current_figures.response || kept.weights != current.weights {
        (
            None,
            format!(
                "the responses are on different scales or weights ({} and {}): R², AIC and BIC are not comparable and there is no test",
                kept_figures.response, current_figures.response
            ),
        )
    } else if is_nested(&kept_figures.terms, &current_figures.terms) {
        (
            Some(compare_nested(&a.fit, &b.fit)),
            format!("{first} is nested in {second}"),
        )
    } else if is_nested(&current_figures.terms, &kept_figures.terms) {
        (
            Some(compare_nested(&b.fit, &a.fit)),
            format!("{second} is nested in {first}"),
        )
    } else {
        (
            None,
            format!("neither {first} nor {second} holds the other's terms: the models are not nested, so there is no partial F test (compare AIC or BIC)"),
        )
    };
    Ok(Comparison {
        kept: kept_figures,
        current: current_figures,
        nested,
        note,
    })
}
