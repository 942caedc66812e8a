//! Which numeric columns the map compares: a tick box per column, and a line naming the
//! columns left out (those that look like row labels are left out when the file opens) with a
//! way to put them back.

use std::collections::BTreeSet;

use eframe::egui;

use crate::action::Action;
use crate::state::dataset::Dataset;
use crate::state::map::{MapKey, MapModel};

/// The line of left-out columns and the tick boxes; a changed choice is an action.
pub(super) fn columns_ui(map: &MapModel, data: &Dataset, ui: &mut egui::Ui) -> Option<Action> {
    let key = map.key();
    let mut left_out = key.left_out.clone();
    let why = |c: &str| {
        map.row_labels()
            .iter()
            .find(|(name, _)| name == c)
            .map(|(_, label)| label.describe())
    };
    let out: Vec<&String> = data
        .numeric
        .iter()
        .filter(|c| left_out.contains(*c))
        .collect();
    if !out.is_empty() {
        ui.horizontal_wrapped(|ui| {
            let named: Vec<String> = out
                .iter()
                .map(|c| match why(c) {
                    Some(w) => format!("{c} ({w})"),
                    None => c.to_string(),
                })
                .collect();
            ui.label(format!("Left out of the map: {}.", named.join(", ")));
            if ui
                .button("Put them back")
                .on_hover_text("Compare every numeric column again")
                .clicked()
            {
                left_out.clear();
            }
        });
    }
    let total = data.numeric.len();
    egui::CollapsingHeader::new(format!(
        "Columns in the map: {} of {total}",
        total - out.len()
    ))
    .id_salt("map-columns")
    .show(ui, |ui| tick_boxes(ui, data, &mut left_out, &why));
    (left_out != key.left_out).then(|| {
        Action::MapSettings(MapKey {
            left_out,
            ..key.clone()
        })
    })
}

fn tick_boxes(
    ui: &mut egui::Ui,
    data: &Dataset,
    left_out: &mut BTreeSet<String>,
    why: &dyn Fn(&str) -> Option<String>,
) {
    egui::ScrollArea::vertical()
        .id_salt("map-columns-scroll")
        .max_height(120.0)
        .show(ui, |ui| {
            ui.horizontal_wrapped(|ui| {
                for c in &data.numeric {
                    let mut on = !left_out.contains(c);
                    let tip = why(c).map_or_else(
                        || "Untick to leave this column out of the map".to_string(),
                        |w| format!("Looks like {w}: left out when the file opened"),
                    );
                    if ui.checkbox(&mut on, c).on_hover_text(tip).changed() {
                        if on {
                            left_out.remove(c);
                        } else {
                            left_out.insert(c.clone());
                        }
                    }
                }
            });
        });
}
