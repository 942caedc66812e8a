//! The numbers panel: the headline (R², the share of variation it stands for, the typical miss,
//! the whole-model test), the term table, the z-units view, the cues, and the influence table
//! with its key; the model copyable as text or CSV. Its words are `wording::numbers`, shared
//! with `plumb fit` and the summary.

use eframe::egui::{self, RichText};
use plumb_core::regression::LiveSummary;
use plumb_report::text::{count, num, p, p_clause, sig};
use plumb_report::wording;
use plumb_report::wording::influence::{flag_key, flag_letter, flag_letters, FLAG_SOURCE};
use plumb_report::wording::numbers::{self as words, Headline};

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

/// The headline figures of the live fit: R² with its kinds (the scale it is on when the
/// response is transformed, weighted, uncentred), adjusted R², the typical miss, the
/// whole-model test.
pub fn headline<'a>(pair: &PairRows, s: &LiveSummary, response: &'a str) -> Headline<'a> {
    let weighted = pair.spec.weights.is_some() || pair.spec.weight_rule.is_some();
    let p = pair.terms.len();
    let df_model = p.saturating_sub(usize::from(pair.spec.intercept));
    Headline {
        response,
        centred: pair.spec.intercept,
        kinds: words::r_squared_kinds(response, &pair.spec.y, weighted),
        r_squared: s.r_squared,
        adj_r_squared: s.adj_r_squared,
        terms: p,
        sigma: s.residual_std_error,
        df_residual: s.n.saturating_sub(p),
        f_test: s.f_test.map(|(f, fp)| (f, df_model, fp)),
    }
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
            "{}, {}\n",
            pair.spec.describe(),
            plumb_report::text::plural(s.n, "row", "rows")
        ));
        if hypothetical {
            out.push_str("WHAT-IF: some points are moved; these numbers are hypothetical\n");
        }
        let response = pair.model.response_transform.label(&pair.spec.y);
        let h = headline(pair, s, &response);
        out.push_str(&format!("{}: {}\n", h.r_squared(), h.share()));
        for line in h.lines() {
            out.push_str(&format!("{}: {}\n", line.label, line.figures));
        }
        let interval = words::interval(pair.spec.level);
        for (j, t) in pair.terms.iter().enumerate() {
            out.push_str(&format!(
                "{t}: {} ({} {}; {}; {interval} {})\n",
                num(s.estimates[j]),
                words::STANDARD_ERROR_SHORT,
                num(s.std_errors[j]),
                p_clause(s.p_values[j]),
                words::interval_ends(s.ci[j].0, s.ci[j].1, 6)
            ));
        }
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
                .on_hover_text("Both columns in standard deviations from their means: the straight line's slope is then Pearson's r");
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
        "{} in use · {} left out by you · {} incomplete in the file",
        plumb_report::text::plural(s.n, "row", "rows"),
        count(excluded),
        count(pair.incomplete)
    ));
    let response = pair.model.response_transform.label(&pair.spec.y);
    let h = headline(pair, s, &response);
    ui.label(RichText::new(h.r_squared()).size(18.0).strong())
        .on_hover_text(h.r_squared_means());
    ui.label(h.share());
    // Each line wraps in a narrow panel: the label, then its figures.
    for line in h.lines() {
        ui.horizontal_wrapped(|ui| {
            ui.label(RichText::new(line.label).weak())
                .on_hover_text(&line.means);
            ui.label(&line.figures).on_hover_text(&line.means);
        });
    }
    model_numbers::scale_ui(ui, scene, scene.bench.diagnostics().map(AsRef::as_ref));
    let rows: Vec<TermRow> = pair
        .terms
        .iter()
        .enumerate()
        .map(|(j, t)| TermRow {
            term: t.clone(),
            value: s.estimates[j],
            std_error: s.std_errors[j],
            p: s.p_values[j],
            interval: s.ci[j],
        })
        .collect();
    coefficient_table(ui, "model-table", &rows, pair.spec.level);
    copy_buttons(ui, pair, s, hypothetical);
}

/// One term of a coefficient table.
pub struct TermRow {
    /// The term's name.
    pub term: String,
    /// Its value.
    pub value: f64,
    /// Its standard error.
    pub std_error: f64,
    /// Its p-value.
    pub p: f64,
    /// Its interval at the table's level.
    pub interval: (f64, f64),
}

/// Below this width the interval leaves the table for a line per term under it, so that no
/// column is cut at the panel's edge.
const TABLE_WITH_INTERVAL_FROM: f32 = 440.0;

/// The coefficient table the bench and the one-pass view share: term, value, ± standard
/// error, p and the interval at `level` — in a narrow panel the intervals go under the table.
pub fn coefficient_table(ui: &mut egui::Ui, id: &str, rows: &[TermRow], level: f64) {
    let interval = words::interval(level);
    let wide = ui.available_width() >= TABLE_WITH_INTERVAL_FROM;
    let se = if wide {
        words::STANDARD_ERROR
    } else {
        words::STANDARD_ERROR_SHORT
    };
    egui::Grid::new(id).striped(true).show(ui, |ui| {
        let mut heads = vec!["term", words::VALUE, se, "p"];
        if wide {
            heads.push(&interval);
        }
        for h in heads {
            ui.label(RichText::new(h).strong());
        }
        ui.end_row();
        for r in rows {
            ui.label(&r.term);
            ui.label(num(r.value));
            ui.label(num(r.std_error));
            ui.label(p(r.p));
            if wide {
                ui.label(words::interval_ends(r.interval.0, r.interval.1, 4))
                    .on_hover_text(words::interval_ends(r.interval.0, r.interval.1, 6));
            }
            ui.end_row();
        }
    });
    if !wide {
        for r in rows {
            ui.label(format!(
                "{interval} of {}: {}",
                r.term,
                words::interval_ends(r.interval.0, r.interval.1, 4)
            ));
        }
    }
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
    // The slope in z-units is r only for the plain, unweighted straight line.
    let spec = &pair.spec;
    let is_the_line = pair.terms.len() == 2
        && spec.intercept
        && spec.weights.is_none()
        && spec.weight_rule.is_none();
    let y = pair.model.response_transform.label(&spec.y);
    // The view is on the model's scales: a transformed predictor is named as transformed.
    let x = spec
        .x_transforms
        .iter()
        .find(|(c, _)| c == spec.x0())
        .map_or_else(|| spec.x0().to_string(), |(c, t)| t.label(c));
    for line in words::z_units(&z, &x, &y, is_the_line) {
        ui.label(line);
    }
}

fn cues_ui(ui: &mut egui::Ui, scene: &Scene<'_>, diag: Option<&Diagnostics>) -> Actions {
    let pair = scene.pair;
    ui.label(RichText::new("Cues").strong());
    crate::screens::map::pair_notes_ui(ui, scene.map, &pair.spec.y, pair.spec.x0());
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
                "degree {}: R² {} (the added power: partial F {}, {})",
                step.degree,
                num(step.fit.r_squared),
                sig(cmp.f_statistic, 4),
                p_clause(cmp.p_value)
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
    let key = flag_key(d.cases.len(), scene.pair.terms.len());
    let key_text = key
        .iter()
        .map(|k| format!("{}: {} ({})", flag_letter(k.flag), k.rule, k.says))
        .collect::<Vec<_>>()
        .join("\n");
    egui::Grid::new("influence").striped(true).show(ui, |ui| {
        for h in [
            "row",
            "leverage",
            "studentized (external)",
            "Cook's D",
            "flags",
            "",
        ] {
            ui.label(RichText::new(h).strong());
        }
        ui.end_row();
        for &k in order.iter().take(INFLUENCE_ROWS) {
            let Some(c) = d.cases.get(k) else {
                continue;
            };
            let entry = d.included[k];
            let row = scene.pair.rows[entry];
            if ui
                .selectable_label(own.pointer.selected == Some(entry), scene.names.short(row))
                .on_hover_text("Ring this row in every view")
                .clicked()
            {
                own.pointer.selected = Some(entry);
            }
            ui.label(num(c.leverage));
            ui.label(num(c.studentized_external));
            ui.label(num(c.cooks_distance));
            ui.label(flag_letters(&c.flags)).on_hover_text(&key_text);
            if ui
                .small_button("exclude")
                .on_hover_text(format!("Leave row {row} out (you will be asked why)"))
                .clicked()
            {
                out.push(Action::Exclude {
                    rows: vec![row],
                    reason: None,
                });
            }
            ui.end_row();
        }
    });
    // The key of the flags column, under the table.
    ui.label(
        RichText::new(format!("flags ({FLAG_SOURCE})"))
            .weak()
            .small(),
    );
    for k in &key {
        ui.horizontal(|ui| {
            ui.label(RichText::new(flag_letter(k.flag)).strong().monospace());
            ui.label(RichText::new(format!("{}: {}", k.rule, k.says)).small());
        });
    }
    out
}
