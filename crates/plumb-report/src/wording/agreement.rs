//! Sentences of a method comparison: what the Passing–Bablok interval says about slope 1 and
//! intercept 0, and the notes on linearity, association and proportional bias.

use plumb_core::agreement::{AgreementLimits, PassingBablok};

use super::CHECK_ALPHA;

/// Whether the Passing–Bablok interval holds slope 1 and intercept 0.
pub fn verdict(pb: &PassingBablok) -> &'static str {
    match &pb.interval {
        Ok(i) => {
            let one = i.slope_low <= 1.0 && 1.0 <= i.slope_high;
            let zero = i.intercept_low <= 0.0 && 0.0 <= i.intercept_high;
            match (one, zero) {
                (true, true) => "The intervals hold slope 1 and intercept 0: no proportional or constant difference is shown.",
                (false, true) => "The slope's interval misses 1: the methods differ in proportion to the level.",
                (true, false) => "The intercept's interval misses 0: the methods differ by a constant amount.",
                (false, false) => "The methods differ both in proportion to the level and by a constant amount.",
            }
        }
        Err(_) => "No interval, so no verdict on slope 1 and intercept 0.",
    }
}

/// The linearity note, when the cusum check flags.
pub const NOT_STRAIGHT: &str =
    "The points drift to one side of the line along it: the relation is not straight, and the line summarizes it poorly.";

/// The association note, when Kendall's τ does not show the methods rising together.
pub const NOT_RISING_TOGETHER: &str =
    "The methods do not clearly rise together, which the Passing–Bablok line assumes.";

/// The proportional-bias note for the differences, when their slope on the level is clear.
pub fn proportional(l: &AgreementLimits) -> Option<&'static str> {
    l.proportional
        .filter(|p| p.p_value < CHECK_ALPHA)
        .map(|_| "The difference changes with the level (proportional bias): one bias and one pair of limits summarize it poorly; try differences as a percentage of the mean.")
}
