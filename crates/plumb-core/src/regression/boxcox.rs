//! The Box–Cox transform of the response, with λ chosen by maximum likelihood for the model
//! at hand, and its profile-likelihood interval.
//!
//! For `y⁽λ⁾ = (y^λ − 1)/λ` (`ln y` at λ = 0) fitted by least squares on the design, the
//! profile log-likelihood of λ is, up to a constant,
//!
//! `ℓ(λ) = −(n/2)·ln(RSS(λ)/n) + (λ − 1)·Σ ln yᵢ`
//!
//! (Box and Cox, 1964; the second term is the Jacobian of the transform). λ̂ maximizes it;
//! the interval at level `1 − α` is `{λ : ℓ(λ) ≥ ℓ(λ̂) − ½·χ²₁(1 − α)}`, with
//! `χ²₁(1 − α) = z²_{α/2}`. With an intercept-only design this is the likelihood of the
//! response alone.

use super::transform::Transform;
use super::{fit, Design, FitOptions};
use crate::{distributions, optimize, CoreError, Result};

/// λ is searched for in `[−LAMBDA_REACH, LAMBDA_REACH]`.
pub const LAMBDA_REACH: f64 = 10.0;

/// The maximum-likelihood Box–Cox transform of a response.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BoxCox {
    /// λ̂.
    pub lambda: f64,
    /// `ℓ(λ̂)`.
    pub log_likelihood: f64,
    /// The profile-likelihood interval of λ at `level`; an end is `None` where `ℓ` does not
    /// fall far enough within the search range (the data do not bound λ on that side).
    pub interval: (Option<f64>, Option<f64>),
    /// Confidence level of the interval.
    pub level: f64,
}

impl BoxCox {
    /// The transform with λ̂.
    pub fn transform(&self) -> Transform {
        Transform::BoxCox(self.lambda)
    }
}

/// `ℓ(λ)` of the design on `y` (every `y` positive).
///
/// # Errors
/// A fit the solver refuses (too few rows, an aliased term).
pub fn boxcox_log_likelihood(design: &Design, y: &[f64], lambda: f64) -> Result<f64> {
    let t = Transform::BoxCox(lambda);
    let ty: Vec<f64> = y
        .iter()
        .map(|&v| t.apply(v))
        .collect::<Option<_>>()
        .ok_or_else(|| CoreError::InvalidOption("λ overflows the response".into()))?;
    let rss = fit(design, &ty, None, &FitOptions::default())?
        .anova
        .ss_residual;
    let n = y.len() as f64;
    let sum_ln: f64 = y.iter().map(|v| v.ln()).sum();
    Ok(-0.5 * n * (rss / n).ln() + (lambda - 1.0) * sum_ln)
}

/// λ̂ and its interval at `level` for the design on `y`.
///
/// # Errors
/// [`CoreError::InvalidOption`] when a response value is not positive (named by position) or
/// the level is outside (0, 1); what the solver refuses.
pub fn boxcox(design: &Design, y: &[f64], level: f64) -> Result<BoxCox> {
    if let Some(index) = y.iter().position(|&v| !(v > 0.0 && v.is_finite())) {
        return Err(CoreError::InvalidOption(format!(
            "the Box–Cox transform needs a positive response; position {index} holds {}",
            y[index]
        )));
    }
    if !(level > 0.0 && level < 1.0) {
        return Err(CoreError::InvalidOption(format!(
            "confidence level {level} is not between 0 and 1"
        )));
    }
    boxcox_log_likelihood(design, y, 1.0)?;
    // Where ℓ cannot be evaluated (a power that overflows), it counts as −∞.
    let llf = |l: f64| boxcox_log_likelihood(design, y, l).unwrap_or(f64::NEG_INFINITY);
    let (lo, hi) = bracket(&llf);
    let lambda = optimize::maximize(llf, lo, hi, 1e-10);
    let best = llf(lambda);
    let z = distributions::normal_upper_quantile(0.5 * (1.0 - level));
    let target = best - 0.5 * z * z;
    let below = |l: f64| llf(l) - target;
    let interval = (
        optimize::bisect(below, -LAMBDA_REACH, lambda, 1e-10),
        optimize::bisect(below, lambda, LAMBDA_REACH, 1e-10),
    );
    Ok(BoxCox {
        lambda,
        log_likelihood: best,
        interval,
        level,
    })
}

/// A bracket `[lo, hi]` around the highest value of `llf` on a grid of step ½ over the
/// search range.
fn bracket(llf: &impl Fn(f64) -> f64) -> (f64, f64) {
    let steps = (2.0 * LAMBDA_REACH) as i32 * 2;
    let grid: Vec<f64> = (0..=steps)
        .map(|k| -LAMBDA_REACH + 0.5 * f64::from(k))
        .collect();
    let values: Vec<f64> = grid.iter().map(|&l| llf(l)).collect();
    let best = values
        .iter()
        .enumerate()
        .max_by(|a, b| a.1.total_cmp(b.1))
        .map_or(0, |(k, _)| k);
    let lo = grid[best.saturating_sub(1)];
    let hi = grid[(best + 1).min(grid.len() - 1)];
    (lo, hi)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn lambda_recovers_the_power_that_made_the_data_normal() {
        // y = (1 + 0.5·z)^2 for symmetric z: √y is exactly linear in z, so λ̂ near 0.5.
        let z: Vec<f64> = (0..200)
            .map(|k| {
                let u = (f64::from(k) + 0.5) / 200.0;
                crate::distributions::normal_upper_quantile(1.0 - u)
            })
            .collect();
        let y: Vec<f64> = z.iter().map(|v| (3.0 + 0.5 * v).powi(2)).collect();
        let design = Design::new(y.len(), true);
        let b = boxcox(&design, &y, 0.95).expect("positive");
        assert!((b.lambda - 0.5).abs() < 0.05, "λ̂ = {}", b.lambda);
        let (lo, hi) = (b.interval.0.expect("low"), b.interval.1.expect("high"));
        assert!(lo < b.lambda && b.lambda < hi);
        // At the ends the log-likelihood is ½χ²₁ below its top.
        let drop = b.log_likelihood - boxcox_log_likelihood(&design, &y, hi).expect("ℓ");
        assert!((drop - 0.5 * 1.959_964_f64.powi(2)).abs() < 1e-6, "{drop}");
    }

    #[test]
    fn a_response_that_is_not_positive_is_named() {
        let design = Design::new(3, true);
        let e = boxcox(&design, &[1.0, 0.0, 2.0], 0.95).expect_err("zero");
        assert!(e.to_string().contains("position 1"), "{e}");
    }
}
