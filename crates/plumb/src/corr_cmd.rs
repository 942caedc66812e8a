//! `plumb corr`: the pairwise association matrix, as JSON or as a list of pairs.

use std::fmt::Write;

use plumb_core::association::{
    correlation_matrix, Adjustment, CorrelationMatrix, MatrixSize, Method,
};
use plumb_data::ColumnValues;
use plumb_report::text::{count, p, plural, sig};
use plumb_report::wording;
use serde::Serialize;

use crate::cli::{AdjustArg, CorrArgs, Format, MethodArg};

#[derive(Serialize)]
struct CorrJson<'a> {
    data: String,
    method: &'static str,
    adjust: &'static str,
    n_tests: usize,
    columns: &'a [String],
    order: Option<&'a str>,
    r: &'a [Vec<Option<f64>>],
    p_value: &'a [Vec<Option<f64>>],
    p_adjusted: &'a [Vec<Option<f64>>],
    n: &'a [Vec<usize>],
    ci_level: Option<f64>,
    ci_low: Option<Vec<Vec<Option<f64>>>>,
    ci_high: Option<Vec<Vec<Option<f64>>>>,
    reason: &'a [Vec<Option<String>>],
    r_differenced: Option<&'a [Vec<Option<f64>>]>,
    r_detrended: Option<&'a [Vec<Option<f64>>]>,
}

pub fn run(args: &CorrArgs) -> anyhow::Result<String> {
    let table = plumb_data::load(&args.load.data, &args.load.options_for_numbers())?;
    let columns = columns_of(args, &table)?;
    let values: Vec<&[f64]> = columns
        .iter()
        .map(|c| table.numeric(c).map(plumb_data::Numbers::as_nan_missing))
        .collect::<Result<_, _>>()?;
    let order = args
        .order
        .as_deref()
        .map(|o| table.numeric(o).map(plumb_data::Numbers::as_nan_missing))
        .transpose()?;
    let method = match args.method {
        MethodArg::Pearson => Method::Pearson,
        MethodArg::Spearman => Method::Spearman,
        MethodArg::Kendall => Method::Kendall,
        MethodArg::Distance => Method::Distance,
    };
    let adjust = match args.adjust {
        AdjustArg::Holm => Adjustment::Holm,
        AdjustArg::Bh => Adjustment::BenjaminiHochberg,
        AdjustArg::None => Adjustment::None,
    };
    let m = correlation_matrix(&values, method, adjust, order);
    let applied = if m.n_tests > 1 {
        adjust
    } else {
        Adjustment::None
    };
    let file = table.source().display().to_string();
    Ok(match args.format {
        Format::Json => json(file, args, &columns, (method, applied), &m)?,
        Format::Text => text(&file, &columns, method, applied, &m),
    })
}

/// The columns asked for, or every numeric column but the order column.
fn columns_of(args: &CorrArgs, table: &plumb_data::Table) -> anyhow::Result<Vec<String>> {
    let columns: Vec<String> = if args.columns.is_empty() {
        table
            .columns()
            .iter()
            .filter(|c| matches!(&c.values, ColumnValues::Numeric(v) if !v.all_missing()))
            .map(|c| c.name.clone())
            .filter(|n| Some(n) != args.order.as_ref())
            .collect()
    } else {
        args.columns.clone()
    };
    let size = MatrixSize::of(columns.len());
    if !size.is_allowed() {
        anyhow::bail!(
            "{}: {}: name the columns to compare with --columns a,b,c, or split the table",
            table.source().display(),
            wording::matrix_too_wide(&size)
        );
    }
    if columns.len() < 2 {
        anyhow::bail!(
            "{}: at least two numeric columns are needed, found {}; name them with --columns",
            table.source().display(),
            columns.len()
        );
    }
    Ok(columns)
}

fn json(
    data: String,
    args: &CorrArgs,
    columns: &[String],
    (method, applied): (Method, Adjustment),
    m: &CorrelationMatrix,
) -> anyhow::Result<String> {
    let pearson = method == Method::Pearson;
    let json = CorrJson {
        data,
        method: method.as_str(),
        adjust: applied.as_str(),
        n_tests: m.n_tests,
        columns,
        order: args.order.as_deref(),
        r: &m.r,
        p_value: &m.p_value,
        p_adjusted: &m.p_adjusted,
        n: &m.n,
        ci_level: pearson.then_some(0.95),
        ci_low: pearson.then(|| ends(m, |c| c.0)),
        ci_high: pearson.then(|| ends(m, |c| c.1)),
        reason: &m.reason,
        r_differenced: m.r_differenced.as_deref(),
        r_detrended: m.r_detrended.as_deref(),
    };
    Ok(serde_json::to_string_pretty(&json)? + "\n")
}

fn ends(m: &CorrelationMatrix, pick: fn(&(f64, f64)) -> f64) -> Vec<Vec<Option<f64>>> {
    m.ci.iter()
        .map(|row| row.iter().map(|c| c.as_ref().map(pick)).collect())
        .collect()
}

fn text(
    file: &str,
    columns: &[String],
    method: Method,
    adjust: Adjustment,
    m: &CorrelationMatrix,
) -> String {
    let mut pairs: Vec<(usize, usize)> = (0..columns.len())
        .flat_map(|i| (i + 1..columns.len()).map(move |j| (i, j)))
        .collect();
    pairs.sort_by(|a, b| {
        let key = |(i, j): (usize, usize)| m.r[i][j].map_or(-1.0, f64::abs);
        key(*b).total_cmp(&key(*a))
    });
    let mut out = String::new();
    let _ = writeln!(out, "{file}");
    let _ = writeln!(
        out,
        "  {} of {} columns, {} coefficient; p adjusted by {} across {}\n",
        plural(pairs.len(), "pair", "pairs"),
        count(columns.len()),
        method.as_str(),
        adjust.as_str(),
        plural(m.n_tests, "test", "tests")
    );
    let _ = write!(
        out,
        "  {:<20} {:<20} {:>8} {:>10} {:>10} {:>6}",
        "column", "with", "coef", "p", "p adj.", "n"
    );
    if m.r_detrended.is_some() {
        let _ = write!(out, " {:>9} {:>9}", "Δ-series", "detrended");
    }
    out.push('\n');
    let mut cues = Vec::new();
    for (i, j) in pairs {
        out.push_str(&pair_line(columns, m, i, j));
        if m.drifts_together(i, j) {
            cues.push(wording::shared_trend(&columns[i], &columns[j]));
        }
    }
    for cue in cues {
        let _ = writeln!(out, "\n  cue: {cue}");
    }
    let _ = writeln!(out, "\n  note: {}", wording::line(&wording::MAP_CAUTIONS));
    out
}

/// One pair's line: coefficient, p, adjusted p, n, and with a row order the coefficients of
/// first differences and after removing the trend.
fn pair_line(columns: &[String], m: &CorrelationMatrix, i: usize, j: usize) -> String {
    let cell = |v: Option<f64>| v.map_or_else(|| "—".to_string(), |x| sig(x, 3));
    let pv = |v: Option<f64>| v.map_or_else(|| "—".to_string(), p);
    let mut line = format!(
        "  {:<20} {:<20} {:>8} {:>10} {:>10} {:>6}",
        columns[i],
        columns[j],
        cell(m.r[i][j]),
        pv(m.p_value[i][j]),
        pv(m.p_adjusted[i][j]),
        count(m.n[i][j])
    );
    if let (Some(diff), Some(det)) = (&m.r_differenced, &m.r_detrended) {
        let _ = write!(line, " {:>9} {:>9}", cell(diff[i][j]), cell(det[i][j]));
    }
    if let Some(why) = &m.reason[i][j] {
        let _ = write!(line, "  ({why})");
    }
    line.push('\n');
    line
}
