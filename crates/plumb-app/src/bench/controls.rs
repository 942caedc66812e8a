//! The bench's controls (the model, the overlays, the colouring, the pointer's mode) and the
//! banner shown while what-if moves are in force.

use eframe::egui::{self, RichText};
use plumb_report::wording;

use super::pointer::PointerMode;
use crate::action::{Action, Actions};
use crate::palette;
use crate::state::dataset::Dataset;
use crate::state::reading::BenchMode;
use crate::state::BenchModel;

/// The row of controls above the bench.
pub fn controls_ui(
    bench: &BenchModel,
    data: &Dataset,
    mode: &mut PointerMode,
    ui: &mut egui::Ui,
) -> Actions {
    let mut out = Actions::none();
    ui.horizontal_wrapped(|ui| {
        out.push_some(mode_ui(bench, ui));
        ui.separator();
        out.push_some(super::model_editor::model_ui(bench.spec(), data, ui));
        if bench.is_opening() {
            ui.spinner();
            ui.weak("fitting…");
        }
    });
    ui.horizontal_wrapped(|ui| {
        // Two methods get their own lines (Passing–Bablok, Deming, identity) instead.
        if bench.reading().mode != BenchMode::Agreement {
            out.push_some(overlays_ui(bench, ui));
            ui.separator();
        }
        if !data.groups.is_empty() {
            out.push_some(ui.horizontal(|ui| colour_ui(bench, data, ui)).inner);
            ui.separator();
        }
        pointer_ui(mode, ui);
    });
    out
}

/// What the bench is for: a fit, a calibration, or two methods compared.
fn mode_ui(bench: &BenchModel, ui: &mut egui::Ui) -> Option<Action> {
    let reading = bench.reading();
    let mut mode = reading.mode;
    ui.label("bench:");
    for m in BenchMode::ALL {
        ui.selectable_value(&mut mode, m, m.label())
            .on_hover_text(m.tip());
    }
    (mode != reading.mode).then(|| {
        let mut next = reading.clone();
        next.mode = mode;
        Action::SetReading(next)
    })
}

fn overlays_ui(bench: &BenchModel, ui: &mut egui::Ui) -> Option<Action> {
    let before = bench.overlays();
    let mut o = before;
    ui.checkbox(&mut o.theil_sen, "Theil–Sen")
        .on_hover_text("Median of pairwise slopes: resists outliers in y");
    ui.checkbox(&mut o.deming, "Deming")
        .on_hover_text("Errors in both x and y (equal variances)");
    ui.checkbox(&mut o.loess, "LOESS")
        .on_hover_text("Local regression: shows the shape without assuming one");
    if o.loess {
        ui.add(
            egui::Slider::new(&mut o.loess_span, 0.1..=1.0)
                .text("span")
                .custom_formatter(|v, _| plumb_report::text::num(v)),
        )
        .on_hover_text("Share of the rows in each local fit");
    }
    (o != before).then_some(Action::SetOverlays(o))
}

fn colour_ui(bench: &BenchModel, data: &Dataset, ui: &mut egui::Ui) -> Option<Action> {
    ui.label("colour by:");
    let before = bench.colouring().column.clone();
    let mut chosen = before.clone();
    egui::ComboBox::from_id_salt("group-by")
        .selected_text(chosen.clone().unwrap_or_else(|| "nothing".into()))
        .show_ui(ui, |ui| {
            ui.selectable_value(&mut chosen, None, "nothing");
            for (g, _) in &data.groups {
                ui.selectable_value(&mut chosen, Some(g.clone()), g);
            }
        })
        .response
        .on_hover_text("Colour the points by a text column and fit a line per group");
    (chosen != before).then_some(Action::ColourBy(chosen))
}

fn pointer_ui(mode: &mut PointerMode, ui: &mut egui::Ui) {
    ui.label("pointer:");
    ui.radio_value(mode, PointerMode::Exclude, "click excludes")
        .on_hover_text("Click a point to leave it out (click again to put it back); you are asked for a reason");
    ui.radio_value(mode, PointerMode::Lasso, "lasso excludes")
        .on_hover_text("Drag a loop around points in the scatter to leave them all out");
    ui.radio_value(mode, PointerMode::Move, "drag moves y (what-if)")
        .on_hover_text("Drag a point up or down to see what the numbers would be if it read there (hold Shift to move its x too); its place in the file stays marked, and the data file is never changed");
}

/// The banner over the bench while points are moved.
pub fn what_if_banner_ui(moved: usize, ui: &mut egui::Ui) -> Actions {
    let clear = egui::Frame::new()
        .fill(palette::WHAT_IF)
        .inner_margin(6.0)
        .show(ui, |ui| {
            ui.horizontal(|ui| {
                let what = if moved == 1 {
                    "1 point moved".to_string()
                } else {
                    format!("{moved} points moved")
                };
                ui.label(
                    RichText::new(format!(
                        "WHAT-IF: {what}. The numbers below are hypothetical. {}",
                        wording::WHAT_IF_ONLY
                    ))
                    .color(egui::Color32::BLACK)
                    .strong(),
                );
                ui.button("Clear what-if moves")
                    .on_hover_text("Put every moved point back where the data file has it")
                    .clicked()
            })
            .inner
        })
        .inner;
    Actions::from(clear.then_some(Action::ResetMoves(None)))
}
