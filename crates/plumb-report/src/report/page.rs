//! The summary's HTML page, one function per section: the data, the model, the charts, the
//! exclusions with their effects, the cues, the cautions and the command that reproduces it.

use std::fmt::Write as _;

use plumb_data::analysis::Analysis;

use super::ReportInput;
use crate::charts::Chart;
use crate::effects::Effect;
use crate::session::Exclusion;
use crate::text::{count, html, num, p, sig};
use crate::wording;
use crate::wording::numbers::{self as words, Headline};

const STYLE: &str = include_str!("report.css");

/// What the page is made of.
pub struct Page<'a> {
    /// The table, request, reasons and reproduce command.
    pub input: &'a ReportInput<'a>,
    /// The analysis.
    pub outcome: &'a Analysis,
    /// The before/after of each exclusion.
    pub effects: &'a [Effect],
    /// The charts, drawn.
    pub charts: &'a [Chart],
    /// A second model beside the first.
    pub beside: Option<&'a super::Beside>,
    /// The checks, the calibration and the method comparison.
    pub lab: &'a super::lab::Lab,
}

impl Page<'_> {
    /// The whole page.
    pub fn render(&self) -> String {
        let mut out = String::new();
        // Writing to a String cannot fail.
        let _ = self.head(&mut out);
        let _ = self.data(&mut out);
        let _ = self.model(&mut out);
        let _ = self.groups(&mut out);
        let _ = self.beside(&mut out);
        let _ = self.checks(&mut out);
        let _ = self.calibration(&mut out);
        let _ = self.agreement(&mut out);
        let _ = self.figures(&mut out);
        let _ = self.exclusions(&mut out);
        let _ = self.cues(&mut out);
        let _ = self.cautions(&mut out);
        out
    }

    fn file_name(&self) -> String {
        let source = self.input.table.source();
        source.file_name().map_or_else(
            || source.display().to_string(),
            |f| f.to_string_lossy().into_owned(),
        )
    }

    fn head(&self, out: &mut String) -> std::fmt::Result {
        let file = html(&self.file_name());
        let request = &self.input.request;
        write!(
            out,
            "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n<title>Plumbline summary: {file}</title>\n<style>\n{STYLE}</style>\n</head>\n<body>\n"
        )?;
        writeln!(
            out,
            "<header><h1>{} explained by {}</h1><p class=\"sub\">Plumbline summary of <b>{file}</b></p></header>",
            html(&request.y),
            html(&request.x.join(", "))
        )
    }

    fn data(&self, out: &mut String) -> std::fmt::Result {
        let (input, sel) = (self.input, &self.outcome.rows.selection);
        writeln!(out, "<section class=\"facts\"><h2>Data</h2><dl>")?;
        writeln!(
            out,
            "<dt>file</dt><dd>{}</dd><dt>SHA-256</dt><dd class=\"mono\">{}</dd>",
            // The file's full path, however it was named (`../data/x.csv` or through a
            // session): one file, one name on the page.
            html(
                &std::fs::canonicalize(input.table.source())
                    .unwrap_or_else(|_| input.table.source().to_path_buf())
                    .display()
                    .to_string()
            ),
            html(&input.sha256)
        )?;
        writeln!(
            out,
            "<dt>read as</dt><dd>{}</dd>",
            html(&input.table.format().to_string())
        )?;
        writeln!(out, "<dt>rows</dt><dd>{} in the file; {} used; {} dropped for gaps; {} excluded by the analyst</dd></dl>", count(input.table.n_rows()), count(self.outcome.fit.n), count(sel.dropped.len()), count(sel.excluded.len()))?;
        for note in input.table.notes() {
            writeln!(out, "<p class=\"small\">Reading note: {}.</p>", html(note))?;
        }
        if !sel.dropped.is_empty() {
            let listed: Vec<String> = sel
                .dropped
                .iter()
                .map(|d| format!("{} ({} {})", d.row, html(&d.column), d.reason.as_str()))
                .collect();
            writeln!(
                out,
                "<p class=\"small\">Dropped rows: {}.</p>",
                listed.join(", ")
            )?;
        }
        writeln!(out, "</section>")
    }

    fn model(&self, out: &mut String) -> std::fmt::Result {
        let fit = &self.outcome.fit;
        let terms: Vec<String> = crate::text::equation_terms(fit)
            .iter()
            .map(|t| html(t))
            .collect();
        let y = &self.input.request.y;
        writeln!(
            out,
            "<section><h2>Model</h2><p class=\"eq\">{} = {}</p>",
            html(&self.outcome.response_label(y)),
            terms.join(" + ")
        )?;
        self.scale(out)?;
        let label = self.outcome.response_label(y);
        let request = &self.input.request;
        let weighted = request.weights.is_some() || request.weight_rule.is_some();
        let h = Headline::of_fit(fit, &label, words::r_squared_kinds(&label, y, weighted));
        writeln!(
            out,
            "<p class=\"headline\"><b>{}</b>: {}.</p>",
            html(&h.r_squared()),
            html(&h.share())
        )?;
        write!(out, "<dl class=\"quality\">")?;
        for line in h.lines() {
            write!(
                out,
                "<dt title=\"{}\">{}</dt><dd>{}</dd>",
                html(&line.means),
                html(line.label),
                html(&line.figures)
            )?;
        }
        writeln!(
            out,
            "<dt>to compare models</dt><dd>AIC {}, BIC {}</dd></dl>",
            num(fit.aic),
            num(fit.bic)
        )?;
        writeln!(
            out,
            "<table><thead><tr><th>term</th><th>{}</th><th>{}</th><th>t</th><th>p</th><th>{}</th><th>z-units</th></tr></thead><tbody>",
            words::VALUE,
            html(words::STANDARD_ERROR),
            html(&words::interval(fit.level))
        )?;
        for c in &fit.coefficients {
            writeln!(
                out,
                "<tr><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td></tr>",
                html(&c.term),
                num(c.estimate),
                num(c.std_error),
                sig(c.t, 4),
                html(&p(c.p_value)),
                words::interval_ends(c.ci_low, c.ci_high, 6),
                c.standardized.map_or_else(|| "—".into(), |v| sig(v, 4))
            )?;
        }
        writeln!(out, "</tbody></table></section>")
    }

    fn figures(&self, out: &mut String) -> std::fmt::Result {
        writeln!(out, "<section><h2>Charts</h2><div class=\"charts\">")?;
        for c in self.charts {
            let svg = c.svg.trim_start_matches(|ch| ch != '<');
            let svg = svg
                .strip_prefix("<?xml version=\"1.0\" encoding=\"UTF-8\"?>")
                .unwrap_or(svg);
            writeln!(
                out,
                "<figure>{}<figcaption>{}</figcaption></figure>",
                svg.trim(),
                html(&c.title)
            )?;
        }
        writeln!(out, "</div><p class=\"small\">Filled dots: rows used. Hollow dots: rows excluded by the analyst (kept visible). Shaded: confidence band of the mean; dashed: prediction band of a new reading.</p></section>")
    }

    fn exclusions(&self, out: &mut String) -> std::fmt::Result {
        writeln!(out, "<section><h2>Exclusions</h2>")?;
        if self.effects.is_empty() {
            writeln!(out, "<p>No rows were excluded.</p>")?;
            return writeln!(out, "</section>");
        }
        writeln!(out, "<table><thead><tr><th>rows</th><th>reason</th><th>recorded</th><th>R² before → after</th><th>slope before → after</th><th>slope p before → after</th></tr></thead><tbody>")?;
        let log = &self.input.exclusions;
        for e in self.effects {
            let (reason, at) = match e.rows.as_slice() {
                [row] => reason_of(log, *row).map_or(
                    ("<em>no reason given</em>".to_string(), "—".to_string()),
                    |x| (html(&x.reason), x.at.as_deref().map_or("—".into(), html)),
                ),
                _ => ("<b>all exclusions together</b>".to_string(), String::new()),
            };
            let rows: Vec<String> = e.rows.iter().map(ToString::to_string).collect();
            writeln!(out, "<tr><td>{}</td><td>{reason}</td><td>{at}</td><td>{} → {}</td><td>{} → {}</td><td>{} → {}</td></tr>", rows.join(", "), num(e.before.r_squared), num(e.after.r_squared), num(e.before.slope), num(e.after.slope), html(&p(e.before.slope_p)), html(&p(e.after.slope_p)))?;
        }
        writeln!(out, "</tbody></table>\n</section>")
    }

    fn cues(&self, out: &mut String) -> std::fmt::Result {
        let sel = &self.outcome.rows.selection;
        let mut cues: Vec<String> = self
            .outcome
            .extras
            .as_ref()
            .and_then(|e| e.cues.as_ref())
            .map(|c| wording::pair_cues(c, |i| sel.rows.get(i).copied()))
            .unwrap_or_default()
            .into_iter()
            .map(|c| c.text)
            .collect();
        let log = &self.input.exclusions;
        if self
            .effects
            .iter()
            .any(|e| e.rows.len() == 1 && reason_of(log, e.rows[0]).is_none())
        {
            cues.push("Some exclusions have no recorded reason; every exclusion needs one.".into());
        }
        cues.push(wording::ONE_MODEL_OF_MANY.into());
        writeln!(out, "<section><h2>Cues</h2><ul>")?;
        for c in &cues {
            writeln!(out, "<li>{}</li>", html(c))?;
        }
        writeln!(out, "</ul></section>")
    }

    fn cautions(&self, out: &mut String) -> std::fmt::Result {
        write!(out, "<section class=\"caution\"><h2>Cautions</h2><ul>")?;
        for c in wording::FIT_CAUTIONS {
            write!(out, "<li>{}</li>", html(c))?;
        }
        writeln!(out, "</ul></section>")?;
        writeln!(
            out,
            "<footer>Plumbline {} · reproduce with <code>{}</code></footer>\n</body>\n</html>",
            env!("CARGO_PKG_VERSION"),
            html(&self.input.reproduce)
        )
    }
}

/// The logged exclusion of `row`, if it has a reason.
pub fn reason_of(log: &[Exclusion], row: usize) -> Option<&Exclusion> {
    log.iter()
        .find(|e| e.row == row && !e.reason.trim().is_empty())
}
