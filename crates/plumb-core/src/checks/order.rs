//! Independence along a row order: the Durbin–Watson statistic and the runs of residual signs.

use super::{finite, CheckError};
use crate::distributions;

/// Durbin–Watson statistic of residuals in row order:
/// `d = Σₜ₌₂ⁿ (eₜ − eₜ₋₁)² / Σₜ₌₁ⁿ eₜ²`. Near 2 when neighbouring residuals are unrelated,
/// towards 0 when they follow each other (positive autocorrelation), towards 4 when they
/// alternate; `d ≈ 2(1 − r₁)` with `r₁` the lag-one autocorrelation.
///
/// # Errors
/// Fewer than 3 residuals, a non-finite value, or all residuals zero.
pub fn durbin_watson(residuals: &[f64]) -> Result<f64, CheckError> {
    let n = residuals.len();
    if n < 3 {
        return Err(CheckError::TooFew { n, needed: 3 });
    }
    finite(residuals)?;
    let ss = crate::accurate::dot(residuals, residuals);
    if ss == 0.0 {
        return Err(CheckError::NoSpread);
    }
    let diffs: Vec<f64> = residuals.windows(2).map(|w| w[1] - w[0]).collect();
    Ok(crate::accurate::dot(&diffs, &diffs) / ss)
}

/// The runs of residual signs in row order (Wald–Wolfowitz runs test about zero).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SignRuns {
    /// Number of runs `R` (maximal stretches of one sign; zero residuals are left out).
    pub runs: usize,
    /// Positive residuals `n₊`.
    pub positive: usize,
    /// Negative residuals `n₋`.
    pub negative: usize,
    /// Expected runs `μ = 2n₊n₋/n + 1`.
    pub expected: f64,
    /// `z = (R − μ)/σ` with `σ² = 2n₊n₋(2n₊n₋ − n)/(n²(n − 1))` (no continuity correction).
    pub z: f64,
    /// Two-sided normal p-value of `z`.
    pub p_value: f64,
}

/// Runs of residual signs about zero in row order; too few runs means residuals of one sign
/// cluster together (a drift or a missed curve), too many that they alternate.
///
/// # Errors
/// Fewer than 2 residuals of either sign, or a non-finite value.
pub fn sign_runs(residuals: &[f64]) -> Result<SignRuns, CheckError> {
    finite(residuals)?;
    let signs: Vec<bool> = residuals
        .iter()
        .filter(|&&e| e != 0.0)
        .map(|&e| e > 0.0)
        .collect();
    let positive = signs.iter().filter(|&&s| s).count();
    let negative = signs.len() - positive;
    if positive < 2 || negative < 2 {
        return Err(CheckError::TooFew {
            n: positive.min(negative),
            needed: 2,
        });
    }
    let runs = 1 + signs.windows(2).filter(|w| w[0] != w[1]).count();
    let (np, nm, n) = (positive as f64, negative as f64, signs.len() as f64);
    let expected = 2.0 * np * nm / n + 1.0;
    let variance = 2.0 * np * nm * (2.0 * np * nm - n) / (n * n * (n - 1.0));
    let z = (runs as f64 - expected) / variance.sqrt();
    Ok(SignRuns {
        runs,
        positive,
        negative,
        expected,
        z,
        p_value: 2.0 * distributions::normal_upper_tail(z.abs()),
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn durbin_watson_of_a_small_series_by_hand() {
        // e = 1, −1, 2: d = ((−2)² + 3²)/(1 + 1 + 4) = 13/6 (by hand).
        assert_relative_eq!(
            durbin_watson(&[1.0, -1.0, 2.0]).expect("defined"),
            13.0 / 6.0
        );
    }

    #[test]
    fn clustered_signs_make_few_runs_and_a_small_p() {
        // Ten positives then ten negatives: 2 runs against μ = 11 (by hand).
        let e: Vec<f64> = (0..20).map(|i| if i < 10 { 1.0 } else { -1.0 }).collect();
        let r = sign_runs(&e).expect("defined");
        assert_eq!((r.runs, r.positive, r.negative), (2, 10, 10));
        assert_relative_eq!(r.expected, 11.0);
        assert!(r.p_value < 1e-4);
        let alternating: Vec<f64> = (0..20)
            .map(|i: usize| if i.is_multiple_of(2) { 1.0 } else { -1.0 })
            .collect();
        assert_eq!(sign_runs(&alternating).expect("defined").runs, 20);
    }
}
