//! Sentences about a model's parts beyond its columns: the scale its figures are on, the
//! Box–Cox estimate, and an F test between two fits.

use plumb_core::regression::{BoxCox, NestedComparison};

use crate::text::fixed;

/// What to do when two fits cannot be tested against each other.
pub const NOT_NESTED_HINT: &str =
    "Compare them by adjusted R², AIC and BIC; the F test needs one model inside the other on the same rows and scale.";

/// `p = 0.024 (F = 4.12 with 2 and 37 df)` ([`super::numbers::f_figures`]).
pub fn f_test(c: &NestedComparison) -> String {
    super::numbers::f_figures(c.f_statistic, c.df_num, c.df_den, c.p_value)
}

/// Which scale R², the typical miss (σ̂) and the residuals refer to, when the response is transformed
/// (`label` is the response as fitted, e.g. `ln(dose)`; `None` when it is `y` itself).
pub fn scale_note(label: &str, y: &str) -> Option<String> {
    (label != y).then(|| {
        format!(
            "R², the typical miss and the residuals are on {label}; curves are drawn back in {y}'s units"
        )
    })
}

/// `λ = 0.4312 (95 % profile-likelihood interval 0.21 to 0.66)`; an end the data do not
/// bound reads "unbounded".
pub fn box_cox(b: &BoxCox) -> String {
    let end = |v: Option<f64>| v.map_or_else(|| "unbounded".into(), |v| fixed(v, 4));
    format!(
        "λ = {} ({} profile-likelihood interval {} to {})",
        fixed(b.lambda, 4),
        super::numbers::level(b.level),
        end(b.interval.0),
        end(b.interval.1)
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_scale_is_named_only_when_the_response_is_transformed() {
        assert_eq!(scale_note("dose", "dose"), None);
        let said = scale_note("ln(dose)", "dose").expect("a note");
        assert!(
            said.contains("on ln(dose)") && said.contains("dose's units"),
            "{said}"
        );
    }

    #[test]
    fn an_unbounded_end_of_the_box_cox_interval_says_so() {
        let b = BoxCox {
            lambda: 0.25,
            log_likelihood: -10.0,
            interval: (Some(0.1), None),
            level: 0.95,
        };
        assert_eq!(
            box_cox(&b),
            "λ = 0.25 (95 % profile-likelihood interval 0.1 to unbounded)"
        );
    }
}
