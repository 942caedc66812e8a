//! The numbers that follow from a fit's sums of squares alone, written once for every route
//! to a fit (the full solver, the one-pass line and the live exclusion engine):
//!
//! * `R² = 1 − RSS/TSS` (TSS about the mean with an intercept, about zero without);
//! * `R²_adj = 1 − (1 − R²)(n − k)/(n − p)`, `k = 1` with an intercept and 0 without;
//! * `σ̂ = √(RSS/(n − p))`;
//! * the ANOVA split `TSS = SS_model + RSS` and the overall `F = (SS_model/df_model)/σ̂²` on
//!   `df_model = p − k` and `n − p` degrees of freedom;
//! * for each coefficient `t = β̂/SE`, its two-sided p on `n − p` df, and the interval
//!   `β̂ ± q·SE` with `q` the upper `(1 − level)/2` quantile of `t_{n−p}`.

use crate::distributions;

/// One row of the coefficient table.
#[derive(Debug, Clone, PartialEq)]
pub struct Coefficient {
    /// Term name.
    pub term: String,
    /// Estimate `β̂ⱼ`.
    pub estimate: f64,
    /// Standard error `SEⱼ = σ̂ √[(XᵀWX)⁻¹]ⱼⱼ`.
    pub std_error: f64,
    /// `tⱼ = β̂ⱼ / SEⱼ`.
    pub t: f64,
    /// Two-sided `P(|T_{n−p}| ≥ |tⱼ|)`.
    pub p_value: f64,
    /// `β̂ⱼ − q·SEⱼ` with `q` the upper `(1−level)/2` quantile of `t_{n−p}`.
    pub ci_low: f64,
    /// `β̂ⱼ + q·SEⱼ`.
    pub ci_high: f64,
    /// Standardized (beta) coefficient `β̂ⱼ · s_{xⱼ} / s_y` (weighted standard deviations when
    /// weights are given); `None` for the intercept, which has no standardized counterpart.
    pub standardized: Option<f64>,
}

/// Analysis-of-variance decomposition `TSS = SS_model + RSS`.
#[derive(Debug, Clone, PartialEq)]
pub struct Anova {
    /// `SS_model = TSS − RSS`.
    pub ss_model: f64,
    /// `RSS = Σ wᵢ eᵢ²`.
    pub ss_residual: f64,
    /// TSS of the kind given by [`LinearFit::r_squared_kind`].
    pub ss_total: f64,
    /// `p − 1` with an intercept, `p` without.
    pub df_model: usize,
    /// `n − p`.
    pub df_residual: usize,
    /// `SS_model / df_model` (`None` when `df_model = 0`).
    pub ms_model: Option<f64>,
    /// `RSS / df_residual` = `σ̂²`.
    pub ms_residual: f64,
    /// `F = MS_model / MS_residual` (`None` when `df_model = 0`).
    pub f_statistic: Option<f64>,
    /// `P(F_{df_model, df_residual} ≥ F)`.
    pub f_p_value: Option<f64>,
}

/// R², adjusted R², σ̂ and the ANOVA of a fit with `n` rows and `p` terms.
#[derive(Debug, Clone, PartialEq)]
pub struct FitQuality {
    /// `R² = 1 − RSS/TSS`.
    pub r_squared: f64,
    /// `R²_adj = 1 − (1 − R²)(n − k)/(n − p)`.
    pub adj_r_squared: f64,
    /// `σ̂ = √(RSS/(n − p))`.
    pub residual_std_error: f64,
    /// The variance split and the overall F test.
    pub anova: Anova,
}

impl FitQuality {
    /// From the residual and total sums of squares.
    ///
    /// # Panics
    /// If `n ≤ p` or `p` is zero (a caller bug: the solvers refuse such fits first).
    pub fn from_sums(n: usize, p: usize, intercept: bool, rss: f64, tss: f64) -> Self {
        assert!(
            n > p && p > 0,
            "a fit needs more rows ({n}) than terms ({p})"
        );
        let k = usize::from(intercept);
        let df_residual = n - p;
        let r_squared = 1.0 - rss / tss;
        Self {
            r_squared,
            adj_r_squared: 1.0 - (1.0 - r_squared) * (n - k) as f64 / df_residual as f64,
            residual_std_error: (rss / df_residual as f64).sqrt(),
            anova: Anova::from_sums(tss, rss, p - k, df_residual),
        }
    }

    /// The overall F and its p-value (`None` for a model with no term besides the intercept).
    pub fn f_test(&self) -> Option<(f64, f64)> {
        self.anova.f_statistic.zip(self.anova.f_p_value)
    }
}

impl Anova {
    /// `SS_model = TSS − RSS`, the mean squares and `F = MS_model/MS_residual` with its upper
    /// tail `P(F_{df_model, df_residual} ≥ F)`; no F when `df_model = 0`.
    pub fn from_sums(ss_total: f64, rss: f64, df_model: usize, df_residual: usize) -> Self {
        let ss_model = ss_total - rss;
        let ms_residual = rss / df_residual as f64;
        let (ms_model, f_statistic, f_p_value) = if df_model == 0 {
            (None, None, None)
        } else {
            let ms = ss_model / df_model as f64;
            let f = ms / ms_residual;
            let p = distributions::f_upper_tail(f, df_model as f64, df_residual as f64);
            (Some(ms), Some(f), Some(p))
        };
        Self {
            ss_model,
            ss_residual: rss,
            ss_total,
            df_model,
            df_residual,
            ms_model,
            ms_residual,
            f_statistic,
            f_p_value,
        }
    }
}

/// t-based inference for the coefficients of one fit: `n − p` degrees of freedom and the
/// quantile `q` of the confidence level, computed once.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TInference {
    /// Residual degrees of freedom `n − p`.
    pub df: f64,
    /// Upper `(1 − level)/2` quantile of `t_df`.
    pub q: f64,
}

impl TInference {
    /// For `df` residual degrees of freedom at confidence `level`.
    pub fn new(level: f64, df: f64) -> Self {
        Self {
            df,
            q: distributions::t_upper_quantile(0.5 * (1.0 - level), df),
        }
    }

    /// Two-sided `P(|T_df| ≥ |t|)`.
    pub fn p_value(&self, t: f64) -> f64 {
        distributions::t_two_sided_p(t, self.df)
    }

    /// `(β̂ − q·SE, β̂ + q·SE)`.
    pub fn interval(&self, estimate: f64, std_error: f64) -> (f64, f64) {
        (estimate - self.q * std_error, estimate + self.q * std_error)
    }

    /// The coefficient table's row for one term.
    pub fn coefficient(
        &self,
        term: &str,
        estimate: f64,
        std_error: f64,
        standardized: Option<f64>,
    ) -> Coefficient {
        let t = estimate / std_error;
        let (ci_low, ci_high) = self.interval(estimate, std_error);
        Coefficient {
            term: term.to_string(),
            estimate,
            std_error,
            t,
            p_value: self.p_value(t),
            ci_low,
            ci_high,
            standardized,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn the_five_point_line_worked_by_hand() {
        // x = 1..5, y = (2, 4, 5, 4, 5): RSS 2.4, TSS 6.0 (worked by hand), n = 5, p = 2.
        let q = FitQuality::from_sums(5, 2, true, 2.4, 6.0);
        assert_relative_eq!(q.r_squared, 0.6, max_relative = 1e-15);
        assert_relative_eq!(q.adj_r_squared, 1.0 - 0.4 * 4.0 / 3.0, max_relative = 1e-15);
        assert_relative_eq!(q.residual_std_error, 0.8_f64.sqrt(), max_relative = 1e-15);
        let (f, p) = q.f_test().expect("one slope");
        // F = (3.6/1)/(2.4/3) = 4.5; with one term F is t² of the slope.
        assert_relative_eq!(f, 4.5, max_relative = 1e-14);
        assert!(p > 0.05 && p < 0.2, "p = {p}");
    }

    #[test]
    fn without_an_intercept_adjusted_r_squared_uses_n_over_n_minus_p() {
        // No intercept: k = 0, so (1 − R²)·n/(n − p), not (n − 1)/(n − p).
        let q = FitQuality::from_sums(10, 1, false, 2.0, 20.0);
        assert_relative_eq!(
            q.adj_r_squared,
            1.0 - 0.1 * 10.0 / 9.0,
            max_relative = 1e-15
        );
        assert_eq!(q.anova.df_model, 1);
        let only_intercept = FitQuality::from_sums(10, 1, true, 2.0, 2.0);
        assert!(only_intercept.f_test().is_none());
    }

    #[test]
    fn intervals_are_symmetric_and_p_falls_with_t() {
        let t = TInference::new(0.95, 10.0);
        // t quantile 0.975 on 10 df is 2.228139 (printed statistical tables, recalled from memory).
        assert_relative_eq!(t.q, 2.228_139, max_relative = 1e-6);
        let c = t.coefficient("x", 3.0, 1.5, None);
        assert_relative_eq!(c.t, 2.0);
        assert_relative_eq!(c.ci_high - 3.0, 3.0 - c.ci_low, max_relative = 1e-15);
        assert!(t.p_value(4.0) < t.p_value(2.0));
    }
}
