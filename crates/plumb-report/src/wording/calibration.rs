//! Sentences of a calibration: what an inverse-prediction interval is, and the caution that
//! goes with detection limits.

use plumb_core::calibration::{DetectionLimits, Interval, ReadBack};

use crate::text::num;

/// Detection and quantitation limits from a line are estimates.
pub const LIMITS_CAUTION: &str = "These limits are estimates from the calibration line (ICH Q2(R1): 3.3σ/S and 10σ/S); confirm them with samples near the limits under your laboratory's validation protocol.";

/// Readings outside the standards.
pub const OUTSIDE_RANGE: &str =
    "outside the standards: an extrapolation; dilute or concentrate the sample and read it again";

/// The set of concentrations whose prediction band holds the reading, in words.
pub fn interval(i: &Interval) -> String {
    match *i {
        Interval::Bounded { low, high } => format!("{} to {}", num(low), num(high)),
        Interval::Open { low, high } => match (low, high) {
            (Some(l), None) => format!("from {} up, with no upper end near the standards", num(l)),
            (None, Some(h)) => format!("up to {}, with no lower end near the standards", num(h)),
            _ => "no end near the standards on either side".into(),
        },
        Interval::Unbounded { outside_of } => {
            let tail = outside_of.map_or_else(
                || "any concentration fits".into(),
                |(a, b)| format!("everything outside {} to {}", num(a), num(b)),
            );
            format!("unbounded: the slope is not distinguishable from zero at this level ({tail})")
        }
    }
}

/// `detection 0.71, quantitation 2.15 (σ = residual standard deviation 0.0046, S = 0.0215)`;
/// with a weighted fit the residual SD is said to be that of a reading at the lowest standard.
pub fn limits(l: &DetectionLimits) -> String {
    let source = if l.at_lowest_standard {
        "residual standard deviation of a reading at the lowest standard (weighted fit)"
    } else {
        l.source.label()
    };
    format!(
        "detection {}, quantitation {} (σ = {source} {}, S = {})",
        num(l.detection),
        num(l.quantitation),
        num(l.sigma),
        num(l.slope)
    )
}

/// Where an unknown's x̂ falls against the limits: below detection, below quantitation, or
/// nowhere worth saying (`None`).
pub fn against_limits(x: f64, l: &DetectionLimits) -> Option<&'static str> {
    if x < l.detection {
        Some("below the detection limit: report as not detected")
    } else if x < l.quantitation {
        Some("below the quantitation limit: detected, not quantified")
    } else {
        None
    }
}

/// What to say about one unknown read back: an extrapolation, and where x̂ falls against the
/// limits (when they are defined).
pub fn unknown_notes(rb: &ReadBack, limits: Option<&DetectionLimits>) -> Vec<&'static str> {
    let mut notes = Vec::new();
    if rb.outside_range {
        notes.push(OUTSIDE_RANGE);
    }
    if let Some(note) = limits.and_then(|l| against_limits(rb.x, l)) {
        notes.push(note);
    }
    notes
}

/// A note when the limits lie below the lowest standard (they are then extrapolated).
pub fn limits_below_standards(l: &DetectionLimits, lowest: f64) -> Option<String> {
    (l.quantitation < lowest).then(|| {
        format!(
            "Both limits lie below the lowest standard ({}): they are extrapolated from the line; a standard near them would show whether they hold.",
            num(lowest)
        )
    })
}
