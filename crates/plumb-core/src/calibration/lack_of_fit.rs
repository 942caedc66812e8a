//! Lack of fit against pure error, when the predictor has replicated levels.

use std::collections::HashMap;

use crate::distributions;

/// The lack-of-fit F test of a fitted model against the cell-means model of its replicated
/// levels.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LackOfFit {
    /// Distinct levels `k` (rows with the same predictor values).
    pub levels: usize,
    /// Pure-error sum of squares `SS_pe = Σᵢ wᵢ (yᵢ − ȳ_{level(i)})²`, `ȳ` the weighted level mean.
    pub pure_error_ss: f64,
    /// `df_pe = n − k`.
    pub pure_error_df: usize,
    /// `SS_lof = RSS − SS_pe`.
    pub lack_of_fit_ss: f64,
    /// `df_lof = k − p`.
    pub lack_of_fit_df: usize,
    /// `F = (SS_lof/df_lof) / (SS_pe/df_pe)`.
    pub f: f64,
    /// `P(F_{df_lof, df_pe} ≥ F)`.
    pub p_value: f64,
}

/// Why the test cannot be made.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum LackOfFitError {
    /// No level is replicated, so there is no pure error to compare with.
    #[error("no predictor level is measured more than once, so lack of fit cannot be told from noise; measure some standards in replicate")]
    NoReplicates,
    /// Fewer levels than the model has terms plus one.
    #[error("{levels} distinct levels for {terms} terms: at least {} levels are needed to test the shape", terms + 1)]
    TooFewLevels {
        /// Distinct levels.
        levels: usize,
        /// Terms of the model.
        terms: usize,
    },
}

/// Lack-of-fit test: rows with identical predictor values (`keys`, one vector per row; for a
/// single x, `[x]`) form a level; with residual sum of squares `rss` of a model with `terms`
/// parameters, `SS_lof = RSS − SS_pe` on `k − p` df against `SS_pe` on `n − k` df. Weighted
/// when `weights` is given (then `rss` must be the weighted RSS).
///
/// # Errors
/// No replicated level, or no more levels than terms.
///
/// # Panics
/// If the lengths of `keys`, `y` and `weights` differ (a caller bug).
pub fn lack_of_fit(
    keys: &[Vec<f64>],
    y: &[f64],
    weights: Option<&[f64]>,
    rss: f64,
    terms: usize,
) -> Result<LackOfFit, LackOfFitError> {
    let n = y.len();
    assert_eq!(keys.len(), n, "one key per row");
    let w = |i: usize| weights.map_or(1.0, |w| w[i]);
    let mut levels: HashMap<Vec<u64>, Vec<usize>> = HashMap::new();
    for (i, key) in keys.iter().enumerate() {
        // −0.0 and 0.0 are one level.
        let bits = key.iter().map(|v| (v + 0.0).to_bits()).collect();
        levels.entry(bits).or_default().push(i);
    }
    let k = levels.len();
    if k == n {
        return Err(LackOfFitError::NoReplicates);
    }
    if k <= terms {
        return Err(LackOfFitError::TooFewLevels { levels: k, terms });
    }
    let pure_error_ss = crate::accurate::sum(levels.values().map(|rows| {
        let sw: f64 = rows.iter().map(|&i| w(i)).sum();
        let mean = rows.iter().map(|&i| w(i) * y[i]).sum::<f64>() / sw;
        crate::accurate::sum(rows.iter().map(|&i| w(i) * (y[i] - mean).powi(2)))
    }));
    let lack_of_fit_ss = (rss - pure_error_ss).max(0.0);
    let (df_pe, df_lof) = (n - k, k - terms);
    let f = (lack_of_fit_ss / df_lof as f64) / (pure_error_ss / df_pe as f64);
    Ok(LackOfFit {
        levels: k,
        pure_error_ss,
        pure_error_df: df_pe,
        lack_of_fit_ss,
        lack_of_fit_df: df_lof,
        f,
        p_value: distributions::f_upper_tail(f, df_lof as f64, df_pe as f64),
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::regression::{fit, Design, FitOptions};

    fn keys(x: &[f64]) -> Vec<Vec<f64>> {
        x.iter().map(|&v| vec![v]).collect()
    }

    #[test]
    fn a_curve_fitted_by_a_line_lacks_fit_and_the_right_shape_does_not() {
        // Duplicates at five levels of y = x² ± 0.1 (by construction).
        let x: Vec<f64> = [1.0, 2.0, 3.0, 4.0, 5.0]
            .iter()
            .flat_map(|&v| [v, v])
            .collect();
        let y: Vec<f64> = x
            .iter()
            .enumerate()
            .map(|(i, v)| v * v + if i.is_multiple_of(2) { 0.1 } else { -0.1 })
            .collect();
        let line = fit(
            &Design::linear(&[("x", &x)], true),
            &y,
            None,
            &FitOptions::default(),
        )
        .expect("fits");
        let rss = line.anova.ss_residual;
        let r = lack_of_fit(&keys(&x), &y, None, rss, 2).expect("replicated");
        // Pure error by hand: five levels, each (0.1)² + (0.1)² = 0.02 → 0.1 on 5 df.
        assert!((r.pure_error_ss - 0.1).abs() < 1e-12);
        assert_eq!((r.levels, r.pure_error_df, r.lack_of_fit_df), (5, 5, 3));
        // statsmodels 0.14.4 anova_lm(line, cell means) on 2026-12-02, pasted:
        // SS_lof 28.00000000000001, F 466.6666666666641, p 1.5371335147174412e-06.
        assert!((r.lack_of_fit_ss / 28.0 - 1.0).abs() < 1e-12);
        assert!((r.f / 466.6666666666641 - 1.0).abs() < 1e-9);
        assert!((r.p_value / 1.5371335147174412e-06 - 1.0).abs() < 1e-9);
        let quad = fit(
            &Design::polynomial("x", &x, 2, true).expect("design"),
            &y,
            None,
            &FitOptions::default(),
        )
        .expect("fits");
        let q = lack_of_fit(&keys(&x), &y, None, quad.anova.ss_residual, 3).expect("replicated");
        assert!(q.p_value > 0.5, "{q:?}");
    }

    #[test]
    fn no_replicates_is_said_plainly() {
        let x = [1.0, 2.0, 3.0, 4.0];
        let e = lack_of_fit(&keys(&x), &[1.0, 2.0, 2.5, 4.5], None, 0.3, 2);
        assert_eq!(e, Err(LackOfFitError::NoReplicates));
    }
}
