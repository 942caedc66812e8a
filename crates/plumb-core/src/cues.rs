//! Warnings about a pair that a single correlation coefficient would hide: a strong shape
//! that is not a line, and a coefficient carried by one point.

use crate::alternative::loess;
use crate::association::{distance_correlation, pearson};
use crate::regression::{fit, influence, CaseInfluence, Design, FitOptions, LinearFit};

/// A curve counts as clearly better than the line when its R² exceeds the line's by this much
/// and reaches [`CURVE_R2_STRONG`]. Plumbline's own rule of thumb, no source.
pub const CURVE_R2_GAIN: f64 = 0.15;
/// See [`CURVE_R2_GAIN`].
pub const CURVE_R2_STRONG: f64 = 0.5;
/// Dependence that r misses: the distance-correlation permutation p, or the p of the
/// quantile-grid independence test, is at most this while Pearson's p exceeds
/// [`PEARSON_QUIET_P`]. Plumbline's own rule of thumb, no source.
pub const DCOR_P: f64 = 0.01;
/// See [`DCOR_P`].
pub const PEARSON_QUIET_P: f64 = 0.05;
/// Largest n for which the cue runs the distance-correlation permutation test (O(n²) each).
pub const DCOR_CUE_MAX_N: usize = 1_000;
/// Seed of that permutation test.
pub const DCOR_CUE_SEED: u64 = 20_261_202;
/// |r| below this is weak; a sign flip between weak coefficients is not flagged.
pub const WEAK_R: f64 = 0.3;
/// Leaving out the most influential point changes r by at least this much: flagged.
/// Plumbline's own rule of thumb, no source.
pub const SINGLE_POINT_DELTA_R: f64 = 0.2;

/// What the cues found for one pair.
#[derive(Debug, Clone, PartialEq)]
pub struct PairCues {
    /// Pearson r.
    pub r: f64,
    /// R² of the straight line (= r²).
    pub linear_r_squared: f64,
    /// Best R² of a cubic polynomial and (up to [`crate::alternative::LOESS_MAX_N`] pairs) a
    /// LOESS smooth (span 0.75, degree 2).
    pub curve_r_squared: Option<f64>,
    /// Distance correlation and its permutation p (None above [`DCOR_CUE_MAX_N`]).
    pub distance_correlation: Option<(f64, f64)>,
    /// Chi-square test of independence on a k×k grid of quantile bins: `(χ², df, p)`.
    pub grid_independence: Option<(f64, usize, f64)>,
    /// The pair has a strong pattern that is not a line.
    pub nonlinear: bool,
    /// 0-based index of the point with the largest Cook's distance in the straight-line fit.
    pub most_influential: usize,
    /// Pearson r without that point.
    pub r_without_most_influential: f64,
    /// `|r − r_without| ≥` [`SINGLE_POINT_DELTA_R`], or the sign flips.
    pub driven_by_one_point: bool,
}

/// Computes the cues; `None` when Pearson's r itself is undefined or n < 5.
pub fn pair_cues(x: &[f64], y: &[f64]) -> Option<PairCues> {
    pair_cues_given(x, y, KnownFits::default())
}

/// Fits of the same `x` and `y` the caller already has, so that [`pair_cues_given`] need not
/// repeat them: each must be by least squares with an intercept, unweighted, with
/// [`FitOptions::default`], and the cases must be the line's [`influence`] at those options
/// (the answer is then the same as [`pair_cues`]'s, to the bit).
#[derive(Debug, Clone, Copy, Default)]
pub struct KnownFits<'a> {
    /// The straight line.
    pub line: Option<&'a LinearFit>,
    /// The cubic polynomial (degree 3).
    pub cubic: Option<&'a LinearFit>,
    /// The line's case diagnostics ([`influence`] of `line`), one per row.
    pub line_cases: Option<&'a [CaseInfluence]>,
}

/// [`pair_cues`], reusing the fits in `known`.
pub fn pair_cues_given(x: &[f64], y: &[f64], known: KnownFits<'_>) -> Option<PairCues> {
    let pearson_fit = pearson(x, y, 0.95).ok()?;
    let r = pearson_fit.r;
    let n = x.len();
    if n < 5 {
        return None;
    }
    let options = FitOptions::default();
    let line_design = Design::linear(&[("x", x)], true);
    let fresh_line;
    let line = match known.line {
        Some(line) => line,
        None => {
            fresh_line = fit(&line_design, y, None, &options).ok()?;
            &fresh_line
        }
    };
    let cubic = match known.cubic {
        Some(c) => Some(c.r_squared),
        None => Design::polynomial("x", x, 3, true)
            .ok()
            .and_then(|d| fit(&d, y, None, &options).ok())
            .map(|f| f.r_squared),
    };
    let smooth = loess(x, y, 0.75, 2).ok().map(|l| l.r_squared);
    let curve_r_squared = match (cubic, smooth) {
        (Some(a), Some(b)) => Some(a.max(b)),
        (a, b) => a.or(b),
    };
    let distance = (n <= DCOR_CUE_MAX_N)
        .then(|| distance_correlation(x, y, DCOR_CUE_SEED).ok())
        .flatten()
        .map(|a| (a.r, a.p_value));
    let curve_gain = curve_r_squared
        .is_some_and(|c| c >= CURVE_R2_STRONG && c - line.r_squared >= CURVE_R2_GAIN);
    let grid = grid_independence(x, y);
    let dependent =
        distance.is_some_and(|(_, p)| p <= DCOR_P) || grid.is_some_and(|(_, _, p)| p <= DCOR_P);
    let hidden = dependent && pearson_fit.p_value > PEARSON_QUIET_P;
    let fresh_cases;
    let cases = match known.line_cases {
        Some(c) if c.len() == n => c,
        _ => {
            fresh_cases = influence(&line_design, None, line, &options).ok()?;
            &fresh_cases
        }
    };
    let most_influential = cases
        .iter()
        .enumerate()
        .max_by(|a, b| a.1.cooks_distance.total_cmp(&b.1.cooks_distance))
        .map(|(i, _)| i)?;
    let keep = |v: &[f64]| -> Vec<f64> {
        v.iter()
            .enumerate()
            .filter(|(k, _)| *k != most_influential)
            .map(|(_, a)| *a)
            .collect()
    };
    let r_without = pearson(&keep(x), &keep(y), 0.95).ok()?.r;
    Some(PairCues {
        r,
        linear_r_squared: line.r_squared,
        curve_r_squared,
        distance_correlation: distance,
        grid_independence: grid,
        nonlinear: curve_gain || hidden,
        most_influential,
        r_without_most_influential: r_without,
        driven_by_one_point: (r - r_without).abs() >= SINGLE_POINT_DELTA_R
            || (r * r_without < 0.0 && r.abs().max(r_without.abs()) >= WEAK_R),
    })
}

/// Pearson's chi-square test of independence on a k×k grid of quantile bins,
/// `k = clamp(⌊√(n/5)⌋, 2, 6)` so that about five points are expected per cell:
/// bin of a value = `⌊k·(rank − 1)/n⌋` (average ranks), `χ² = Σ(O − E)²/E` with `E` from the
/// margins, `df = (r − 1)(c − 1)` over the r rows and c columns of the grid that hold any
/// point (heavy ties can leave a bin empty; an empty row or column carries no information, as
/// in scipy's `chi2_contingency` on the table without it), `p = Q(df/2, χ²/2)` (regularized
/// upper incomplete gamma). `None` for fewer than 20 pairs, or when fewer than two rows or
/// columns hold points (one variable takes a single value: nothing to test).
pub fn grid_independence(x: &[f64], y: &[f64]) -> Option<(f64, usize, f64)> {
    let n = x.len();
    if n < 20 {
        return None;
    }
    let k = (((n as f64) / 5.0).sqrt().floor() as usize).clamp(2, 6);
    let bin = |v: &[f64]| -> Vec<usize> {
        crate::association::average_ranks(v)
            .iter()
            .map(|r| ((k as f64 * (r - 1.0) / n as f64).floor() as usize).min(k - 1))
            .collect()
    };
    let (bx, by) = (bin(x), bin(y));
    let mut observed = vec![vec![0.0f64; k]; k];
    for (a, b) in bx.iter().zip(&by) {
        observed[*a][*b] += 1.0;
    }
    let rows: Vec<f64> = observed.iter().map(|r| r.iter().sum()).collect();
    let cols: Vec<f64> = (0..k)
        .map(|j| observed.iter().map(|r| r[j]).sum())
        .collect();
    let mut chi2 = 0.0;
    for a in 0..k {
        for b in 0..k {
            let e = rows[a] * cols[b] / n as f64;
            if e > 0.0 {
                chi2 += (observed[a][b] - e).powi(2) / e;
            }
        }
    }
    let filled = |m: &[f64]| m.iter().filter(|&&v| v > 0.0).count();
    let (r, c) = (filled(&rows), filled(&cols));
    if r < 2 || c < 2 {
        return None;
    }
    let df = (r - 1) * (c - 1);
    let p = if chi2 > 0.0 {
        statrs::function::gamma::gamma_ur(0.5 * df as f64, 0.5 * chi2)
    } else {
        1.0
    };
    Some((chi2, df, p))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn cues_from_fits_the_caller_has_are_the_cues_computed_afresh() {
        let x: Vec<f64> = (0..200).map(|k| f64::from(k) * 0.05).collect();
        let y: Vec<f64> = x.iter().map(|v| (v * 1.7).sin() + 0.1 * v * v).collect();
        let options = FitOptions::default();
        let line = fit(&Design::linear(&[("t", &x)], true), &y, None, &options).expect("line");
        let cubic_design = Design::polynomial("t", &x, 3, true).expect("cubic design");
        let cubic = fit(&cubic_design, &y, None, &options).expect("cubic");
        let line_design = Design::linear(&[("t", &x)], true);
        let cases = influence(&line_design, None, &line, &options).expect("cases");
        let known = KnownFits {
            line: Some(&line),
            cubic: Some(&cubic),
            line_cases: Some(&cases),
        };
        assert_eq!(pair_cues_given(&x, &y, known), pair_cues(&x, &y));
        let wrong = fit(&Design::linear(&[("t", &x)], false), &y, None, &options).expect("fit");
        let misled = KnownFits {
            line: Some(&wrong),
            ..KnownFits::default()
        };
        // The test can fail: a fit of another kind changes the answer.
        assert_ne!(pair_cues_given(&x, &y, misled), pair_cues(&x, &y));
        // So can cases of another fit: the most influential row is read from them.
        let mut shuffled = cases.clone();
        shuffled.rotate_left(1);
        let misled = KnownFits {
            line_cases: Some(&shuffled),
            ..KnownFits::default()
        };
        assert_ne!(pair_cues_given(&x, &y, misled), pair_cues(&x, &y));
    }

    #[test]
    fn a_ring_is_flagged_as_non_linear() {
        let t: Vec<f64> = (0..80).map(|k| f64::from(k) * 0.0785).collect();
        let x: Vec<f64> = t.iter().map(|a| a.cos()).collect();
        let y: Vec<f64> = t.iter().map(|a| a.sin()).collect();
        let c = pair_cues(&x, &y).expect("defined");
        assert!(c.nonlinear, "{c:?}");
        assert!(!c.driven_by_one_point, "{c:?}");
    }

    #[test]
    fn a_lone_far_point_is_flagged() {
        // Unrelated noise plus one far point that creates a strong r on its own.
        let mut x = vec![
            0.1, 0.5, -0.3, 0.8, -0.6, 0.2, -0.1, 0.4, -0.7, 0.3, 0.0, -0.4,
        ];
        let mut y = vec![
            0.3, -0.2, 0.6, 0.1, -0.5, 0.4, -0.6, -0.1, 0.2, -0.3, 0.5, 0.0,
        ];
        x.push(10.0);
        y.push(10.0);
        let c = pair_cues(&x, &y).expect("defined");
        assert_eq!(c.most_influential, 12);
        assert!(c.driven_by_one_point, "{c:?}");
    }

    #[test]
    fn an_empty_grid_margin_takes_its_degrees_of_freedom_with_it() {
        // x takes three values (tied ranks put each in one bin of k = 6), y is spread: three
        // rows of the grid hold points, so df = (3 − 1)(6 − 1) = 10 (by hand), not 25.
        let x: Vec<f64> = (0..180).map(|i| f64::from(i % 3)).collect();
        let y: Vec<f64> = (0..180).map(|i| f64::from((i * 37) % 180)).collect();
        let (_, df, p) = grid_independence(&x, &y).expect("defined");
        assert_eq!(df, 10);
        assert!(p > 0.0 && p <= 1.0);
        let flat = vec![1.0; 40];
        let spread: Vec<f64> = (0..40).map(f64::from).collect();
        assert_eq!(grid_independence(&flat, &spread), None, "nothing to test");
    }

    #[test]
    fn a_clean_line_raises_nothing() {
        let x: Vec<f64> = (0..30).map(f64::from).collect();
        let y: Vec<f64> = x
            .iter()
            .enumerate()
            .map(|(k, v)| 2.0 * v + if k % 3 == 0 { 0.7 } else { -0.35 })
            .collect();
        let c = pair_cues(&x, &y).expect("defined");
        assert!(!c.nonlinear && !c.driven_by_one_point, "{c:?}");
    }
}
