//! Detection and quantitation limits from a calibration line.

use super::CalibrationError;
use crate::regression::{LinearFit, TermKind};

/// Where σ, the standard deviation of the response near zero, is taken from.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum SigmaSource {
    /// The residual standard deviation of the line (of one reading at the lowest standard
    /// when the fit is weighted).
    #[default]
    ResidualSd,
    /// The standard error of the line's intercept.
    InterceptSe,
}

impl SigmaSource {
    /// A few words for tables and JSON.
    pub fn label(self) -> &'static str {
        match self {
            Self::ResidualSd => "residual standard deviation",
            Self::InterceptSe => "standard error of the intercept",
        }
    }

    /// Parses `residual` or `intercept`.
    pub fn parse(s: &str) -> Option<Self> {
        match s {
            "residual" => Some(Self::ResidualSd),
            "intercept" => Some(Self::InterceptSe),
            _ => None,
        }
    }
}

/// Detection and quantitation limits in the units of x.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct DetectionLimits {
    /// Where σ came from.
    pub source: SigmaSource,
    /// σ, in the units of y.
    pub sigma: f64,
    /// The line's slope `S` (sensitivity).
    pub slope: f64,
    /// `LOD = 3.3σ/|S|`.
    pub detection: f64,
    /// `LOQ = 10σ/|S|`.
    pub quantitation: f64,
    /// Whether σ is the residual SD of one reading at the lowest standard of a weighted fit
    /// (`σ̂/√w_low`) rather than the fit's σ̂ itself.
    pub at_lowest_standard: bool,
}

/// The limits of detection and quantitation of a straight calibration line `y = a + Sx`:
/// `LOD = 3.3σ/|S|` and `LOQ = 10σ/|S|`, with σ the residual standard deviation of the line or
/// the standard error of its intercept (ICH Q2(R1), *Validation of analytical procedures*,
/// §§ 6.3 and 7.3, "based on the standard deviation of the response and the slope"). With a
/// weighted fit the residual standard deviation is that of one reading at the lowest standard,
/// `σ̂/√w_low` (`low_weight`), since that is where the limits lie. These are estimates: the
/// guideline asks that they be confirmed with samples near the limits.
///
/// # Errors
/// A fit that is not a straight line with an intercept, or a slope of zero.
pub fn detection_limits(
    fit: &LinearFit,
    kinds: &[TermKind],
    source: SigmaSource,
    low_weight: Option<f64>,
) -> Result<DetectionLimits, CalibrationError> {
    if kinds != [TermKind::Intercept, TermKind::Linear] {
        return Err(CalibrationError::NotALine);
    }
    let slope = fit.coefficients[1].estimate;
    if slope == 0.0 || !slope.is_finite() {
        return Err(CalibrationError::FlatLine);
    }
    let sigma = match source {
        SigmaSource::ResidualSd => fit.residual_std_error / low_weight.unwrap_or(1.0).sqrt(),
        SigmaSource::InterceptSe => fit.coefficients[0].std_error,
    };
    Ok(DetectionLimits {
        at_lowest_standard: source == SigmaSource::ResidualSd && low_weight.is_some(),
        source,
        sigma,
        slope,
        detection: 3.3 * sigma / slope.abs(),
        quantitation: 10.0 * sigma / slope.abs(),
    })
}
