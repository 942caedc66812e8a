//! Sentences of a calibration: what an inverse-prediction interval is, and the caution that
//! goes with detection limits.

use plumb_core::calibration::{DetectionLimits, Interval};

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

/// `LOD 0.71, LOQ 2.15 (σ = residual standard deviation 0.0046, S = 0.0215)`.
pub fn limits(l: &DetectionLimits) -> String {
    format!(
        "detection {}, quantitation {} (σ = {} {}, S = {})",
        num(l.detection),
        num(l.quantitation),
        l.source.label(),
        num(l.sigma),
        num(l.slope)
    )
}
