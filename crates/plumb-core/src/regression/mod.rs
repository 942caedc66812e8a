//! Linear least squares: model terms, the solver, and the inference built on it.
//!
//! The model is `y = Xβ + ε` with `ε ~ N(0, σ²W⁻¹)`; `W` is the diagonal matrix of optional
//! positive weights (all ones for ordinary least squares). The estimate minimizes
//! `Σ wᵢ (yᵢ − xᵢᵀβ)²`. See [`fit`] for the method and [`LinearFit`] for what is reported.

mod bands;
mod basis;
mod boxcox;
mod compare;
mod design;
mod inference;
mod influence;
mod line;
mod live;
mod pull;
mod quality;
mod solve;
mod standardized;
mod transform;

pub use bands::{bands, bands_at, BandPoint};
pub use boxcox::{boxcox, boxcox_log_likelihood, BoxCox, LAMBDA_REACH};
pub use compare::{
    added_variable, compare_nested, is_nested, variance_inflation, variance_inflation_of_fit,
    AddedVariable, NestedComparison,
};
pub use design::{
    is_intercept_name, polynomial_value, Design, Term, TermKind, INTERCEPT, INTERCEPT_ALIAS,
    MAX_DEGREE,
};
pub use inference::{LinearFit, RSquaredKind};
pub use influence::{
    cooks_flag_cut, influence, influence_with_dfbetas, normal_scores, CaseInfluence, Dfbetas,
    Flags, InfluenceFlag, COOKS_FLAG_NUMERATOR, COOKS_FLAG_ROWS_CAP, LEVERAGE_FLAG_FACTOR,
    STUDENTIZED_FLAG,
};
pub use line::{
    line_fit, line_from_moments, residual_sum_of_squares, LineSummary, RESIDUAL_PASS_BELOW,
};
pub use live::{
    LiveFit, LiveSummary, CONDITION_LIMIT, FEW_ROWS_PER_TERM, PIVOT_FLOOR, REFRESH_EVERY, TIGHT_FIT,
};
pub use pull::{pull_of, strong_pull_from, Pull};
pub use quality::{Anova, Coefficient, FitQuality, TInference};
pub use standardized::StandardizedView;
pub use transform::Transform;

use crate::{CoreError, Result};

/// Settings of one fit that are not part of the model itself.
#[derive(Debug, Clone, PartialEq)]
pub struct FitOptions {
    /// Confidence level of the coefficient intervals, in (0, 1). Default 0.95.
    pub level: f64,
    /// Relative tolerance of the rank decision: a pivot `|R_kk|` of the column-equilibrated
    /// design at or below `rank_tolerance · max |R_ii|` means column `k` adds nothing new
    /// (it is aliased). Default `1e-13`, i.e. about 450 units of roundoff.
    pub rank_tolerance: f64,
}

impl Default for FitOptions {
    fn default() -> Self {
        Self {
            level: 0.95,
            rank_tolerance: 1e-13,
        }
    }
}

/// Fits `y` on the terms of `design`, optionally weighted.
///
/// Method: the weighted design `W^{1/2}X` is equilibrated by powers of two (exact, so the
/// coefficients come back in the user's units with no rounding), factored as `QR = XP` by
/// Householder reflections with column pivoting (nalgebra), checked for rank, solved, and
/// then refined: residuals `r = y − Xβ̂` are recomputed with compensated dot products and the
/// correction `Δ = argmin ‖W^{1/2}(r − XΔ)‖` is added, up to three times.
///
/// # Errors
/// Non-finite data, non-positive weights, too few rows, a constant predictor or response,
/// or an aliased term: see [`CoreError`].
///
/// # Panics
/// If the lengths of `y`, `weights` and the design's columns disagree (a caller bug).
pub fn fit(
    design: &Design,
    y: &[f64],
    weights: Option<&[f64]>,
    options: &FitOptions,
) -> Result<LinearFit> {
    validate(design, y, weights, options)?;
    // Work with y divided by a power of two near its largest magnitude (exact), so that sums of
    // squares of values near 1e±300 neither overflow nor underflow; the scale is put back after.
    let peak = y.iter().fold(0.0_f64, |m, v| m.max(v.abs()));
    let scale = crate::accurate::power_of_two_near(peak);
    let scaled: Vec<f64>;
    let y_work = if scale == 1.0 {
        y
    } else {
        scaled = y.iter().map(|v| v / scale).collect();
        &scaled
    };
    let solution = solve::least_squares(design, y_work, weights, options.rank_tolerance)?;
    let mut fit = inference::summarize(design, y_work, weights, solution, options.level);
    if scale != 1.0 {
        inference::rescale(&mut fit, scale);
    }
    Ok(fit)
}

fn validate(
    design: &Design,
    y: &[f64],
    weights: Option<&[f64]>,
    options: &FitOptions,
) -> Result<()> {
    let n = y.len();
    assert_eq!(design.n_rows(), n, "design and response differ in length");
    if !(options.level > 0.0 && options.level < 1.0) {
        return Err(CoreError::InvalidOption(format!(
            "confidence level {} is not between 0 and 1 (try 0.95)",
            options.level
        )));
    }
    if let Some(index) = y.iter().position(|v| !v.is_finite()) {
        return Err(CoreError::NonFinite {
            what: "the response".into(),
            index,
        });
    }
    for (term, column) in design.terms().iter().zip(design.columns()) {
        if let Some(index) = column.iter().position(|v| !v.is_finite()) {
            return Err(CoreError::NonFinite {
                what: format!("term '{}'", term.name),
                index,
            });
        }
    }
    if let Some(w) = weights {
        assert_eq!(w.len(), n, "weights and response differ in length");
        if let Some(index) = w.iter().position(|v| !(v.is_finite() && *v > 0.0)) {
            return Err(CoreError::BadWeight {
                index,
                value: w[index],
            });
        }
    }
    let p = design.n_terms();
    if n <= p {
        return Err(CoreError::TooFewRows { n, p });
    }
    if design.has_intercept() {
        for (term, column) in design.terms().iter().zip(design.columns()) {
            if term.kind != TermKind::Intercept && column.iter().all(|&v| v == column[0]) {
                return Err(CoreError::ConstantPredictor {
                    term: term.name.clone(),
                    value: column[0],
                });
            }
        }
        if y.iter().all(|&v| v == y[0]) {
            return Err(CoreError::ConstantResponse { value: y[0] });
        }
    } else if y.iter().all(|&v| v == 0.0) {
        return Err(CoreError::ConstantResponse { value: 0.0 });
    }
    Ok(())
}
