//! The summary's sections on a model's parts beyond its columns: the scale its figures are on
//! and the Box–Cox estimate, the grouping factor's tests and the groups' slopes, and the second
//! model beside the first.

use std::fmt::Write as _;

/// One row of the side-by-side table: how to read a figure off a fit.
type Figure = fn(&FitFigures) -> String;

use plumb_data::analysis::FitFigures;

use super::page::Page;
use crate::text::{count, fixed, html, num, p};
use crate::wording;
use crate::wording::numbers as words;

impl Page<'_> {
    /// The scale line and the Box–Cox estimate, under the model's equation.
    pub(super) fn scale(&self, out: &mut String) -> std::fmt::Result {
        let y = &self.input.request.y;
        if let Some(note) = wording::scale_note(&self.outcome.response_label(y), y) {
            writeln!(out, "<p class=\"small\">{}.</p>", html(&note))?;
        }
        if let Some(b) = &self.outcome.rows.boxcox {
            writeln!(
                out,
                "<p class=\"small\">Box–Cox {}.</p>",
                html(&wording::box_cox(b))
            )?;
        }
        Ok(())
    }

    /// The grouping factor's tests and a row per group.
    pub(super) fn groups(&self, out: &mut String) -> std::fmt::Result {
        let Some(g) = &self.outcome.groups else {
            return Ok(());
        };
        let reference = g.table.first().map_or("—", |r| r.level.as_str());
        writeln!(
            out,
            "<section><h2>Groups by {}</h2><p class=\"small\">Reference level {}: the other levels' terms measure how far they sit from it.</p>",
            html(&g.column),
            html(reference)
        )?;
        writeln!(
            out,
            "<dl class=\"quality\"><dt>equal slopes of {}</dt><dd>{}</dd><dt>one common line</dt><dd>{}</dd></dl>",
            html(&g.predictor),
            html(&wording::f_test(&g.equal_slopes)),
            html(&wording::f_test(&g.common_line))
        )?;
        writeln!(out, "<table><thead><tr><th>level</th><th>rows</th><th>own slope</th><th>{}</th><th>p</th><th>interval</th></tr></thead><tbody>", html(words::STANDARD_ERROR))?;
        for r in &g.table {
            let s = &r.slope;
            writeln!(
                out,
                "<tr><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td></tr>",
                html(&r.level),
                count(r.n),
                num(s.estimate),
                num(s.std_error),
                html(&p(s.p_value)),
                words::interval_ends(s.ci_low, s.ci_high, 6)
            )?;
        }
        writeln!(out, "</tbody></table></section>")
    }

    /// The second model's figures beside the first's, with the partial F when nested.
    pub(super) fn beside(&self, out: &mut String) -> std::fmt::Result {
        let Some(b) = self.beside else { return Ok(()) };
        writeln!(out, "<section><h2>Beside another model</h2>")?;
        let c = match &b.comparison {
            Ok(c) => c,
            Err(e) => {
                return writeln!(
                    out,
                    "<p>The other model could not be fitted: {}.</p></section>",
                    html(e)
                )
            }
        };
        let model = |f: &FitFigures| format!("{} = {}", f.response, f.terms.join(" + "));
        writeln!(out, "<table><thead><tr><th></th><th>this model</th><th>the other model</th></tr></thead><tbody>")?;
        writeln!(
            out,
            "<tr><td>model</td><td>{}</td><td>{}</td></tr>",
            html(&model(&c.current)),
            html(&model(&c.kept))
        )?;
        let figures: [(&str, Figure); 6] = [
            ("rows", |f| count(f.n)),
            ("R²", |f| num(f.r_squared)),
            ("adjusted R²", |f| num(f.adj_r_squared)),
            (words::TYPICAL_MISS, |f| {
                format!("± {}", num(f.residual_std_error))
            }),
            ("AIC", |f| fixed(f.aic, 3)),
            ("BIC", |f| fixed(f.bic, 3)),
        ];
        for (name, value) in figures {
            writeln!(
                out,
                "<tr><td>{name}</td><td>{}</td><td>{}</td></tr>",
                value(&c.current),
                value(&c.kept)
            )?;
        }
        writeln!(out, "</tbody></table>")?;
        match &c.nested {
            Some(n) => writeln!(
                out,
                "<p>Partial F of the smaller model against the larger: {}.</p>",
                html(&wording::f_test(n))
            )?,
            None => writeln!(out, "<p>{}</p>", html(wording::NOT_NESTED_HINT))?,
        }
        writeln!(out, "<p class=\"small\">{}.</p></section>", html(&c.note))
    }
}
