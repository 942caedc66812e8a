//! The pairs beside the grid: those the map flags (whatever their coefficient), then the
//! strongest. Each is a button that opens the pair, so they are reachable by keyboard, screen
//! readers and tests.

use eframe::egui::{self, RichText};
use plumb_report::text::{count, num, p};

use super::grid::cell_text;
use crate::state::map::MapResult;

/// The flagged pairs; returns the one clicked.
pub(super) fn flagged_ui(ui: &mut egui::Ui, r: &MapResult) -> Option<(usize, usize)> {
    let flagged = &r.flagged;
    ui.label(RichText::new("Pairs the map flags").strong());
    if flagged.is_empty() {
        ui.weak("none");
        return None;
    }
    let mut chosen = None;
    let widest = pair_column_width(ui, 130.0);
    egui::Grid::new("map-flagged")
        .striped(true)
        .max_col_width(widest)
        .show(ui, |ui| {
            for &(i, j, ref labels) in flagged {
                let label = format!("{} and {}", r.columns[i], r.columns[j]);
                if pair_button(ui, label)
                    .on_hover_ui(|ui| {
                        ui.label(cell_text(r, i, j));
                    })
                    .clicked()
                {
                    chosen = Some((i, j));
                }
                ui.colored_label(ui.visuals().warn_fg_color, labels.join(", "));
                ui.end_row();
            }
        });
    chosen
}

/// The strongest pairs by |coefficient|; returns the one clicked.
pub(super) fn strongest_ui(ui: &mut egui::Ui, r: &MapResult) -> Option<(usize, usize)> {
    let m = &r.matrix;
    let pairs = &r.strongest;
    ui.label(RichText::new("Strongest pairs").strong());
    let mut chosen = None;
    let widest = pair_column_width(ui, 190.0);
    egui::Grid::new("strongest")
        .striped(true)
        .max_col_width(widest)
        .show(ui, |ui| {
            for h in ["pair", "coefficient", "adjusted p", "n"] {
                ui.label(RichText::new(h).strong());
            }
            ui.end_row();
            for &(i, j, v) in pairs {
                let label = format!("{} and {}", r.columns[i], r.columns[j]);
                if ui
                    .button(&label)
                    .on_hover_text(cell_text(r, i, j))
                    .clicked()
                {
                    chosen = Some((i, j));
                }
                ui.label(num(v));
                ui.label(m.p_adjusted[i][j].or(m.p_value[i][j]).map_or("—".into(), p));
                ui.label(count(m.n[i][j]));
                ui.end_row();
            }
        });
    chosen
}

/// Width left for the pairs' column beside `others` points of other columns (long names are
/// cut short rather than pushing the panel wider than the window).
fn pair_column_width(ui: &egui::Ui, others: f32) -> f32 {
    (ui.available_width() - others).max(100.0)
}

/// A pair's button, its text cut short with an ellipsis when the column is narrow (the hover
/// and the accessible label keep the whole text).
fn pair_button(ui: &mut egui::Ui, label: String) -> egui::Response {
    ui.add(egui::Button::new(label).truncate())
}
