//! What a calibration line is for: the lack-of-fit test against replicate standards (more to
//! follow: reading unknowns back, detection limits, weightings).

mod lack_of_fit;

pub use lack_of_fit::{lack_of_fit, LackOfFit, LackOfFitError};
