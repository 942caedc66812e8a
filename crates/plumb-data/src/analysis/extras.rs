//! What goes with a one-predictor fit: an overlay line, a LOESS smooth, the cues, the pair in
//! z-units, the fit read at one x, the polynomial ladder and the bands along the curve.

use plumb_core::alternative::{
    deming, loess, theil_sen, AlternativeError, DemingFit, LoessFit, TheilSenFit,
};
use plumb_core::cues::{pair_cues_given, KnownFits, PairCues};
use plumb_core::regression::{
    bands_at, compare_nested, fit, BandPoint, CaseInfluence, Design, FitOptions, LinearFit,
    NestedComparison, StandardizedView,
};

use std::sync::Arc;

use super::{FitRequest, ModelRows};

/// An overlay line for the same pair.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Robust {
    /// Theil–Sen median of slopes.
    TheilSen,
    /// Deming regression with this error-variance ratio.
    Deming(f64),
}

/// A fitted overlay line.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum RobustFit {
    /// Theil–Sen.
    TheilSen(TheilSenFit),
    /// Deming.
    Deming(DemingFit),
}

/// What is computed beside the least-squares fit when there is a single predictor.
#[derive(Debug, Clone, PartialEq)]
pub struct PairExtras {
    /// The requested overlay line, or why it is undefined.
    pub robust: Option<Result<RobustFit, AlternativeError>>,
    /// The requested LOESS smooth (degree 2), or why it is undefined.
    pub loess: Option<Result<LoessFit, AlternativeError>>,
    /// Non-linearity and single-point cues.
    pub cues: Option<PairCues>,
    /// The pair in z-units.
    pub z_view: Option<StandardizedView>,
    /// The fit read at the requested predictor value.
    pub read_at: Option<ReadAt>,
    /// Polynomials of degree 1, 2 and 3 on the same rows, each tested against the one below
    /// (without a grouping factor).
    pub degrees: Vec<DegreeStep>,
    /// The fitted curve with its confidence and prediction bands on an even grid over the x
    /// range, in the data's units; one per level of a grouping factor.
    pub curves: Vec<Curve>,
}

/// A fitted curve and its bands, in the data's units (the response transform undone).
#[derive(Debug, Clone, PartialEq)]
pub struct Curve {
    /// The factor's level it belongs to (`None` without a factor).
    pub level: Option<String>,
    /// Points along the x range.
    pub points: Vec<BandPoint>,
}

impl PairExtras {
    /// The single curve of a model without a grouping factor.
    pub fn bands(&self) -> &[BandPoint] {
        match self.curves.as_slice() {
            [c] if c.level.is_none() => &c.points,
            _ => &[],
        }
    }
}

/// One rung of the polynomial ladder.
#[derive(Debug, Clone, PartialEq)]
pub struct DegreeStep {
    /// Degree.
    pub degree: u32,
    /// Its fit, without its per-row fitted values and residuals (let go as soon as each fit
    /// is made, a fresh line's once the cues have read them: at millions of rows they would
    /// be six more copies of the data).
    pub fit: LinearFit,
    /// Against the degree below (None for degree 1).
    pub versus_previous: Option<NestedComparison>,
}

/// The p-value an added power must fall below for the ladder to suggest it (common practice,
/// no source: a strict level, since the ladder is itself a search).
pub const POWER_STEP_P: f64 = 0.01;

impl PairExtras {
    /// The degree the polynomial ladder supports: the highest degree reached by adding powers
    /// one at a time while each addition's partial-F p-value is below [`POWER_STEP_P`]
    /// (1 when the ladder is empty or the square already fails).
    pub fn suggested_degree(&self) -> u32 {
        let mut degree = 1;
        for step in self.degrees.iter().skip(1) {
            match step.versus_previous {
                Some(c) if c.p_value < POWER_STEP_P => degree = step.degree,
                _ => break,
            }
        }
        degree
    }
}

/// Points in the band grid.
pub const BAND_POINTS: usize = 41;

/// What to add beside a one-predictor fit.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct ExtrasRequest {
    /// Overlay line.
    pub robust: Option<Robust>,
    /// LOESS span.
    pub loess_span: Option<f64>,
    /// A predictor value to read the fit at.
    pub at: Option<f64>,
}

/// The fit read at one predictor value.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ReadAt {
    /// The value, its fit and its bands.
    pub point: BandPoint,
    /// `z_x = (x − x̄)/s_x`.
    pub z_x: f64,
    /// Expected `z_y = r·z_x`: the unit is expected `(1 − |r|)·|z_x|` SDs nearer the mean on y.
    pub expected_z_y: f64,
}

/// The polynomial ladder of a one-predictor request, and whether the model is its line.
#[derive(Debug, Default)]
pub(super) struct Ladder {
    degrees: Vec<DegreeStep>,
    model_is_line: bool,
}

/// Fits the ladder (empty with several predictors, weights or a grouping factor). The analysis
/// runs it before the case diagnostics, so that its designs are never alive beside them.
pub(super) fn ladder(rows: &ModelRows, fitted: &LinearFit, request: &FitRequest) -> Ladder {
    if request.x.len() != 1 {
        return Ladder::default();
    }
    let name = request.x_term_names().remove(0);
    let x = &rows.predictors[0];
    let line_design = Design::linear_shared(&[(name.as_str(), Arc::clone(x))], request.intercept);
    // The model is this line, unweighted: its fit and cases serve the ladder and the cues.
    let model_is_line = rows.weights().is_none() && *rows.design == line_design;
    let degrees = if request.weights.is_none() && rows.levels.is_none() {
        degree_ladder(
            (&name, x),
            rows.y(),
            request,
            (&line_design, model_is_line.then_some(fitted)),
        )
    } else {
        Vec::new()
    };
    Ladder {
        degrees,
        model_is_line,
    }
}

/// Overlays and cues for a one-predictor request (`None` with several predictors), beside its
/// `ladder`. Cues, the z-units view, the overlays and the ladder work on the model's scale; the
/// curves are drawn back in the data's units.
pub(super) fn pair_extras(
    rows: &ModelRows,
    fitted: &LinearFit,
    cases: &[CaseInfluence],
    request: &FitRequest,
    extras: ExtrasRequest,
    ladder: Ladder,
) -> Option<PairExtras> {
    if request.x.len() != 1 {
        return None;
    }
    let ExtrasRequest {
        robust,
        loess_span,
        at,
    } = extras;
    let Ladder {
        mut degrees,
        model_is_line,
    } = ladder;
    let (y, x) = (rows.y(), &rows.predictors[0][..]);
    let z_view = StandardizedView::of(x, y);
    let read_at = at.and_then(|a| read_at(rows, fitted, z_view, a));
    // The ladder's line and cubic are the cues' own fits when they are fitted the same way
    // (with an intercept, at the default options): each is fitted once.
    let same_way =
        request.intercept && request.level.to_bits() == FitOptions::default().level.to_bits();
    let step = |d: u32| {
        same_way
            .then(|| degrees.iter().find(|s| s.degree == d))
            .flatten()
            .map(|s| &s.fit)
    };
    let known = KnownFits {
        // The model's own fit when it is the line (the ladder keeps only its numbers).
        line: if model_is_line {
            same_way.then_some(fitted)
        } else {
            step(1)
        },
        cubic: step(3),
        line_cases: (same_way && model_is_line && !cases.is_empty()).then_some(cases),
    };
    let cues = pair_cues_given(x, y, known);
    for s in &mut degrees {
        s.fit.fitted = Vec::new();
        s.fit.residuals = Vec::new();
    }
    Some(PairExtras {
        read_at,
        robust: robust.map(|r| match r {
            Robust::TheilSen => theil_sen(x, y, request.level).map(RobustFit::TheilSen),
            Robust::Deming(lambda) => deming(x, y, lambda).map(RobustFit::Deming),
        }),
        loess: loess_span.map(|span| loess(x, y, span, 2)),
        cues,
        z_view,
        curves: curves(rows, fitted),
        degrees,
    })
}

/// The fit read at `a` (in the data's units) for the reference level.
fn read_at(
    rows: &ModelRows,
    fitted: &LinearFit,
    z_view: Option<StandardizedView>,
    a: f64,
) -> Option<ReadAt> {
    let row = rows.row_at(&[a], None)?;
    let point = back_transformed(rows, bands_at(fitted, &[(a, row)]).pop()?)?;
    let z = z_view?;
    let xt = rows.x_transforms[0].apply(a)?;
    let z_x = (xt - z.mean_x) / z.sd_x;
    Some(ReadAt {
        point,
        z_x,
        expected_z_y: z.slope * z_x,
    })
}

/// Polynomials of degree 1, 2 and 3 in `x` (named `name`); the line is `line`'s design, and
/// its fit is `line`'s own when given (the model's, fitted the same way) instead of a refit.
fn degree_ladder(
    (name, x): (&str, &Arc<[f64]>),
    y: &[f64],
    request: &FitRequest,
    (line_design, line_fit): (&Design, Option<&LinearFit>),
) -> Vec<DegreeStep> {
    let options = FitOptions {
        level: request.level,
        ..FitOptions::default()
    };
    let mut steps: Vec<DegreeStep> = Vec::new();
    for degree in 1..=3 {
        let fitted = match (degree, line_fit) {
            (1, Some(known)) => Some(without_rows(known)),
            (1, None) => fit(line_design, y, None, &options).ok(),
            _ => Design::polynomial_shared(name, Arc::clone(x), degree, request.intercept)
                .ok()
                .and_then(|d| fit(&d, y, None, &options).ok()),
        };
        let Some(mut f) = fitted else {
            break;
        };
        // The cues read a fresh line's per-row values (for its influence); a higher degree's
        // are let go at once.
        if degree > 1 {
            f.fitted = Vec::new();
            f.residuals = Vec::new();
        }
        let versus_previous = steps.last().map(|prev| compare_nested(&prev.fit, &f));
        steps.push(DegreeStep {
            degree,
            fit: f,
            versus_previous,
        });
    }
    steps
}

/// A copy of `f` without its per-row fitted values and residuals.
fn without_rows(f: &LinearFit) -> LinearFit {
    LinearFit {
        coefficients: f.coefficients.clone(),
        covariance: f.covariance.clone(),
        anova: f.anova.clone(),
        fitted: Vec::new(),
        residuals: Vec::new(),
        ..*f
    }
}

/// The curve and bands over the data's x range (one per level), back in the data's units.
fn curves(rows: &ModelRows, fitted: &LinearFit) -> Vec<Curve> {
    let x = &rows.selection.columns[1];
    let (lo, hi) = x
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &v| {
            (a.min(v), b.max(v))
        });
    let grid: Vec<f64> = (0..BAND_POINTS)
        .map(|k| lo + (hi - lo) * k as f64 / (BAND_POINTS - 1) as f64)
        .collect();
    let levels: Vec<(Option<usize>, Option<String>)> = match &rows.levels {
        None => vec![(None, None)],
        Some(l) => l
            .names
            .iter()
            .enumerate()
            .map(|(k, n)| (Some(k), Some(n.clone())))
            .collect(),
    };
    levels
        .into_iter()
        .map(|(k, name)| {
            let at: Vec<(f64, Vec<f64>)> = grid
                .iter()
                .filter_map(|&g| Some((g, rows.row_at(&[g], k)?)))
                .collect();
            let points = bands_at(fitted, &at)
                .into_iter()
                .filter_map(|p| back_transformed(rows, p))
                .collect();
            Curve {
                level: name,
                points,
            }
        })
        .collect()
}

/// A band point on the model's scale in the data's units: each value through the inverse
/// transform, the ends reordered when the transform reverses order (a reciprocal).
fn back_transformed(rows: &ModelRows, p: BandPoint) -> Option<BandPoint> {
    let b = |v: f64| rows.response_back(v);
    let order = |a: f64, c: f64| (a.min(c), a.max(c));
    let (mean_low, mean_high) = order(b(p.mean_low)?, b(p.mean_high)?);
    let (predict_low, predict_high) = order(b(p.predict_low)?, b(p.predict_high)?);
    Some(BandPoint {
        x: p.x,
        fitted: b(p.fitted)?,
        mean_low,
        mean_high,
        predict_low,
        predict_high,
    })
}
