//! Guarding against correlations that come only from two series drifting together over time.

use super::pearson;
use crate::describe;

/// Correlations of a pair once a shared order (time, run sequence) is taken out.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TrendGuard {
    /// Pearson r of first differences `Δxᵢ = x₍ᵢ₊₁₎ − x₍ᵢ₎`, `Δyᵢ` likewise, rows sorted by the order.
    pub r_differenced: Option<f64>,
    /// Pearson r of the residuals of x and of y after each is regressed on the order by a line:
    /// `eᵢ = vᵢ − v̄ − b(tᵢ − t̄)`, `b = Σ(tᵢ − t̄)(vᵢ − v̄)/Σ(tᵢ − t̄)²`.
    pub r_detrended: Option<f64>,
}

/// Both guards for the triples `(x, y, order)`; a guard is `None` where it is undefined
/// (fewer than 3 usable values, or a series that is constant after the transformation; a
/// series whose residual sum of squares is below 1e-12 of its total counts as constant).
pub fn trend_guard(x: &[f64], y: &[f64], order: &[f64]) -> TrendGuard {
    assert!(
        x.len() == y.len() && y.len() == order.len(),
        "triples differ in length"
    );
    let mut idx: Vec<usize> = (0..x.len()).collect();
    idx.sort_by(|&a, &b| order[a].total_cmp(&order[b]));
    let diff = |v: &[f64]| -> Option<Vec<f64>> {
        let d: Vec<f64> = idx.windows(2).map(|w| v[w[1]] - v[w[0]]).collect();
        // Steps that are all equal but for rounding carry no signal.
        (describe::sum_sq_dev(&d, None) > 1e-12 * describe::sum_sq(&d, None)).then_some(d)
    };
    let r_differenced = match (diff(x), diff(y)) {
        (Some(dx), Some(dy)) => pearson(&dx, &dy, 0.95).ok().map(|a| a.r),
        _ => None,
    };
    let r_detrended = match (detrend(x, order), detrend(y, order)) {
        (Some(ex), Some(ey)) => pearson(&ex, &ey, 0.95).ok().map(|a| a.r),
        _ => None,
    };
    TrendGuard {
        r_differenced,
        r_detrended,
    }
}

/// A pair counts as strong for the shared-trend cue from this |r| up. Common practice, no
/// source.
pub const TREND_STRONG: f64 = 0.7;
/// A guarded coefficient below this |r| means the association faded once the trend was
/// taken out. Common practice, no source.
pub const TREND_FADES: f64 = 0.3;

/// The shared-trend rule: a strong pair (`|r| ≥` [`TREND_STRONG`]) whose first differences or
/// detrended residuals correlate weakly (`|r_Δ| <` [`TREND_FADES`] or `|r_detrended| <`
/// [`TREND_FADES`]) moves together mostly because both columns drift along the row order.
/// Undefined inputs never fire.
pub fn drifts_together(r: Option<f64>, differenced: Option<f64>, detrended: Option<f64>) -> bool {
    let strong = r.is_some_and(|r| r.abs() >= TREND_STRONG);
    let fades = |g: Option<f64>| g.is_some_and(|g| g.abs() < TREND_FADES);
    strong && (fades(differenced) || fades(detrended))
}

fn detrend(v: &[f64], t: &[f64]) -> Option<Vec<f64>> {
    let (mv, mt) = (describe::mean(v, None), describe::mean(t, None));
    let stt = describe::sum_sq_dev(t, None);
    if stt == 0.0 {
        return None;
    }
    let dt: Vec<f64> = t.iter().map(|x| x - mt).collect();
    let dv: Vec<f64> = v.iter().map(|x| x - mv).collect();
    let b = crate::accurate::dot(&dt, &dv) / stt;
    let residuals: Vec<f64> = dv.iter().zip(&dt).map(|(a, c)| a - b * c).collect();
    // A series that is (nearly) a straight line in the order has nothing left but rounding.
    let left = crate::accurate::dot(&residuals, &residuals);
    (left > 1e-12 * crate::accurate::dot(&dv, &dv)).then_some(residuals)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_rule_needs_a_strong_pair_that_fades() {
        assert!(drifts_together(Some(0.9), Some(0.1), None));
        assert!(drifts_together(Some(-0.8), None, Some(0.2)));
        assert!(
            !drifts_together(Some(0.5), Some(0.0), Some(0.0)),
            "not strong"
        );
        assert!(
            !drifts_together(Some(0.9), Some(0.6), Some(0.7)),
            "does not fade"
        );
        assert!(!drifts_together(None, Some(0.0), Some(0.0)), "undefined r");
        assert!(!drifts_together(Some(0.9), None, None), "no guards");
    }

    #[test]
    fn two_drifting_series_lose_their_correlation_once_the_drift_is_removed() {
        // Both series climb with time plus unrelated wiggles: raw r is high, guarded r is not.
        let t: Vec<f64> = (0..40).map(f64::from).collect();
        let x: Vec<f64> = t.iter().map(|&s| s + (s * 1.7).sin()).collect();
        let y: Vec<f64> = t.iter().map(|&s| 2.0 * s + (s * 0.9 + 1.0).cos()).collect();
        let raw = pearson(&x, &y, 0.95).expect("defined").r;
        let g = trend_guard(&x, &y, &t);
        assert!(raw > 0.95, "raw {raw}");
        assert!(g.r_detrended.expect("defined").abs() < 0.5, "{g:?}");
        assert!(g.r_differenced.expect("defined").abs() < 0.5, "{g:?}");
    }
}
