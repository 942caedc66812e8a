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
    /// is expected at `r·z` SDs on the second: the rest of its distance, `(1 − |r|)·|z|`, is
    /// regression toward the mean (with a negative r the expected side flips, the distance still
    /// shrinks by |r|).
    pub fn expected_y(&self, x: f64) -> f64 {
        self.mean_y + self.slope * self.sd_y / self.sd_x * (x - self.mean_x)
    }

    /// The share of a unit's distance from the mean (in SDs) expected to vanish on
    /// remeasurement: `1 − |r|` (for r = −0.5 a unit 2 SDs out is expected 1 SD out on the
    /// other side: half its distance gone, not 1.5 times it).
    pub fn shrinkage(&self) -> f64 {
        1.0 - self.slope.abs()
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

    #[test]
    fn a_negative_r_shrinks_the_distance_by_its_size() {
        // y falls as x rises: r = Sxy/√(SxxSyy) = −2/√(2·3) = −0.816… (by hand, and recomputed
        // below from the definitions). The old 1 − r would claim a shrinkage of 1.8.
        let x = [-1.0, 0.0, 1.0, 0.0];
        let y = [1.0, 1.0, -1.0, 1.0];
        let n = 4.0;
        let (mx, my) = (x.iter().sum::<f64>() / n, y.iter().sum::<f64>() / n);
        let sxy: f64 = x.iter().zip(&y).map(|(a, b)| (a - mx) * (b - my)).sum();
        let sxx: f64 = x.iter().map(|a| (a - mx).powi(2)).sum();
        let syy: f64 = y.iter().map(|b| (b - my).powi(2)).sum();
        let r = sxy / (sxx * syy).sqrt();
        assert!(r < 0.0);
        let v = StandardizedView::of(&x, &y).expect("defined");
        assert_relative_eq!(v.shrinkage(), 1.0 - r.abs(), max_relative = 1e-14);
        assert!(
            v.shrinkage() < 1.0,
            "a distance cannot shrink by more than all of it"
        );
    }
}
