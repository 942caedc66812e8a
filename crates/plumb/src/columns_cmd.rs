//! `plumb columns`: what the loader made of a file.

use std::fmt::Write;

use crate::cli::ColumnsArgs;

pub fn run(args: &ColumnsArgs) -> anyhow::Result<String> {
    let table = plumb_data::load(&args.load.data, &args.load.options())?;
    let mut out = String::new();
    writeln!(
        out,
        "{} · {} data rows · read as {}",
        table.source().display(),
        table.n_rows(),
        table.format()
    )?;
    writeln!(out)?;
    writeln!(
        out,
        "  {:<24} {:<8} {:>8} {:>14} {:>14}",
        "column", "type", "missing", "lowest", "highest"
    )?;
    for c in table.columns() {
        let s = c.summary();
        let show = |v: Option<f64>| v.map_or_else(|| "—".to_string(), |x| format!("{x:.6}"));
        writeln!(
            out,
            "  {:<24} {:<8} {:>8} {:>14} {:>14}",
            s.name,
            s.kind,
            s.missing,
            show(s.min),
            show(s.max)
        )?;
    }
    for note in table.notes() {
        writeln!(out, "note: {note}")?;
    }
    Ok(out)
}
