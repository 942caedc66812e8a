//! The pair in z-units, and the regression toward the mean it implies.

use crate::association::pearson;
use crate::describe;

/// A simple regression seen in standard units (both variables standardized).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct StandardizedView {
    /// Slope in z-units; for a simple regression it equals Pearson's r.
    pub slope: f64,
    /// Its square, which equals the R² of the straight-line fit.
    pub slope_squared: f64,
    /// x̄.
    pub mean_x: f64,
    /// ȳ.
    pub mean_y: f64,
    /// Sample standard deviation of x.
    pub sd_x: f64,
    /// Sample standard deviation of y.
    pub sd_y: f64,
}

impl StandardizedView {
    /// The z-units view of `(x, y)`; `None` where r is undefined.
    pub fn of(x: &[f64], y: &[f64]) -> Option<Self> {
        let r = pearson(x, y, 0.95).ok()?.r;
        let n1 = (x.len() - 1) as f64;
        Some(Self {
            slope: r,
            slope_squared: r * r,
            mean_x: describe::mean(x, None),
            mean_y: describe::mean(y, None),
            sd_x: (describe::sum_sq_dev(x, None) / n1).sqrt(),
            sd_y: (describe::sum_sq_dev(y, None) / n1).sqrt(),
        })
    }

    /// Expected y for a given x: `ŷ − ȳ = r·(s_y/s_x)·(x − x̄)`. For two measurements of the same
    /// quantity (before/after, test–retest) a unit that sits `z` SDs from the mean on the first
    /// is expected at `r·z` SDs on the second: the rest, `(1 − r)·z`, is regression toward the mean.
    pub fn expected_y(&self, x: f64) -> f64 {
        self.mean_y + self.slope * self.sd_y / self.sd_x * (x - self.mean_x)
    }

    /// The share of a unit's distance from the mean (in SDs) expected to vanish on remeasurement: `1 − r`.
    pub fn shrinkage(&self) -> f64 {
        1.0 - self.slope
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::regression::{fit, Design, FitOptions};
    use approx::assert_relative_eq;

    #[test]
    fn z_slope_is_r_and_its_square_is_the_line_r_squared() {
        let x = [3.1, 4.0, 5.2, 6.1, 6.9, 8.3, 9.0];
        let y = [10.2, 11.9, 11.1, 14.8, 13.7, 16.9, 16.1];
        let v = StandardizedView::of(&x, &y).expect("defined");
        let line = fit(
            &Design::linear(&[("x", &x)], true),
            &y,
            None,
            &FitOptions::default(),
        )
        .expect("fits");
        assert_relative_eq!(v.slope_squared, line.r_squared, max_relative = 1e-13);
        assert_relative_eq!(
            v.expected_y(7.0),
            line.coefficients[0].estimate + 7.0 * line.coefficients[1].estimate,
            max_relative = 1e-13
        );
        assert!(v.shrinkage() > 0.0 && v.shrinkage() < 1.0);
    }
}
