//! Confidence and prediction bands along the fitted curve of a one-predictor model.

use super::{Design, LinearFit, TInference, TermKind};
use crate::accurate;

/// The fit and its bands at one x.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BandPoint {
    /// Where.
    pub x: f64,
    /// `ŷ(x) = x₀ᵀβ̂` with `x₀` the design row at x.
    pub fitted: f64,
    /// `ŷ − q·√(x₀ᵀ Σ x₀)`, `Σ = σ̂²(XᵀWX)⁻¹`, `q` the t quantile on n − p df: the mean response.
    pub mean_low: f64,
    /// `ŷ + q·√(x₀ᵀ Σ x₀)`.
    pub mean_high: f64,
    /// `ŷ − q·√(σ̂² + x₀ᵀ Σ x₀)`: a new observation (of weight 1).
    pub predict_low: f64,
    /// `ŷ + q·√(σ̂² + x₀ᵀ Σ x₀)`.
    pub predict_high: f64,
}

/// Bands at each `x` of `grid` at the fit's confidence level; `None` when the design has more
/// than one predictor (a curve in x alone is then not defined).
pub fn bands(design: &Design, fit: &LinearFit, grid: &[f64]) -> Option<Vec<BandPoint>> {
    let one_predictor = design.polynomial_source().is_some()
        || design
            .terms()
            .iter()
            .filter(|t| t.kind != TermKind::Intercept)
            .count()
            == 1;
    if !one_predictor {
        return None;
    }
    let rows: Vec<(f64, Vec<f64>)> = grid
        .iter()
        .map(|&x| {
            let row = design
                .terms()
                .iter()
                .map(|t| x.powi(t.kind.power() as i32))
                .collect();
            (x, row)
        })
        .collect();
    Some(bands_at(fit, &rows))
}

/// The fit and its bands at design rows of any model: each `(x, row)` gives the place to
/// report (`x`) and the design row `x₀` there (one value per term, as the design builds it).
///
/// # Panics
/// If a row's length is not the number of terms (a caller bug).
pub fn bands_at(fit: &LinearFit, rows: &[(f64, Vec<f64>)]) -> Vec<BandPoint> {
    let beta: Vec<f64> = fit.coefficients.iter().map(|c| c.estimate).collect();
    let q = TInference::new(fit.level, fit.anova.df_residual as f64).q;
    let s2 = fit.residual_std_error.powi(2);
    rows.iter()
        .map(|(x, row)| {
            assert_eq!(row.len(), beta.len(), "a design row has one value per term");
            let fitted = accurate::dot(row, &beta);
            let sigma_row: Vec<f64> = (0..row.len())
                .map(|j| accurate::dot(fit.covariance.row(j).transpose().as_slice(), row))
                .collect();
            let var_mean = accurate::dot(row, &sigma_row).max(0.0);
            let (m, p) = (q * var_mean.sqrt(), q * (s2 + var_mean).sqrt());
            BandPoint {
                x: *x,
                fitted,
                mean_low: fitted - m,
                mean_high: fitted + m,
                predict_low: fitted - p,
                predict_high: fitted + p,
            }
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::distributions;
    use crate::regression::{fit, FitOptions};
    use approx::assert_relative_eq;

    #[test]
    fn simple_regression_bands_match_the_textbook_formula() {
        // Mean band half-width: q·s·√(1/n + (x₀ − x̄)²/Sxx) (textbook formula for a line).
        let x = [1.0, 2.0, 3.0, 4.0, 5.0, 6.0];
        let y = [1.2, 1.9, 3.3, 3.8, 5.4, 5.9];
        let d = Design::linear(&[("x", &x)], true);
        let f = fit(&d, &y, None, &FitOptions::default()).expect("fits");
        let b = bands(&d, &f, &[0.0, 3.5, 8.0]).expect("one predictor");
        let q = distributions::t_upper_quantile(0.025, 4.0);
        let s = f.residual_std_error;
        for p in &b {
            let half = q * s * (1.0 / 6.0 + (p.x - 3.5f64).powi(2) / 17.5).sqrt();
            assert_relative_eq!(p.mean_high - p.fitted, half, max_relative = 1e-10);
            assert!(p.predict_high - p.fitted > half);
        }
    }
}
