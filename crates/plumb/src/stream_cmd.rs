//! `plumb stream`: the line of y on x and Pearson's r from one pass over a file of any size.
//!
//! Pass 1 streams the two columns through the mergeable co-moments; when the line explains
//! nearly everything (`1 − R²` below the core's threshold) a second pass sums the squared
//! residuals directly, because `Syy − b·Sxy` would have cancelled digits.

use std::fmt::Write;
use std::ops::ControlFlow;

use plumb_core::moments::CoMoments;
use plumb_core::regression::{
    line_from_moments, residual_sum_of_squares, LineSummary, RESIDUAL_PASS_BELOW,
};
use plumb_data::{stream_columns, StreamOptions, StreamSummary};
use plumb_report::text::{count, num, p, sig};
use plumb_report::wording;
use plumb_report::wording::numbers::{self as words, Headline};
use serde::Serialize;

use crate::cli::{Format, StreamArgs};
use crate::fit_json::CoefficientJson;

pub fn run(args: &StreamArgs) -> anyhow::Result<String> {
    let options = StreamOptions {
        load: args.load.options(),
        chunk_bytes: (args.chunk_mb as usize) << 20,
    };
    let path = &args.load.data;
    let names = [args.x.as_str(), args.y.as_str()];
    let mut moments = CoMoments::new(2);
    let summary = stream_columns(path, &names, &options, |piece| {
        moments.add(&[&piece.columns[0], &piece.columns[1]]);
        ControlFlow::Continue(())
    })?;
    let mut line = line_from_moments(&moments, args.level, None)
        .map_err(|e| anyhow::anyhow!("{}: {e}", path.display()))?;
    if 1.0 - line.r_squared < RESIDUAL_PASS_BELOW {
        let (a, b) = (line.intercept.estimate, line.slope.estimate);
        let mut rss = 0.0;
        stream_columns(path, &names, &options, |piece| {
            rss += residual_sum_of_squares(&piece.columns[0], &piece.columns[1], a, b);
            ControlFlow::Continue(())
        })?;
        line = line_from_moments(&moments, args.level, Some(rss))
            .map_err(|e| anyhow::anyhow!("{}: {e}", path.display()))?;
    }
    line.slope.term.clone_from(&args.x);
    Ok(match args.format {
        Format::Text => text(args, &summary, &line)?,
        Format::Json => json(args, &summary, &line)?,
    })
}

fn text(args: &StreamArgs, s: &StreamSummary, line: &LineSummary) -> anyhow::Result<String> {
    let mut out = String::new();
    writeln!(
        out,
        "{}  (read in one pass, {} bytes)",
        args.load.data.display(),
        count(usize::try_from(s.bytes).unwrap_or(usize::MAX))
    )?;
    writeln!(
        out,
        "  line    {} = a + b·{}   (least squares)",
        args.y, args.x
    )?;
    writeln!(
        out,
        "  rows    {} used of {}; {} dropped for gaps{}",
        count(usize::try_from(line.n).unwrap_or(usize::MAX)),
        count(s.rows),
        count(s.dropped_count),
        dropped_list(s)
    )?;
    writeln!(out)?;
    let h = Headline::of_line(line, &args.y);
    writeln!(out, "  {}: {}", h.r_squared(), h.share())?;
    for l in h.lines() {
        writeln!(out, "    {:<20}{}", l.label, l.figures)?;
    }
    writeln!(out, "    {:<20}{}", "Pearson r", num(line.r))?;
    if line.residual_pass {
        writeln!(out, "    {:<20}residuals summed in a second pass", "")?;
    }
    writeln!(out)?;
    writeln!(
        out,
        "  {:<14} {:>14} {:>17} {:>9} {:>10}   {}",
        "term",
        words::VALUE,
        words::STANDARD_ERROR,
        "t",
        "p",
        words::interval(line.level)
    )?;
    for (name, c) in [
        ("a (intercept)", &line.intercept),
        ("b (slope)", &line.slope),
    ] {
        writeln!(
            out,
            "  {:<14} {:>14} {:>17} {:>9} {:>10}   {}",
            name,
            num(c.estimate),
            num(c.std_error),
            sig(c.t, 4),
            p(c.p_value),
            words::interval_ends(c.ci_low, c.ci_high, 6)
        )?;
    }
    writeln!(out)?;
    writeln!(
        out,
        "    {} from {} to {}; {} from {} to {}",
        args.x,
        num(line.x_range.0),
        num(line.x_range.1),
        args.y,
        num(line.y_range.0),
        num(line.y_range.1)
    )?;
    writeln!(out)?;
    writeln!(out, "  note: no rows were excluded and no per-row diagnostics were computed (the file is not held in memory); to inspect rows, open an extract in the workbench.")?;
    let cautions = [wording::NOT_CAUSATION, wording::FOLLOW_PROTOCOL];
    writeln!(out, "  note: {}", wording::line(&cautions))?;
    Ok(out)
}

fn dropped_list(s: &StreamSummary) -> String {
    if s.dropped.is_empty() {
        return String::new();
    }
    let rows: Vec<String> = s
        .dropped
        .iter()
        .map(|d| format!("{} ({} {})", d.row, d.column, d.reason.as_str()))
        .collect();
    let more = if s.dropped_count > s.dropped.len() {
        format!(", and {} more", count(s.dropped_count - s.dropped.len()))
    } else {
        String::new()
    };
    format!(": {}{more}", rows.join(", "))
}

#[derive(Serialize)]
struct StreamJson<'a> {
    data: String,
    response: &'a str,
    predictor: &'a str,
    level: f64,
    bytes_read: u64,
    rows: usize,
    n: u64,
    n_dropped: usize,
    first_dropped_rows: Vec<usize>,
    r_squared: f64,
    adj_r_squared: f64,
    pearson_r: f64,
    residual_std_error: f64,
    df_residual: usize,
    f_statistic: Option<f64>,
    f_p_value: Option<f64>,
    residual_pass: bool,
    coefficients: [CoefficientJson<'a>; 2],
}

fn json(args: &StreamArgs, s: &StreamSummary, line: &LineSummary) -> anyhow::Result<String> {
    let j = StreamJson {
        data: args.load.data.display().to_string(),
        response: &args.y,
        predictor: &args.x,
        level: line.level,
        bytes_read: s.bytes,
        rows: s.rows,
        n: line.n,
        n_dropped: s.dropped_count,
        first_dropped_rows: s.dropped.iter().map(|d| d.row).collect(),
        r_squared: line.r_squared,
        adj_r_squared: line.adj_r_squared,
        pearson_r: line.r,
        residual_std_error: line.residual_std_error,
        df_residual: line.anova.df_residual,
        f_statistic: line.anova.f_statistic,
        f_p_value: line.anova.f_p_value,
        residual_pass: line.residual_pass,
        coefficients: [(&line.intercept).into(), (&line.slope).into()],
    };
    Ok(serde_json::to_string_pretty(&j)? + "\n")
}
