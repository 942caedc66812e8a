//! The summary's charts: the pair with its fit and bands (or y against its fitted value with
//! several predictors), the residuals against the same predictor and against a normal sample,
//! and how much each row pulls the fit; excluded rows stay visible in the pair chart.

use plumb_data::analysis::{Analysis, Curve, PairExtras};

use super::{Beside, ReportInput};
use crate::charts::{
    pair_chart, pull_chart, quantile_chart, residual_chart, Chart, ChartLine, Dot, LineKind,
    PairChart, PullDot,
};
use crate::Result;
use plumb_core::regression::{normal_scores, pull_of, strong_pull_from};

/// Every chart of the summary.
///
/// # Errors
/// A chart that could not be drawn.
pub fn draw(
    input: &ReportInput<'_>,
    outcome: &Analysis,
    beside: Option<&Beside>,
) -> Result<Vec<Chart>> {
    let first = match &outcome.extras {
        Some(e) => pair_figure(input, outcome, e, beside)?,
        None => fitted_figure(input, outcome)?,
    };
    let (x_label, along) = residual_axis(input, outcome);
    let residuals = dots(along.iter().zip(&outcome.fit.residuals));
    let strong_from = strong_pull_from(outcome.cases.len(), outcome.fit.coefficients.len());
    let pulls: Vec<PullDot> = outcome
        .cases
        .iter()
        .map(|c| PullDot {
            leverage: c.leverage,
            studentized: c.studentized_external,
            pull: pull_of(c, strong_from),
        })
        .collect();
    let mut ranked: Vec<f64> = outcome
        .cases
        .iter()
        .map(|c| c.studentized_external)
        .filter(|t| t.is_finite())
        .collect();
    ranked.sort_by(f64::total_cmp);
    let quantiles: Vec<(f64, f64)> = normal_scores(ranked.len())
        .into_iter()
        .zip(ranked)
        .collect();
    Ok(vec![
        first,
        residual_chart(&residuals, &x_label, format!("residuals against {x_label}"))?,
        quantile_chart(
            &quantiles,
            "residuals against a normal sample (shaded: where 95 % of normal samples put each rank)".into(),
        )?,
        pull_chart(
            &pulls,
            strong_from,
            "how much each row pulls the fit (marker size and colour: Cook's distance)".into(),
        )?,
    ])
}

/// What the residual chart is drawn against, as in the workbench: the predictor (one
/// predictor, so the chart reads under the pair chart) or the fitted values.
fn residual_axis(input: &ReportInput<'_>, outcome: &Analysis) -> (String, Vec<f64>) {
    let x = &input.request.x;
    match outcome.rows.selection.columns.get(1) {
        Some(values) if x.len() == 1 && values.len() == outcome.fit.residuals.len() => {
            (x[0].clone(), values.to_vec())
        }
        _ => ("fitted value".into(), outcome.fit.fitted.clone()),
    }
}

/// Included dots from `(x, y)` pairs.
fn dots<'a>(xy: impl Iterator<Item = (&'a f64, &'a f64)>) -> Vec<Dot> {
    xy.map(|(&x, &y)| Dot {
        x,
        y,
        excluded: false,
    })
    .collect()
}

/// The excluded rows at their file values of `x` and the response.
fn excluded_dots(input: &ReportInput<'_>, outcome: &Analysis, x: &str) -> Vec<Dot> {
    let table = input.table;
    let (Ok(xs), Ok(ys)) = (table.numeric(x), table.numeric(&input.request.y)) else {
        return Vec::new();
    };
    outcome
        .rows
        .selection
        .excluded
        .iter()
        .filter_map(|&r| {
            Some(Dot {
                x: xs.get(r - 1)?,
                y: ys.get(r - 1)?,
                excluded: true,
            })
        })
        .collect()
}

/// The curves drawn without bands: one per group level, and the other model's when it is
/// drawn against the same axes.
fn lines(input: &ReportInput<'_>, e: &PairExtras, beside: Option<&Beside>) -> Vec<ChartLine> {
    let along = |c: &Curve| c.points.iter().map(|b| (b.x, b.fitted)).collect();
    let mut out: Vec<ChartLine> = e
        .curves
        .iter()
        .enumerate()
        .filter(|(_, c)| c.level.is_some())
        .map(|(k, c)| ChartLine {
            label: format!("fit, {}", c.level.as_deref().unwrap_or_default()),
            points: along(c),
            kind: LineKind::Level(k),
        })
        .collect();
    let request = &input.request;
    let same_axes = |b: &&Beside| b.request.y == request.y && b.request.x[0] == request.x[0];
    for c in beside.filter(same_axes).iter().flat_map(|b| &b.curves) {
        let label = match &c.level {
            Some(l) => format!("other model, {l}"),
            None => "other model".to_string(),
        };
        out.push(ChartLine {
            label,
            points: along(c),
            kind: LineKind::Kept,
        });
    }
    out
}

fn pair_figure(
    input: &ReportInput<'_>,
    outcome: &Analysis,
    e: &PairExtras,
    beside: Option<&Beside>,
) -> Result<Chart> {
    let request = &input.request;
    let sel = &outcome.rows.selection;
    let mut all = dots(sel.columns[1].iter().zip(sel.columns[0].iter()));
    all.extend(excluded_dots(input, outcome, &request.x[0]));
    let curve = crate::charts::band_rows(e.bands());
    let data = PairChart {
        x_label: &request.x[0],
        y_label: &request.y,
        dots: all,
        curve,
        lines: lines(input, e, beside),
    };
    pair_chart(
        &data,
        format!(
            "{} against {}, with the fit and its bands",
            request.y, request.x[0]
        ),
    )
}

/// The response (on the model's scale) against its fitted value.
fn fitted_figure(input: &ReportInput<'_>, outcome: &Analysis) -> Result<Chart> {
    let y = &outcome.response_label(&input.request.y);
    let data = PairChart {
        x_label: "fitted value",
        y_label: y,
        dots: dots(outcome.fit.fitted.iter().zip(outcome.rows.y())),
        curve: Vec::new(),
        lines: Vec::new(),
    };
    pair_chart(&data, format!("{y} against its fitted value"))
}
