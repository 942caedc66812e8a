//! `plumb fit`: load, fit, print.

use plumb_data::analysis::run_fit;

use crate::cli::{FitArgs, Format};
use crate::{fit_json, fit_text};

pub fn run(args: &FitArgs) -> anyhow::Result<String> {
    let table = plumb_data::load(&args.load.data, &args.load.options())?;
    let request = args.model.request();
    let outcome = run_fit(&table, &request)?;
    Ok(match args.format {
        Format::Json => fit_json::render(&table, &request, &outcome)?,
        Format::Text => fit_text::render(&table, &request, &outcome),
    })
}
