//! The readable layout of a model's parts beyond its columns, in `plumb fit`: the response's
//! scale, the Box–Cox estimate, the groups, and the comparison with a second model.

use std::fmt::Write;

use plumb_data::analysis::{Analysis, Comparison, FitFigures, FitRequest};
use plumb_report::text::{count, fixed, num};
use plumb_report::wording;
use plumb_report::wording::numbers as words;

/// The lines, or nothing for a model of columns as they are.
pub fn render(outcome: &Analysis, request: &FitRequest, comparison: Option<&Comparison>) -> String {
    let mut out = String::new();
    // Writing to a String cannot fail.
    let _ = scale(&mut out, outcome, request);
    let _ = groups(&mut out, outcome);
    if let Some(c) = comparison {
        let _ = compared(&mut out, c);
    }
    out
}

fn scale(out: &mut String, o: &Analysis, request: &FitRequest) -> std::fmt::Result {
    if let Some(note) = wording::scale_note(&o.response_label(&request.y), &request.y) {
        writeln!(out, "  scale                {note}")?;
    }
    if let Some(b) = &o.rows.boxcox {
        writeln!(out, "  Box–Cox              {}", wording::box_cox(b))?;
    }
    Ok(())
}

fn groups(out: &mut String, o: &Analysis) -> std::fmt::Result {
    let Some(g) = &o.groups else { return Ok(()) };
    writeln!(
        out,
        "  groups by {} (reference {})",
        g.column,
        g.table.first().map_or("—", |r| r.level.as_str())
    )?;
    writeln!(
        out,
        "    equal slopes of {}    {}",
        g.predictor,
        wording::f_test(&g.equal_slopes)
    )?;
    writeln!(
        out,
        "    one common line       {}",
        wording::f_test(&g.common_line)
    )?;
    writeln!(
        out,
        "    {:<16} {:>6} {:>14} {:>17}   interval",
        "level",
        "rows",
        "slope",
        words::STANDARD_ERROR
    )?;
    for r in &g.table {
        writeln!(
            out,
            "    {:<16} {:>6} {:>14} {:>17}   {}",
            r.level,
            count(r.n),
            num(r.slope.estimate),
            num(r.slope.std_error),
            words::interval_ends(r.slope.ci_low, r.slope.ci_high, 6)
        )?;
    }
    writeln!(out)
}

fn compared(out: &mut String, c: &Comparison) -> std::fmt::Result {
    writeln!(out, "  beside another model ({})", c.note)?;
    let row = |name: &str, f: &FitFigures| {
        format!(
            "    {name:<6} {} = {}\n           rows {}  R² {}  adjusted R² {}  {} ± {}  AIC {}  BIC {}",
            f.response,
            f.terms.join(" + "),
            count(f.n),
            num(f.r_squared),
            num(f.adj_r_squared),
            words::TYPICAL_MISS,
            num(f.residual_std_error),
            fixed(f.aic, 3),
            fixed(f.bic, 3)
        )
    };
    writeln!(out, "{}", row("this", &c.current))?;
    writeln!(out, "{}", row("other", &c.kept))?;
    if let Some(n) = &c.nested {
        writeln!(out, "    partial F           {}", wording::f_test(n))?;
    }
    writeln!(out)
}
