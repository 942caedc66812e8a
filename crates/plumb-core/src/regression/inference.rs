//! Inference for a least-squares fit: coefficient table, R², ANOVA, information criteria.

use nalgebra::DMatrix;

use super::design::{Design, TermKind};
use super::quality::{Anova, Coefficient, FitQuality, TInference};
use super::solve::Solution;
use crate::{accurate, describe};

/// Which total sum of squares R² is measured against.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum RSquaredKind {
    /// Models with an intercept: `TSS = Σ wᵢ (yᵢ − ȳ_w)²`.
    Centered,
    /// Models through the origin: `TSS = Σ wᵢ yᵢ²`.
    Uncentered,
}

impl RSquaredKind {
    /// Lower-case name used in machine-readable output.
    pub fn as_str(self) -> &'static str {
        match self {
            Self::Centered => "centered",
            Self::Uncentered => "uncentered",
        }
    }
}

/// Everything reported about one least-squares fit.
#[derive(Debug, Clone, PartialEq)]
pub struct LinearFit {
    /// Observations used, `n`.
    pub n: usize,
    /// Confidence level of the intervals.
    pub level: f64,
    /// Coefficient table, in term order.
    pub coefficients: Vec<Coefficient>,
    /// `R² = 1 − RSS/TSS`.
    pub r_squared: f64,
    /// Which TSS R² uses.
    pub r_squared_kind: RSquaredKind,
    /// `R²_adj = 1 − (1 − R²)(n − k)/(n − p)`, `k = 1` with an intercept and 0 without.
    pub adj_r_squared: f64,
    /// `σ̂ = √(RSS/(n − p))`.
    pub residual_std_error: f64,
    /// The ANOVA decomposition and overall F test.
    pub anova: Anova,
    /// Gaussian log-likelihood at the maximum, `ℓ = −(n/2)(ln 2π + ln(RSS/n) + 1) + ½ Σ ln wᵢ`.
    pub log_likelihood: f64,
    /// `AIC = −2ℓ + 2p` (σ² not counted as a parameter).
    pub aic: f64,
    /// `BIC = −2ℓ + p·ln n`.
    pub bic: f64,
    /// Fitted values `ŷᵢ = yᵢ − eᵢ`.
    pub fitted: Vec<f64>,
    /// Residuals `eᵢ = yᵢ − ŷᵢ` (unweighted).
    pub residuals: Vec<f64>,
    /// `σ̂²(XᵀWX)⁻¹`, in term order.
    pub covariance: DMatrix<f64>,
    /// 2-norm condition number of the column-equilibrated (weighted) design.
    pub condition_number: f64,
}

impl LinearFit {
    /// The linear combination `cᵀβ̂` of the coefficients, with `SE = √(cᵀΣc)` (`Σ` the
    /// coefficients' covariance), its t, two-sided p and interval at the fit's level: e.g. a
    /// group's own slope, the common slope plus that group's difference.
    ///
    /// # Panics
    /// If `c` does not have one weight per coefficient (a caller bug).
    pub fn combination(&self, name: &str, c: &[f64]) -> Coefficient {
        assert_eq!(
            c.len(),
            self.coefficients.len(),
            "one weight per coefficient"
        );
        let beta: Vec<f64> = self.coefficients.iter().map(|k| k.estimate).collect();
        let estimate = accurate::dot(c, &beta);
        let sigma_c: Vec<f64> = (0..c.len())
            .map(|j| accurate::dot(self.covariance.row(j).transpose().as_slice(), c))
            .collect();
        let se = accurate::dot(c, &sigma_c).max(0.0).sqrt();
        TInference::new(self.level, self.anova.df_residual as f64)
            .coefficient(name, estimate, se, None)
    }
}

/// Builds the full report from the solver's output.
pub(crate) fn summarize(
    design: &Design,
    y: &[f64],
    weights: Option<&[f64]>,
    mut solution: Solution,
    level: f64,
) -> LinearFit {
    let n = y.len();
    let p = design.n_terms();
    let intercept = design.has_intercept();
    if intercept {
        // With an intercept the least-squares residuals have weighted mean zero; what is left
        // is the rounding of the intercept itself (half an ulp of a level far from zero),
        // shared by every residual. Taking it out keeps RSS to full precision in tight fits.
        let drift = describe::mean(&solution.residuals, weights);
        solution.residuals.iter_mut().for_each(|r| *r -= drift);
    }
    let rss = describe::sum_sq(&solution.residuals, weights);
    let (ss_total, kind) = if intercept {
        (describe::sum_sq_dev(y, weights), RSquaredKind::Centered)
    } else {
        (describe::sum_sq(y, weights), RSquaredKind::Uncentered)
    };
    let quality = FitQuality::from_sums(n, p, intercept, rss, ss_total);

    let sum_ln_w = weights.map_or(0.0, |w| accurate::sum(w.iter().map(|v| v.ln())));
    let nf = n as f64;
    let log_likelihood =
        -0.5 * nf * ((2.0 * std::f64::consts::PI).ln() + (rss / nf).ln() + 1.0) + 0.5 * sum_ln_w;
    let coefficients = coefficient_table(
        design,
        y,
        weights,
        &solution.beta,
        &solution.unit_std_errors,
        quality.residual_std_error,
        TInference::new(level, (n - p) as f64),
    );
    let covariance = solution.unscaled_covariance * quality.residual_std_error.powi(2);
    let fitted = y
        .iter()
        .zip(&solution.residuals)
        .map(|(v, e)| v - e)
        .collect();

    LinearFit {
        n,
        level,
        coefficients,
        r_squared: quality.r_squared,
        r_squared_kind: kind,
        adj_r_squared: quality.adj_r_squared,
        residual_std_error: quality.residual_std_error,
        anova: quality.anova,
        log_likelihood,
        aic: -2.0 * log_likelihood + 2.0 * p as f64,
        bic: -2.0 * log_likelihood + nf.ln() * p as f64,
        fitted,
        residuals: solution.residuals,
        covariance,
        condition_number: solution.condition_number,
    }
}

/// Undoes the working scale of y: the fit of `y/s` becomes the fit of `y`. Coefficients,
/// their errors and intervals, σ̂, fitted values and residuals scale by `s`; sums of squares
/// and the covariance by `s²` (and may then overflow to ∞ for data near the f64 limit, while
/// R², t, p and F, which do not depend on `s`, stay finite); `ℓ` shifts by `−n·ln s`.
pub(crate) fn rescale(fit: &mut LinearFit, s: f64) {
    for c in &mut fit.coefficients {
        c.estimate *= s;
        c.std_error *= s;
        c.ci_low *= s;
        c.ci_high *= s;
    }
    fit.residual_std_error *= s;
    let s2 = s * s;
    let a = &mut fit.anova;
    a.ss_model *= s2;
    a.ss_residual *= s2;
    a.ss_total *= s2;
    a.ms_residual *= s2;
    a.ms_model = a.ms_model.map(|m| m * s2);
    let shift = fit.n as f64 * s.ln();
    fit.log_likelihood -= shift;
    fit.aic += 2.0 * shift;
    fit.bic += 2.0 * shift;
    fit.fitted.iter_mut().for_each(|v| *v *= s);
    fit.residuals.iter_mut().for_each(|v| *v *= s);
    fit.covariance *= s2;
}

fn coefficient_table(
    design: &Design,
    y: &[f64],
    weights: Option<&[f64]>,
    beta: &[f64],
    unit_se: &[f64],
    sigma: f64,
    inference: TInference,
) -> Vec<Coefficient> {
    let sd_y = describe::root_sum_sq_dev(y, weights);
    design
        .terms()
        .iter()
        .zip(design.columns())
        .enumerate()
        .map(|(j, (term, column))| {
            let estimate = beta[j];
            let standardized = (term.kind != TermKind::Intercept)
                .then(|| estimate * describe::root_sum_sq_dev(column, weights) / sd_y);
            inference.coefficient(&term.name, estimate, sigma * unit_se[j], standardized)
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use crate::regression::{fit, Design, FitOptions, RSquaredKind};
    use approx::assert_relative_eq;

    #[test]
    fn fits_least_squares_line_through_five_points() {
        // x = 1..5, y = (2, 4, 5, 4, 5): slope 0.6, intercept 2.2, RSS 2.4, TSS 6.0,
        // R² 0.6 (worked by hand from the normal equations).
        let x = [1.0, 2.0, 3.0, 4.0, 5.0];
        let y = [2.0, 4.0, 5.0, 4.0, 5.0];
        let fit = fit(
            &Design::linear(&[("x", &x)], true),
            &y,
            None,
            &FitOptions::default(),
        )
        .expect("well-posed");
        assert_relative_eq!(fit.coefficients[0].estimate, 2.2, max_relative = 1e-14);
        assert_relative_eq!(fit.coefficients[1].estimate, 0.6, max_relative = 1e-14);
        assert_relative_eq!(fit.anova.ss_residual, 2.4, max_relative = 1e-14);
        assert_relative_eq!(fit.r_squared, 0.6, max_relative = 1e-14);
        assert_eq!(fit.r_squared_kind, RSquaredKind::Centered);
        // Standardized slope of a simple regression is r, and its square is R².
        let beta = fit.coefficients[1].standardized.expect("slope has one");
        assert_relative_eq!(beta * beta, fit.r_squared, max_relative = 1e-14);
        assert!(fit.coefficients[0].standardized.is_none());
    }

    #[test]
    fn uncentered_r_squared_without_intercept() {
        // y = 2x exactly plus one perturbation; through the origin TSS is Σy².
        let x = [1.0, 2.0, 3.0, 4.0];
        let y = [2.0, 4.0, 6.0, 9.0];
        let fit = fit(
            &Design::linear(&[("x", &x)], false),
            &y,
            None,
            &FitOptions::default(),
        )
        .expect("well-posed");
        assert_eq!(fit.r_squared_kind, RSquaredKind::Uncentered);
        // By hand: b = Σxy/Σx² = 64/30, RSS = Σ(y − bx)² = 7/15, TSS = Σy² = 137, so
        // R² = 1 − (7/15)/137 = 1 − 7/2055 (independent of the fit's own sums).
        assert_relative_eq!(fit.anova.ss_residual, 7.0 / 15.0, max_relative = 1e-13);
        assert_relative_eq!(fit.r_squared, 1.0 - 7.0 / 2055.0, max_relative = 1e-14);
        assert_eq!(fit.anova.df_model, 1);
    }

    #[test]
    fn responses_near_the_f64_limit_keep_their_statistics() {
        // y and 1e300·y give the same R², t and p, and estimates 1e300 times larger (scale
        // invariance of least squares); plain sums of squares of 1e300·y would overflow.
        let x = [1.0, 2.0, 3.0, 4.0, 5.0, 6.0];
        let y = [1.3, 1.9, 3.4, 3.8, 5.3, 5.7];
        let big: Vec<f64> = y.iter().map(|v| v * 1e300).collect();
        let d = Design::linear(&[("x", &x)], true);
        let a = fit(&d, &y, None, &FitOptions::default()).expect("fits");
        let b = fit(&d, &big, None, &FitOptions::default()).expect("fits");
        assert_relative_eq!(a.r_squared, b.r_squared, max_relative = 1e-14);
        assert_relative_eq!(
            a.coefficients[1].t,
            b.coefficients[1].t,
            max_relative = 1e-13
        );
        assert_relative_eq!(
            a.coefficients[1].estimate * 1e300,
            b.coefficients[1].estimate,
            max_relative = 1e-13
        );
        assert!(b.residual_std_error.is_finite() && b.coefficients[1].std_error.is_finite());
    }

    #[test]
    fn predictors_near_the_f64_limit_are_not_mistaken_for_zero() {
        let x = [1e308, -1e308, 5e307, -3e307, 2e307, 7e307];
        let y = [1.0, 2.0, 3.0, 4.0, 6.0, 5.5];
        let f = fit(
            &Design::linear(&[("x", &x)], true),
            &y,
            None,
            &FitOptions::default(),
        )
        .expect("fits");
        assert!(
            f.r_squared.is_finite() && f.coefficients[1].std_error.is_finite(),
            "{f:?}"
        );
    }

    #[test]
    fn weights_equal_to_repeating_rows() {
        // Weight 2 on a row gives the same estimates as listing that row twice.
        let x = [1.0, 2.0, 3.0, 4.0, 5.0];
        let y = [1.0, 3.0, 2.0, 5.0, 4.0];
        let w = [1.0, 2.0, 1.0, 1.0, 1.0];
        let weighted = fit(
            &Design::linear(&[("x", &x)], true),
            &y,
            Some(&w),
            &FitOptions::default(),
        )
        .expect("well-posed");
        let x2 = [1.0, 2.0, 2.0, 3.0, 4.0, 5.0];
        let y2 = [1.0, 3.0, 3.0, 2.0, 5.0, 4.0];
        let repeated = fit(
            &Design::linear(&[("x", &x2)], true),
            &y2,
            None,
            &FitOptions::default(),
        )
        .expect("well-posed");
        for (a, b) in weighted.coefficients.iter().zip(&repeated.coefficients) {
            assert_relative_eq!(a.estimate, b.estimate, max_relative = 1e-13);
        }
        assert_relative_eq!(weighted.r_squared, repeated.r_squared, max_relative = 1e-13);
    }
}
