//! Comparing models: partial F for nested fits, and variance inflation of each predictor.

use super::{fit, Design, FitOptions, LinearFit, TermKind};
use crate::{distributions, Result};

/// The test of a larger model against a smaller one nested in it.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct NestedComparison {
    /// `ΔR² = R²_full − R²_reduced`.
    pub delta_r_squared: f64,
    /// `F = ((RSS_r − RSS_f)/(df_r − df_f)) / (RSS_f/df_f)`.
    pub f_statistic: f64,
    /// Numerator degrees of freedom `df_r − df_f`.
    pub df_num: usize,
    /// Denominator degrees of freedom `df_f`.
    pub df_den: usize,
    /// `P(F_{df_num, df_den} ≥ F)`.
    pub p_value: f64,
    /// `AIC_full − AIC_reduced` (negative favours the larger model).
    pub delta_aic: f64,
    /// `BIC_full − BIC_reduced`.
    pub delta_bic: f64,
}

/// Partial F test of `full` against `reduced`, which must be fitted to the same rows with a
/// subset of its terms (the caller's responsibility; only the degrees of freedom are checked).
///
/// # Panics
/// If `full` does not have fewer residual degrees of freedom than `reduced`.
pub fn compare_nested(reduced: &LinearFit, full: &LinearFit) -> NestedComparison {
    let (dr, df) = (reduced.anova.df_residual, full.anova.df_residual);
    assert!(
        df < dr && reduced.n == full.n,
        "models are not nested fits of the same rows"
    );
    let (rss_r, rss_f) = (reduced.anova.ss_residual, full.anova.ss_residual);
    let df_num = dr - df;
    let f_statistic = ((rss_r - rss_f) / df_num as f64) / (rss_f / df as f64);
    NestedComparison {
        delta_r_squared: full.r_squared - reduced.r_squared,
        f_statistic,
        df_num,
        df_den: df,
        p_value: distributions::f_upper_tail(f_statistic, df_num as f64, df as f64),
        delta_aic: full.aic - reduced.aic,
        delta_bic: full.bic - reduced.bic,
    }
}

/// Variance inflation factor of every non-intercept term: `VIFⱼ = 1/(1 − R²ⱼ)`, with `R²ⱼ`
/// from regressing term j on the other terms of the design (centred R² when the design has an
/// intercept, uncentred otherwise). `None` for the intercept; 1 for a lone predictor.
///
/// # Errors
/// A rank error from an auxiliary fit (which the main fit would have raised first).
pub fn variance_inflation(design: &Design, weights: Option<&[f64]>) -> Result<Vec<Option<f64>>> {
    let terms = design.terms();
    let others_exist = terms
        .iter()
        .filter(|t| t.kind != TermKind::Intercept)
        .count()
        > 1;
    terms
        .iter()
        .enumerate()
        .map(|(j, term)| {
            if term.kind == TermKind::Intercept {
                return Ok(None);
            }
            if !others_exist {
                return Ok(Some(1.0));
            }
            let mut aux = Design::new(design.n_rows(), design.has_intercept());
            for (k, (t, c)) in terms.iter().zip(design.columns()).enumerate() {
                if k != j && t.kind != TermKind::Intercept {
                    aux.push(t.clone(), c.clone());
                }
            }
            let r2 = fit(&aux, &design.columns()[j], weights, &FitOptions::default())?.r_squared;
            Ok(Some(1.0 / (1.0 - r2)))
        })
        .collect()
}

/// [`variance_inflation`] read off `fit`, the fit of `design` (with `weights`) to any response,
/// without the auxiliary fits: `1/[(XᵀWX)⁻¹]ⱼⱼ` is the residual sum of squares of term j on
/// the other terms, so `VIFⱼ = [(XᵀWX)⁻¹]ⱼⱼ · TSSⱼ` with `TSSⱼ = Σwᵢ(xᵢⱼ − x̄ⱼ)²` (uncentred,
/// `Σwᵢxᵢⱼ²`, without an intercept), and `[(XᵀWX)⁻¹]ⱼⱼ = SE(β̂ⱼ)²/σ̂²` from the fit's
/// covariance. A fit with `σ̂ = 0` carries no such scale: the auxiliary fits are run instead.
///
/// # Errors
/// As [`variance_inflation`], whose auxiliary fits are the fallback.
pub fn variance_inflation_of_fit(
    design: &Design,
    weights: Option<&[f64]>,
    fit: &LinearFit,
) -> Result<Vec<Option<f64>>> {
    let s2 = fit.residual_std_error.powi(2);
    if !(s2 > 0.0 && s2.is_finite()) {
        return variance_inflation(design, weights);
    }
    let terms = design.terms();
    let predictors = terms
        .iter()
        .filter(|t| t.kind != TermKind::Intercept)
        .count();
    let total = |x: &[f64]| match (design.has_intercept(), weights) {
        (true, w) => crate::describe::sum_sq_dev(x, w),
        (false, None) => crate::accurate::sum(x.iter().map(|v| v * v)),
        (false, Some(w)) => crate::accurate::sum(x.iter().zip(w).map(|(v, wi)| wi * v * v)),
    };
    Ok(terms
        .iter()
        .zip(design.columns())
        .enumerate()
        .map(|(j, (term, x))| match (term.kind, predictors) {
            (TermKind::Intercept, _) => None,
            (_, 1) => Some(1.0),
            _ => Some(fit.covariance[(j, j)] / s2 * total(x)),
        })
        .collect())
}

/// Whether the model with terms `reduced` is nested in the one with terms `full`: every term
/// of the smaller is a term of the larger (by name), and the larger has more.
pub fn is_nested(reduced: &[String], full: &[String]) -> bool {
    full.len() > reduced.len() && reduced.iter().all(|t| full.contains(t))
}

/// The added-variable (partial regression) view of term `j`: the response and that term, each
/// with the other terms regressed out, `e_y = y − ŷ₍₋ⱼ₎` and `e_x = xⱼ − x̂ⱼ₍₋ⱼ₎` (scaled by `√wᵢ`
/// under weights). The slope of `e_y` on `e_x` through the origin,
/// `Σ e_x e_y / Σ e_x²`, equals the multiple-regression coefficient `β̂ⱼ`
/// (Frisch–Waugh–Lovell theorem).
#[derive(Debug, Clone, PartialEq)]
pub struct AddedVariable {
    /// The term.
    pub term: String,
    /// `e_x`, one per row.
    pub x: Vec<f64>,
    /// `e_y`, one per row.
    pub y: Vec<f64>,
    /// `Σ e_x e_y / Σ e_x²`.
    pub slope: f64,
}

/// The added-variable view of term `j` of `design` on `y`.
///
/// # Errors
/// What the solver raises for the auxiliary fits (the main fit would have raised it first).
///
/// # Panics
/// If `j` is not a term of the design (a caller bug).
pub fn added_variable(
    design: &Design,
    y: &[f64],
    weights: Option<&[f64]>,
    j: usize,
) -> Result<AddedVariable> {
    assert!(j < design.n_terms(), "term {j} is not in the design");
    let terms = design.terms();
    let mut others = Design::new(design.n_rows(), design.has_intercept());
    for (k, (t, c)) in terms.iter().zip(design.columns()).enumerate() {
        if k != j && t.kind != TermKind::Intercept {
            others.push(t.clone(), c.clone());
        }
    }
    let root_w: Vec<f64> = weights.map_or_else(
        || vec![1.0; y.len()],
        |w| w.iter().map(|v| v.sqrt()).collect(),
    );
    let residual = |v: &[f64]| -> Result<Vec<f64>> {
        let e = if others.n_terms() == 0 {
            v.to_vec()
        } else {
            fit(&others, v, weights, &FitOptions::default())?.residuals
        };
        Ok(e.iter().zip(&root_w).map(|(a, w)| a * w).collect())
    };
    let ex = residual(&design.columns()[j])?;
    let ey = residual(y)?;
    let slope = crate::accurate::dot(&ex, &ey) / crate::accurate::dot(&ex, &ex);
    Ok(AddedVariable {
        term: terms[j].name.clone(),
        x: ex,
        y: ey,
        slope,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn the_added_variable_slope_is_the_multiple_regression_coefficient() {
        // Frisch–Waugh–Lovell: the slope of e_y on e_x equals β̂ⱼ of the full fit.
        let a: Vec<f64> = (0..40).map(|i| f64::from(i) * 0.25).collect();
        let b: Vec<f64> = (0..40)
            .map(|i| f64::from((i * 17) % 11) + 0.1 * f64::from(i))
            .collect();
        let y: Vec<f64> = a
            .iter()
            .zip(&b)
            .enumerate()
            .map(|(i, (x1, x2))| 2.0 + 0.7 * x1 - 1.3 * x2 + ((i * 7) % 5) as f64 * 0.2)
            .collect();
        let w: Vec<f64> = (0..40).map(|i| 1.0 + f64::from(i % 3)).collect();
        let d = Design::linear(&[("a", &a), ("b", &b)], true);
        for weights in [None, Some(w.as_slice())] {
            let full = fit(&d, &y, weights, &FitOptions::default()).expect("fits");
            for j in [1, 2] {
                let av = added_variable(&d, &y, weights, j).expect("defined");
                let beta = full.coefficients[j].estimate;
                assert_relative_eq!(av.slope, beta, max_relative = 1e-10);
            }
        }
        assert!(is_nested(
            &["intercept".into()],
            &["intercept".into(), "a".into()]
        ));
        assert!(!is_nested(&["a".into()], &["intercept".into(), "b".into()]));
    }

    #[test]
    fn inflation_read_off_the_fit_equals_the_auxiliary_fits() {
        // Three predictors sharing a factor, with and without weights and an intercept.
        let n = 300;
        let f: Vec<f64> = (0..n).map(|i| (f64::from(i) * 0.37).sin()).collect();
        let a: Vec<f64> = (0..n)
            .map(|i| f[i as usize] + 0.3 * (f64::from(i) * 1.3).cos())
            .collect();
        let b: Vec<f64> = (0..n)
            .map(|i| 2.0 * f[i as usize] + 0.1 * (f64::from(i) * 2.9).sin() + 5.0)
            .collect();
        let c: Vec<f64> = (0..n).map(|i| f64::from(i % 7) - f[i as usize]).collect();
        let y: Vec<f64> = (0..n)
            .map(|i| a[i as usize] - b[i as usize] + (f64::from(i) * 0.71).cos())
            .collect();
        let w: Vec<f64> = (0..n).map(|i| 1.0 + f64::from(i % 4)).collect();
        for intercept in [true, false] {
            let d = Design::linear(&[("a", &a), ("b", &b), ("c", &c)], intercept);
            for weights in [None, Some(w.as_slice())] {
                let full = fit(&d, &y, weights, &FitOptions::default()).expect("fits");
                let quick = variance_inflation_of_fit(&d, weights, &full).expect("defined");
                let slow = variance_inflation(&d, weights).expect("defined");
                for (q, s) in quick.iter().zip(&slow) {
                    match (q, s) {
                        (Some(q), Some(s)) => assert_relative_eq!(*q, *s, max_relative = 1e-9),
                        _ => assert_eq!(q, s),
                    }
                }
            }
        }
    }

    #[test]
    fn uncorrelated_predictors_have_no_inflation() {
        // Orthogonal, centred columns: every auxiliary R² is 0 (by construction).
        let a = [1.0, -1.0, 1.0, -1.0, 0.0, 0.0];
        let b = [1.0, 1.0, -1.0, -1.0, 0.0, 0.0];
        let d = Design::linear(&[("a", &a), ("b", &b)], true);
        let vif = variance_inflation(&d, None).expect("defined");
        assert_eq!(vif[0], None);
        assert_relative_eq!(vif[1].expect("a"), 1.0, epsilon = 1e-12);
        assert_relative_eq!(vif[2].expect("b"), 1.0, epsilon = 1e-12);
    }

    #[test]
    fn a_needed_curve_gives_a_large_partial_f() {
        let x: Vec<f64> = (0..20).map(f64::from).collect();
        let y: Vec<f64> = x
            .iter()
            .enumerate()
            .map(|(k, v)| 0.3 * v * v + if k % 2 == 0 { 0.5 } else { -0.5 })
            .collect();
        let o = FitOptions::default();
        let line = fit(
            &Design::polynomial("x", &x, 1, true).expect("d1"),
            &y,
            None,
            &o,
        )
        .expect("fits");
        let quad = fit(
            &Design::polynomial("x", &x, 2, true).expect("d2"),
            &y,
            None,
            &o,
        )
        .expect("fits");
        let c = compare_nested(&line, &quad);
        assert_eq!((c.df_num, c.df_den), (1, 17));
        assert!(c.p_value < 1e-10 && c.delta_r_squared > 0.0 && c.delta_aic < 0.0);
        // With one added term the partial F is the square of that term's t (textbook identity).
        assert_relative_eq!(
            c.f_statistic,
            quad.coefficients[2].t.powi(2),
            max_relative = 1e-9
        );
    }
}
