//! The Theil–Sen line: the median of all pairwise slopes.

use super::{check, AlternativeError};
use crate::distributions;

/// Largest n accepted (n(n−1)/2 slopes are formed and sorted).
pub const THEIL_SEN_MAX_N: usize = 4_000;

/// A Theil–Sen line with Sen's confidence interval for the slope.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TheilSenFit {
    /// `b = median{(yⱼ − yᵢ)/(xⱼ − xᵢ) : xᵢ < xⱼ}`.
    pub slope: f64,
    /// `a = median(y) − b·median(x)`.
    pub intercept: f64,
    /// Lower end of the slope interval.
    pub slope_low: f64,
    /// Upper end of the slope interval.
    pub slope_high: f64,
    /// Pairs used.
    pub n: usize,
}

/// Theil–Sen slope and intercept, with the slope interval of Sen (1968, eq. 2.6): with the
/// N sorted slopes, `σ² = (n(n−1)(2n+5) − Σt(t−1)(2t+5) − Σu(u−1)(2u+5))/18` over tie groups t
/// of x and u of y, `z = z_{(1−level)/2}` (negative), the bounds are the slopes of 0-based rank
/// `round((N + zσ)/2) − 1` and `round((N − zσ)/2)` (rounding half to even, clamped to the list),
/// as scipy.stats.theilslopes computes them.
///
/// # Errors
/// Fewer than 3 pairs, constant x, or more than [`THEIL_SEN_MAX_N`] pairs.
pub fn theil_sen(x: &[f64], y: &[f64], level: f64) -> Result<TheilSenFit, AlternativeError> {
    check(x, y, 3)?;
    let n = x.len();
    if n > THEIL_SEN_MAX_N {
        return Err(AlternativeError::TooLarge {
            n,
            max: THEIL_SEN_MAX_N,
        });
    }
    let mut slopes = Vec::with_capacity(n * (n - 1) / 2);
    for i in 0..n {
        for j in 0..n {
            let dx = x[i] - x[j];
            if dx > 0.0 {
                slopes.push((y[i] - y[j]) / dx);
            }
        }
    }
    slopes.sort_by(f64::total_cmp);
    let slope = median_sorted(&slopes);
    let intercept = median(y) - slope * median(x);
    let z = -distributions::normal_upper_quantile(0.5 * (1.0 - level));
    let nn = n as f64;
    let ties = |v: &[f64]| -> f64 {
        let mut s = v.to_vec();
        s.sort_by(f64::total_cmp);
        let mut total = 0.0;
        let mut i = 0;
        while i < s.len() {
            let t = s[i..].iter().take_while(|&&a| a == s[i]).count();
            let tf = t as f64;
            if t > 1 {
                total += tf * (tf - 1.0) * (2.0 * tf + 5.0);
            }
            i += t;
        }
        total
    };
    let sigma = ((nn * (nn - 1.0) * (2.0 * nn + 5.0) - ties(x) - ties(y)) / 18.0).sqrt();
    let count = slopes.len() as f64;
    let last = slopes.len() as i64 - 1;
    let upper = (((count - z * sigma) / 2.0).round_ties_even() as i64).min(last);
    let lower = ((((count + z * sigma) / 2.0).round_ties_even() as i64) - 1).max(0);
    let at = |k: i64| slopes[k.clamp(0, last) as usize];
    Ok(TheilSenFit {
        slope,
        intercept,
        slope_low: at(lower),
        slope_high: at(upper),
        n,
    })
}

fn median(v: &[f64]) -> f64 {
    let mut s = v.to_vec();
    s.sort_by(f64::total_cmp);
    median_sorted(&s)
}

fn median_sorted(s: &[f64]) -> f64 {
    let m = s.len() / 2;
    if s.len() % 2 == 1 {
        s[m]
    } else {
        0.5 * (s[m - 1] + s[m])
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn one_wild_point_does_not_move_the_line() {
        // y = 2x + 1 exactly, except one gross error: the median slope stays 2 (by hand).
        let x: Vec<f64> = (0..11).map(f64::from).collect();
        let mut y: Vec<f64> = x.iter().map(|v| 2.0 * v + 1.0).collect();
        y[7] = 100.0;
        let f = theil_sen(&x, &y, 0.95).expect("defined");
        assert_eq!(f.slope, 2.0);
        assert_eq!(f.intercept, 1.0);
        assert!(f.slope_low <= 2.0 && f.slope_high >= 2.0);
    }
}
