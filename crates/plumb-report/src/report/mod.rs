//! The summary for a colleague: HTML with inline charts, charts as SVG and PNG, and CSVs.

mod figures;
mod lab;
mod page;
mod parts;
mod tables;

use std::path::{Path, PathBuf};

use plumb_data::analysis::{
    analyze, compare, AgreementRequest, CalibrationRequest, Comparison, Curve, ExtrasRequest,
    FitRequest, RowOrder, Wanted,
};
use plumb_data::Table;

use crate::charts::Chart;
use crate::effects::exclusion_effects;
use crate::guard::{check_outputs, Input, Output};
use crate::session::Exclusion;
use crate::{write_atomically, Result};

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
    /// A second model shown beside the first (on the same exclusions), if one was kept.
    pub comparison: Option<FitRequest>,
    /// Read the model as a calibration: these unknowns and this σ of the limits.
    pub calibration: Option<CalibrationRequest>,
    /// Compare two methods (on the request's exclusions).
    pub agreement: Option<AgreementRequest>,
    /// The order the sequence checks follow.
    pub order: RowOrder,
}

/// The second model beside the first: how they compare (or why they could not be fitted
/// together) and its curves in the data's units.
#[derive(Debug, Clone)]
pub struct Beside {
    /// The model.
    pub request: FitRequest,
    /// The two fits' figures and the partial F when nested, or why there is none.
    pub comparison: std::result::Result<Comparison, String>,
    /// Its curves (one predictor), in the data's units.
    pub curves: Vec<Curve>,
}

impl Beside {
    fn of(table: &Table, kept: &FitRequest, current: &FitRequest) -> Self {
        let names = ["the other model", "this one"];
        let comparison = compare(table, kept, current, names).map_err(|e| e.to_string());
        let wanted = Wanted {
            extras: Some(ExtrasRequest::default()),
            ..Wanted::default()
        };
        let curves = analyze(table, kept, wanted)
            .ok()
            .and_then(|a| a.extras)
            .map(|e| e.curves)
            .unwrap_or_default();
        Self {
            request: kept.clone(),
            comparison,
            curves,
        }
    }
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
        ..Wanted::default()
    };
    let outcome = analyze(input.table, request, wanted)?;
    let effects = exclusion_effects(input.table, request)?;
    let beside = input.comparison.as_ref().map(|k| {
        let kept = FitRequest {
            exclude: request.exclude.clone(),
            ..k.clone()
        };
        Beside::of(input.table, &kept, request)
    });
    let lab = lab::Lab::of(input, &outcome);
    let mut charts = figures::draw(input, &outcome, beside.as_ref())?;
    charts.extend(lab.charts(input)?);
    let html = page::Page {
        input,
        outcome: &outcome,
        effects: &effects,
        charts: &charts,
        beside: beside.as_ref(),
        lab: &lab,
    }
    .render();
    let mut statistics_csv = tables::statistics_csv(&outcome, beside.as_ref());
    lab::statistics_rows(&lab, &mut statistics_csv);
    Ok(Report {
        html,
        statistics_csv,
        exclusions_csv: tables::exclusions_csv(&effects, &input.exclusions),
        charts,
    })
}

/// Writes the summary: `out` (HTML) and, beside it, `STEM-statistics.csv`,
/// `STEM-exclusions.csv`, `STEM-CHART.svg` and `STEM-CHART.png`. Before anything is written,
/// every one of these names is checked against `inputs` (the data file, a session) and each
/// other ([`crate::guard::check_outputs`]); then every file is written atomically.
///
/// # Errors
/// [`crate::ReportError::Unsafe`] when a name would overwrite an input (nothing is written
/// then), or [`crate::ReportError::Io`] for the first file that could not be written.
pub fn write(report: &Report, out: &Path, inputs: &[Input<'_>]) -> Result<Vec<PathBuf>> {
    let files = files_of(report, out);
    let outputs: Vec<Output<'_>> = files
        .iter()
        .map(|(path, _, what)| Output { path, what })
        .collect();
    check_outputs(&outputs, inputs)?;
    for (path, bytes, _) in &files {
        write_atomically(path, bytes)?;
    }
    Ok(files.into_iter().map(|f| f.0).collect())
}

/// The names a summary at `out` would write, with what each is (to check them beside other
/// outputs, such as a session saved with it, before anything is written).
pub fn planned_files(report: &Report, out: &Path) -> Vec<(PathBuf, &'static str)> {
    files_of(report, out)
        .into_iter()
        .map(|(path, _, what)| (path, what))
        .collect()
}

/// The files of a summary at `out`: path, bytes, and what the file is.
fn files_of<'r>(report: &'r Report, out: &Path) -> Vec<(PathBuf, &'r [u8], &'static str)> {
    let stem = out
        .file_stem()
        .map_or_else(|| "summary".into(), |s| s.to_string_lossy().into_owned());
    let beside = |suffix: &str| out.with_file_name(format!("{stem}-{suffix}"));
    let mut files: Vec<(PathBuf, &[u8], &str)> = vec![
        (out.to_path_buf(), report.html.as_bytes(), "the summary"),
        (
            beside("statistics.csv"),
            report.statistics_csv.as_bytes(),
            "the summary's statistics CSV",
        ),
        (
            beside("exclusions.csv"),
            report.exclusions_csv.as_bytes(),
            "the summary's exclusions CSV",
        ),
    ];
    for c in &report.charts {
        files.push((
            beside(&format!("{}.svg", c.name)),
            c.svg.as_bytes(),
            "a chart",
        ));
        files.push((beside(&format!("{}.png", c.name)), &c.png, "a chart"));
    }
    files
}
