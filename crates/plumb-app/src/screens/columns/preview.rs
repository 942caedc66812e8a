//! The file's first rows as the workbench reads them, scrolling sideways when wide.

use eframe::egui::{self, RichText};

use crate::state::State;

/// Rows shown.
pub const PREVIEW_ROWS: usize = 8;
/// Columns shown (a very wide file says how many more it has).
pub const PREVIEW_COLUMNS: usize = 60;

/// Draws the first [`PREVIEW_ROWS`] rows of the open file.
pub fn preview_ui(state: &State, ui: &mut egui::Ui) {
    let Some(loaded) = state.loaded() else {
        return;
    };
    let d = &loaded.dataset;
    let rows = d.table.n_rows().min(PREVIEW_ROWS);
    let columns: Vec<&str> = d
        .summaries
        .iter()
        .take(PREVIEW_COLUMNS)
        .map(|s| s.name.as_str())
        .collect();
    let heading = if d.sample.is_some() {
        format!("First {rows} rows of the sample")
    } else {
        format!("First {rows} rows")
    };
    ui.label(RichText::new(heading).strong());
    egui::ScrollArea::horizontal()
        .id_salt("row-preview-scroll")
        .show(ui, |ui| {
            egui::Grid::new("row-preview").striped(true).show(ui, |ui| {
                ui.label(RichText::new("row").strong())
                    .on_hover_text("Data row (1 = the first row after the header)");
                for c in &columns {
                    ui.label(RichText::new(*c).strong());
                }
                ui.end_row();
                for row in 1..=rows {
                    ui.label(row.to_string());
                    for c in &columns {
                        match d.cell_text(c, row) {
                            Some(v) => ui.label(v),
                            None => ui.weak("·").on_hover_text("missing"),
                        };
                    }
                    ui.end_row();
                }
            });
        });
    if d.summaries.len() > PREVIEW_COLUMNS {
        ui.weak(format!(
            "the first {PREVIEW_COLUMNS} of {} columns",
            d.summaries.len()
        ));
    }
}
