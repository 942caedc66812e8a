//! `plumb fit`: load, fit, print.

use plumb_data::analysis::{analyze, assumption_checks, compare, ExtrasRequest, Wanted};

use crate::cli::{FitArgs, Format};
use crate::{fit_json, fit_text};

pub fn run(args: &FitArgs) -> anyhow::Result<String> {
    let mut columns = args.model.columns();
    columns.extend(args.order.order.iter().cloned());
    let table = plumb_data::load(&args.load.data, &args.load.options_for(columns))?;
    let request = args.model.request(&table).map_err(anyhow::Error::msg)?;
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
    let other = args.compare.other(&request).map_err(anyhow::Error::msg)?;
    let comparison = other
        .map(|o| compare(&table, &o, &request, ["the other model", "this one"]))
        .transpose()?;
    let checks = assumption_checks(&table, &outcome, &args.order.row_order())?;
    let extras = outcome.extras.as_ref();
    Ok(match args.format {
        Format::Json => {
            let mut keys = crate::model_json::keys(&outcome, &request, comparison.as_ref());
            keys.insert("checks".into(), crate::checks_out::json(&checks));
            fit_json::render(&table, &request, &outcome, extras, keys)?
        }
        Format::Text => {
            let mut model = crate::model_text::render(&outcome, &request, comparison.as_ref());
            // Writing to a String cannot fail.
            let _ = crate::checks_out::write(&mut model, &checks);
            fit_text::render(&table, &request, &outcome, extras, &model)
        }
    })
}
