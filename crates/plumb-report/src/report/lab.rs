//! The summary's lab sections: the assumption checks of the fit, the calibration read from it
//! (unknowns, limits, lack of fit, weightings) and the comparison of two methods — their
//! figures, their charts and their rows in the statistics CSV.

use std::fmt::Write as _;

use plumb_core::calibration::Interval;
use plumb_data::analysis::{
    agree, assumption_checks, calibrate, AgreementReport, Analysis, CalibrationReport, Checks,
};

use super::page::Page;
use super::ReportInput;
use crate::charts::{
    differences_chart, pair_chart_named, weightings_chart, Chart, ChartLine, DifferencesChart, Dot,
    LineKind, PairChart, WeightingPanel,
};
use crate::text::{csv, exact, fixed, html, num, p, p_clause, plural};
use crate::wording;
use crate::wording::numbers as words;
use crate::Result;

/// The lab sections' figures.
#[derive(Debug, Clone)]
pub struct Lab {
    /// The assumption checks (or why they could not be made).
    pub checks: std::result::Result<Checks, String>,
    /// The calibration, when asked for.
    pub calibration: Option<std::result::Result<CalibrationReport, String>>,
    /// The method comparison, when asked for.
    pub agreement: Option<std::result::Result<AgreementReport, String>>,
}

impl Lab {
    /// Computes what `input` asks for beside the fit `outcome`.
    pub fn of(input: &ReportInput<'_>, outcome: &Analysis) -> Self {
        let checks =
            assumption_checks(input.table, outcome, &input.order).map_err(|e| e.to_string());
        let calibration = input
            .calibration
            .as_ref()
            .map(|c| calibrate(&input.request, outcome, c).map_err(|e| e.to_string()));
        let agreement = input
            .agreement
            .as_ref()
            .map(|a| agree(input.table, a).map_err(|e| e.to_string()));
        Self {
            checks,
            calibration,
            agreement,
        }
    }

    /// The weightings' residuals side by side, and the two methods' charts.
    ///
    /// # Errors
    /// A chart that could not be drawn.
    pub fn charts(&self, input: &ReportInput<'_>) -> Result<Vec<Chart>> {
        let mut out = Vec::new();
        if let Some(Ok(c)) = &self.calibration {
            out.push(weightings_figure(input, c)?);
        }
        if let Some(Ok(a)) = &self.agreement {
            out.push(methods_figure(input, a)?);
            if let Ok(l) = &a.limits {
                out.push(differences_figure(input, a, l)?);
            }
        }
        Ok(out)
    }
}

fn weightings_figure(input: &ReportInput<'_>, c: &CalibrationReport) -> Result<Chart> {
    let x = &input.request.x[0];
    let panels: Vec<WeightingPanel> = c
        .weightings
        .iter()
        .filter_map(|w| {
            let f = w.outcome.as_ref().ok()?;
            Some(WeightingPanel {
                label: w.label.clone(),
                points: c
                    .x
                    .iter()
                    .copied()
                    .zip(f.weighted_residuals.iter().copied())
                    .collect(),
            })
        })
        .collect();
    weightings_chart(
        &panels,
        x,
        format!("weighted residuals against {x} under each weighting (even spread is the aim)"),
    )
}

fn methods_figure(input: &ReportInput<'_>, a: &AgreementReport) -> Result<Chart> {
    let r = input.agreement.as_ref().map(|a| (&a.reference, &a.test));
    let (reference, test) = r.map_or(("x", "y"), |(x, y)| (x.as_str(), y.as_str()));
    let xs = a.reference();
    let lo = xs.iter().copied().fold(f64::INFINITY, f64::min);
    let hi = xs.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    let along = |a0: f64, b: f64| vec![(lo, a0 + b * lo), (hi, a0 + b * hi)];
    let mut lines = vec![ChartLine {
        label: "line of identity".into(),
        points: along(0.0, 1.0),
        kind: LineKind::Guide,
    }];
    if let Ok(pb) = &a.passing_bablok {
        lines.push(ChartLine {
            label: "Passing–Bablok".into(),
            points: along(pb.intercept, pb.slope),
            kind: LineKind::Level(4),
        });
    }
    if let Ok(d) = &a.deming {
        lines.push(ChartLine {
            label: "Deming".into(),
            points: along(d.fit.intercept, d.fit.slope),
            kind: LineKind::Dashed(5),
        });
    }
    let mut dots: Vec<Dot> = xs
        .iter()
        .zip(a.test())
        .map(|(&x, &y)| Dot {
            x,
            y,
            excluded: false,
        })
        .collect();
    if let (Ok(xc), Ok(yc)) = (input.table.numeric(reference), input.table.numeric(test)) {
        dots.extend(a.selection.excluded.iter().filter_map(|&r| {
            Some(Dot {
                x: xc.get(r - 1)?,
                y: yc.get(r - 1)?,
                excluded: true,
            })
        }));
    }
    pair_chart_named(
        "methods",
        &PairChart {
            x_label: reference,
            y_label: test,
            dots,
            curve: Vec::new(),
            lines,
        },
        format!("{test} against {reference}, with the line of identity"),
    )
}

fn differences_figure(
    input: &ReportInput<'_>,
    a: &AgreementReport,
    l: &plumb_core::agreement::AgreementLimits,
) -> Result<Chart> {
    let percent = input.agreement.as_ref().is_some_and(|r| r.percent);
    let mut dots: Vec<Dot> = l
        .points
        .iter()
        .map(|&(x, y)| Dot {
            x,
            y,
            excluded: false,
        })
        .collect();
    dots.extend(excluded_differences(input, a, percent));
    let data = DifferencesChart {
        dots,
        bias: (l.bias, l.bias_interval.0, l.bias_interval.1),
        lower: (l.lower, l.lower_interval.0, l.lower_interval.1),
        upper: (l.upper, l.upper_interval.0, l.upper_interval.1),
        trend: l.proportional.map(|p| (p.intercept, p.slope)),
        y_label: if percent {
            "difference, % of the mean".into()
        } else {
            "difference (new − established)".into()
        },
    };
    differences_chart(
        &data,
        format!(
            "differences against the mean of the two methods ({}): bias solid, limits of agreement dashed, their {} intervals as bars at the right",
            plural(a.selection.rows.len(), "pair", "pairs"),
            words::level(a.level)
        ),
    )
}

/// The excluded pairs at their file values, as hollow dots (mean, difference).
fn excluded_differences(input: &ReportInput<'_>, a: &AgreementReport, percent: bool) -> Vec<Dot> {
    let Some(req) = &input.agreement else {
        return Vec::new();
    };
    let (Ok(x), Ok(y)) = (
        input.table.numeric(&req.reference),
        input.table.numeric(&req.test),
    ) else {
        return Vec::new();
    };
    a.selection
        .excluded
        .iter()
        .filter_map(|&r| {
            let (xi, yi) = (x.get(r - 1)?, y.get(r - 1)?);
            let m = 0.5 * xi + 0.5 * yi;
            let d = if percent {
                (m != 0.0).then(|| 100.0 * (yi - xi) / m)?
            } else {
                yi - xi
            };
            Some(Dot {
                x: m,
                y: d,
                excluded: true,
            })
        })
        .collect()
}

impl Page<'_> {
    /// The checks of the residuals, each with its figures and, when it flags, what it means.
    pub(super) fn checks(&self, out: &mut String) -> std::fmt::Result {
        writeln!(out, "<section><h2>Checks of the residuals</h2>")?;
        match &self.lab.checks {
            Ok(c) => {
                writeln!(out, "<ul>")?;
                for cue in wording::check_cues(c) {
                    let class = if cue.flagged { " class=\"flag\"" } else { "" };
                    writeln!(
                        out,
                        "<li{class}><b>{}</b>: {}. {}</li>",
                        html(cue.topic),
                        html(&cue.figures),
                        html(&cue.meaning)
                    )?;
                }
                writeln!(out, "</ul>")?;
            }
            Err(e) => writeln!(out, "<p>{}</p>", html(e))?,
        }
        writeln!(out, "</section>")
    }

    /// The calibration: unknowns, limits, lack of fit and the weightings.
    pub(super) fn calibration(&self, out: &mut String) -> std::fmt::Result {
        let Some(c) = &self.lab.calibration else {
            return Ok(());
        };
        writeln!(out, "<section><h2>Calibration</h2>")?;
        let c = match c {
            Ok(c) => c,
            Err(e) => {
                writeln!(out, "<p>{}</p>", html(e))?;
                return writeln!(out, "</section>");
            }
        };
        writeln!(
            out,
            "<p>Weights: {}. Standards from {} to {}.</p>",
            html(&c.weighting),
            num(c.range.0),
            num(c.range.1)
        )?;
        self.unknowns_table(out, c)?;
        match &c.limits {
            Ok(l) => writeln!(
                out,
                "<p><b>Limits</b>: {}.</p><p class=\"small\">{} {}</p>",
                html(&wording::calibration::limits(l)),
                html(
                    &wording::calibration::limits_below_standards(l, c.range.0).unwrap_or_default()
                ),
                html(wording::calibration::LIMITS_CAUTION)
            )?,
            Err(e) => writeln!(out, "<p><b>Limits</b>: {}</p>", html(e))?,
        }
        match &c.lack_of_fit {
            Ok(l) => writeln!(
                out,
                "<p><b>Lack of fit</b> over {} levels: lack-of-fit SS {} ({} df) against pure error {} ({} df); {}.</p>",
                l.levels,
                num(l.lack_of_fit_ss),
                l.lack_of_fit_df,
                num(l.pure_error_ss),
                l.pure_error_df,
                html(&words::f_figures(l.f, l.lack_of_fit_df, l.pure_error_df, l.p_value))
            )?,
            Err(e) => writeln!(out, "<p><b>Lack of fit</b>: {}</p>", html(e))?,
        }
        self.weightings_table(out, c)?;
        writeln!(out, "</section>")
    }

    fn unknowns_table(&self, out: &mut String, c: &CalibrationReport) -> std::fmt::Result {
        if c.unknowns.is_empty() {
            return writeln!(out, "<p>No unknowns were read back.</p>");
        }
        let pct = words::level(self.outcome.fit.level);
        writeln!(out, "<table><thead><tr><th>sample</th><th>readings</th><th>mean reading</th><th>x̂</th><th>{}</th><th>first-order {pct}</th><th>band {pct}</th></tr></thead><tbody>", html(words::STANDARD_ERROR))?;
        for (u, rb) in &c.unknowns {
            match rb {
                Ok(rb) => {
                    let notes = wording::calibration::unknown_notes(rb, c.limits.as_ref().ok());
                    let note = if notes.is_empty() {
                        String::new()
                    } else {
                        format!(" ({})", notes.join("; "))
                    };
                    writeln!(
                        out,
                        "<tr><td>{}</td><td>{}</td><td>{}</td><td>{}{}</td><td>{}</td><td>{} to {}</td><td>{}</td></tr>",
                        html(&u.name),
                        rb.replicates,
                        num(rb.reading),
                        num(rb.x),
                        html(&note),
                        num(rb.std_error),
                        num(rb.approximate.0),
                        num(rb.approximate.1),
                        html(&wording::calibration::interval(&rb.exact))
                    )?;
                }
                Err(e) => writeln!(
                    out,
                    "<tr><td>{}</td><td>{}</td><td colspan=\"5\">{}</td></tr>",
                    html(&u.name),
                    u.readings.len(),
                    html(e)
                )?,
            }
        }
        writeln!(out, "</tbody></table>")
    }

    fn weightings_table(&self, out: &mut String, c: &CalibrationReport) -> std::fmt::Result {
        writeln!(out, "<p><b>Weightings side by side</b>: Σ|RE| sums the relative errors of the standards read back on each line; spread is the weighted residuals' spread in the upper half of the standards over the lower half; p is Breusch–Pagan of the weighted residuals against x.</p>")?;
        writeln!(out, "<table><thead><tr><th>weights</th><th>R²</th><th>Σ|RE| %</th><th>max|RE| %</th><th>spread</th><th>p</th></tr></thead><tbody>")?;
        for w in &c.weightings {
            match &w.outcome {
                Ok(f) => writeln!(
                    out,
                    "<tr><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td></tr>",
                    html(&w.label),
                    num(f.r_squared),
                    fixed(f.sum_abs_relative_error, 2),
                    fixed(f.max_abs_relative_error, 2),
                    fixed(f.spread_ratio, 2),
                    f.spread_p.map_or_else(|| "—".into(), |v| html(&p(v)))
                )?,
                Err(e) => writeln!(
                    out,
                    "<tr><td>{}</td><td colspan=\"5\">{}</td></tr>",
                    html(&w.label),
                    html(e)
                )?,
            }
        }
        writeln!(out, "</tbody></table>")
    }

    /// The two methods compared.
    pub(super) fn agreement(&self, out: &mut String) -> std::fmt::Result {
        let (Some(a), Some(req)) = (&self.lab.agreement, &self.input.agreement) else {
            return Ok(());
        };
        writeln!(
            out,
            "<section><h2>Method comparison</h2><p>{} (new) against {} (established). Agreement would be slope 1 and intercept 0.</p>",
            html(&req.test),
            html(&req.reference)
        )?;
        let a = match a {
            Ok(a) => a,
            Err(e) => {
                writeln!(out, "<p>{}</p>", html(e))?;
                return writeln!(out, "</section>");
            }
        };
        writeln!(out, "<ul>")?;
        match &a.passing_bablok {
            Ok(pb) => {
                let ends = pb.interval.as_ref().map_or_else(
                    |_| ("no interval".to_string(), "no interval".to_string()),
                    |i| {
                        (
                            format!("{} to {}", num(i.slope_low), num(i.slope_high)),
                            format!("{} to {}", num(i.intercept_low), num(i.intercept_high)),
                        )
                    },
                );
                writeln!(
                    out,
                    "<li><b>Passing–Bablok</b>: slope {} ({}), intercept {} ({}). {}</li>",
                    num(pb.slope),
                    ends.0,
                    num(pb.intercept),
                    ends.1,
                    html(wording::agreement::verdict(pb))
                )?;
                let l = &pb.linearity;
                writeln!(
                    out,
                    "<li>Linearity: largest cusum {} against {} ({}){}</li>",
                    fixed(l.statistic, 3),
                    fixed(l.bound, 3),
                    html(&p_clause(l.p_value)),
                    if l.deviates {
                        format!(". {}", html(wording::agreement::NOT_STRAIGHT))
                    } else {
                        String::new()
                    }
                )?;
                if pb.association.doubtful {
                    writeln!(
                        out,
                        "<li>Kendall τ {} ({}). {}</li>",
                        fixed(pb.association.tau, 3),
                        html(&p_clause(pb.association.p_value)),
                        html(wording::agreement::NOT_RISING_TOGETHER)
                    )?;
                }
            }
            Err(e) => writeln!(out, "<li><b>Passing–Bablok</b>: {}</li>", html(e))?,
        }
        match &a.deming {
            Ok(d) => writeln!(
                out,
                "<li><b>Deming</b> (λ = {}): slope {} ({} to {}), intercept {} ({} to {})</li>",
                num(d.fit.lambda),
                num(d.fit.slope),
                num(d.slope_interval.0),
                num(d.slope_interval.1),
                num(d.fit.intercept),
                num(d.intercept_interval.0),
                num(d.intercept_interval.1)
            )?,
            Err(e) => writeln!(out, "<li><b>Deming</b>: {}</li>", html(e))?,
        }
        match &a.limits {
            Ok(l) => {
                writeln!(out, "<li><b>Differences</b>: bias {} ({} to {}); limits of agreement {} ({} to {}) and {} ({} to {}); SD {}</li>", num(l.bias), num(l.bias_interval.0), num(l.bias_interval.1), num(l.lower), num(l.lower_interval.0), num(l.lower_interval.1), num(l.upper), num(l.upper_interval.0), num(l.upper_interval.1), num(l.sd))?;
                if let Some(note) = wording::agreement::proportional(l) {
                    writeln!(out, "<li>{}</li>", html(note))?;
                }
            }
            Err(e) => writeln!(out, "<li><b>Differences</b>: {}</li>", html(e))?,
        }
        writeln!(out, "</ul></section>")
    }
}

/// The lab sections' rows of the statistics CSV.
pub fn statistics_rows(lab: &Lab, out: &mut String) {
    let mut row = |section: &str, name: &str, term: &str, v: String| {
        let _ = writeln!(out, "{},{},{},{}", csv(section), csv(name), csv(term), v);
    };
    if let Ok(c) = &lab.checks {
        if let Ok(b) = &c.spread {
            row("checks", "breusch_pagan", "statistic", exact(b.statistic));
            row("checks", "breusch_pagan", "p_value", exact(b.p_value));
        }
        if let Some(o) = &c.order {
            if let Ok(d) = &o.durbin_watson {
                row("checks", "durbin_watson", &o.column, exact(*d));
            }
            if let Ok(r) = &o.runs {
                row("checks", "sign_runs_p_value", &o.column, exact(r.p_value));
            }
        }
        if let (test, Ok(n)) = &c.normality {
            row("checks", test.key(), "statistic", exact(n.statistic));
            row("checks", test.key(), "p_value", exact(n.p_value));
        }
    }
    if let Some(Ok(c)) = &lab.calibration {
        for (u, rb) in &c.unknowns {
            let Ok(rb) = rb else { continue };
            row("unknown", "x", &u.name, exact(rb.x));
            row("unknown", "std_error", &u.name, exact(rb.std_error));
            row("unknown", "approx_low", &u.name, exact(rb.approximate.0));
            row("unknown", "approx_high", &u.name, exact(rb.approximate.1));
            if let Interval::Bounded { low, high } = rb.exact {
                row("unknown", "band_low", &u.name, exact(low));
                row("unknown", "band_high", &u.name, exact(high));
            }
        }
        if let Ok(l) = &c.limits {
            row("limits", "detection", l.source.label(), exact(l.detection));
            row(
                "limits",
                "quantitation",
                l.source.label(),
                exact(l.quantitation),
            );
        }
        if let Ok(l) = &c.lack_of_fit {
            row("lack_of_fit", "f_statistic", "", exact(l.f));
            row("lack_of_fit", "p_value", "", exact(l.p_value));
        }
    }
    if let Some(Ok(a)) = &lab.agreement {
        if let Ok(pb) = &a.passing_bablok {
            row("passing_bablok", "slope", "", exact(pb.slope));
            row("passing_bablok", "intercept", "", exact(pb.intercept));
        }
        if let Ok(d) = &a.deming {
            row("deming", "slope", "", exact(d.fit.slope));
            row("deming", "intercept", "", exact(d.fit.intercept));
        }
        if let Ok(l) = &a.limits {
            row("differences", "bias", "", exact(l.bias));
            row("differences", "lower_limit", "", exact(l.lower));
            row("differences", "upper_limit", "", exact(l.upper));
        }
    }
}
