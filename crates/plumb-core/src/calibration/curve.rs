//! A fitted calibration curve in one variable: its value, slope, the variance of its value,
//! and the x where it takes a given reading.

use nalgebra::DMatrix;

use super::CalibrationError;
use crate::regression::{Design, LinearFit, TermKind};

/// Points of the grid that brackets roots and band ends in [`CalibrationCurve::roots`] and
/// the band inversion.
pub const SEARCH_POINTS: usize = 4_000;

/// A straight line or polynomial `f(x) = Σⱼ βⱼ x^{kⱼ}` fitted to calibration standards, with
/// what inverse prediction needs: the coefficients' covariance `Σ = σ̂²(XᵀWX)⁻¹`, the residual
/// standard error `σ̂` (of a reading of weight 1), its degrees of freedom and the x range of
/// the standards.
#[derive(Debug, Clone, PartialEq)]
pub struct CalibrationCurve {
    powers: Vec<u32>,
    beta: Vec<f64>,
    covariance: DMatrix<f64>,
    /// `σ̂`, the residual standard error of a reading of weight 1.
    pub sigma: f64,
    /// Residual degrees of freedom `n − p`.
    pub df: usize,
    /// Confidence level of the intervals.
    pub level: f64,
    /// Smallest and largest standard.
    pub range: (f64, f64),
}

impl CalibrationCurve {
    /// The curve of `fit`, fitted on `design` (terms: an optional intercept and powers of one
    /// predictor) over standards whose x values span `range`.
    ///
    /// # Errors
    /// A design with terms other than powers of one predictor (several predictors, a
    /// grouping) or without any power of x.
    pub fn new(
        design: &Design,
        fit: &LinearFit,
        range: (f64, f64),
    ) -> Result<Self, CalibrationError> {
        let powers: Vec<u32> = design.terms().iter().map(|t| t.kind.power()).collect();
        let linear_terms = design
            .terms()
            .iter()
            .filter(|t| t.kind == TermKind::Linear)
            .count();
        let is_polynomial = linear_terms == 1
            && design.terms().iter().all(|t| {
                !matches!(t.kind, TermKind::Power(_)) || design.polynomial_source().is_some()
            });
        if !is_polynomial {
            return Err(CalibrationError::NotOneVariable);
        }
        Ok(Self {
            powers,
            beta: fit.coefficients.iter().map(|c| c.estimate).collect(),
            covariance: fit.covariance.clone(),
            sigma: fit.residual_std_error,
            df: fit.anova.df_residual,
            level: fit.level,
            range,
        })
    }

    /// Whether the curve is a straight line with an intercept (`f = β₀ + β₁x`).
    pub fn is_line(&self) -> bool {
        self.powers == [0, 1]
    }

    /// The coefficients, in term order.
    pub fn coefficients(&self) -> &[f64] {
        &self.beta
    }

    /// The design row `g(x) = (x^{k₁}, …, x^{k_p})`.
    pub fn row(&self, x: f64) -> Vec<f64> {
        self.powers.iter().map(|&k| x.powi(k as i32)).collect()
    }

    /// `f(x) = g(x)ᵀβ̂`.
    pub fn value(&self, x: f64) -> f64 {
        self.powers
            .iter()
            .zip(&self.beta)
            .map(|(&k, b)| b * x.powi(k as i32))
            .sum()
    }

    /// `f′(x) = Σⱼ kⱼ βⱼ x^{kⱼ−1}`.
    pub fn slope(&self, x: f64) -> f64 {
        self.powers
            .iter()
            .zip(&self.beta)
            .filter(|(&k, _)| k > 0)
            .map(|(&k, b)| f64::from(k) * b * x.powi(k as i32 - 1))
            .sum()
    }

    /// `Var f(x) = g(x)ᵀ Σ g(x)`: the variance of the fitted curve at x.
    pub fn value_variance(&self, x: f64) -> f64 {
        let g = self.row(x);
        let p = g.len();
        let mut v = 0.0;
        for i in 0..p {
            for j in 0..p {
                v += g[i] * self.covariance[(i, j)] * g[j];
            }
        }
        v.max(0.0)
    }

    /// Entry `(i, j)` of the coefficients' covariance `Σ`.
    pub fn covariance_entry(&self, i: usize, j: usize) -> f64 {
        self.covariance[(i, j)]
    }

    /// The upper `(1 − level)/2` quantile of `t` on the residual degrees of freedom.
    pub fn t_quantile(&self) -> f64 {
        crate::distributions::t_upper_quantile(0.5 * (1.0 - self.level), self.df as f64)
    }

    /// Where inverse prediction looks: the standards' range widened by its own width on each
    /// side (readings far outside it are extrapolations the curve cannot vouch for).
    pub fn search_domain(&self) -> (f64, f64) {
        let (lo, hi) = self.range;
        let w = (hi - lo).max(f64::MIN_POSITIVE);
        (lo - w, hi + w)
    }

    /// Every x in `[a, b]` with `f(x) = y0`, ascending: for a line the closed form, otherwise
    /// sign changes of `f − y0` on a grid of [`SEARCH_POINTS`] refined by bisection.
    pub fn roots(&self, y0: f64, a: f64, b: f64) -> Vec<f64> {
        if self.is_line() {
            let x = (y0 - self.beta[0]) / self.beta[1];
            return if x.is_finite() && (a..=b).contains(&x) {
                vec![x]
            } else {
                Vec::new()
            };
        }
        sign_changes(|x| self.value(x) - y0, a, b)
    }
}

impl CalibrationCurve {
    /// The x nearest `start` where `f(x) = y0`, by Newton's method from `start` (a line in
    /// closed form): O(1), for reading back many standards. `None` when the iteration leaves
    /// the search domain, meets a flat stretch or does not settle in 50 steps.
    pub fn root_near(&self, y0: f64, start: f64) -> Option<f64> {
        if self.is_line() {
            let x = (y0 - self.beta[0]) / self.beta[1];
            return x.is_finite().then_some(x);
        }
        let (a, b) = self.search_domain();
        let scale = (b - a).abs().max(start.abs()).max(f64::MIN_POSITIVE);
        let mut x = start;
        for _ in 0..50 {
            let d = self.slope(x);
            if d == 0.0 || !d.is_finite() {
                return None;
            }
            let step = (self.value(x) - y0) / d;
            x -= step;
            if !(a..=b).contains(&x) {
                return None;
            }
            if step.abs() <= 1e-14 * scale {
                return Some(x);
            }
        }
        None
    }
}

/// The points where `h` changes sign (or is zero) on a grid over `[a, b]`, each refined by
/// bisection to a relative 1e-13 of the interval.
pub(super) fn sign_changes(h: impl Fn(f64) -> f64, a: f64, b: f64) -> Vec<f64> {
    let step = (b - a) / SEARCH_POINTS as f64;
    let tol = 1e-13 * (b - a).abs().max(a.abs()).max(b.abs());
    let mut out = Vec::new();
    let mut x0 = a;
    let mut h0 = h(a);
    if h0 == 0.0 {
        out.push(a);
    }
    for k in 1..=SEARCH_POINTS {
        let x1 = if k == SEARCH_POINTS {
            b
        } else {
            a + step * k as f64
        };
        let h1 = h(x1);
        if h1 == 0.0 {
            out.push(x1);
        } else if h0 != 0.0 && h0.signum() != h1.signum() {
            if let Some(r) = crate::optimize::bisect(&h, x0, x1, tol) {
                out.push(r);
            }
        }
        (x0, h0) = (x1, h1);
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::regression::{fit, FitOptions};

    #[test]
    fn a_quadratic_curve_is_read_back_where_it_takes_the_reading() {
        // y = 1 + 2x + 0.5x² exactly on x = 0..8 (plus a tiny wobble so σ̂ > 0).
        let x: Vec<f64> = (0..9).map(f64::from).collect();
        let y: Vec<f64> = x
            .iter()
            .enumerate()
            .map(|(i, v)| 1.0 + 2.0 * v + 0.5 * v * v + if i % 2 == 0 { 1e-3 } else { -1e-3 })
            .collect();
        let d = Design::polynomial("x", &x, 2, true).expect("design");
        let f = fit(&d, &y, None, &FitOptions::default()).expect("fit");
        let c = CalibrationCurve::new(&d, &f, (0.0, 8.0)).expect("one variable");
        assert!(!c.is_line());
        // f(3) = 1 + 6 + 4.5 = 11.5 (by hand); f'(3) = 2 + 3 = 5.
        let roots = c.roots(11.5, 0.0, 8.0);
        assert_eq!(roots.len(), 1);
        assert!((roots[0] - 3.0).abs() < 1e-3, "{roots:?}");
        assert!((c.slope(3.0) - 5.0).abs() < 1e-2);
        let near = c.root_near(11.5, 2.0).expect("Newton settles");
        assert!((near - roots[0]).abs() < 1e-9, "{near} vs {}", roots[0]);
        // The other root of 1 + 2x + 0.5x² = 11.5 lies at x = −7 (by hand), in the domain.
        let other = c.root_near(11.5, -7.5).expect("the far root");
        assert!((other + 7.0).abs() < 1e-2, "{other}");
    }

    #[test]
    fn several_predictors_are_not_a_calibration_curve() {
        let a = [1.0, 2.0, 3.0, 4.0, 5.0];
        let b = [2.0, 1.0, 4.0, 3.0, 6.0];
        let y = [1.0, 2.0, 2.5, 4.0, 5.5];
        let d = Design::linear(&[("a", &a), ("b", &b)], true);
        let f = fit(&d, &y, None, &FitOptions::default()).expect("fit");
        assert_eq!(
            CalibrationCurve::new(&d, &f, (1.0, 5.0)),
            Err(CalibrationError::NotOneVariable)
        );
    }
}
