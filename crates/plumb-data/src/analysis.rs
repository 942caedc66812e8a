//! One least-squares analysis from a table: choose rows, build the design, fit.
//!
//! This is the single path from a loaded file to a [`LinearFit`], shared by the command
//! line, the report and the workbench, so that each shows the same numbers for the same request.

use plumb_core::alternative::{
    deming, loess, theil_sen, AlternativeError, DemingFit, LoessFit, TheilSenFit,
};
use plumb_core::cues::{pair_cues, PairCues};
use plumb_core::regression::{
    bands, compare_nested, fit, influence, variance_inflation, BandPoint, CaseInfluence, Design,
    FitOptions, LinearFit, NestedComparison, StandardizedView,
};
use plumb_core::CoreError;
use thiserror::Error;

use crate::select::Selection;
use crate::table::Table;
use crate::DataError;

/// What to fit.
#[derive(Debug, Clone, PartialEq)]
pub struct FitRequest {
    /// Response column.
    pub y: String,
    /// Predictor columns (exactly one when `degree > 1`).
    pub x: Vec<String>,
    /// Include the intercept.
    pub intercept: bool,
    /// Polynomial degree of the single predictor (1 = straight line).
    pub degree: u32,
    /// Optional column of positive weights (weighted least squares).
    pub weights: Option<String>,
    /// 1-based data rows to leave out.
    pub exclude: Vec<usize>,
    /// Confidence level of the intervals.
    pub level: f64,
}

impl Default for FitRequest {
    fn default() -> Self {
        Self {
            y: String::new(),
            x: Vec::new(),
            intercept: true,
            degree: 1,
            weights: None,
            exclude: Vec::new(),
            level: 0.95,
        }
    }
}

/// A fit together with the account of which rows it used.
#[derive(Debug, Clone, PartialEq)]
pub struct FitOutcome {
    /// The rows used, dropped and excluded.
    pub selection: Selection,
    /// The fit on the rows used.
    pub fit: LinearFit,
    /// Variance inflation factor per term (`None` for the intercept), with two or more predictors.
    pub vif: Option<Vec<Option<f64>>>,
}

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
    /// Polynomials of degree 1, 2 and 3 on the same rows, each tested against the one below.
    pub degrees: Vec<DegreeStep>,
    /// The fitted curve with its confidence and prediction bands on an even grid over the x range.
    pub bands: Vec<BandPoint>,
}

/// One rung of the polynomial ladder.
#[derive(Debug, Clone, PartialEq)]
pub struct DegreeStep {
    /// Degree.
    pub degree: u32,
    /// Its fit.
    pub fit: LinearFit,
    /// Against the degree below (None for degree 1).
    pub versus_previous: Option<NestedComparison>,
}

/// Points in the band grid.
pub const BAND_POINTS: usize = 41;

fn degree_ladder(x: &[f64], y: &[f64], intercept: bool, level: f64) -> Vec<DegreeStep> {
    let options = FitOptions {
        level,
        ..FitOptions::default()
    };
    let mut steps: Vec<DegreeStep> = Vec::new();
    for degree in 1..=3 {
        let Some(f) = Design::polynomial("x", x, degree, intercept)
            .ok()
            .and_then(|d| fit(&d, y, None, &options).ok())
        else {
            break;
        };
        let versus_previous = steps.last().map(|prev| compare_nested(&prev.fit, &f));
        steps.push(DegreeStep {
            degree,
            fit: f,
            versus_previous,
        });
    }
    steps
}

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
    /// Expected `z_y = r·z_x`: the unit is expected `(1 − r)·z_x` SDs nearer the mean on y.
    pub expected_z_y: f64,
}

/// Overlays and cues for a one-predictor request (`None` with several predictors).
pub fn pair_extras(
    outcome: &FitOutcome,
    request: &FitRequest,
    extras: ExtrasRequest,
) -> Option<PairExtras> {
    if request.x.len() != 1 {
        return None;
    }
    let ExtrasRequest {
        robust,
        loess_span,
        at,
    } = extras;
    let (y, x) = (&outcome.selection.columns[0], &outcome.selection.columns[1]);
    let z_view = StandardizedView::of(x, y);
    let read_at = at.and_then(|a| {
        let point = *band_grid_at(x, outcome, request, &[a]).first()?;
        let z = z_view?;
        let z_x = (a - z.mean_x) / z.sd_x;
        Some(ReadAt {
            point,
            z_x,
            expected_z_y: z.slope * z_x,
        })
    });
    Some(PairExtras {
        read_at,
        robust: robust.map(|r| match r {
            Robust::TheilSen => theil_sen(x, y, request.level).map(RobustFit::TheilSen),
            Robust::Deming(lambda) => deming(x, y, lambda).map(RobustFit::Deming),
        }),
        loess: loess_span.map(|span| loess(x, y, span, 2)),
        cues: pair_cues(x, y),
        z_view,
        degrees: if request.weights.is_none() {
            degree_ladder(x, y, request.intercept, request.level)
        } else {
            Vec::new()
        },
        bands: band_grid(x, outcome, request),
    })
}

fn band_grid(x: &[f64], outcome: &FitOutcome, request: &FitRequest) -> Vec<BandPoint> {
    let (lo, hi) = x
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &v| {
            (a.min(v), b.max(v))
        });
    let grid: Vec<f64> = (0..BAND_POINTS)
        .map(|k| lo + (hi - lo) * k as f64 / (BAND_POINTS - 1) as f64)
        .collect();
    band_grid_at(x, outcome, request, &grid)
}

fn band_grid_at(
    x: &[f64],
    outcome: &FitOutcome,
    request: &FitRequest,
    grid: &[f64],
) -> Vec<BandPoint> {
    let design = if request.degree > 1 {
        Design::polynomial(&request.x[0], x, request.degree, request.intercept).ok()
    } else {
        Some(Design::linear(
            &[(request.x[0].as_str(), x)],
            request.intercept,
        ))
    };
    design
        .and_then(|d| bands(&d, &outcome.fit, grid))
        .unwrap_or_default()
}

/// Why an analysis could not run, with the file named.
#[derive(Debug, Error)]
pub enum AnalysisError {
    /// Loading or selecting failed.
    #[error(transparent)]
    Data(#[from] DataError),
    /// The request itself does not make sense.
    #[error("{0}")]
    Request(String),
    /// The rows chosen cannot support the model.
    #[error("{file}: {source}")]
    Model {
        /// File name.
        file: String,
        /// What the core said.
        source: CoreError,
    },
}

/// Runs `request` on `table`.
///
/// # Errors
/// See [`AnalysisError`]: every message names the file, and the column or row where it applies.
pub fn run_fit(table: &Table, request: &FitRequest) -> Result<FitOutcome, AnalysisError> {
    let prepared = prepare(table, request)?;
    let fit = prepared.fit(table, request)?;
    let vif = (request.x.len() > 1)
        .then(|| variance_inflation(&prepared.design, prepared.weights()))
        .transpose()
        .map_err(|source| AnalysisError::Model {
            file: table.source().display().to_string(),
            source,
        })?;
    Ok(FitOutcome {
        selection: prepared.selection,
        fit,
        vif,
    })
}

/// Runs `request` and computes the case diagnostics of every row used (in `selection.rows` order).
///
/// # Errors
/// As [`run_fit`].
pub fn run_influence(
    table: &Table,
    request: &FitRequest,
) -> Result<(FitOutcome, Vec<CaseInfluence>), AnalysisError> {
    let prepared = prepare(table, request)?;
    let fit = prepared.fit(table, request)?;
    let cases = influence(
        &prepared.design,
        prepared.weights(),
        &fit,
        &prepared.options,
    )
    .map_err(|source| AnalysisError::Model {
        file: table.source().display().to_string(),
        source,
    })?;
    Ok((
        FitOutcome {
            selection: prepared.selection,
            fit,
            vif: None,
        },
        cases,
    ))
}

/// Rows chosen and the design built, ready to fit.
struct Prepared {
    selection: Selection,
    design: Design,
    has_weights: bool,
    options: FitOptions,
}

impl Prepared {
    fn weights(&self) -> Option<&[f64]> {
        self.has_weights.then(|| {
            self.selection
                .columns
                .last()
                .expect("weights column selected")
                .as_slice()
        })
    }

    fn fit(&self, table: &Table, request: &FitRequest) -> Result<LinearFit, AnalysisError> {
        let file = table.source().display().to_string();
        fit(&self.design, &self.selection.columns[0], self.weights(), &self.options).map_err(|e| match e {
            CoreError::BadWeight { index, value } => AnalysisError::Request(format!(
                "{file}, column '{}', row {}: weight {value} is not positive; weights must be positive and finite",
                request.weights.as_deref().unwrap_or_default(),
                self.selection.rows[index]
            )),
            source => AnalysisError::Model { file, source },
        })
    }
}

fn prepare(table: &Table, request: &FitRequest) -> Result<Prepared, AnalysisError> {
    let file = table.source().display().to_string();
    if request.x.is_empty() {
        return Err(AnalysisError::Request(
            "name at least one predictor column (--x COLUMN)".into(),
        ));
    }
    if request.degree > 1 && request.x.len() != 1 {
        return Err(AnalysisError::Request(format!(
            "a polynomial of degree {} takes exactly one predictor; {} were given",
            request.degree,
            request.x.len()
        )));
    }
    if let Some(dup) = request.x.iter().find(|x| **x == request.y) {
        return Err(AnalysisError::Request(format!(
            "column '{dup}' is both the response and a predictor; choose different columns"
        )));
    }
    let mut names: Vec<&str> = vec![request.y.as_str()];
    names.extend(request.x.iter().map(String::as_str));
    if let Some(w) = &request.weights {
        names.push(w);
    }
    let selection = table.complete_rows(&names, &request.exclude)?;
    let predictors: Vec<(&str, &[f64])> = request
        .x
        .iter()
        .zip(&selection.columns[1..])
        .map(|(n, c)| (n.as_str(), c.as_slice()))
        .collect();
    let design = if request.degree > 1 {
        Design::polynomial(
            predictors[0].0,
            predictors[0].1,
            request.degree,
            request.intercept,
        )
        .map_err(|source| AnalysisError::Model { file, source })?
    } else {
        Design::linear(&predictors, request.intercept)
    };
    Ok(Prepared {
        selection,
        design,
        has_weights: request.weights.is_some(),
        options: FitOptions {
            level: request.level,
            ..FitOptions::default()
        },
    })
}
