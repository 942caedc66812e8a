//! `plumb influence`: case diagnostics of a fit, row by row.

use std::fmt::Write;

use plumb_core::regression::{
    cooks_flag_cut, CaseInfluence, LEVERAGE_FLAG_FACTOR, STUDENTIZED_FLAG,
};
use plumb_data::analysis::{analyze, Wanted};
use plumb_report::text::{count, sig};
use plumb_report::wording::influence::{flag_key_lines, flag_letters, FLAG_SOURCE};
use serde::Serialize;

use crate::cli::{Format, InfluenceArgs};

/// Rows listed in the text layout (those with flags are always listed).
const TEXT_ROWS: usize = 12;

#[derive(Serialize)]
struct InfluenceJson<'a> {
    data: String,
    n: usize,
    terms: Vec<&'a str>,
    thresholds: Thresholds,
    excluded_rows: &'a [usize],
    rows: Vec<RowJson<'a>>,
}

#[derive(Serialize)]
struct Thresholds {
    leverage: f64,
    cooks_distance: f64,
    studentized_external: f64,
    source: &'static str,
}

#[derive(Serialize)]
struct RowJson<'a> {
    row: usize,
    fitted: f64,
    residual: f64,
    leverage: f64,
    studentized_internal: f64,
    studentized_external: f64,
    cooks_distance: f64,
    dffits: f64,
    dfbetas: &'a [f64],
    flags: Vec<&'static str>,
    #[serde(skip)]
    letters: String,
}

pub fn run(args: &InfluenceArgs) -> anyhow::Result<String> {
    let table = plumb_data::load(
        &args.load.data,
        &args.load.options_for(args.model.columns()),
    )?;
    let wanted = Wanted {
        influence: true,
        dfbetas: true,
        extras: None,
        ..Wanted::default()
    };
    let request = args.model.request(&table).map_err(anyhow::Error::msg)?;
    let outcome = analyze(&table, &request, wanted)?;
    let cases = &outcome.cases;
    let dfbetas = outcome
        .dfbetas
        .as_ref()
        .ok_or_else(|| anyhow::anyhow!("the DFBETAS were asked for and not computed"))?;
    let n = outcome.fit.n;
    let p = outcome.fit.coefficients.len();
    let thresholds = Thresholds {
        leverage: LEVERAGE_FLAG_FACTOR * p as f64 / n as f64,
        cooks_distance: cooks_flag_cut(n),
        studentized_external: STUDENTIZED_FLAG,
        source: "common practice, no source",
    };
    let rows: Vec<RowJson> = outcome
        .rows
        .selection
        .rows
        .iter()
        .zip(cases)
        .enumerate()
        .map(|(i, (&row, c))| row_json(row, c, dfbetas.row(i)))
        .collect();
    Ok(match args.format {
        Format::Json => {
            let json = InfluenceJson {
                data: table.source().display().to_string(),
                n,
                terms: outcome
                    .fit
                    .coefficients
                    .iter()
                    .map(|c| c.term.as_str())
                    .collect(),
                thresholds,
                excluded_rows: &outcome.rows.selection.excluded,
                rows,
            };
            serde_json::to_string_pretty(&json)? + "\n"
        }
        Format::Text => text(&table.source().display().to_string(), n, p, rows),
    })
}

fn row_json<'a>(row: usize, c: &'a CaseInfluence, dfbetas: &'a [f64]) -> RowJson<'a> {
    RowJson {
        row,
        fitted: c.fitted,
        residual: c.residual,
        leverage: c.leverage,
        studentized_internal: c.studentized_internal,
        studentized_external: c.studentized_external,
        cooks_distance: c.cooks_distance,
        dffits: c.dffits,
        dfbetas,
        flags: c.flags.iter().map(|f| f.as_str()).collect(),
        letters: flag_letters(&c.flags),
    }
}

fn text(file: &str, n: usize, p: usize, mut rows: Vec<RowJson>) -> String {
    rows.sort_by(|a, b| b.cooks_distance.total_cmp(&a.cooks_distance));
    let flagged = rows.iter().filter(|r| !r.flags.is_empty()).count();
    let mut out = String::new();
    let _ = writeln!(out, "{file}");
    let _ = writeln!(
        out,
        "  {} used, {} flagged; sorted by Cook's distance\n",
        count(rows.len()),
        count(flagged)
    );
    let _ = writeln!(
        out,
        "  {:>6} {:>12} {:>12} {:>9} {:>12} {:>10} {:>9}   flags",
        "row", "fitted", "residual", "leverage", "studentized", "Cook's D", "DFFITS"
    );
    for (k, r) in rows.iter().enumerate() {
        if k >= TEXT_ROWS && r.flags.is_empty() {
            continue;
        }
        let _ = writeln!(
            out,
            "  {:>6} {:>12} {:>12} {:>9} {:>12} {:>10} {:>9}   {}",
            r.row,
            sig(r.fitted, 5),
            sig(r.residual, 5),
            sig(r.leverage, 4),
            sig(r.studentized_external, 4),
            sig(r.cooks_distance, 4),
            sig(r.dffits, 4),
            r.letters
        );
    }
    let _ = writeln!(out, "\n  flags ({FLAG_SOURCE}):");
    for line in flag_key_lines(n, p) {
        let _ = writeln!(out, "    {line}");
    }
    let _ = writeln!(out, "\n  {}", plumb_report::wording::REASON_NEEDED);
    out
}
