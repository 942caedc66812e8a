//! `plumb columns`: what the loader made of a file.

use std::fmt::Write;

use plumb_report::text::{count, num, plural};

use crate::cli::ColumnsArgs;

pub fn run(args: &ColumnsArgs) -> anyhow::Result<String> {
    let table = plumb_data::load(&args.load.data, &args.load.options_for_numbers())?;
    let mut out = String::new();
    writeln!(
        out,
        "{} · {} · read as {}",
        table.source().display(),
        plural(table.n_rows(), "data row", "data rows"),
        table.format()
    )?;
    writeln!(out)?;
    writeln!(
        out,
        "  {:<24} {:<8} {:>8} {:>14} {:>14}",
        "column", "type", "missing", "lowest", "highest"
    )?;
    for s in table.summaries() {
        let show = |v: Option<f64>| v.map_or_else(|| "—".to_string(), num);
        writeln!(
            out,
            "  {:<24} {:<8} {:>8} {:>14} {:>14}",
            s.name,
            s.kind,
            count(s.missing),
            show(s.min),
            show(s.max)
        )?;
    }
    for note in table.notes() {
        writeln!(out, "note: {note}")?;
    }
    Ok(out)
}
