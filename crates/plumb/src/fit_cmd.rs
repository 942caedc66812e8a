//! `plumb fit`: load, fit, print.

use plumb_data::analysis::{run_fit, FitRequest};

use crate::cli::{FitArgs, Format};
use crate::{fit_json, fit_text};

pub fn run(args: &FitArgs) -> anyhow::Result<String> {
    let table = plumb_data::load(&args.load.data, &args.load.options())?;
    let request = FitRequest {
        y: args.y.clone(),
        x: args.x.clone(),
        intercept: !args.no_intercept,
        degree: args.degree,
        weights: args.weights.clone(),
        exclude: args
            .exclude
            .as_ref()
            .map(|r| r.0.clone())
            .unwrap_or_default(),
        level: args.level,
    };
    let outcome = run_fit(&table, &request)?;
    Ok(match args.format {
        Format::Json => fit_json::render(&table, &request, &outcome)?,
        Format::Text => fit_text::render(&table, &request, &outcome),
    })
}
