//! The numbers panel: the live model table, R² and its companions, the z-units view, the cues,
//! and the influence table; all copyable as text or CSV.

use eframe::egui::{self, RichText};
use plumb_core::regression::{InfluenceFlag, LiveSummary};
use plumb_report::text::{num, p};

use crate::app::Workbench;
use crate::bench::SortKey;
use crate::pair::PairRows;

/// Rows listed in the influence table.
const INFLUENCE_ROWS: usize = 25;

/// The headline line for tests and the clipboard: `R² = …`.
pub fn r_squared_line(pair: &PairRows, s: &LiveSummary) -> String {
    let kind = if pair.spec.intercept {
        ""
    } else {
        " (uncentred, no intercept)"
    };
    format!("R² = {}{kind}", num(s.r_squared))
}

/// The model table as text (`csv = false`) or CSV.
pub fn model_text(pair: &PairRows, s: &LiveSummary, csv: bool, hypothetical: bool) -> String {
    let level = (pair.spec.level * 100.0).round();
    let mut out = String::new();
    if csv {
        out.push_str(&format!(
            "term,estimate,std_error,ci{level}_low,ci{level}_high,p_value\n"
        ));
        for (j, t) in pair.terms.iter().enumerate() {
            out.push_str(&format!(
                "{},{},{},{},{},{}\n",
                plumb_report::text::csv(t),
                plumb_report::text::exact(s.estimates[j]),
                plumb_report::text::exact(s.std_errors[j]),
                plumb_report::text::exact(s.ci[j].0),
                plumb_report::text::exact(s.ci[j].1),
                plumb_report::text::exact(s.p_values[j])
            ));
        }
        out.push_str(&format!(
            "r_squared,{}\nadj_r_squared,{}\nresidual_se,{}\nn,{}\n",
            plumb_report::text::exact(s.r_squared),
            plumb_report::text::exact(s.adj_r_squared),
            plumb_report::text::exact(s.residual_std_error),
            s.n
        ));
    } else {
        out.push_str(&format!(
            "{} on {} (degree {}), n = {}\n",
            pair.spec.y, pair.spec.x, pair.spec.degree, s.n
        ));
        if hypothetical {
            out.push_str("WHAT-IF: some points are moved; these numbers are hypothetical\n");
        }
        for (j, t) in pair.terms.iter().enumerate() {
            out.push_str(&format!(
                "{t}: {} (SE {}; {level}% CI {} to {}; p {})\n",
                num(s.estimates[j]),
                num(s.std_errors[j]),
                num(s.ci[j].0),
                num(s.ci[j].1),
                p(s.p_values[j])
            ));
        }
        out.push_str(&format!(
            "{}; adjusted R² = {}; residual SE = {}\n",
            r_squared_line(pair, s),
            num(s.adj_r_squared),
            num(s.residual_std_error)
        ));
    }
    out
}

/// Draws the panel.
pub fn show(wb: &mut Workbench, ui: &mut egui::Ui) {
    let Some(pair) = wb.bench.pair().map(crate::pair::Pair::rows) else {
        return;
    };
    let hypothetical = wb.marks().is_hypothetical();
    egui::ScrollArea::vertical().show(ui, |ui| {
        ui.heading("Numbers");
        if hypothetical {
            ui.colored_label(
                ui.visuals().warn_fg_color,
                RichText::new("hypothetical (what-if moves)").strong(),
            );
        }
        match wb.bench.summary().unwrap_or_else(|| Err("no pair".into())) {
            Ok(s) => {
                model(ui, wb, &pair, &s, hypothetical);
            }
            Err(e) => {
                ui.colored_label(ui.visuals().error_fg_color, format!("no fit: {e}"));
            }
        }
        ui.separator();
        z_units(wb, ui, &pair);
        ui.separator();
        cues(wb, ui);
        ui.separator();
        influence_table(wb, ui, &pair);
    });
}

fn model(ui: &mut egui::Ui, wb: &Workbench, pair: &PairRows, s: &LiveSummary, hypothetical: bool) {
    let excluded = pair.excluded_rows(wb.marks()).len();
    ui.label(format!(
        "n = {} rows used ({} excluded, {} incomplete in the file)",
        s.n, excluded, pair.incomplete
    ));
    ui.label(RichText::new(r_squared_line(pair, s)).size(18.0).strong())
        .on_hover_text("Share of the variation in y around its mean that the fit accounts for: 1 − RSS/TSS. Without an intercept it is measured around zero (uncentred) and is not comparable.");
    ui.label(format!("adjusted R² = {}", num(s.adj_r_squared)))
        .on_hover_text("R² penalised for the number of terms: 1 − (1 − R²)(n − 1)/(n − p)");
    ui.label(format!("residual SE = {}", num(s.residual_std_error)))
        .on_hover_text("Typical size of a residual, in y's units: √(RSS/(n − p))");
    if let Some((f, fp)) = s.f_test {
        ui.label(format!("F = {} (p = {})", num(f), p(fp)))
            .on_hover_text("Overall test that every non-intercept term is zero");
    }
    let level = (pair.spec.level * 100.0).round();
    egui::ScrollArea::horizontal()
        .id_salt("model-table-scroll")
        .show(ui, |ui| {
            model_grid(ui, pair, s, level);
        });
    copy_buttons(ui, pair, s, hypothetical);
}

fn model_grid(ui: &mut egui::Ui, pair: &PairRows, s: &LiveSummary, level: f64) {
    egui::Grid::new("model-table").striped(true).show(ui, |ui| {
        // p before the interval: in a narrow panel the interval is what scrolls out of view.
        for h in ["term", "estimate", "SE", "p", &format!("{level}% CI")] {
            ui.label(RichText::new(h).strong());
        }
        ui.end_row();
        for (j, t) in pair.terms.iter().enumerate() {
            ui.label(t);
            ui.label(num(s.estimates[j]));
            ui.label(num(s.std_errors[j]));
            ui.label(p(s.p_values[j]));
            ui.label(format!("{} to {}", short(s.ci[j].0), short(s.ci[j].1)))
                .on_hover_text(format!("{} to {}", num(s.ci[j].0), num(s.ci[j].1)));
            ui.end_row();
        }
    });
}

fn copy_buttons(ui: &mut egui::Ui, pair: &PairRows, s: &LiveSummary, hypothetical: bool) {
    ui.horizontal(|ui| {
        if ui
            .button("Copy as text")
            .on_hover_text("Copy the model table and R² to the clipboard")
            .clicked()
        {
            ui.ctx().copy_text(model_text(pair, s, false, hypothetical));
        }
        if ui
            .button("Copy as CSV")
            .on_hover_text("Copy the model table with full precision as CSV")
            .clicked()
        {
            ui.ctx().copy_text(model_text(pair, s, true, hypothetical));
        }
    });
}

fn z_units(wb: &mut Workbench, ui: &mut egui::Ui, pair: &PairRows) {
    ui.checkbox(&mut wb.bench.standardized, "z-units view")
        .on_hover_text("Both columns in standard deviations from their means: the slope is then Pearson's r, and its square is R² of the straight line");
    if !wb.bench.standardized {
        return;
    }
    let Some(d) = wb.bench.diagnostics() else {
        return;
    };
    let Some(z) = d.extras.as_ref().and_then(|e| e.z_view) else {
        ui.weak("undefined (a constant column)");
        return;
    };
    ui.label(format!("slope in z-units = r = {}", num(z.slope)));
    ui.label(format!("slope² = {}", num(z.slope_squared)));
    if pair.spec.degree == 1 && pair.spec.intercept {
        if let Ok(f) = &d.fit {
            ui.label(format!("R² of the line = {}", num(f.r_squared)))
                .on_hover_text("equal to slope² for a straight line with intercept");
        }
    }
    ui.label(format!(
        "A row 2 SD above the mean of {} is expected {} SD from the mean of {}: {} nearer the mean (regression toward the mean).",
        pair.spec.x,
        num(2.0 * z.slope),
        pair.spec.y,
        num(2.0 * (1.0 - z.slope.abs()))
    ));
}

fn cues(wb: &Workbench, ui: &mut egui::Ui) {
    ui.label(RichText::new("Cues").strong());
    let Some(d) = wb.bench.diagnostics() else {
        ui.spinner();
        return;
    };
    let Some(c) = d.extras.as_ref().and_then(|e| e.cues.clone()) else {
        ui.weak("no cues for this model");
        return;
    };
    let warn = ui.visuals().warn_fg_color;
    if c.nonlinear {
        let curve = c.curve_r_squared.map_or("—".into(), num);
        ui.colored_label(warn, format!(
            "Curved or non-linear: a quadratic reaches R² {curve} against {} for the line; r describes only the straight-line part.",
            num(c.linear_r_squared)
        ));
    } else {
        ui.label("No strong non-linear pattern found.");
    }
    if let Some((dc, dp)) = c.distance_correlation {
        ui.label(format!(
            "distance correlation {} (permutation p = {})",
            num(dc),
            p(dp)
        ))
        .on_hover_text("Detects any kind of dependence, not only linear");
    }
    if c.driven_by_one_point {
        let row = wb
            .bench
            .pair()
            .and_then(|pr| d.included.get(c.most_influential).map(|&e| pr.rows[e]));
        ui.colored_label(
            warn,
            format!(
                "One row drives r: without row {} r = {} (with it {}).",
                row.map_or("?".into(), |r| r.to_string()),
                num(c.r_without_most_influential),
                num(c.r)
            ),
        );
    }
    if let Some(extras) = &d.extras {
        for step in extras.degrees.iter().skip(1) {
            if let Some(cmp) = &step.versus_previous {
                ui.label(format!(
                    "degree {}: R² {} (adding the term: F p = {})",
                    step.degree,
                    num(step.fit.r_squared),
                    p(cmp.p_value)
                ));
            }
        }
    }
}

fn influence_table(wb: &mut Workbench, ui: &mut egui::Ui, pair: &PairRows) {
    ui.label(RichText::new("Most influential rows").strong());
    ui.horizontal(|ui| {
        ui.label("sort by:");
        let s = &mut wb.bench.sort;
        ui.radio_value(s, SortKey::Cook, "Cook's D")
            .on_hover_text("How far the whole fit moves when the row is left out");
        ui.radio_value(s, SortKey::Leverage, "leverage")
            .on_hover_text("How unusual the row's x is");
        ui.radio_value(s, SortKey::Residual, "residual")
            .on_hover_text("|externally studentized residual|");
    });
    let Some(d) = wb.bench.diagnostics().cloned() else {
        return;
    };
    let order = match wb.bench.sort {
        SortKey::Cook => &d.top[0],
        SortKey::Leverage => &d.top[1],
        SortKey::Residual => &d.top[2],
    };
    let mut pick = None;
    let mut exclude = None;
    egui::Grid::new("influence").striped(true).show(ui, |ui| {
        for h in ["row", "leverage", "stud. resid.", "Cook's D", "flags", ""] {
            ui.label(RichText::new(h).strong());
        }
        ui.end_row();
        for &k in order.iter().take(INFLUENCE_ROWS) {
            let c = &d.cases[k];
            let entry = d.included[k];
            let row = pair.rows[entry];
            if ui.selectable_label(wb.bench.selected == Some(entry), row.to_string())
                .on_hover_text("Ring this row in every view")
                .clicked()
            {
                pick = Some(entry);
            }
            ui.label(num(c.leverage));
            ui.label(num(c.studentized_external));
            ui.label(num(c.cooks_distance));
            ui.label(flags(&c.flags)).on_hover_text("Rules of thumb (common practice, no source): x = leverage above 2p/n (unusual x), y = |studentized residual| above 3 (unusual y), D = Cook's D above 4/n (moves the fit)");
            if ui.small_button("exclude").on_hover_text(format!("Leave row {row} out (you will be asked why)")).clicked() {
                exclude = Some(row);
            }
            ui.end_row();
        }
    });
    if let Some(e) = pick {
        wb.bench.selected = Some(e);
    }
    if let Some(r) = exclude {
        wb.exclude_rows(&[r]);
    }
}

/// Short flag names for the table (the tooltip spells out the rules).
fn flags(f: &[InfluenceFlag]) -> String {
    f.iter()
        .map(|x| match x {
            InfluenceFlag::HighLeverage => "x",
            InfluenceFlag::LargeCooksDistance => "D",
            InfluenceFlag::LargeResidual => "y",
        })
        .collect::<Vec<_>>()
        .join(" ")
}

/// Four significant digits, for the interval column (the tooltip and the copies have six or
/// all of them).
fn short(v: f64) -> String {
    let a = v.abs();
    if !v.is_finite() {
        "—".into()
    } else if a != 0.0 && !(1e-3..1e5).contains(&a) {
        format!("{v:.3e}")
    } else {
        let digits = if a == 0.0 {
            0
        } else {
            a.log10().floor() as i32
        };
        let decimals = (3 - digits).clamp(0, 6) as usize;
        format!("{v:.decimals$}")
    }
}

#[cfg(test)]
mod tests {
    use super::short;

    #[test]
    fn interval_ends_keep_four_significant_digits() {
        assert_eq!(short(9.843_004), "9.843");
        assert_eq!(short(11.8435), "11.84");
        assert_eq!(short(-0.297_967), "-0.2980");
        assert_eq!(short(123_456.0), "1.235e5");
        assert_eq!(short(f64::NAN), "—");
    }
}
