//! The points of the lab's views, linked to the pair's entries like the other views: the two
//! methods' differences against their means, and the calibration's weighted residuals under
//! each weighting.

use plumb_data::analysis::{AgreementReport, CalibrationReport};

use super::cloud::Cloud;
use super::diagnostics::Input;

/// Standards spanning this ratio or more are drawn against log₁₀ x in the weightings' view.
pub const LOG_AXIS_FROM: f64 = 50.0;

/// Excluded points set aside from a view: `(entry, value)`.
type Beyond = Vec<(usize, f64)>;

/// The lab views' points.
#[derive(Debug, Clone, Default)]
pub struct LabViews {
    /// Included pairs as (mean, difference), excluded ones as rings at their current values.
    pub differences: Option<(Cloud, Cloud)>,
    /// Excluded pairs whose difference lies far outside the included ones' (drawn, they would
    /// squash the view): `(entry, difference)`, named under the view instead.
    pub differences_beyond: Beyond,
    /// Each weighting's weighted residuals against x (or log₁₀ x), by label.
    pub weightings: Vec<(String, Cloud)>,
    /// Whether the weightings' x axis is log₁₀ of the standards.
    pub weightings_log_x: bool,
}

/// The points of the lab views for the reports at hand.
pub fn lab_views(
    input: &Input,
    calibration: Option<&CalibrationReport>,
    agreement: Option<&AgreementReport>,
) -> LabViews {
    let mut out = LabViews::default();
    if let Some(a) = agreement {
        if let Some((points, rings, beyond)) = differences(input, a) {
            out.differences = Some((points, rings));
            out.differences_beyond = beyond;
        }
    }
    if let Some(c) = calibration {
        let (lo, hi) = c.range;
        out.weightings_log_x = lo > 0.0 && hi / lo >= LOG_AXIS_FROM;
        let place = |x: f64| if out.weightings_log_x { x.log10() } else { x };
        // The calibration's rows are the analysis rows: the included entries, in order.
        let entries: Vec<usize> = (0..input.pair.rows.len())
            .filter(|&i| !input.pair.is_excluded(i, &input.marks))
            .collect();
        if entries.len() == c.x.len() {
            out.weightings = c
                .weightings
                .iter()
                .filter_map(|w| {
                    let f = w.outcome.as_ref().ok()?;
                    let pts =
                        c.x.iter()
                            .zip(&f.weighted_residuals)
                            .map(|(&x, &r)| (place(x), r))
                            .collect();
                    Some((w.label.clone(), Cloud::new(pts, entries.clone())))
                })
                .collect();
        }
    }
    out
}

/// Included pairs as (mean, difference) by their data rows; excluded pairs of the bench at
/// their current values, as rings (those further from the included differences than their
/// own spread are set aside to be named).
fn differences(input: &Input, a: &AgreementReport) -> Option<(Cloud, Cloud, Beyond)> {
    let l = a.limits.as_ref().ok()?;
    let (mut pts, mut entries) = (Vec::new(), Vec::new());
    for (k, &row) in a.selection.rows.iter().enumerate() {
        if let Some(e) = input.pair.index_of(row) {
            pts.push(l.points[k]);
            entries.push(e);
        }
    }
    let percent = input.reading.agreement.percent;
    let rings: Vec<((f64, f64), usize)> = (0..input.pair.rows.len())
        .filter(|&i| input.pair.is_excluded(i, &input.marks))
        .filter_map(|i| {
            let (x, y) = input.pair.point(i, &input.marks);
            let m = 0.5 * x + 0.5 * y;
            let d = if percent {
                (m != 0.0).then(|| 100.0 * (y - x) / m)?
            } else {
                y - x
            };
            Some(((m, d), i))
        })
        .collect();
    let points = Cloud::new(pts, entries);
    let (lo, hi) = points
        .bounds
        .map_or((f64::NEG_INFINITY, f64::INFINITY), |b| (b.y_min, b.y_max));
    let span = (hi - lo).max(f64::MIN_POSITIVE);
    let near = |d: f64| d >= lo - span && d <= hi + span;
    let (kept, far): (Vec<_>, Vec<_>) = rings.into_iter().partition(|((_, d), _)| near(*d));
    let (rp, re): (Vec<_>, Vec<_>) = kept.into_iter().unzip();
    let beyond = far.into_iter().map(|((_, d), e)| (e, d)).collect();
    Some((points, Cloud::new(rp, re), beyond))
}
