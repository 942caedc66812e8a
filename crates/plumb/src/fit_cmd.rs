//! `plumb fit`: load, fit, print.

use plumb_data::analysis::{analyze, ExtrasRequest, Wanted};

use crate::cli::{FitArgs, Format};
use crate::{fit_json, fit_text};

pub fn run(args: &FitArgs) -> anyhow::Result<String> {
    let table = plumb_data::load(&args.load.data, &args.load.options())?;
    let request = args.model.request();
    if (args.robust.is_some() || args.loess.is_some()) && request.x.len() != 1 {
        anyhow::bail!(
            "--robust and --loess draw a line for one predictor; {} were given",
            request.x.len()
        );
    }
    let wanted = Wanted {
        influence: false,
        extras: Some(ExtrasRequest {
            robust: args.robust,
            loess_span: args.loess,
            at: args.at,
        }),
        ..Wanted::default()
    };
    let outcome = analyze(&table, &request, wanted)?;
    let extras = outcome.extras.as_ref();
    Ok(match args.format {
        Format::Json => fit_json::render(&table, &request, &outcome, extras)?,
        Format::Text => fit_text::render(&table, &request, &outcome, extras),
    })
}
