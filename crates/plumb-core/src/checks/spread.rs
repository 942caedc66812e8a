//! Variance that changes with the fitted values: the studentized Breusch–Pagan test.

use super::{finite, CheckError};
use crate::distributions;
use crate::regression::{fit, Design, FitOptions};

/// The studentized (Koenker) Breusch–Pagan test of constant variance.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BreuschPagan {
    /// `LM = n·R²` of the auxiliary regression of `eᵢ²` on an intercept and the regressors.
    pub statistic: f64,
    /// Degrees of freedom: the number of regressors (not counting the intercept).
    pub df: usize,
    /// `P(χ²_df ≥ LM)`.
    pub p_value: f64,
}

/// Koenker's studentized Breusch–Pagan test: regress the squared residuals `uᵢ = eᵢ²` on
/// `[1, z₁ … z_k]` and take `LM = n·R²_aux`, which is χ² with k degrees of freedom when the
/// variance is constant (Koenker 1981; the form statsmodels' `het_breuschpagan` computes by
/// default). With the fitted values as the only regressor it asks whether the spread grows
/// or shrinks along the fit.
///
/// # Errors
/// Fewer than k + 2 residuals, non-finite values, or squared residuals that do not vary.
pub fn breusch_pagan(residuals: &[f64], regressors: &[&[f64]]) -> Result<BreuschPagan, CheckError> {
    let n = residuals.len();
    let k = regressors.len();
    if n < k + 2 {
        return Err(CheckError::TooFew { n, needed: k + 2 });
    }
    finite(residuals)?;
    for z in regressors {
        assert_eq!(
            z.len(),
            n,
            "a regressor differs in length from the residuals"
        );
        finite(z)?;
    }
    let u: Vec<f64> = residuals.iter().map(|e| e * e).collect();
    // With one regressor the auxiliary R² is the squared correlation of u with it, which one
    // pass over the co-moments gives without a fit (the fit stays for the cases r cannot
    // settle: a regressor that does not vary, or u that does not).
    if let [z] = regressors {
        if let Ok(r) = crate::association::pearson(&u, z, 0.95) {
            return Ok(result(n as f64 * r.r * r.r, k));
        }
    }
    let names: Vec<String> = (1..=k).map(|j| format!("z{j}")).collect();
    let columns: Vec<(&str, &[f64])> = names
        .iter()
        .map(String::as_str)
        .zip(regressors.iter().copied())
        .collect();
    let design = Design::linear(&columns, true);
    let aux = fit(&design, &u, None, &FitOptions::default()).map_err(|_| CheckError::NoSpread)?;
    Ok(result(n as f64 * aux.r_squared, k))
}

fn result(statistic: f64, df: usize) -> BreuschPagan {
    BreuschPagan {
        statistic,
        df,
        p_value: distributions::chi_square_upper_tail(statistic, df as f64),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_spread_growing_with_x_is_detected_and_an_even_one_is_not() {
        // Deterministic pattern: residuals ±x (spread proportional to x) against ±1.
        let x: Vec<f64> = (1..=40).map(f64::from).collect();
        let sign = |i: usize| if i.is_multiple_of(2) { 1.0 } else { -1.0 };
        let growing: Vec<f64> = x.iter().enumerate().map(|(i, v)| sign(i) * v).collect();
        let even: Vec<f64> = (0..40)
            .map(|i| sign(i) * (1.0 + 0.3 * ((i * 7 % 11) as f64 / 11.0)))
            .collect();
        let g = breusch_pagan(&growing, &[&x]).expect("defined");
        let e = breusch_pagan(&even, &[&x]).expect("defined");
        assert_eq!(g.df, 1);
        assert!(g.p_value < 1e-4, "growing spread: p = {}", g.p_value);
        assert!(e.p_value > 0.05, "even spread: p = {}", e.p_value);
    }

    #[test]
    fn matches_statsmodels_on_a_skewed_series() {
        // statsmodels 0.14.4 het_breuschpagan(e, [1, i]) on 2026-12-02, pasted:
        // LM 4.010591194790268, p 0.04521529352895727, with e the sample below and i = 0..37.
        let e: Vec<f64> = (0..37)
            .map(|i| ((i * 7919 % 101) as f64 / 10.0).powf(1.3) + i as f64 * 0.1)
            .collect();
        let z: Vec<f64> = (0..37).map(f64::from).collect();
        let r = breusch_pagan(&e, &[&z]).expect("defined");
        assert!((r.statistic / 4.010591194790268 - 1.0).abs() < 1e-12);
        assert!((r.p_value / 0.04521529352895727 - 1.0).abs() < 1e-10);
    }

    #[test]
    fn one_regressor_by_correlation_equals_the_auxiliary_fit() {
        let e: Vec<f64> = (0..500)
            .map(|i| ((i * 7919 % 257) as f64 / 25.0 - 5.0) * (1.0 + i as f64 / 400.0))
            .collect();
        let z: Vec<f64> = (0..500).map(|i| 3.0 + (i as f64).sqrt()).collect();
        let u: Vec<f64> = e.iter().map(|v| v * v).collect();
        let aux = fit(
            &Design::linear(&[("z", &z)], true),
            &u,
            None,
            &FitOptions::default(),
        )
        .expect("aux");
        let r = breusch_pagan(&e, &[&z]).expect("defined");
        let lm = 500.0 * aux.r_squared;
        assert!(
            (r.statistic / lm - 1.0).abs() < 1e-12,
            "{} vs {lm}",
            r.statistic
        );
    }

    #[test]
    fn equal_squares_are_reported_not_divided_by_zero() {
        let e = [1.0, -1.0, 1.0, -1.0, 1.0];
        let z = [1.0, 2.0, 3.0, 4.0, 5.0];
        assert_eq!(breusch_pagan(&e, &[&z]), Err(CheckError::NoSpread));
    }
}
