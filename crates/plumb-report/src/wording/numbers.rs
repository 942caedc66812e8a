//! The words of a fit's numbers, one vocabulary for the workbench's numbers block, the one-pass
//! view, `plumb fit` and the summary: the headline share of variation, the typical miss, the
//! whole-model test, the column words of the term table, and the pair in z-units.

use plumb_core::regression::{LineSummary, LinearFit, RSquaredKind, StandardizedView};

use crate::text::{count, num, p_clause, percent, sig};

/// Column word for an estimated coefficient.
pub const VALUE: &str = "value";
/// The standard error of an estimate, as a column word and in sentences.
pub const STANDARD_ERROR: &str = "± standard error";
/// The short form of [`STANDARD_ERROR`] where a line is narrow (the clipboard text).
pub const STANDARD_ERROR_SHORT: &str = "± s.e.";
/// What σ̂ is called: how far a row typically lies from the fit.
pub const TYPICAL_MISS: &str = "typical miss";
/// The trade name of σ̂, given beside [`TYPICAL_MISS`].
pub const TYPICAL_MISS_IS: &str = "residual standard deviation";
/// The overall F test of every term but the intercept.
pub const WHOLE_MODEL_TEST: &str = "whole-model test";
/// What the whole-model test asks.
pub const WHOLE_MODEL_TEST_ASKS: &str =
    "Could every term but the intercept be zero? A small p says the terms together explain more than chance would.";

/// A confidence level (0.95) as people read it: `95 %`.
pub fn level(level: f64) -> String {
    format!("{} %", sig(level * 100.0, 4))
}

/// A confidence interval's heading at `level` (0.95): `95 % interval`.
pub fn interval(level_: f64) -> String {
    format!("{} interval", level(level_))
}

/// An interval's ends: `0.35 to 3.17`.
pub fn interval_ends(low: f64, high: f64, digits: u32) -> String {
    format!("{} to {}", sig(low, digits), sig(high, digits))
}

/// The figures of a fit's headline block, from whichever fit a surface holds (the live one
/// on the workbench, the full fit on the command line and in the summary).
#[derive(Debug, Clone, PartialEq)]
pub struct Headline<'a> {
    /// The response as fitted (`leaf_n_pct`, `ln(dose)`).
    pub response: &'a str,
    /// Whether R² is measured around the mean (a fit with an intercept) or around zero.
    pub centred: bool,
    /// What else qualifies R² (`on ln(dose)`, `weighted`): shown in brackets after it.
    pub kinds: Vec<String>,
    /// R².
    pub r_squared: f64,
    /// Adjusted R².
    pub adj_r_squared: f64,
    /// The number of terms `p`.
    pub terms: usize,
    /// σ̂.
    pub sigma: f64,
    /// Residual degrees of freedom `n − p`.
    pub df_residual: usize,
    /// The whole-model test: F, its numerator df and p (none for an intercept-only model).
    pub f_test: Option<(f64, usize, f64)>,
}

/// One line of the block under the headline: what it is, its figures, and what it means.
#[derive(Debug, Clone, PartialEq)]
pub struct HeadlineLine {
    /// The label (`typical miss`).
    pub label: &'static str,
    /// The figures (`± 0.322 (residual standard deviation, 158 df)`).
    pub figures: String,
    /// What it means and its formula, for a tooltip or a footnote.
    pub means: String,
}

/// What qualifies R² besides its centring: the scale it is on when the response is
/// transformed (`label` as fitted, `y` as measured) and whether the fit is weighted.
pub fn r_squared_kinds(label: &str, y: &str, weighted: bool) -> Vec<String> {
    let mut kinds = Vec::new();
    if label != y {
        kinds.push(format!("on {label}"));
    }
    if weighted {
        kinds.push("weighted".into());
    }
    kinds
}

impl<'a> Headline<'a> {
    /// The headline of a full fit of `response` (as fitted), with `kinds` from
    /// [`r_squared_kinds`].
    pub fn of_fit(fit: &LinearFit, response: &'a str, kinds: Vec<String>) -> Self {
        let a = &fit.anova;
        Self {
            response,
            centred: fit.r_squared_kind == RSquaredKind::Centered,
            kinds,
            r_squared: fit.r_squared,
            adj_r_squared: fit.adj_r_squared,
            terms: fit.coefficients.len(),
            sigma: fit.residual_std_error,
            df_residual: a.df_residual,
            f_test: a
                .f_statistic
                .zip(a.f_p_value)
                .map(|(f, p)| (f, a.df_model, p)),
        }
    }

    /// The headline of a one-pass straight line (with an intercept, unweighted) of `response`.
    pub fn of_line(line: &LineSummary, response: &'a str) -> Self {
        let a = &line.anova;
        Self {
            response,
            centred: true,
            kinds: Vec::new(),
            r_squared: line.r_squared,
            adj_r_squared: line.adj_r_squared,
            terms: 2,
            sigma: line.residual_std_error,
            df_residual: a.df_residual,
            f_test: a
                .f_statistic
                .zip(a.f_p_value)
                .map(|(f, p)| (f, a.df_model, p)),
        }
    }
    /// `R² = 0.0210`, with its kinds in brackets: `R² = 0.97 (uncentred, no intercept)`.
    pub fn r_squared(&self) -> String {
        let mut kinds = self.kinds.clone();
        if !self.centred {
            kinds.push("uncentred, no intercept".into());
        }
        let kind = if kinds.is_empty() {
            String::new()
        } else {
            format!(" ({})", kinds.join("; "))
        };
        format!("R² = {}{kind}", num(self.r_squared))
    }

    /// [`share_explained`] of this fit.
    pub fn share(&self) -> String {
        share_explained(self.r_squared, self.response, self.centred)
    }

    /// What R² means, for a tooltip.
    pub fn r_squared_means(&self) -> &'static str {
        "Share of the variation in the response around its mean that the fit accounts for: 1 − RSS/TSS. Without an intercept it is measured around zero (uncentred) and is not comparable."
    }

    /// The lines under the headline: adjusted R², the typical miss, the whole-model test.
    pub fn lines(&self) -> Vec<HeadlineLine> {
        let k = if self.centred { "n − 1" } else { "n" };
        let mut out = vec![
            HeadlineLine {
                label: "adjusted R²",
                figures: adjusted(self.adj_r_squared, self.terms),
                means: format!(
                    "R² penalised for the number of terms p: 1 − (1 − R²)({k})/(n − p)"
                ),
            },
            HeadlineLine {
                label: TYPICAL_MISS,
                figures: typical_miss(self.sigma, self.df_residual),
                means: "How far a row typically lies from the fit, in the response's units: σ̂ = √(RSS/(n − p))".into(),
            },
        ];
        if let Some((f, df_model, p_value)) = self.f_test {
            out.push(HeadlineLine {
                label: WHOLE_MODEL_TEST,
                figures: f_figures(f, df_model, self.df_residual, p_value),
                means: WHOLE_MODEL_TEST_ASKS.into(),
            });
        }
        out
    }
}

/// `the fit accounts for 2.1 % of the variation in leaf_n_pct around its mean` (or around zero,
/// for a fit without an intercept, whose R² is uncentred).
pub fn share_explained(r_squared: f64, response: &str, centred: bool) -> String {
    let around = if centred { "its mean" } else { "zero" };
    format!(
        "the fit accounts for {} of the variation in {response} around {around}",
        percent(r_squared)
    )
}

/// `0.0127 (for 3 terms)`.
pub fn adjusted(adj_r_squared: f64, terms: usize) -> String {
    let noun = if terms == 1 { "term" } else { "terms" };
    format!("{} (for {terms} {noun})", num(adj_r_squared))
}

/// `± 0.322 (residual standard deviation, 158 df)`.
pub fn typical_miss(sigma: f64, df: usize) -> String {
    format!("± {} ({TYPICAL_MISS_IS}, {} df)", num(sigma), count(df))
}

/// `p = 0.068 (F = 3.39 with 1 and 158 df)`: the p-value first, the statistic behind it.
pub fn f_figures(f: f64, df_num: usize, df_den: usize, p_value: f64) -> String {
    format!(
        "{} (F = {} with {} and {} df)",
        p_clause(p_value),
        sig(f, 4),
        count(df_num),
        count(df_den)
    )
}

/// The pair in z-units, as lines. Only for the plain straight line of `y` on `x` (with an
/// intercept, unweighted: `is_the_line`) is the slope in z-units Pearson's r and its square the
/// fit's R²; for any other model the lines say so and give r for that line alone.
pub fn z_units(z: &StandardizedView, x: &str, y: &str, is_the_line: bool) -> Vec<String> {
    let toward = format!(
        "a row 2 SD above the mean of {x} is expected {} SD from the mean of {y}, {} SD nearer it (regression toward the mean)",
        sig(2.0 * z.slope, 3),
        sig(2.0 * z.shrinkage(), 3)
    );
    if is_the_line {
        vec![
            format!(
                "slope in z-units = r = {}; its square {} is the line's R²",
                sig(z.slope, 4),
                sig(z.slope_squared, 4)
            ),
            format!("On this line {toward}."),
        ]
    } else {
        vec![
            format!(
                "This model is not the plain straight line of {y} on {x}, so no slope of it is r."
            ),
            format!(
                "For that straight line alone: r = {} (its slope in z-units), r² = {}; {toward}.",
                sig(z.slope, 4),
                sig(z.slope_squared, 4)
            ),
        ]
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn z() -> StandardizedView {
        StandardizedView {
            slope: 0.5,
            slope_squared: 0.25,
            mean_x: 0.0,
            mean_y: 0.0,
            sd_x: 1.0,
            sd_y: 1.0,
        }
    }

    #[test]
    fn the_headline_words_carry_the_numbers() {
        assert_eq!(
            share_explained(0.021, "leaf_n_pct", true),
            "the fit accounts for 2.1 % of the variation in leaf_n_pct around its mean"
        );
        assert!(share_explained(0.5, "y", false).ends_with("around zero"));
        assert_eq!(adjusted(0.0148, 2), "0.0148 (for 2 terms)");
        assert_eq!(
            typical_miss(0.322_001, 158),
            "± 0.322001 (residual standard deviation, 158 df)"
        );
        assert_eq!(
            f_figures(3.3912, 1, 158, 0.0675),
            "p = 0.0675 (F = 3.391 with 1 and 158 df)"
        );
        assert_eq!(
            f_figures(900.0, 1, 158, 1e-90),
            "p < 0.0001 (F = 900 with 1 and 158 df)"
        );
        assert_eq!(interval(0.95), "95 % interval");
        assert_eq!(interval(0.999), "99.9 % interval");
    }

    #[test]
    fn the_headline_names_its_kind_and_tests_only_with_slopes() {
        let mut h = Headline {
            response: "y",
            centred: true,
            kinds: Vec::new(),
            r_squared: 0.5,
            adj_r_squared: 0.45,
            terms: 2,
            sigma: 1.5,
            df_residual: 10,
            f_test: Some((10.0, 1, 0.01)),
        };
        assert_eq!(h.r_squared(), "R² = 0.5");
        let labels: Vec<&str> = h.lines().iter().map(|l| l.label).collect();
        assert_eq!(labels, ["adjusted R²", TYPICAL_MISS, WHOLE_MODEL_TEST]);
        assert_eq!(h.lines()[2].figures, "p = 0.01 (F = 10 with 1 and 10 df)");
        h.centred = false;
        h.kinds.push("weighted".into());
        h.f_test = None;
        assert_eq!(
            h.r_squared(),
            "R² = 0.5 (weighted; uncentred, no intercept)"
        );
        assert_eq!(h.lines().len(), 2);
    }

    #[test]
    fn only_the_straight_line_claims_its_slope_is_r() {
        let line = z_units(&z(), "x", "y", true);
        assert!(line[0].contains("= r = 0.5"), "{line:?}");
        let curve = z_units(&z(), "x", "y", false);
        assert!(
            !curve.iter().any(|l| l.contains("slope in z-units = r")),
            "{curve:?}"
        );
        assert!(
            curve[0].contains("line of y on x, so no slope of it is r"),
            "{curve:?}"
        );
        assert!(curve[1].contains("1 SD from the mean of y"), "{curve:?}");
    }
}
