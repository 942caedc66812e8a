//! A calibration read from a fitted curve: unknowns read back, detection and quantitation
//! limits, lack of fit against the replicate standards, and the weightings side by side.

use plumb_core::calibration::{
    compare_weightings, detection_limits, lack_of_fit, read_back, rule_weights, CalibrationCurve,
    CalibrationError, Candidate, DetectionLimits, LackOfFit, ReadBack, SigmaSource, WeightProfile,
    WeightRule, WeightingRow,
};
use plumb_core::regression::Transform;

use super::{Analysis, AnalysisError, FitRequest, ResponseScale};

/// An unknown sample: its name and its replicate readings.
#[derive(Debug, Clone, PartialEq)]
pub struct Unknown {
    /// Sample name.
    pub name: String,
    /// Replicate readings (response units).
    pub readings: Vec<f64>,
}

/// What to read from the calibration beside the fit.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct CalibrationRequest {
    /// The unknowns to read back.
    pub unknowns: Vec<Unknown>,
    /// Where σ of the detection limits comes from.
    pub sigma: SigmaSource,
}

/// How a calibration reads.
#[derive(Debug, Clone, PartialEq)]
pub struct CalibrationReport {
    /// The weighting in use: `none`, a rule (`1/x²`) or `column w`.
    pub weighting: String,
    /// Smallest and largest standard.
    pub range: (f64, f64),
    /// The standards' x, in the order of the rows used (the weightings' residuals follow it).
    pub x: Vec<f64>,
    /// Each unknown read back (or why it cannot be).
    pub unknowns: Vec<(Unknown, Result<ReadBack, String>)>,
    /// LOD and LOQ from the chosen σ (or why they are not defined).
    pub limits: Result<DetectionLimits, String>,
    /// The other σ's limits, for comparison.
    pub other_limits: Result<DetectionLimits, String>,
    /// Lack of fit against the replicated standards (or why it cannot be tested).
    pub lack_of_fit: Result<LackOfFit, String>,
    /// The same calibration under every weighting, side by side.
    pub weightings: Vec<WeightingRow>,
}

/// Reads the calibration of `analysis` (fitted for `request`): the request must be a line or
/// polynomial in one predictor, both as measured, without a grouping.
///
/// # Errors
/// A model that is not such a curve (the message says what to change).
pub fn calibrate(
    request: &FitRequest,
    analysis: &Analysis,
    wanted: &CalibrationRequest,
) -> Result<CalibrationReport, AnalysisError> {
    calibration_ready(request)?;
    let rows = &analysis.rows;
    let (y, x) = (&rows.selection.columns[0], &rows.selection.columns[1]);
    let range = x
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &v| {
            (a.min(v), b.max(v))
        });
    let curve = CalibrationCurve::new(&rows.design, &analysis.fit, range)
        .map_err(|e| AnalysisError::Request(e.to_string()))?;
    let weights = rows.weights();
    let unknowns = wanted
        .unknowns
        .iter()
        .map(|u| {
            let mean = u.readings.iter().sum::<f64>() / u.readings.len().max(1) as f64;
            let (weight, varies) = reading_weight(request, x, weights, mean);
            let r = read_back(&curve, &u.readings, &*weight, varies).map_err(|e| e.to_string());
            (u.clone(), r)
        })
        .collect();
    let kinds: Vec<_> = rows.design.terms().iter().map(|t| t.kind).collect();
    let low_weight = weights.map(|w| {
        let at_low: Vec<f64> = x
            .iter()
            .zip(w)
            .filter(|(v, _)| **v == range.0)
            .map(|(_, w)| *w)
            .collect();
        at_low.iter().sum::<f64>() / at_low.len() as f64
    });
    let limits_for =
        |s| detection_limits(&analysis.fit, &kinds, s, low_weight).map_err(|e| e.to_string());
    let other = match wanted.sigma {
        SigmaSource::ResidualSd => SigmaSource::InterceptSe,
        SigmaSource::InterceptSe => SigmaSource::ResidualSd,
    };
    let keys: Vec<Vec<f64>> = x.iter().map(|&v| vec![v]).collect();
    let lof = lack_of_fit(
        &keys,
        rows.y(),
        weights,
        analysis.fit.anova.ss_residual,
        rows.design.n_terms(),
    )
    .map_err(|e| e.to_string());
    Ok(CalibrationReport {
        weighting: weighting_label(request),
        range,
        unknowns,
        limits: limits_for(wanted.sigma),
        other_limits: limits_for(other),
        lack_of_fit: lof,
        weightings: side_by_side(request, x, y, weights),
        x: x.to_vec(),
    })
}

/// `none`, the rule, or `column NAME`.
pub fn weighting_label(request: &FitRequest) -> String {
    match (&request.weights, request.weight_rule) {
        (Some(c), _) => format!("column {c}"),
        (None, Some(r)) => r.label().to_string(),
        (None, None) => "none".into(),
    }
}

/// Whether `request` can be read as a calibration: one predictor and the response, both as
/// measured, no grouping.
///
/// # Errors
/// What to change, when it cannot.
pub fn calibration_ready(request: &FitRequest) -> Result<(), AnalysisError> {
    let bad = |why: &str| Err(AnalysisError::Request(format!("a calibration {why}")));
    if request.x.len() != 1 || request.factor.is_some() {
        return bad("reads one predictor back from the response: give one --x and no grouping");
    }
    if request.response != ResponseScale::Identity
        || request.x_transform(&request.x[0]) != Transform::Identity
    {
        return bad("is read on the measured scales: remove the transforms of the response and the predictor (weight the fit instead if the spread grows)");
    }
    Ok(())
}

/// The weight of one reading of an unknown at x, and whether it depends on x.
fn reading_weight(
    request: &FitRequest,
    x: &[f64],
    weights: Option<&[f64]>,
    mean_reading: f64,
) -> (Box<dyn Fn(f64) -> f64>, bool) {
    match (request.weight_rule, weights) {
        (Some(WeightRule::InverseX), _) => (Box::new(|v: f64| 1.0 / v), true),
        (Some(WeightRule::InverseX2), _) => (Box::new(|v: f64| 1.0 / (v * v)), true),
        (Some(WeightRule::InverseY2), _) => {
            let w = 1.0 / (mean_reading * mean_reading);
            (Box::new(move |_| w), false)
        }
        (_, Some(w)) => {
            let profile = WeightProfile::new(x, w);
            (Box::new(move |v| profile.weight_at(v)), true)
        }
        (_, None) => (Box::new(|_| 1.0), false),
    }
}

/// The calibration refitted under no weighting, each rule, and the weights column in use.
fn side_by_side(
    request: &FitRequest,
    x: &[f64],
    y: &[f64],
    weights: Option<&[f64]>,
) -> Vec<WeightingRow> {
    let mut candidates: Vec<Candidate> = vec![("none".into(), Ok(None))];
    for rule in WeightRule::ALL {
        let w = rule_weights(rule, x, y)
            .map(Some)
            .map_err(|e| short_reason(&e));
        candidates.push((rule.label().into(), w));
    }
    if let (Some(column), Some(w)) = (&request.weights, weights) {
        candidates.push((format!("column {column}"), Ok(Some(w.to_vec()))));
    }
    compare_weightings(x, y, request.degree, candidates)
}

/// Why a rule does not apply, in a few words for a table.
fn short_reason(e: &CalibrationError) -> String {
    match e {
        CalibrationError::BadWeightBase { rule, value, .. } if rule.contains('y') => {
            format!("undefined: a reading of {value}")
        }
        CalibrationError::BadWeightBase { value, .. } => {
            format!("undefined: a standard at x = {value}")
        }
        CalibrationError::UnreplicatedLevel { level, .. } => {
            format!("needs replicates at every level (x = {level} has one reading)")
        }
        CalibrationError::NoSpreadAtLevel { level, .. } => {
            format!("the readings at x = {level} do not vary")
        }
        other => other.to_string(),
    }
}
