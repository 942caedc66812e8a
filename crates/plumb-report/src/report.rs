//! The summary for a colleague: HTML with inline charts, charts as SVG and PNG, and CSVs.

use std::fmt::Write as _;
use std::path::{Path, PathBuf};

use plumb_core::regression::LinearFit;
use plumb_data::analysis::{analyze, Analysis, ExtrasRequest, FitRequest, Wanted};
use plumb_data::Table;

use crate::charts::{leverage_chart, pair_chart, residual_chart, Chart, Dot, PairChart};
use crate::effects::{exclusion_effects, Effect};
use crate::session::Exclusion;
use crate::text::{csv, exact, html, num, p};
use crate::wording;
use crate::{write_atomically, Result};

const STYLE: &str = include_str!("report.css");

/// Everything a summary is made from.
#[derive(Debug, Clone)]
pub struct ReportInput<'a> {
    /// The loaded table.
    pub table: &'a Table,
    /// SHA-256 of the data file.
    pub sha256: String,
    /// The model, with `exclude` listing the excluded rows.
    pub request: FitRequest,
    /// The reason (and time, where recorded) of each excluded row.
    pub exclusions: Vec<Exclusion>,
    /// The command that reproduces this summary.
    pub reproduce: String,
}

/// A built summary, not yet written.
#[derive(Debug, Clone, PartialEq)]
pub struct Report {
    /// The self-contained HTML page.
    pub html: String,
    /// Every statistic, one per line: `section,name,term,value`.
    pub statistics_csv: String,
    /// The exclusion log with before/after numbers.
    pub exclusions_csv: String,
    /// The charts.
    pub charts: Vec<Chart>,
}

/// Builds the summary.
///
/// # Errors
/// Loading, fitting or drawing failures, each naming what failed.
pub fn build(input: &ReportInput<'_>) -> Result<Report> {
    let request = &input.request;
    // One fit serves the tables, the charts and the diagnostics.
    let wanted = Wanted {
        influence: true,
        extras: Some(ExtrasRequest::default()),
    };
    let outcome = analyze(input.table, request, wanted)?;
    let (cases, extras) = (&outcome.cases, outcome.extras.as_ref());
    let effects = exclusion_effects(input.table, request)?;
    let charts = draw_charts(input, &outcome, cases, extras)?;
    let mut out = String::new();
    page(
        &mut out,
        input,
        &outcome,
        extras,
        &effects,
        &input.exclusions,
        &charts,
    );
    Ok(Report {
        html: out,
        statistics_csv: statistics_csv(&outcome.fit, &outcome),
        exclusions_csv: exclusions_csv(&effects, &input.exclusions),
        charts,
    })
}

/// Writes the summary: `out` (HTML) and, beside it, `STEM-statistics.csv`,
/// `STEM-exclusions.csv`, `STEM-CHART.svg` and `STEM-CHART.png`. Every file is written atomically.
///
/// # Errors
/// [`crate::ReportError::Io`] for the first file that could not be written.
pub fn write(report: &Report, out: &Path) -> Result<Vec<PathBuf>> {
    let stem = out
        .file_stem()
        .map_or_else(|| "summary".into(), |s| s.to_string_lossy().into_owned());
    let beside = |suffix: &str| out.with_file_name(format!("{stem}-{suffix}"));
    let mut files: Vec<(PathBuf, &[u8])> = vec![
        (out.to_path_buf(), report.html.as_bytes()),
        (beside("statistics.csv"), report.statistics_csv.as_bytes()),
        (beside("exclusions.csv"), report.exclusions_csv.as_bytes()),
    ];
    for c in &report.charts {
        files.push((beside(&format!("{}.svg", c.name)), c.svg.as_bytes()));
        files.push((beside(&format!("{}.png", c.name)), &c.png));
    }
    for (path, bytes) in &files {
        write_atomically(path, bytes)?;
    }
    Ok(files.into_iter().map(|f| f.0).collect())
}

fn draw_charts(
    input: &ReportInput<'_>,
    outcome: &Analysis,
    cases: &[plumb_core::regression::CaseInfluence],
    extras: Option<&plumb_data::analysis::PairExtras>,
) -> Result<Vec<Chart>> {
    let request = &input.request;
    let sel = &outcome.selection;
    let mut charts = Vec::new();
    let excluded_dots = |xcol: &str| -> Vec<Dot> {
        let (Ok(xs), Ok(ys)) = (input.table.numeric(xcol), input.table.numeric(&request.y)) else {
            return Vec::new();
        };
        sel.excluded
            .iter()
            .filter_map(|&r| {
                Some(Dot {
                    x: xs[r - 1]?,
                    y: ys[r - 1]?,
                    excluded: true,
                })
            })
            .collect()
    };
    if let Some(e) = extras {
        let mut dots: Vec<Dot> = sel.columns[1]
            .iter()
            .zip(&sel.columns[0])
            .map(|(&x, &y)| Dot {
                x,
                y,
                excluded: false,
            })
            .collect();
        dots.extend(excluded_dots(&request.x[0]));
        let curve = e
            .bands
            .iter()
            .map(|b| {
                [
                    b.x,
                    b.fitted,
                    b.mean_low,
                    b.mean_high,
                    b.predict_low,
                    b.predict_high,
                ]
            })
            .collect();
        let data = PairChart {
            x_label: &request.x[0],
            y_label: &request.y,
            dots,
            curve,
        };
        charts.push(pair_chart(
            &data,
            format!(
                "{} against {}, with the fit and its bands",
                request.y, request.x[0]
            ),
        )?);
    } else {
        let dots: Vec<Dot> = outcome
            .fit
            .fitted
            .iter()
            .zip(&sel.columns[0])
            .map(|(&x, &y)| Dot {
                x,
                y,
                excluded: false,
            })
            .collect();
        let data = PairChart {
            x_label: "fitted value",
            y_label: &request.y,
            dots,
            curve: Vec::new(),
        };
        charts.push(pair_chart(
            &data,
            format!("{} against its fitted value", request.y),
        )?);
    }
    let resid: Vec<Dot> = outcome
        .fit
        .fitted
        .iter()
        .zip(&outcome.fit.residuals)
        .map(|(&x, &y)| Dot {
            x,
            y,
            excluded: false,
        })
        .collect();
    charts.push(residual_chart(
        &resid,
        "residuals against fitted values".into(),
    )?);
    let lev: Vec<Dot> = cases
        .iter()
        .map(|c| Dot {
            x: c.leverage,
            y: c.studentized_external,
            excluded: false,
        })
        .collect();
    charts.push(leverage_chart(
        &lev,
        outcome.fit.coefficients.len(),
        "leverage against studentized residual (dashed: Cook's distance 0.5 and 1)".into(),
    )?);
    Ok(charts)
}

fn page(
    out: &mut String,
    input: &ReportInput<'_>,
    outcome: &Analysis,
    extras: Option<&plumb_data::analysis::PairExtras>,
    effects: &[Effect],
    log: &[Exclusion],
    charts: &[Chart],
) {
    let fit = &outcome.fit;
    let sel = &outcome.selection;
    let request = &input.request;
    let file = input.table.source().file_name().map_or_else(
        || input.table.source().display().to_string(),
        |f| f.to_string_lossy().into_owned(),
    );
    let _ = write!(
        out,
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n<title>Plumbline summary: {}</title>\n<style>\n{STYLE}</style>\n</head>\n<body>\n",
        html(&file)
    );
    let _ = writeln!(out, "<header><h1>{} explained by {}</h1><p class=\"sub\">Plumbline summary of <b>{}</b></p></header>", html(&request.y), html(&request.x.join(", ")), html(&file));
    let _ = writeln!(out, "<section class=\"facts\"><h2>Data</h2><dl>");
    let _ = writeln!(
        out,
        "<dt>file</dt><dd>{}</dd><dt>SHA-256</dt><dd class=\"mono\">{}</dd>",
        html(&input.table.source().display().to_string()),
        html(&input.sha256)
    );
    let _ = writeln!(out, "<dt>rows</dt><dd>{} in the file; {} used; {} dropped for gaps; {} excluded by the analyst</dd></dl>", input.table.n_rows(), fit.n, sel.dropped.len(), sel.excluded.len());
    if !sel.dropped.is_empty() {
        let listed: Vec<String> = sel
            .dropped
            .iter()
            .map(|d| format!("{} ({} {})", d.row, html(&d.column), d.reason.as_str()))
            .collect();
        let _ = writeln!(
            out,
            "<p class=\"small\">Dropped rows: {}.</p>",
            listed.join(", ")
        );
    }
    let _ = writeln!(out, "</section>");

    let terms: Vec<String> = crate::text::equation_terms(fit)
        .iter()
        .map(|t| html(t))
        .collect();
    let _ = writeln!(
        out,
        "<section><h2>Model</h2><p class=\"eq\">{} = {}</p>",
        html(&request.y),
        terms.join(" + ")
    );
    let _ = writeln!(out, "<table><thead><tr><th>term</th><th>estimate</th><th>std. error</th><th>t</th><th>p</th><th>{}% interval</th><th>z-units</th></tr></thead><tbody>", fit.level * 100.0);
    for c in &fit.coefficients {
        let _ = writeln!(out, "<tr><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>[{}, {}]</td><td>{}</td></tr>", html(&c.term), num(c.estimate), num(c.std_error), num(c.t), p(c.p_value), num(c.ci_low), num(c.ci_high), c.standardized.map_or_else(|| "—".into(), num));
    }
    let _ = writeln!(out, "</tbody></table>");
    let a = &fit.anova;
    let _ = writeln!(out, "<dl class=\"quality\"><dt>R² ({})</dt><dd>{}</dd><dt>adjusted R²</dt><dd>{}</dd><dt>residual SE</dt><dd>{} on {} df</dd>", fit.r_squared_kind.as_str(), num(fit.r_squared), num(fit.adj_r_squared), num(fit.residual_std_error), a.df_residual);
    if let (Some(f), Some(fp)) = (a.f_statistic, a.f_p_value) {
        let _ = writeln!(
            out,
            "<dt>overall F</dt><dd>{} on {} and {} df, p {}</dd>",
            num(f),
            a.df_model,
            a.df_residual,
            p(fp)
        );
    }
    let _ = writeln!(
        out,
        "<dt>AIC / BIC</dt><dd>{} / {}</dd></dl></section>",
        num(fit.aic),
        num(fit.bic)
    );

    let _ = writeln!(out, "<section><h2>Charts</h2><div class=\"charts\">");
    for c in charts {
        let svg = c.svg.trim_start_matches(|ch| ch != '<');
        let svg = svg
            .strip_prefix("<?xml version=\"1.0\" encoding=\"UTF-8\"?>")
            .unwrap_or(svg);
        let _ = writeln!(
            out,
            "<figure>{}<figcaption>{}</figcaption></figure>",
            svg.trim(),
            html(&c.title)
        );
    }
    let _ = writeln!(out, "</div><p class=\"small\">Filled dots: rows used. Hollow dots: rows excluded by the analyst (kept visible). Shaded: confidence band of the mean; dashed: prediction band of a new reading.</p></section>");

    let _ = writeln!(out, "<section><h2>Exclusions</h2>");
    if effects.is_empty() {
        let _ = writeln!(out, "<p>No rows were excluded.</p>");
    } else {
        let _ = writeln!(out, "<table><thead><tr><th>rows</th><th>reason</th><th>recorded</th><th>R² before → after</th><th>slope before → after</th><th>slope p before → after</th></tr></thead><tbody>");
        for e in effects {
            let (reason, at) = match e.rows.as_slice() {
                [row] => reason_of(log, *row).map_or(
                    ("<em>no reason given</em>".to_string(), "—".to_string()),
                    |x| (html(&x.reason), x.at.as_deref().map_or("—".into(), html)),
                ),
                _ => ("<b>all exclusions together</b>".to_string(), String::new()),
            };
            let rows: Vec<String> = e.rows.iter().map(ToString::to_string).collect();
            let _ = writeln!(out, "<tr><td>{}</td><td>{reason}</td><td>{at}</td><td>{} → {}</td><td>{} → {}</td><td>{} → {}</td></tr>", rows.join(", "), num(e.before.r_squared), num(e.after.r_squared), num(e.before.slope), num(e.after.slope), p(e.before.slope_p), p(e.after.slope_p));
        }
        let _ = writeln!(out, "</tbody></table>");
    }
    let _ = writeln!(out, "</section>");

    let mut cues: Vec<String> = extras
        .and_then(|e| e.cues.as_ref())
        .map(|c| wording::pair_cues(c, |i| sel.rows.get(i).copied()))
        .unwrap_or_default()
        .into_iter()
        .map(|c| c.text)
        .collect();
    if effects
        .iter()
        .any(|e| e.rows.len() == 1 && reason_of(log, e.rows[0]).is_none())
    {
        cues.push("Some exclusions have no recorded reason; every exclusion needs one.".into());
    }
    cues.push(wording::ONE_MODEL_OF_MANY.into());
    let _ = writeln!(out, "<section><h2>Cues</h2><ul>");
    for c in &cues {
        let _ = writeln!(out, "<li>{}</li>", html(c));
    }
    let _ = writeln!(out, "</ul></section>");
    let _ = write!(out, "<section class=\"caution\"><h2>Cautions</h2><ul>");
    for c in wording::FIT_CAUTIONS {
        let _ = write!(out, "<li>{}</li>", html(c));
    }
    let _ = writeln!(out, "</ul></section>");
    let _ = writeln!(
        out,
        "<footer>Plumbline {} · reproduce with <code>{}</code></footer>\n</body>\n</html>",
        env!("CARGO_PKG_VERSION"),
        html(&input.reproduce)
    );
}

fn reason_of(log: &[Exclusion], row: usize) -> Option<&Exclusion> {
    log.iter()
        .find(|e| e.row == row && !e.reason.trim().is_empty())
}

fn statistics_csv(fit: &LinearFit, outcome: &Analysis) -> String {
    let mut out = String::from("section,name,term,value\n");
    let mut row = |section: &str, name: &str, term: &str, v: String| {
        let _ = writeln!(out, "{},{},{},{}", csv(section), csv(name), csv(term), v);
    };
    row("rows", "used", "", fit.n.to_string());
    row(
        "rows",
        "dropped",
        "",
        outcome.selection.dropped.len().to_string(),
    );
    row(
        "rows",
        "excluded",
        "",
        outcome.selection.excluded.len().to_string(),
    );
    row(
        "fit",
        "r_squared",
        fit.r_squared_kind.as_str(),
        exact(fit.r_squared),
    );
    row("fit", "adj_r_squared", "", exact(fit.adj_r_squared));
    row(
        "fit",
        "residual_std_error",
        "",
        exact(fit.residual_std_error),
    );
    row("fit", "df_residual", "", fit.anova.df_residual.to_string());
    row(
        "fit",
        "f_statistic",
        "",
        fit.anova.f_statistic.map_or_else(String::new, exact),
    );
    row(
        "fit",
        "f_p_value",
        "",
        fit.anova.f_p_value.map_or_else(String::new, exact),
    );
    row("fit", "aic", "", exact(fit.aic));
    row("fit", "bic", "", exact(fit.bic));
    for c in &fit.coefficients {
        for (name, v) in [
            ("estimate", c.estimate),
            ("std_error", c.std_error),
            ("t", c.t),
            ("p_value", c.p_value),
            ("ci_low", c.ci_low),
            ("ci_high", c.ci_high),
        ] {
            row("coefficient", name, &c.term, exact(v));
        }
        row(
            "coefficient",
            "standardized",
            &c.term,
            c.standardized.map_or_else(String::new, exact),
        );
    }
    out
}

fn exclusions_csv(effects: &[Effect], log: &[Exclusion]) -> String {
    let mut out = String::from("rows,reason,recorded_at,r_squared_before,r_squared_after,slope_before,slope_after,slope_p_before,slope_p_after\n");
    for e in effects {
        let rows: Vec<String> = e.rows.iter().map(ToString::to_string).collect();
        let (reason, at) = match e.rows.as_slice() {
            [row] => reason_of(log, *row).map_or((String::new(), String::new()), |x| {
                (x.reason.clone(), x.at.clone().unwrap_or_default())
            }),
            _ => ("all exclusions together".to_string(), String::new()),
        };
        let _ = writeln!(
            out,
            "{},{},{},{},{},{},{},{},{}",
            csv(&rows.join(" ")),
            csv(&reason),
            csv(&at),
            exact(e.before.r_squared),
            exact(e.after.r_squared),
            exact(e.before.slope),
            exact(e.after.slope),
            exact(e.before.slope_p),
            exact(e.after.slope_p)
        );
    }
    out
}
