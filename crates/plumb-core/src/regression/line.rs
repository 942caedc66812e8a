//! The straight line `y = a + b·x` from sufficient statistics alone: one pass over the rows
//! (or over a file too large to hold), no per-row output.
//!
//! From the centred co-moments of [`CoMoments`] (`Sxx`, `Sxy`, `Syy`, means `x̄`, `ȳ`):
//!
//! * `b = Sxy/Sxx`, `a = ȳ − b·x̄`;
//! * `RSS = Syy − b·Sxy`, `TSS = Syy`, `R² = 1 − RSS/TSS`, `R²_adj = 1 − (1 − R²)(n − 1)/(n − 2)`;
//! * `σ̂ = √(RSS/(n − 2))`, `SE(b) = σ̂/√Sxx`, `SE(a) = σ̂·√(1/n + x̄²/Sxx)`;
//! * `t = estimate/SE` on `n − 2` degrees of freedom, `F = t_b²`.
//!
//! `RSS = Syy − b·Sxy` cancels when the line explains almost everything: its relative error is
//! about `ε/(1 − R²)`. When `1 − R²` is below [`RESIDUAL_PASS_BELOW`] and the rows are at hand,
//! [`line_fit`] takes a second pass and sums the squared residuals directly.

use super::quality::{Anova, Coefficient, FitQuality, TInference};
use crate::moments::CoMoments;
use crate::{CoreError, Result};

/// Below this `1 − R²` the residual sum of squares is recomputed from the rows (when they are
/// available), because `Syy − b·Sxy` would keep fewer than about 12 digits.
pub const RESIDUAL_PASS_BELOW: f64 = 1e-4;

/// A least-squares line and its inference, without per-row values.
#[derive(Debug, Clone, PartialEq)]
pub struct LineSummary {
    /// Rows used.
    pub n: u64,
    /// Confidence level of the intervals.
    pub level: f64,
    /// The intercept `a`.
    pub intercept: Coefficient,
    /// The slope `b`.
    pub slope: Coefficient,
    /// `R² = 1 − RSS/TSS` (centred).
    pub r_squared: f64,
    /// `R²_adj = 1 − (1 − R²)(n − 1)/(n − 2)`.
    pub adj_r_squared: f64,
    /// `σ̂ = √(RSS/(n − 2))`.
    pub residual_std_error: f64,
    /// Pearson's r of x and y (`√R²` with the slope's sign).
    pub r: f64,
    /// The ANOVA decomposition and the F test of the slope.
    pub anova: Anova,
    /// Whether RSS came from a second pass over the rows (see the module notes).
    pub residual_pass: bool,
    /// `(min, max)` of x.
    pub x_range: (f64, f64),
    /// `(min, max)` of y.
    pub y_range: (f64, f64),
}

/// Fits the line to rows held in memory: one pass for the moments, and a second only when
/// `1 − R² <` [`RESIDUAL_PASS_BELOW`].
///
/// # Errors
/// As [`line_from_moments`]; also [`CoreError::NonFinite`] for a non-finite value.
///
/// # Panics
/// If `x` and `y` differ in length (a caller bug).
pub fn line_fit(x: &[f64], y: &[f64], level: f64) -> Result<LineSummary> {
    assert_eq!(x.len(), y.len(), "line_fit: x and y differ in length");
    let m = CoMoments::of(&[x, y]);
    if !m.is_finite() {
        // Only now look for the culprit: the moments pass stays a single pass.
        for (what, v) in [("the predictor", x), ("the response", y)] {
            if let Some(index) = v.iter().position(|v| !v.is_finite()) {
                return Err(CoreError::NonFinite {
                    what: what.into(),
                    index,
                });
            }
        }
        return Err(CoreError::InvalidOption(
            "the sums of squares overflow; rescale the data (e.g. divide by a power of ten)".into(),
        ));
    }
    let mut line = line_from_moments(&m, level, None)?;
    if 1.0 - line.r_squared < RESIDUAL_PASS_BELOW {
        let rss = residual_sum_of_squares(x, y, line.intercept.estimate, line.slope.estimate);
        line = line_from_moments(&m, level, Some(rss))?;
    }
    Ok(line)
}

/// `Σ (yᵢ − a − b·xᵢ)²`, written as `((yᵢ − ȳ) − b(xᵢ − x̄))²` would need the means again;
/// the residuals are small here by construction, so the direct form is accurate.
pub fn residual_sum_of_squares(x: &[f64], y: &[f64], a: f64, b: f64) -> f64 {
    use rayon::prelude::*;
    x.par_chunks(crate::moments::CHUNK)
        .zip(y.par_chunks(crate::moments::CHUNK))
        .map(|(xs, ys)| {
            xs.iter()
                .zip(ys)
                .map(|(&x, &y)| {
                    let e = y - a - b * x;
                    e * e
                })
                .sum::<f64>()
        })
        .collect::<Vec<f64>>()
        .iter()
        .sum()
}

/// The line from the moments of `(x, y)` (variable 0 is x, 1 is y); `rss` overrides
/// `Syy − b·Sxy` when it was summed from the rows.
///
/// # Errors
/// [`CoreError::TooFewRows`] below three rows, [`CoreError::ConstantPredictor`] or
/// [`CoreError::ConstantResponse`] when a variable does not vary, [`CoreError::InvalidOption`]
/// for a level outside (0, 1).
///
/// # Panics
/// If `m` does not hold exactly two variables.
pub fn line_from_moments(m: &CoMoments, level: f64, rss: Option<f64>) -> Result<LineSummary> {
    assert_eq!(m.k(), 2, "line_from_moments: needs (x, y)");
    if !(level > 0.0 && level < 1.0) {
        return Err(CoreError::InvalidOption(format!(
            "confidence level {level} is not between 0 and 1 (try 0.95)"
        )));
    }
    let n = m.n();
    if n < 3 {
        return Err(CoreError::TooFewRows {
            n: n as usize,
            p: 2,
        });
    }
    let (sxx, sxy, syy) = (m.comoment(0, 0), m.comoment(0, 1), m.comoment(1, 1));
    if sxx <= 0.0 {
        return Err(CoreError::ConstantPredictor {
            term: "x".into(),
            value: m.mean(0),
        });
    }
    if syy <= 0.0 {
        return Err(CoreError::ConstantResponse { value: m.mean(1) });
    }
    let b = sxy / sxx;
    let a = m.mean(1) - b * m.mean(0);
    let residual_pass = rss.is_some();
    let rss = rss.unwrap_or((syy - b * sxy).max(0.0));
    let n_rows = n as usize;
    let quality = FitQuality::from_sums(n_rows, 2, true, rss, syy);
    let sigma = quality.residual_std_error;
    let inference = TInference::new(level, (n - 2) as f64);
    let slope_se = sigma / sxx.sqrt();
    let intercept_se = sigma * (1.0 / n as f64 + m.mean(0) * m.mean(0) / sxx).sqrt();
    let standardized = b * sxx.sqrt() / syy.sqrt();
    Ok(LineSummary {
        n,
        level,
        intercept: inference.coefficient("intercept", a, intercept_se, None),
        slope: inference.coefficient("x", b, slope_se, Some(standardized)),
        r_squared: quality.r_squared,
        adj_r_squared: quality.adj_r_squared,
        residual_std_error: sigma,
        r: m.correlation(0, 1).unwrap_or(0.0),
        anova: quality.anova,
        residual_pass,
        x_range: (m.min(0), m.max(0)),
        y_range: (m.min(1), m.max(1)),
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::regression::{fit, Design, FitOptions};
    use approx::assert_relative_eq;

    #[test]
    fn agrees_with_the_full_solver() {
        let x: Vec<f64> = (0..5000).map(|i| f64::from(i) * 0.37 - 200.0).collect();
        let y: Vec<f64> = x
            .iter()
            .enumerate()
            .map(|(i, v)| 3.0 - 0.8 * v + ((i * 7919) % 101) as f64 * 5.0)
            .collect();
        let line = line_fit(&x, &y, 0.95).expect("fits");
        let full = fit(
            &Design::linear(&[("x", &x)], true),
            &y,
            None,
            &FitOptions::default(),
        )
        .expect("fits");
        assert!(!line.residual_pass);
        assert_relative_eq!(line.r_squared, full.r_squared, max_relative = 1e-12);
        assert_relative_eq!(line.adj_r_squared, full.adj_r_squared, max_relative = 1e-12);
        assert_relative_eq!(
            line.residual_std_error,
            full.residual_std_error,
            max_relative = 1e-11
        );
        for (ours, theirs) in [&line.intercept, &line.slope]
            .iter()
            .zip(&full.coefficients)
        {
            assert_relative_eq!(ours.estimate, theirs.estimate, max_relative = 1e-12);
            assert_relative_eq!(ours.std_error, theirs.std_error, max_relative = 1e-11);
            assert_relative_eq!(ours.p_value, theirs.p_value, max_relative = 1e-9);
            assert_relative_eq!(ours.ci_high, theirs.ci_high, max_relative = 1e-11);
        }
        assert_relative_eq!(
            line.anova.f_statistic.expect("F"),
            full.anova.f_statistic.expect("F"),
            max_relative = 1e-10
        );
    }

    #[test]
    fn a_near_perfect_line_takes_the_residual_pass() {
        let x: Vec<f64> = (0..1000).map(f64::from).collect();
        let y: Vec<f64> = x
            .iter()
            .enumerate()
            .map(|(i, v)| 2.0 * v + 1.0 + if i % 2 == 0 { 1e-6 } else { -1e-6 })
            .collect();
        let line = line_fit(&x, &y, 0.95).expect("fits");
        assert!(line.residual_pass);
        let full = fit(
            &Design::linear(&[("x", &x)], true),
            &y,
            None,
            &FitOptions::default(),
        )
        .expect("fits");
        assert_relative_eq!(
            line.residual_std_error,
            full.residual_std_error,
            max_relative = 1e-9
        );
    }

    #[test]
    fn refuses_what_the_solver_refuses() {
        assert!(matches!(
            line_fit(&[1.0, 2.0], &[1.0, 2.0], 0.95),
            Err(CoreError::TooFewRows { .. })
        ));
        assert!(matches!(
            line_fit(&[1.0; 4], &[1.0, 2.0, 3.0, 4.0], 0.95),
            Err(CoreError::ConstantPredictor { .. })
        ));
        assert!(matches!(
            line_fit(&[1.0, f64::NAN, 3.0], &[1.0, 2.0, 3.0], 0.95),
            Err(CoreError::NonFinite { index: 1, .. })
        ));
    }
}
