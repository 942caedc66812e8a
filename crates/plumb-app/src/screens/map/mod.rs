//! The co-movement map: a coefficient for every pair of the chosen numeric columns, drawn as a
//! grid of coloured cells with a colour key, the complete pairs behind each cell, marks for
//! the map's notes (a drift shared along the row order, structure r misses), the raw and
//! adjusted p-values on hover, and the flagged and strongest pairs listed beside it. A click
//! opens the pair on the bench, whose cues then repeat the map's notes.

mod choose;
mod grid;
mod key;
mod lists;

use eframe::egui;
use plumb_core::association::{Adjustment, Method};
use plumb_report::wording;

use crate::action::{Action, Actions};
use crate::state::map::{MapKey, MapModel, MapResult};
use crate::state::pair::FitSpec;
use crate::state::{Screen, State};

/// What the screen keeps between frames.
pub struct MapUi {
    /// Order cells by similarity (else by file order).
    pub by_similarity: bool,
    /// The dense grid as an image, for (map generation, by similarity, dark).
    image: Option<((u64, bool, bool), egui::TextureHandle)>,
    /// Whether the last frame's cells were large enough for marks (the key says so if not).
    marks_drawn: bool,
}

impl Default for MapUi {
    fn default() -> Self {
        Self {
            by_similarity: true,
            image: None,
            marks_drawn: true,
        }
    }
}

/// Draws the screen.
pub fn map_ui(state: &State, own: &mut MapUi, ui: &mut egui::Ui) -> Actions {
    let mut out = Actions::none();
    let Some(loaded) = state.loaded() else {
        return out;
    };
    let numeric = &loaded.dataset.numeric;
    if numeric.len() < 2 {
        ui.label("The map needs at least two numeric columns.");
        return out;
    }
    let map = state.map();
    out.push_some(controls_ui(map.key(), own, numeric, ui));
    out.push_some(choose::columns_ui(map, &loaded.dataset, ui));
    if let Some(why) = map.refused(&loaded.dataset) {
        ui.label(format!(
            "No map: {why}. Choose the columns above, or open a pair from the columns screen."
        ));
        return out;
    }
    let Some(result) = map.result() else {
        ui.horizontal(|ui| {
            ui.spinner();
            ui.label("computing the map…");
        });
        return out;
    };
    ui.horizontal_wrapped(|ui| {
        if map.is_busy() {
            ui.spinner();
            ui.weak("updating…");
        }
        ui.label(testing_note(result));
    });
    egui::Panel::bottom("map-cautions").show(ui, |ui| {
        ui.weak(format!(
            "{} Open a pair to look at it.",
            wording::line(&wording::MAP_CAUTIONS)
        ));
    });
    let order: Vec<usize> = if own.by_similarity {
        result.similarity.clone()
    } else {
        (0..result.columns.len()).collect()
    };
    let drawn = own.marks_drawn;
    let listed = egui::Panel::right("map-side")
        .resizable(true)
        .default_size(360.0)
        .size_range(260.0..=520.0)
        .show(ui, |ui| side_ui(ui, result, drawn))
        .inner;
    let (clicked, drawn) = egui::CentralPanel::default()
        .show(ui, |ui| grid::grid_ui(ui, result, &order, own))
        .inner;
    own.marks_drawn = drawn;
    if let Some((i, j)) = clicked.or(listed) {
        out.push(Action::OpenPair(FitSpec::line(
            &result.columns[i],
            &result.columns[j],
        )));
        out.push(Action::Show(Screen::Bench));
    }
    out
}

/// What the map flagged on the pair (`y`, `x`), with its numbers, under "From the map:"
/// (nothing when it flagged nothing): the bench's cues show it, so the map's reason survives
/// opening the pair.
pub(crate) fn pair_notes_ui(ui: &mut egui::Ui, map: &MapModel, y: &str, x: &str) {
    let notes = map.pair_notes(y, x);
    if notes.is_empty() {
        return;
    }
    ui.label("From the map:");
    let warn = ui.visuals().warn_fg_color;
    for note in notes {
        ui.colored_label(warn, note);
    }
}

/// The keys, then the flagged and the strongest pairs; returns the pair clicked.
fn side_ui(ui: &mut egui::Ui, r: &MapResult, drawn: bool) -> Option<(usize, usize)> {
    egui::ScrollArea::vertical()
        .id_salt("map-side-scroll")
        .show(ui, |ui| {
            key::colour_key_ui(ui, method_name(r.key.method));
            ui.separator();
            key::marks_key_ui(ui, r, drawn);
            ui.separator();
            let flagged = lists::flagged_ui(ui, r);
            ui.separator();
            lists::strongest_ui(ui, r).or(flagged)
        })
        .inner
}

/// The coefficient, adjustment, grouping and row-order choices; a changed key is an action.
fn controls_ui(
    current: &MapKey,
    own: &mut MapUi,
    numeric: &[String],
    ui: &mut egui::Ui,
) -> Option<Action> {
    let mut key = current.clone();
    ui.horizontal_wrapped(|ui| {
        ui.label("Coefficient:");
        for (m, name, tip) in [
            (Method::Pearson, "Pearson r", "Linear association"),
            (Method::Spearman, "Spearman ρ", "Monotone association (ranks)"),
            (Method::Kendall, "Kendall τ-b", "Rank concordance, tie-corrected"),
        ] {
            ui.radio_value(&mut key.method, m, name).on_hover_text(tip);
        }
        ui.separator();
        ui.label("Adjust p for many pairs:");
        for (a, name, tip) in [
            (Adjustment::Holm, "Holm", "Holm's step-down: controls the chance of any false hit"),
            (Adjustment::BenjaminiHochberg, "Benjamini–Hochberg", "Controls the expected share of false hits"),
            (Adjustment::None, "none", "Raw p-values: with many pairs some will be small by chance"),
        ] {
            ui.radio_value(&mut key.adjust, a, name).on_hover_text(tip);
        }
        ui.separator();
        ui.checkbox(&mut own.by_similarity, "group similar columns")
            .on_hover_text("Order the columns so that those moving together sit together (average-linkage clustering on 1 − |r|); off: file order");
        ui.separator();
        ui.horizontal(|ui| {
        ui.label("Row order:");
        egui::ComboBox::from_id_salt("order-column")
            .selected_text(key.order.clone().unwrap_or_else(|| "none".into()))
            .show_ui(ui, |ui| {
                ui.selectable_value(&mut key.order, None, "none");
                for c in numeric {
                    ui.selectable_value(&mut key.order, Some(c.clone()), c);
                }
            })
            .response
            .on_hover_text("A time or run-order column: each pair is also correlated on first differences and after removing a linear trend, to expose drifts shared by both columns");
        });
    });
    (key != *current).then_some(Action::MapSettings(key))
}

fn testing_note(r: &MapResult) -> String {
    let how = match r.key.adjust {
        Adjustment::Holm => "p adjusted by Holm's step-down",
        Adjustment::BenjaminiHochberg => "p adjusted by Benjamini–Hochberg",
        Adjustment::None => "p NOT adjusted — expect chance hits",
    };
    format!(
        "{} pairs tested with {}; {how} over all {}.",
        r.matrix.n_tests,
        method_name(r.key.method),
        r.matrix.n_tests
    )
}

fn method_name(m: Method) -> &'static str {
    match m {
        Method::Pearson => "Pearson r",
        Method::Spearman => "Spearman ρ",
        Method::Kendall => "Kendall τ-b",
        Method::Distance => "distance correlation",
    }
}
