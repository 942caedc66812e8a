//! The numbers panel: the live model table, R² and its companions, the z-units view, the cues,
//! and the influence table; all copyable as text or CSV.

use eframe::egui::{self, RichText};
use plumb_core::regression::{InfluenceFlag, LiveSummary};
use plumb_report::text::{num, p, sig};
use plumb_report::wording;

use super::{model_numbers, BenchUi, Scene};
use crate::action::{Action, Actions};
use crate::state::diagnostics::Diagnostics;
use crate::state::pair::PairRows;
use crate::state::reading::BenchMode;
use plumb_data::analysis::RowOrder;

/// How the influence table is sorted.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum SortKey {
    /// Cook's distance, largest first.
    #[default]
    Cook,
    /// Leverage, largest first.
    Leverage,
    /// |externally studentized residual|, largest first.
    Residual,
}

/// Rows listed in the influence table.
const INFLUENCE_ROWS: usize = 25;

/// The headline line for tests and the clipboard: `R² = …`, with the scale it is on when the
/// response is transformed, and whether it is weighted or uncentred.
pub fn r_squared_line(pair: &PairRows, s: &LiveSummary) -> String {
    let y = &pair.spec.y;
    let scale = pair.model.response_transform.label(y);
    let mut kinds = Vec::new();
    if scale != *y {
        kinds.push(format!("on {scale}"));
    }
    if pair.spec.weights.is_some() || pair.spec.weight_rule.is_some() {
        kinds.push("weighted".to_string());
    }
    if !pair.spec.intercept {
        kinds.push("uncentred, no intercept".to_string());
    }
    let kind = if kinds.is_empty() {
        String::new()
    } else {
        format!(" ({})", kinds.join("; "))
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
        out.push_str(&format!("{}, n = {}\n", pair.spec.describe(), s.n));
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

/// Draws the panel; returns the exclusions asked for from the influence table.
pub fn numbers_ui(scene: &Scene<'_>, own: &mut BenchUi, ui: &mut egui::Ui) -> Actions {
    let pair = scene.pair;
    let hypothetical = scene.marks.is_hypothetical();
    egui::ScrollArea::vertical()
        .show(ui, |ui| {
            ui.heading("Numbers");
            if hypothetical {
                ui.colored_label(
                    ui.visuals().warn_fg_color,
                    RichText::new("hypothetical (what-if moves)").strong(),
                );
            }
            let mode = scene.bench.reading().mode;
            let mut out = Actions::none();
            if mode == BenchMode::Agreement {
                out.extend(super::agreement_numbers::agreement_ui(scene, ui));
                ui.separator();
            }
            let summary = scene.bench.summary().unwrap_or_else(|| Err("no pair".into()));
            let show_fit = |ui: &mut egui::Ui| match &summary {
                Ok(s) => model_ui(ui, scene, s, hypothetical),
                Err(e) => {
                    ui.colored_label(ui.visuals().error_fg_color, format!("no fit: {e}"));
                }
            };
            if mode == BenchMode::Agreement {
                // A least-squares fit of one method on the other measures association, not
                // agreement: kept at hand, folded away.
                egui::CollapsingHeader::new("Least-squares fit of y on x (association, not agreement)")
                    .default_open(false)
                    .show(ui, show_fit);
            } else {
                show_fit(ui);
            }
            if mode == BenchMode::Calibration {
                ui.separator();
                out.extend(super::calibration_numbers::calibration_ui(scene, own, ui));
            }
            ui.separator();
            out.extend(checks_ui(ui, scene));
            let diag = scene.bench.diagnostics().map(AsRef::as_ref);
            let current = diag.filter(|d| d.spec == pair.spec);
            if let Some(g) = current.and_then(|d| d.groups.as_ref()) {
                ui.separator();
                model_numbers::groups_ui(ui, g);
            }
            ui.separator();
            out.extend(model_numbers::comparison_ui(ui, scene, diag));
            ui.separator();
            ui.checkbox(&mut own.z_units, "z-units view")
                .on_hover_text("Both columns in standard deviations from their means: the slope is then Pearson's r, and its square is R² of the straight line");
            if let (true, Some(d)) = (own.z_units, diag) {
                z_units_ui(ui, pair, d);
            }
            ui.separator();
            out.extend(cues_ui(ui, scene, diag));
            ui.separator();
            out.extend(influence_table_ui(ui, scene, own));
            out
        })
        .inner
}

fn model_ui(ui: &mut egui::Ui, scene: &Scene<'_>, s: &LiveSummary, hypothetical: bool) {
    let pair = scene.pair;
    let excluded = pair.excluded_rows(scene.marks).len();
    ui.label(format!(
        "n = {} rows used ({} excluded, {} incomplete in the file)",
        s.n, excluded, pair.incomplete
    ));
    ui.label(RichText::new(r_squared_line(pair, s)).size(18.0).strong())
        .on_hover_text("Share of the variation in y around its mean that the fit accounts for: 1 − RSS/TSS. Without an intercept it is measured around zero (uncentred) and is not comparable.");
    let k = if pair.spec.intercept { "n − 1" } else { "n" };
    ui.label(format!("adjusted R² = {}", num(s.adj_r_squared)))
        .on_hover_text(format!(
            "R² penalised for the number of terms p: 1 − (1 − R²)({k})/(n − p)"
        ));
    ui.label(format!("residual SE = {}", num(s.residual_std_error)))
        .on_hover_text("Typical size of a residual, in y's units: √(RSS/(n − p))");
    model_numbers::scale_ui(ui, scene, scene.bench.diagnostics().map(AsRef::as_ref));
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
            ui.label(format!("{} to {}", sig(s.ci[j].0, 4), sig(s.ci[j].1, 4)))
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

fn z_units_ui(ui: &mut egui::Ui, pair: &PairRows, d: &Diagnostics) {
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
        pair.spec.x0(),
        num(2.0 * z.slope),
        pair.spec.y,
        num(2.0 * (1.0 - z.slope.abs()))
    ));
}

fn cues_ui(ui: &mut egui::Ui, scene: &Scene<'_>, diag: Option<&Diagnostics>) -> Actions {
    let pair = scene.pair;
    ui.label(RichText::new("Cues").strong());
    let Some(d) = diag else {
        ui.spinner();
        return Actions::none();
    };
    let Some(c) = d.extras.as_ref().and_then(|e| e.cues.as_ref()) else {
        ui.weak("no cues for this model");
        return Actions::none();
    };
    let said = wording::pair_cues(c, |k| d.included.get(k).map(|&e| pair.rows[e]));
    if said.is_empty() {
        ui.label("No strong non-linear pattern and no single row carrying r.");
    }
    let warn = ui.visuals().warn_fg_color;
    for cue in said {
        ui.colored_label(warn, cue.text);
    }
    if let Some((dc, dp)) = c.distance_correlation {
        ui.label(format!(
            "distance correlation {} ({})",
            num(dc),
            wording::permutation_p(dp)
        ))
        .on_hover_text("Detects any kind of dependence, not only linear");
    }
    for step in d.extras.iter().flat_map(|e| e.degrees.iter().skip(1)) {
        if let Some(cmp) = &step.versus_previous {
            ui.label(format!(
                "degree {}: R² {} (adding the term: F p = {})",
                step.degree,
                num(step.fit.r_squared),
                p(cmp.p_value)
            ));
        }
    }
    model_numbers::degree_button_ui(ui, scene, d)
}

/// The assumption checks as cues, and the row order the sequence checks follow.
fn checks_ui(ui: &mut egui::Ui, scene: &Scene<'_>) -> Actions {
    let reading = scene.bench.reading();
    let mut order = reading.order.clone();
    ui.horizontal(|ui| {
        ui.label(RichText::new("Checks of the residuals").strong());
        let label = ui.label("in order of:");
        let shown = match &order {
            RowOrder::None => "no sequence".to_string(),
            RowOrder::File => "file rows".to_string(),
            RowOrder::Column(c) => c.clone(),
        };
        egui::ComboBox::from_id_salt("check-order")
            .selected_text(shown)
            .show_ui(ui, |ui| {
                ui.selectable_value(&mut order, RowOrder::None, "no sequence");
                ui.selectable_value(&mut order, RowOrder::File, "file rows");
                for c in scene.columns {
                    ui.selectable_value(&mut order, RowOrder::Column(c.clone()), c);
                }
            })
            .response
            .labelled_by(label.id)
            .on_hover_text("The order the rows were measured in (run sequence, time): the Durbin–Watson statistic and the runs of residual signs follow it");
    });
    let checks = scene
        .bench
        .diagnostics()
        .filter(|d| d.spec == scene.pair.spec)
        .and_then(|d| d.checks.as_ref());
    match checks {
        None => {
            ui.spinner();
        }
        Some(Err(e)) => {
            ui.weak(e);
        }
        Some(Ok(c)) => {
            for cue in wording::check_cues(c) {
                let head = format!("{}: {}", cue.topic, cue.figures);
                if cue.flagged {
                    ui.colored_label(ui.visuals().warn_fg_color, head);
                    ui.label(cue.meaning);
                } else {
                    ui.label(head).on_hover_text(cue.meaning);
                }
            }
        }
    }
    if order == reading.order {
        return Actions::none();
    }
    let mut next = reading.clone();
    next.order = order;
    Actions::from(Action::SetReading(next))
}

fn influence_table_ui(ui: &mut egui::Ui, scene: &Scene<'_>, own: &mut BenchUi) -> Actions {
    let mut out = Actions::none();
    ui.label(RichText::new("Most influential rows").strong());
    ui.horizontal(|ui| {
        ui.label("sort by:");
        let s = &mut own.sort;
        ui.radio_value(s, SortKey::Cook, "Cook's D")
            .on_hover_text("How far the whole fit moves when the row is left out");
        ui.radio_value(s, SortKey::Leverage, "leverage")
            .on_hover_text("How unusual the row's x is");
        ui.radio_value(s, SortKey::Residual, "residual")
            .on_hover_text("|externally studentized residual|");
    });
    let Some(d) = scene.bench.diagnostics() else {
        return out;
    };
    let order = match own.sort {
        SortKey::Cook => &d.top[0],
        SortKey::Leverage => &d.top[1],
        SortKey::Residual => &d.top[2],
    };
    egui::Grid::new("influence").striped(true).show(ui, |ui| {
        for h in ["row", "leverage", "studentized (external)", "Cook's D", "flags", ""] {
            ui.label(RichText::new(h).strong());
        }
        ui.end_row();
        for &k in order.iter().take(INFLUENCE_ROWS) {
            let c = &d.cases[k];
            let entry = d.included[k];
            let row = scene.pair.rows[entry];
            if ui.selectable_label(own.pointer.selected == Some(entry), row.to_string())
                .on_hover_text("Ring this row in every view")
                .clicked()
            {
                own.pointer.selected = Some(entry);
            }
            ui.label(num(c.leverage));
            ui.label(num(c.studentized_external));
            ui.label(num(c.cooks_distance));
            ui.label(flags(&c.flags)).on_hover_text("Rules of thumb (common practice, no source): x = leverage above 2p/n (unusual x), y = |studentized residual| above 3 (unusual y), D = Cook's D above 4/n (moves the fit)");
            if ui.small_button("exclude").on_hover_text(format!("Leave row {row} out (you will be asked why)")).clicked() {
                out.push(Action::Exclude { rows: vec![row], reason: None });
            }
            ui.end_row();
        }
    });
    out
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
