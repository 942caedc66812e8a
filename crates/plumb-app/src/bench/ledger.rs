//! The exclusion ledger: every row left out with its reason and what it did to the answer,
//! the rows typed in to exclude, and the what-if moves.

use eframe::egui::{self, RichText};
use plumb_report::text::{num, p};
use plumb_report::Effect;

use super::{BenchUi, Scene};
use crate::action::{Action, Actions};
use crate::state::marks::Note;

/// Draws the ledger.
pub fn ledger_ui(
    scene: &Scene<'_>,
    own: &mut BenchUi,
    n_rows: usize,
    ui: &mut egui::Ui,
) -> Actions {
    ui.heading("Exclusion ledger");
    let mut out = typed_rows_ui(&mut own.row_field, n_rows, ui);
    let marks = scene.marks;
    if marks.excluded.is_empty() {
        ui.weak("No rows excluded. Click a point, lasso several, or type a row number.");
    }
    let effects: &[Effect] = scene
        .bench
        .diagnostics()
        .and_then(|d| d.effects.as_ref().ok())
        .map_or(&[], Vec::as_slice);
    egui::ScrollArea::vertical()
        .max_height(ui.available_height() * 0.7)
        .show(ui, |ui| {
            for (&row, note) in &marks.excluded {
                ui.separator();
                out.extend(exclusion_ui(scene, row, note, effects, ui));
            }
        });
    if let Some(all) = effects.last().filter(|e| e.rows.len() > 1) {
        ui.separator();
        ui.label(RichText::new(format!("all {} together", all.rows.len())).strong());
        ui.label(effect_line(all));
    }
    if !marks.excluded.is_empty()
        && ui
            .button("Restore all")
            .on_hover_text("Put every excluded row back (undoable)")
            .clicked()
    {
        out.push(Action::PutBack(marks.excluded.keys().copied().collect()));
    }
    out.extend(moves_ui(scene, ui));
    out
}

/// One excluded row: where it is, its reason (editable), when, and what it does to the fit.
fn exclusion_ui(
    scene: &Scene<'_>,
    row: usize,
    note: &Note,
    effects: &[Effect],
    ui: &mut egui::Ui,
) -> Actions {
    let mut out = Actions::none();
    let pair = scene.pair;
    let label = scene.names.label(row);
    let where_ = match pair.index_of(row) {
        Some(i) => format!(
            "{label}: {} = {}, {} = {}",
            pair.spec.x0(),
            num(pair.x[i]),
            pair.spec.y,
            num(pair.y[i])
        ),
        None => format!("{label} (not among this pair's complete rows)"),
    };
    ui.horizontal_wrapped(|ui| {
        ui.label(RichText::new(where_).strong());
        if ui
            .small_button("put back")
            .on_hover_text("Include this row again")
            .clicked()
        {
            out.push(Action::PutBack(vec![row]));
        }
    });
    let mut text = note.reason.clone();
    let edited = ui
        .add(
            egui::TextEdit::multiline(&mut text)
                .desired_rows(1)
                .desired_width(f32::INFINITY),
        )
        .on_hover_text("Why this row is out; recorded in the session and the summary")
        .changed();
    if edited {
        out.push(Action::EditReason { row, reason: text });
    }
    if !note.at.is_empty() {
        ui.weak(format!("excluded {}", note.at));
    }
    if let Some(e) = effects.iter().find(|e| e.rows == [row]) {
        ui.label(effect_line(e)).on_hover_text("The fit with this row in (other exclusions applied), and with every exclusion applied; computed on the file's values");
    }
    out
}

/// The field for typing row numbers; Enter or the button excludes them.
fn typed_rows_ui(field: &mut String, n_rows: usize, ui: &mut egui::Ui) -> Actions {
    let mut out = Actions::none();
    ui.horizontal(|ui| {
        let label = ui.label("Exclude row:");
        let edit = ui
            .add(egui::TextEdit::singleline(field).desired_width(70.0).hint_text("row №"))
            .labelled_by(label.id)
            .on_hover_text("Data row number as in the file (1 = first row after the header); several as 3, 7, 12");
        let enter = edit.lost_focus() && ui.input(|i| i.key_pressed(egui::Key::Enter));
        let clicked = ui
            .button("Exclude")
            .on_hover_text("Leave these rows out; you will be asked why")
            .clicked();
        if clicked || enter {
            match typed_rows(field, n_rows) {
                Ok(rows) => {
                    field.clear();
                    out.push(Action::Exclude { rows, reason: None });
                }
                Err(message) => out.push(Action::fail(message)),
            }
        }
    });
    out
}

/// Row numbers typed as `3, 7 12;40`, each between 1 and `n_rows`.
pub fn typed_rows(text: &str, n_rows: usize) -> Result<Vec<usize>, String> {
    text.split([',', ' ', ';'])
        .filter(|s| !s.is_empty())
        .map(|part| match part.parse::<usize>() {
            Ok(r) if (1..=n_rows).contains(&r) => Ok(r),
            _ => Err(format!("'{part}' is not a data row number (1 to {n_rows})")),
        })
        .collect()
}

/// The what-if moves, each with a reset.
fn moves_ui(scene: &Scene<'_>, ui: &mut egui::Ui) -> Actions {
    let mut out = Actions::none();
    let (pair, moved) = (scene.pair, &scene.marks.moved);
    if moved.is_empty() {
        return out;
    }
    ui.separator();
    ui.label(RichText::new("What-if moves (not in the data)").strong());
    for (&row, &(x, y)) in moved {
        ui.horizontal(|ui| {
            let from = pair
                .index_of(row)
                .map(|i| format!("({}, {})", num(pair.x[i]), num(pair.y[i])))
                .unwrap_or_default();
            ui.label(format!(
                "{}: {from} moved to ({}, {})",
                scene.names.label(row),
                num(x),
                num(y)
            ));
            if ui
                .small_button("reset")
                .on_hover_text("Put this point back where the file has it")
                .clicked()
            {
                out.push(Action::ResetMoves(Some(row)));
            }
        });
    }
    out
}

fn effect_line(e: &Effect) -> String {
    format!(
        "with {} / without:\nR² {} / {} (Δ {})\nslope {} / {} (Δ {})\nslope p {} / {}",
        if e.rows.len() == 1 {
            "the row"
        } else {
            "the rows"
        },
        num(e.before.r_squared),
        num(e.after.r_squared),
        signed(e.after.r_squared - e.before.r_squared),
        num(e.before.slope),
        num(e.after.slope),
        signed(e.after.slope - e.before.slope),
        p(e.before.slope_p),
        p(e.after.slope_p)
    )
}

fn signed(v: f64) -> String {
    if v >= 0.0 {
        format!("+{}", num(v))
    } else {
        num(v)
    }
}

#[cfg(test)]
mod tests {
    use super::typed_rows;

    #[test]
    fn typed_rows_take_several_separators_and_refuse_what_is_not_a_row() {
        assert_eq!(typed_rows("3, 7 12;40", 40), Ok(vec![3, 7, 12, 40]));
        assert_eq!(typed_rows("", 40), Ok(vec![]));
        assert_eq!(
            typed_rows("3,41", 40),
            Err("'41' is not a data row number (1 to 40)".to_string())
        );
        assert!(typed_rows("0", 40).is_err());
        assert!(typed_rows("x", 40).is_err());
    }
}
