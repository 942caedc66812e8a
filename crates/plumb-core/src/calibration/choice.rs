//! Weightings side by side: the same calibration fitted under each candidate weighting, with
//! the figures that let the data judge between them.

use super::curve::CalibrationCurve;
use crate::checks::breusch_pagan;
use crate::regression::{fit, Design, FitOptions};

/// One weighting's figures.
#[derive(Debug, Clone, PartialEq)]
pub struct WeightingFigures {
    /// Weighted `R² = 1 − Σwe²/Σw(y − ȳ_w)²`.
    pub r_squared: f64,
    /// Back-calculated standards: `Σ|REᵢ|`, `REᵢ = 100·(x̂ᵢ − xᵢ)/xᵢ` over standards with
    /// `xᵢ ≠ 0`, `x̂ᵢ` read back from `yᵢ` on the fitted curve (the root nearest `xᵢ`).
    pub sum_abs_relative_error: f64,
    /// `max|REᵢ|`.
    pub max_abs_relative_error: f64,
    /// Spread of the weighted residuals `√wᵢ·eᵢ` in the upper half of the standards over the
    /// lower half (root mean squares; rows at the median x belong to neither): near 1 when the
    /// weighting evens the spread out.
    pub spread_ratio: f64,
    /// p-value of the studentized Breusch–Pagan test of the weighted residuals against x.
    pub spread_p: Option<f64>,
    /// `√wᵢ·eᵢ`, in row order.
    pub weighted_residuals: Vec<f64>,
    /// `REᵢ` per row (`None` at x = 0 or where no x̂ᵢ exists).
    pub relative_errors: Vec<Option<f64>>,
}

/// A candidate weighting and how it fared (or why it cannot be used on these data).
#[derive(Debug, Clone, PartialEq)]
pub struct WeightingRow {
    /// `none`, `1/x`, …, or a column's name.
    pub label: String,
    /// Its figures.
    pub outcome: Result<WeightingFigures, String>,
}

/// A candidate weighting: its label and its weights (`None`: unweighted), or why it does not
/// apply to these data.
pub type Candidate = (String, Result<Option<Vec<f64>>, String>);

/// Fits a polynomial of `degree` in `x` to `y` under each candidate's weights (`None`:
/// unweighted; `Err`: the reason the rule does not apply) and reports the figures of
/// [`WeightingFigures`] for each, in the order given.
pub fn compare_weightings(
    x: &[f64],
    y: &[f64],
    degree: u32,
    candidates: Vec<Candidate>,
) -> Vec<WeightingRow> {
    candidates
        .into_iter()
        .map(|(label, weights)| WeightingRow {
            outcome: weights.and_then(|w| figures(x, y, degree, w.as_deref())),
            label,
        })
        .collect()
}

fn figures(
    x: &[f64],
    y: &[f64],
    degree: u32,
    w: Option<&[f64]>,
) -> Result<WeightingFigures, String> {
    let design = if degree > 1 {
        Design::polynomial("x", x, degree, true).map_err(|e| e.to_string())?
    } else {
        Design::linear(&[("x", x)], true)
    };
    let f = fit(&design, y, w, &FitOptions::default()).map_err(|e| e.to_string())?;
    let range = x
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &v| {
            (a.min(v), b.max(v))
        });
    let curve = CalibrationCurve::new(&design, &f, range).map_err(|e| e.to_string())?;
    let relative_errors: Vec<Option<f64>> = x
        .iter()
        .zip(y)
        .map(|(&xi, &yi)| {
            let back = curve.root_near(yi, xi)?;
            (xi != 0.0).then(|| 100.0 * (back - xi) / xi)
        })
        .collect();
    let weighted_residuals: Vec<f64> = f
        .residuals
        .iter()
        .enumerate()
        .map(|(i, e)| e * w.map_or(1.0, |w| w[i].sqrt()))
        .collect();
    let res: Vec<f64> = relative_errors.iter().flatten().map(|v| v.abs()).collect();
    Ok(WeightingFigures {
        r_squared: f.r_squared,
        sum_abs_relative_error: res.iter().sum(),
        max_abs_relative_error: res.iter().copied().fold(0.0, f64::max),
        spread_ratio: spread_ratio(x, &weighted_residuals),
        spread_p: breusch_pagan(&weighted_residuals, &[x])
            .ok()
            .map(|b| b.p_value),
        weighted_residuals,
        relative_errors,
    })
}

/// RMS of `r` where x is above its median over the RMS where it is below.
fn spread_ratio(x: &[f64], r: &[f64]) -> f64 {
    let mut sorted = x.to_vec();
    sorted.sort_by(f64::total_cmp);
    let n = sorted.len();
    let median = 0.5 * (sorted[(n - 1) / 2] + sorted[n / 2]);
    let rms = |keep: &dyn Fn(f64) -> bool| {
        let v: Vec<f64> = x
            .iter()
            .zip(r)
            .filter(|(xi, _)| keep(**xi))
            .map(|(_, e)| e * e)
            .collect();
        (v.iter().sum::<f64>() / v.len() as f64).sqrt()
    };
    rms(&|v| v > median) / rms(&|v| v < median)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::calibration::{rule_weights, WeightRule};

    #[test]
    fn constant_relative_error_is_evened_out_by_inverse_x_squared() {
        // Standards 1…100 in duplicate with errors up to 3 % of the value (a fixed pattern).
        let levels = [1.0, 2.0, 5.0, 10.0, 20.0, 50.0, 100.0];
        let x: Vec<f64> = levels.iter().flat_map(|&v| [v, v]).collect();
        let y: Vec<f64> = x
            .iter()
            .enumerate()
            .map(|(i, v)| 0.5 + 2.0 * v * (1.0 + 0.03 * (i as f64 * 2.1).sin()))
            .collect();
        let rule = |r| rule_weights(r, &x, &y).map(Some).map_err(|e| e.to_string());
        let rows = compare_weightings(
            &x,
            &y,
            1,
            vec![
                ("none".into(), Ok(None)),
                ("1/x²".into(), rule(WeightRule::InverseX2)),
            ],
        );
        let none = rows[0].outcome.as_ref().expect("fits");
        let inv = rows[1].outcome.as_ref().expect("fits");
        // Unweighted residuals grow with x; 1/x² makes them even and the back-calculated
        // errors of the low standards small.
        assert!(none.spread_ratio > 5.0, "{}", none.spread_ratio);
        assert!((inv.spread_ratio - 1.0).abs() < 0.6, "{}", inv.spread_ratio);
        assert!(inv.sum_abs_relative_error < none.sum_abs_relative_error);
        assert_eq!(inv.relative_errors.len(), x.len());
    }
}
