//! The summary's charts: the pair with its fit and bands (or y against its fitted value with
//! several predictors), the residuals, and the influence view; excluded rows stay visible.

use plumb_data::analysis::{Analysis, PairExtras};

use super::ReportInput;
use crate::charts::{leverage_chart, pair_chart, residual_chart, Chart, Dot, PairChart};
use crate::Result;

/// Every chart of the summary.
///
/// # Errors
/// A chart that could not be drawn.
pub fn draw(input: &ReportInput<'_>, outcome: &Analysis) -> Result<Vec<Chart>> {
    let first = match &outcome.extras {
        Some(e) => pair_figure(input, outcome, e)?,
        None => fitted_figure(input, outcome)?,
    };
    let residuals = dots(outcome.fit.fitted.iter().zip(&outcome.fit.residuals));
    let leverage: Vec<Dot> = outcome
        .cases
        .iter()
        .map(|c| Dot {
            x: c.leverage,
            y: c.studentized_external,
            excluded: false,
        })
        .collect();
    Ok(vec![
        first,
        residual_chart(&residuals, "residuals against fitted values".into())?,
        leverage_chart(
            &leverage,
            outcome.fit.coefficients.len(),
            "leverage against studentized residual (dashed: Cook's distance 0.5 and 1)".into(),
        )?,
    ])
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
                x: xs[r - 1]?,
                y: ys[r - 1]?,
                excluded: true,
            })
        })
        .collect()
}

fn pair_figure(input: &ReportInput<'_>, outcome: &Analysis, e: &PairExtras) -> Result<Chart> {
    let request = &input.request;
    let sel = &outcome.rows.selection;
    let mut all = dots(sel.columns[1].iter().zip(&sel.columns[0]));
    all.extend(excluded_dots(input, outcome, &request.x[0]));
    let curve = e
        .bands()
        .iter()
        .map(|b| {
            [
                b.x,
                b.fitted,
                b.mean_low,
                b.mean_high,
                b.predict_low,
                b.predict_high,
            ]
        })
        .collect();
    let data = PairChart {
        x_label: &request.x[0],
        y_label: &request.y,
        dots: all,
        curve,
    };
    pair_chart(
        &data,
        format!(
            "{} against {}, with the fit and its bands",
            request.y, request.x[0]
        ),
    )
}

fn fitted_figure(input: &ReportInput<'_>, outcome: &Analysis) -> Result<Chart> {
    let y = &input.request.y;
    let data = PairChart {
        x_label: "fitted value",
        y_label: y,
        dots: dots(
            outcome
                .fit
                .fitted
                .iter()
                .zip(&outcome.rows.selection.columns[0]),
        ),
        curve: Vec::new(),
    };
    pair_chart(&data, format!("{y} against its fitted value"))
}
