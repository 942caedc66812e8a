//! The agreement view of two methods: differences against means, the mean difference (bias)
//! and the limits of agreement (Bland & Altman 1986, Lancet i:307–310; Bland & Altman 1999,
//! Stat Methods Med Res 8:135–160).

use super::{check_level, check_pairs, AgreementError};
use crate::accurate;
use crate::distributions;
use crate::regression::{fit, Design, FitOptions};

/// How each difference is expressed.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum DifferenceScale {
    /// `dᵢ = yᵢ − xᵢ`, in the units of the data.
    #[default]
    Absolute,
    /// `dᵢ = 100·(yᵢ − xᵢ)/mᵢ`, a percentage of the pair's mean (for spread that grows with
    /// the level).
    PercentOfMean,
}

/// Settings of [`bland_altman`].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BlandAltmanOptions {
    /// Share of differences the limits should cover, in (0, 1). Default 0.95.
    pub coverage: f64,
    /// Confidence level of the intervals of the bias and the limits, in (0, 1). Default 0.95.
    pub confidence: f64,
    /// A fixed multiplier of the SD instead of the normal quantile of `coverage` (Bland &
    /// Altman 1986 used 2). Default `None`.
    pub multiplier: Option<f64>,
    /// Absolute differences or percentages of the mean. Default absolute.
    pub scale: DifferenceScale,
}

impl Default for BlandAltmanOptions {
    fn default() -> Self {
        Self {
            coverage: 0.95,
            confidence: 0.95,
            multiplier: None,
            scale: DifferenceScale::Absolute,
        }
    }
}

/// The limits of agreement of `y` (new method) with `x` (reference method).
#[derive(Debug, Clone, PartialEq)]
pub struct AgreementLimits {
    /// Pairs used.
    pub n: usize,
    /// How the differences are expressed.
    pub scale: DifferenceScale,
    /// Mean difference (bias) `d̄ = Σdᵢ/n`.
    pub bias: f64,
    /// `s_d = √(Σ(dᵢ − d̄)²/(n − 1))`.
    pub sd: f64,
    /// `z`: the upper `(1 − coverage)/2` normal quantile (1.959964 for 95%), or the fixed
    /// multiplier asked for.
    pub multiplier: f64,
    /// `d̄ − z·s_d`.
    pub lower: f64,
    /// `d̄ + z·s_d`.
    pub upper: f64,
    /// Confidence level of the three intervals.
    pub confidence: f64,
    /// `d̄ ± t_{n−1}·s_d/√n`, `t_{n−1}` the upper `(1 − confidence)/2` quantile of Student's t.
    pub bias_interval: (f64, f64),
    /// `(d̄ − z·s_d) ± t_{n−1}·s_d·√(3/n)`: the approximate standard error `√(3s_d²/n)` of a
    /// limit given by Bland & Altman (1986), from `var(d̄ + z·s_d) ≈ s_d²/n + z²s_d²/(2n)`
    /// with `z ≈ 2`.
    pub lower_interval: (f64, f64),
    /// `(d̄ + z·s_d) ± t_{n−1}·s_d·√(3/n)`.
    pub upper_interval: (f64, f64),
    /// Least-squares regression of the differences on the means, `None` when the means or the
    /// differences do not vary.
    pub proportional: Option<ProportionalBias>,
    /// `(mᵢ, dᵢ)` per pair, in row order, for the plot; `mᵢ = (xᵢ + yᵢ)/2`.
    pub points: Vec<(f64, f64)>,
}

/// The regression `dᵢ = c₀ + c₁·mᵢ + eᵢ`: a slope away from 0 means the difference changes
/// with the level (proportional bias).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ProportionalBias {
    /// `c₀`.
    pub intercept: f64,
    /// `c₁ = Σ(mᵢ − m̄)(dᵢ − d̄)/Σ(mᵢ − m̄)²`.
    pub slope: f64,
    /// `SE(c₁) = σ̂/√Σ(mᵢ − m̄)²`, `σ̂² = Σeᵢ²/(n − 2)`.
    pub slope_std_error: f64,
    /// `t = c₁/SE(c₁)`.
    pub t: f64,
    /// Two-sided `P(|T_{n−2}| ≥ |t|)`.
    pub p_value: f64,
    /// `n − 2`.
    pub df: usize,
}

/// Bland–Altman agreement of `y` (new method) with `x` (reference method): differences
/// `dᵢ = yᵢ − xᵢ` (or `100·(yᵢ − xᵢ)/mᵢ`) against means `mᵢ = (xᵢ + yᵢ)/2`, with the bias,
/// the limits of agreement, their intervals and the proportional-bias regression; see
/// [`AgreementLimits`] for every formula. The normal quantile is exact (1.959964 at 95%) unless
/// a fixed multiplier is given.
///
/// # Errors
/// Fewer than 3 pairs, a non-finite value (with its column and position), a level or
/// multiplier out of range, or, for percentages, a pair whose mean is 0 (with its position).
pub fn bland_altman(
    x: &[f64],
    y: &[f64],
    options: &BlandAltmanOptions,
) -> Result<AgreementLimits, AgreementError> {
    check_pairs(x, y, 3)?;
    check_level("coverage", options.coverage)?;
    check_level("confidence level", options.confidence)?;
    let z = match options.multiplier {
        Some(k) if k.is_finite() && k > 0.0 => k,
        Some(k) => {
            return Err(AgreementError::InvalidOption(format!(
                "the multiplier of the SD must be a positive number, not {k} (try 1.96 or 2)"
            )))
        }
        None => distributions::normal_upper_quantile(0.5 * (1.0 - options.coverage)),
    };
    let mut points = Vec::with_capacity(x.len());
    for (row, (&xi, &yi)) in x.iter().zip(y).enumerate() {
        let m = 0.5 * xi + 0.5 * yi;
        let d = match options.scale {
            DifferenceScale::Absolute => yi - xi,
            DifferenceScale::PercentOfMean if m == 0.0 => {
                return Err(AgreementError::ZeroMean { row })
            }
            DifferenceScale::PercentOfMean => 100.0 * (yi - xi) / m,
        };
        points.push((m, d));
    }
    let n = points.len();
    let nf = n as f64;
    let bias = accurate::sum(points.iter().map(|p| p.1)) / nf;
    let sd =
        (accurate::sum(points.iter().map(|p| (p.1 - bias) * (p.1 - bias))) / (nf - 1.0)).sqrt();
    let t = distributions::t_upper_quantile(0.5 * (1.0 - options.confidence), nf - 1.0);
    let (lower, upper) = (bias - z * sd, bias + z * sd);
    let half_bias = t * sd / nf.sqrt();
    let half_limit = t * sd * (3.0 / nf).sqrt();
    let means: Vec<f64> = points.iter().map(|p| p.0).collect();
    let diffs: Vec<f64> = points.iter().map(|p| p.1).collect();
    let design = Design::linear(&[("mean", &means)], true);
    let proportional = fit(&design, &diffs, None, &FitOptions::default())
        .ok()
        .and_then(|f| {
            let intercept = f.coefficients.iter().find(|c| c.term != "mean")?.estimate;
            let c = f.coefficients.iter().find(|c| c.term == "mean")?;
            Some(ProportionalBias {
                intercept,
                slope: c.estimate,
                slope_std_error: c.std_error,
                t: c.t,
                p_value: c.p_value,
                df: n - 2,
            })
        });
    Ok(AgreementLimits {
        n,
        scale: options.scale,
        bias,
        sd,
        multiplier: z,
        lower,
        upper,
        confidence: options.confidence,
        bias_interval: (bias - half_bias, bias + half_bias),
        lower_interval: (lower - half_limit, lower + half_limit),
        upper_interval: (upper - half_limit, upper + half_limit),
        proportional,
        points,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn close(a: f64, b: f64, tol: f64) -> bool {
        (a - b).abs() <= tol * b.abs().max(1.0)
    }

    #[test]
    fn a_small_case_worked_by_hand() {
        // d = (−1, 1, −1, 1, 0): d̄ = 0, Σd² = 4, s_d = √(4/4) = 1 (by hand). Means
        // (9.5, 20.5, 29.5, 40.5, 50): m̄ = 30, Σ(m − m̄)d = 22, Σ(m − m̄)² = 1021, so the
        // proportional slope is 22/1021 and its intercept −30·22/1021 (by hand).
        let x = [10.0, 20.0, 30.0, 40.0, 50.0];
        let y = [9.0, 21.0, 29.0, 41.0, 50.0];
        let r = bland_altman(&x, &y, &BlandAltmanOptions::default()).expect("defined");
        assert_eq!(r.bias, 0.0);
        assert_eq!(r.sd, 1.0);
        // z = 1.959963984540054 and t₄ = 2.7764451051977934: scipy 1.17.1 norm.ppf(0.975),
        // t.ppf(0.975, 4).
        assert!(close(r.upper, 1.959963984540054, 1e-14));
        assert!(close(r.lower, -1.959963984540054, 1e-14));
        let t4 = 2.7764451051977934;
        assert!(close(r.bias_interval.1, t4 / 5f64.sqrt(), 1e-13));
        assert!(close(
            r.upper_interval.0,
            1.959963984540054 - t4 * 0.6f64.sqrt(),
            1e-13
        ));
        let p = r.proportional.expect("means vary");
        assert!(close(p.slope, 22.0 / 1021.0, 1e-13));
        assert!(close(p.intercept, -30.0 * 22.0 / 1021.0, 1e-13));
        assert_eq!(p.df, 3);
        assert_eq!(r.points[1], (20.5, 1.0));
    }

    /// Peak expiratory flow rate (l/min), first reading of 17 subjects on the Wright peak flow
    /// meter (x) and the mini Wright meter (y), Bland & Altman (1986) Table 1. The data could not
    /// be retrieved from a page here: they are recalled from memory, and so are the published
    /// figures below (the paper takes Wright − mini and rounds d̄ and s before doubling).
    const WRIGHT: [f64; 17] = [
        494.0, 395.0, 516.0, 434.0, 476.0, 557.0, 413.0, 442.0, 650.0, 433.0, 417.0, 656.0, 267.0,
        478.0, 178.0, 423.0, 427.0,
    ];
    const MINI: [f64; 17] = [
        512.0, 430.0, 520.0, 428.0, 500.0, 600.0, 364.0, 380.0, 658.0, 445.0, 432.0, 626.0, 260.0,
        477.0, 259.0, 350.0, 451.0,
    ];

    #[test]
    fn peak_flow_example_of_bland_and_altman_1986() {
        let options = BlandAltmanOptions {
            multiplier: Some(2.0),
            ..BlandAltmanOptions::default()
        };
        let r = bland_altman(&WRIGHT, &MINI, &options).expect("defined");
        // Published (recalled from memory): d̄ = −2.1, s = 38.8 for Wright − mini, limits
        // −79.7 to 75.5; so for mini − Wright +2.1, 38.8 and −75.5 to 79.7 (to rounding).
        assert!((r.bias - 2.1).abs() < 0.05);
        assert!((r.sd - 38.8).abs() < 0.05);
        assert!((r.lower + 75.5).abs() < 0.15 && (r.upper - 79.7).abs() < 0.15);
        // Published interval of the bias (recalled): −22.0 to 17.8 for Wright − mini.
        assert!((r.bias_interval.0 + 17.8).abs() < 0.05 && (r.bias_interval.1 - 22.0).abs() < 0.05);
        // numpy 2.4.6 / scipy 1.17.1 on the same data (d.mean(), d.std(ddof=1),
        // t.ppf(0.975, 16)): 2.1176470588235294, 38.76512987360738, lower-limit interval
        // −109.93444752843943 to −40.890777848343006.
        assert!(close(r.bias, 2.1176470588235294, 1e-14));
        assert!(close(r.sd, 38.76512987360738, 1e-13));
        assert!(close(r.lower_interval.0, -109.93444752843943, 1e-13));
        assert!(close(r.lower_interval.1, -40.890777848343006, 1e-13));
        // scipy 1.17.1 linregress(means, d): slope −0.02868744515254922, stderr
        // 0.08820640827654685, p 0.7494985336492941, intercept 15.067497300038983.
        let p = r.proportional.expect("means vary");
        assert!(close(p.slope, -0.02868744515254922, 1e-11));
        assert!(close(p.slope_std_error, 0.08820640827654685, 1e-11));
        assert!(close(p.p_value, 0.7494985336492941, 1e-10));
        assert!(close(p.intercept, 15.067497300038983, 1e-11));
    }

    #[test]
    fn percentages_refuse_a_zero_mean_and_name_its_row() {
        let options = BlandAltmanOptions {
            scale: DifferenceScale::PercentOfMean,
            ..BlandAltmanOptions::default()
        };
        let r = bland_altman(&[2.0, -1.0, 3.0], &[2.0, 1.0, 4.0], &options);
        assert_eq!(r, Err(AgreementError::ZeroMean { row: 1 }));
        let ok = bland_altman(&[100.0, 200.0, 300.0], &[110.0, 190.0, 300.0], &options)
            .expect("defined");
        // 100·10/105, 100·(−10)/195, 0 (by hand).
        assert!(close(ok.points[0].1, 1000.0 / 105.0, 1e-15));
        assert!(close(ok.points[1].1, -1000.0 / 195.0, 1e-15));
    }

    #[test]
    fn bad_values_are_reported_with_their_position() {
        let r = bland_altman(
            &[1.0, 2.0, 3.0],
            &[1.0, f64::NAN, 3.0],
            &BlandAltmanOptions::default(),
        );
        assert_eq!(
            r,
            Err(AgreementError::NonFinite {
                column: "y",
                row: 1
            })
        );
        assert!(matches!(
            bland_altman(&[1.0, 2.0], &[1.0, 2.0], &BlandAltmanOptions::default()),
            Err(AgreementError::TooFewPairs { n: 2, needed: 3 })
        ));
    }
}
