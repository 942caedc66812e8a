//! Inverse prediction: the x of an unknown sample from its readings, with two intervals.

use super::curve::{sign_changes, CalibrationCurve};
use super::CalibrationError;

/// How much a single reading of the unknown weighs, as a function of where it lies: `1` for
/// an unweighted calibration; the weighting rule evaluated at x (or at the reading) otherwise.
/// The variance of one reading at x is `σ̂²/w(x)`.
pub type ReadingWeight<'a> = &'a dyn Fn(f64) -> f64;

/// The x read back from an unknown's readings.
#[derive(Debug, Clone, PartialEq)]
pub struct ReadBack {
    /// Mean reading `ȳ₀`.
    pub reading: f64,
    /// Replicate readings `m`.
    pub replicates: usize,
    /// The estimate `x̂₀` with `f(x̂₀) = ȳ₀`.
    pub x: f64,
    /// Whether `x̂₀` lies outside the standards' range (an extrapolation).
    pub outside_range: bool,
    /// First-order standard error `SE(x̂₀) = √(σ̂²/(m·w(x̂₀)) + g(x̂₀)ᵀΣg(x̂₀)) / |f′(x̂₀)|`.
    pub std_error: f64,
    /// `x̂₀ ± t·SE(x̂₀)` (t on the calibration's residual degrees of freedom).
    pub approximate: (f64, f64),
    /// The set of x whose prediction band holds `ȳ₀`.
    pub exact: Interval,
}

/// The x values whose prediction interval for the mean of `m` readings covers `ȳ₀`:
/// `{x : (ȳ₀ − f(x))² ≤ t²·(σ̂²/(m·w(x)) + g(x)ᵀΣg(x))}` (Fieller's interval for a straight
/// line; the inverted prediction band for a curve or a weighting that varies with x).
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Interval {
    /// A bounded interval `[low, high]`.
    Bounded {
        /// Lower end.
        low: f64,
        /// Upper end.
        high: f64,
    },
    /// The band holds `ȳ₀` on a stretch that runs past the searched domain on one side or
    /// both (`None`): the calibration cannot bound x there.
    Open {
        /// Lower end, or `None` when the set runs below the searched domain.
        low: Option<f64>,
        /// Upper end, or `None` when it runs above.
        high: Option<f64>,
    },
    /// A straight line whose slope is not distinguishable from zero at this level: the set
    /// is the whole line outside `(low, high)` (two rays), or the whole line.
    Unbounded {
        /// The excluded middle stretch, when there is one.
        outside_of: Option<(f64, f64)>,
    },
}

impl Interval {
    /// The ends when the interval is bounded.
    pub fn bounded(&self) -> Option<(f64, f64)> {
        match *self {
            Self::Bounded { low, high } => Some((low, high)),
            _ => None,
        }
    }
}

/// Reads the x of an unknown back from its replicate `readings` on `curve`, with `weight` the
/// weight of one reading at x (see [`ReadingWeight`]).
///
/// `x̂₀` solves `f(x̂₀) = ȳ₀`: in closed form for a line, otherwise the one root inside the
/// standards' range (or, failing that, in the search domain: an extrapolation). Its standard
/// error is the first-order (delta-method) one, which for an unweighted line is the familiar
/// `(σ̂/|b|)·√(1/m + 1/n + (ȳ₀ − ȳ)²/(b²Sxx))`. The exact interval inverts the prediction
/// band: for a line with a constant reading weight it is Fieller's quadratic
/// `A x² + B x + C ≤ 0` with `A = b² − t²Σ₁₁`, `B = −2b(ȳ₀ − a) − 2t²Σ₀₁`,
/// `C = (ȳ₀ − a)² − t²(σ̂²/(m w) + Σ₀₀)`, solved exactly (and unbounded when `A ≤ 0`, i.e. the
/// slope's t is below the quantile); otherwise the band is inverted numerically on the search
/// domain around `x̂₀`.
///
/// # Errors
/// No readings, a reading that is not finite, a curve that never takes `ȳ₀` in the search
/// domain, or takes it at several x inside the standards' range.
pub fn read_back(
    curve: &CalibrationCurve,
    readings: &[f64],
    weight: ReadingWeight<'_>,
    weight_varies: bool,
) -> Result<ReadBack, CalibrationError> {
    if readings.is_empty() {
        return Err(CalibrationError::NoReadings);
    }
    if let Some(i) = readings.iter().position(|v| !v.is_finite()) {
        return Err(CalibrationError::NonFiniteReading(i));
    }
    let m = readings.len();
    let y0 = readings.iter().sum::<f64>() / m as f64;
    let x = estimate(curve, y0)?;
    let (lo, hi) = curve.range;
    let outside_range = x < lo || x > hi;
    let reading_var = |x: f64| curve.sigma.powi(2) / (m as f64 * weight(x));
    let slope = curve.slope(x);
    let std_error = (reading_var(x) + curve.value_variance(x)).sqrt() / slope.abs();
    let t = curve.t_quantile();
    let exact = if curve.is_line() && !weight_varies {
        fieller(curve, y0, reading_var(x), t)
    } else {
        band_inversion(curve, y0, x, &reading_var, t)
    };
    Ok(ReadBack {
        reading: y0,
        replicates: m,
        x,
        outside_range,
        std_error,
        approximate: (x - t * std_error, x + t * std_error),
        exact,
    })
}

/// The x where the curve takes `y0`.
fn estimate(curve: &CalibrationCurve, y0: f64) -> Result<f64, CalibrationError> {
    let (lo, hi) = curve.range;
    let inside = curve.roots(y0, lo, hi);
    match inside.len() {
        1 => return Ok(inside[0]),
        0 => {}
        _ => return Err(CalibrationError::SeveralRoots(inside)),
    }
    let (a, b) = curve.search_domain();
    let outside: Vec<f64> = curve
        .roots(y0, a, b)
        .into_iter()
        .filter(|x| *x < lo || *x > hi)
        .collect();
    match outside.as_slice() {
        [] => Err(CalibrationError::NoRoot { reading: y0 }),
        // The root nearest the standards.
        _ => Ok(outside
            .iter()
            .copied()
            .min_by(|p, q| distance(*p, curve.range).total_cmp(&distance(*q, curve.range)))
            .unwrap_or(outside[0])),
    }
}

fn distance(x: f64, (lo, hi): (f64, f64)) -> f64 {
    (lo - x).max(x - hi).max(0.0)
}

/// Fieller's interval for a straight line `a + bx` with a constant reading variance.
fn fieller(curve: &CalibrationCurve, y0: f64, reading_var: f64, t: f64) -> Interval {
    let (a, b) = (curve.coefficients()[0], curve.coefficients()[1]);
    let s = |i: usize, j: usize| curve.covariance_entry(i, j);
    let t2 = t * t;
    let d = y0 - a;
    let qa = b * b - t2 * s(1, 1);
    let qb = -2.0 * b * d - 2.0 * t2 * s(0, 1);
    let qc = d * d - t2 * (reading_var + s(0, 0));
    let disc = qb * qb - 4.0 * qa * qc;
    if qa > 0.0 {
        // Non-negative at x̂₀ by construction; guard rounding.
        let root = disc.max(0.0).sqrt();
        let (r1, r2) = stable_roots(qa, qb, qc, root);
        return Interval::Bounded { low: r1, high: r2 };
    }
    if disc > 0.0 && qa < 0.0 {
        let (r1, r2) = stable_roots(qa, qb, qc, disc.sqrt());
        return Interval::Unbounded {
            outside_of: Some((r1.min(r2), r1.max(r2))),
        };
    }
    Interval::Unbounded { outside_of: None }
}

/// The two roots of `qa·x² + qb·x + qc` from `root = √disc`, without cancellation
/// (`q = −(qb + sign(qb)·root)/2`, roots `q/qa` and `qc/q`), ascending.
fn stable_roots(qa: f64, qb: f64, qc: f64, root: f64) -> (f64, f64) {
    let q = -0.5 * (qb + if qb < 0.0 { -root } else { root });
    let (r1, r2) = if q == 0.0 {
        (0.0, 0.0)
    } else {
        (q / qa, qc / q)
    };
    (r1.min(r2), r1.max(r2))
}

/// The connected stretch around `x0` where `(y0 − f(x))² ≤ t²(V_reading(x) + Var f(x))`.
fn band_inversion(
    curve: &CalibrationCurve,
    y0: f64,
    x0: f64,
    reading_var: &dyn Fn(f64) -> f64,
    t: f64,
) -> Interval {
    let (a, b) = curve.search_domain();
    let (a, b) = (a.min(x0), b.max(x0));
    let h = |x: f64| {
        let v = reading_var(x) + curve.value_variance(x);
        let h = (y0 - curve.value(x)).powi(2) - t * t * v;
        if h.is_nan() {
            f64::INFINITY
        } else {
            h
        }
    };
    let ends = sign_changes(h, a, b);
    let low = ends
        .iter()
        .copied()
        .filter(|&e| e < x0)
        .fold(None, |m: Option<f64>, e| Some(m.map_or(e, |m| m.max(e))));
    let high = ends
        .iter()
        .copied()
        .filter(|&e| e > x0)
        .fold(None, |m: Option<f64>, e| Some(m.map_or(e, |m| m.min(e))));
    match (low, high) {
        (Some(low), Some(high)) => Interval::Bounded { low, high },
        (low, high) => Interval::Open { low, high },
    }
}
