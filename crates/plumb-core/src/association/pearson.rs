//! Pearson's product-moment correlation.

use super::{check_pairs, Association, Pairwise, Undefined};
use crate::distributions;
use crate::moments::CoMoments;

/// Pearson's `r = Σ(xᵢ − x̄)(yᵢ − ȳ) / √(Σ(xᵢ − x̄)² · Σ(yᵢ − ȳ)²)`.
///
/// p-value: `t = r√(n−2)/√(1−r²)` on `n − 2` degrees of freedom, evaluated as
/// `p = I_{1−r²}((n−2)/2, ½)`. Interval at `level` by Fisher's z:
/// `tanh(atanh r ± z_{(1+level)/2} / √(n−3))` (needs `n ≥ 4`).
///
/// Undefined for fewer than 3 pairs or a constant variable.
pub fn pearson(x: &[f64], y: &[f64], level: f64) -> Pairwise {
    check_pairs(x, y, 3)?;
    pearson_from_moments(&CoMoments::of(&[x, y]), 0, 1, level)
}

/// Pearson's r of variables `i` and `j` from their co-moments (see [`CoMoments`]), with the
/// same p-value and interval as [`pearson`]: `r = Cᵢⱼ/√(CᵢᵢCⱼⱼ)` over the moments' `n` rows.
///
/// # Errors
/// [`Undefined::TooFewPairs`] below 3 rows, [`Undefined::Constant`] when either variable does
/// not vary.
pub fn pearson_from_moments(m: &CoMoments, i: usize, j: usize, level: f64) -> Pairwise {
    let n = m.n() as usize;
    if n < 3 {
        return Err(Undefined::TooFewPairs { n, needed: 3 });
    }
    for (which, v) in [i, j].into_iter().enumerate() {
        if m.comoment(v, v) <= 0.0 {
            return Err(Undefined::Constant { which });
        }
    }
    let r = m.correlation(i, j).unwrap_or(0.0);
    let df = (n - 2) as f64;
    let p_value = p_from_r(r, df);
    let ci = (n >= 4).then(|| fisher_interval(r, n, level));
    Ok(Association { r, p_value, n, ci })
}

/// Two-sided p of a correlation coefficient on `df` degrees of freedom:
/// `I_{(1−r)(1+r)}(df/2, ½)`, the t test written without forming t.
pub(crate) fn p_from_r(r: f64, df: f64) -> f64 {
    if r.abs() >= 1.0 {
        return 0.0;
    }
    let x = (1.0 - r) * (1.0 + r);
    let t = r * (df / x).sqrt();
    distributions::t_two_sided_p(t, df)
}

fn fisher_interval(r: f64, n: usize, level: f64) -> (f64, f64) {
    let z = r.atanh();
    let half = distributions::normal_upper_quantile(0.5 * (1.0 - level)) / ((n - 3) as f64).sqrt();
    ((z - half).tanh(), (z + half).tanh())
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn matches_a_case_worked_by_hand() {
        // x = 1..5, y = (2, 4, 5, 4, 5): Sxy = 6, Sxx = 10, Syy = 6, r = 6/√60 (by hand).
        let a =
            pearson(&[1.0, 2.0, 3.0, 4.0, 5.0], &[2.0, 4.0, 5.0, 4.0, 5.0], 0.95).expect("defined");
        assert_relative_eq!(a.r, 6.0 / 60f64.sqrt(), max_relative = 1e-15);
        let (lo, hi) = a.ci.expect("n ≥ 4");
        assert!(lo < a.r && a.r < hi);
    }

    #[test]
    fn perfect_and_undefined_cases() {
        let a = pearson(&[1.0, 2.0, 3.0], &[2.0, 4.0, 6.0], 0.95).expect("defined");
        assert_relative_eq!(a.r, 1.0, max_relative = 1e-15);
        assert!(a.p_value < 1e-7, "{}", a.p_value);
        assert_eq!(p_from_r(1.0, 5.0), 0.0);
        assert!(pearson(&[1.0, 2.0], &[1.0, 2.0], 0.95).is_err());
        assert!(pearson(&[1.0, 1.0, 1.0], &[1.0, 2.0, 3.0], 0.95).is_err());
    }
}
