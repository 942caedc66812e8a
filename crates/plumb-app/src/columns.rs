//! The Columns screen: open a file (path, dialog, drop, recent list) and see its columns.

use std::path::PathBuf;

use eframe::egui::{self, RichText};
use plumb_report::text::num;

use crate::app::{Screen, Workbench};
use crate::files::DialogPurpose;

/// Draws the screen.
pub fn show(wb: &mut Workbench, ui: &mut egui::Ui) {
    ui.horizontal(|ui| {
        let label = ui.label("File:");
        let field = ui
            .add(
                egui::TextEdit::singleline(&mut wb.path_field)
                    .hint_text("path to a CSV, TSV, Parquet, spreadsheet or .plumb session")
                    .desired_width(420.0),
            )
            .labelled_by(label.id)
            .on_hover_text("Type or paste a path and press Enter");
        let enter = field.lost_focus() && ui.input(|i| i.key_pressed(egui::Key::Enter));
        if ui
            .button("Open")
            .on_hover_text("Read the file named in the field")
            .clicked()
            || enter
        {
            let p = PathBuf::from(wb.path_field.trim());
            if !p.as_os_str().is_empty() {
                wb.open_path(&p);
            }
        }
        if ui
            .button("Browse…")
            .on_hover_text("Choose a file with the system's dialog (Ctrl+O)")
            .clicked()
        {
            wb.pick_file(DialogPurpose::Open);
        }
    });
    ui.weak("Or drop a file onto this window.");
    if !wb.recent.files.is_empty() {
        ui.add_space(6.0);
        ui.label(RichText::new("Recent").strong());
        let mut chosen = None;
        for f in &wb.recent.files {
            if ui
                .link(f.display().to_string())
                .on_hover_text("Open this file again")
                .clicked()
            {
                chosen = Some(f.clone());
            }
        }
        if let Some(f) = chosen {
            wb.open_path(&f);
        }
    }
    ui.separator();
    let Some(loaded) = &wb.loaded else {
        ui.label("No file open yet.");
        return;
    };
    let d = &loaded.dataset;
    ui.heading(d.file_name());
    ui.label(format!(
        "{} data rows, {} columns ({} numeric). SHA-256 {}…",
        d.table.n_rows(),
        d.summaries.len(),
        d.numeric.len(),
        &loaded.sha256[..12.min(loaded.sha256.len())]
    ));
    for note in d.table.notes() {
        ui.label(format!("note: {note}"));
    }
    let mut open_pair = None;
    egui::ScrollArea::vertical().show(ui, |ui| {
        egui::Grid::new("column-summary")
            .striped(true)
            .num_columns(5)
            .show(ui, |ui| {
                for h in ["column", "type", "missing", "min", "max"] {
                    ui.label(RichText::new(h).strong());
                }
                ui.end_row();
                for s in &d.summaries {
                    ui.label(&s.name);
                    ui.label(s.kind);
                    ui.label(s.missing.to_string());
                    ui.label(s.min.map_or("—".into(), num));
                    ui.label(s.max.map_or("—".into(), num));
                    ui.end_row();
                }
            });
        if d.numeric.len() >= 2 {
            ui.add_space(8.0);
            if ui
                .button("Map how the columns move together")
                .on_hover_text("The co-movement map of every numeric pair")
                .clicked()
            {
                open_pair = Some(None);
            }
            if ui
                .button(format!("Fit {} on {}", d.numeric[1], d.numeric[0]))
                .on_hover_text("Open the first two numeric columns on the pair bench")
                .clicked()
            {
                open_pair = Some(Some(crate::pair::PairSpec::line(
                    &d.numeric[1],
                    &d.numeric[0],
                )));
            }
        }
    });
    match open_pair {
        Some(None) => wb.screen = Screen::Overview,
        Some(Some(spec)) => {
            let opened = wb.open_pair(spec);
            wb.screen = if opened { Screen::Bench } else { wb.screen };
        }
        None => {}
    }
}
