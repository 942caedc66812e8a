//! The window's frame around the screens: the tool bar, the status line, and the questions
//! that must be answered before work goes on.

use eframe::egui::{self, RichText};

use crate::app::{Ask, Screen, Workbench};
use crate::files::DialogPurpose;

/// Tool bar: file actions, undo/redo and the screen switch.
pub fn top_bar(wb: &mut Workbench, ui: &mut egui::Ui) {
    egui::Panel::top("toolbar").show(ui, |ui| {
        ui.horizontal_wrapped(|ui| {
            ui.label(RichText::new("Plumbline").strong());
            ui.separator();
            if ui
                .button("Open…")
                .on_hover_text("Open a data file (CSV, TSV, Parquet, spreadsheet) or a .plumb session — Ctrl+O. You can also drop a file on the window.")
                .clicked()
            {
                wb.pick_file(DialogPurpose::Open);
            }
            let has_data = wb.loaded.is_some();
            if ui
                .add_enabled(has_data, egui::Button::new("Save session"))
                .on_hover_text("Save the exclusions, their reasons and the model to a .plumb session — Ctrl+S (Ctrl+Shift+S: save as). The data file is never written.")
                .clicked()
            {
                wb.save_session_interactive();
            }
            if ui
                .add_enabled(has_data && wb.bench.pair().is_some(), egui::Button::new("Write summary…"))
                .on_hover_text("Write the colleague summary: HTML with charts, the statistics and exclusion log as CSV, and the session that reproduces it — Ctrl+E")
                .clicked()
            {
                wb.pick_file(DialogPurpose::ExportSummary);
            }
            ui.separator();
            if ui
                .add_enabled(wb.history.can_undo(), egui::Button::new("Undo"))
                .on_hover_text("Take back the last exclusion, restoration or move — Ctrl+Z")
                .clicked()
            {
                wb.undo();
            }
            if ui
                .add_enabled(wb.history.can_redo(), egui::Button::new("Redo"))
                .on_hover_text("Do again what was undone — Ctrl+Y or Ctrl+Shift+Z")
                .clicked()
            {
                wb.redo();
            }
            ui.separator();
            for (screen, name, tip) in [
                (Screen::Columns, "Columns", "The file's columns: type, missing cells, range"),
                (Screen::Overview, "Co-movement map", "How every pair of numeric columns moves together, with adjusted p-values"),
                (Screen::Bench, "Pair bench", "One pair: the fit, its residuals and leverage, live numbers and the exclusion ledger"),
                (Screen::Sweep, "One-pass view", "A file too large to load: the line and a density image from passes over the file"),
            ] {
                if screen == Screen::Sweep && wb.sweep.is_none() {
                    continue;
                }
                let enabled = screen == Screen::Columns || screen == Screen::Sweep || has_data;
                if ui
                    .add_enabled(enabled, egui::Button::selectable(wb.screen == screen, name))
                    .on_hover_text(tip)
                    .clicked()
                {
                    wb.screen = screen;
                }
            }
            ui.with_layout(egui::Layout::right_to_left(egui::Align::Center), |ui| {
                theme_choice(ui);
            });
        });
    });
}

/// Status line: the last message, a running load with its cancel button, background work.
pub fn status_bar(wb: &mut Workbench, ui: &mut egui::Ui) {
    egui::Panel::bottom("status").show(ui, |ui| {
        ui.horizontal(|ui| {
            if let Some(l) = &wb.loading {
                ui.spinner();
                let read = l.progress.bytes_read();
                let (stage, fraction) = match l.progress.stage() {
                    plumb_data::Stage::Reading => (
                        "reading",
                        l.bytes.filter(|&b| b > 0).map(|b| read as f32 / b as f32),
                    ),
                    plumb_data::Stage::Parsing => ("splitting records", None),
                    plumb_data::Stage::Typing => ("typing the cells", None),
                };
                let size = l
                    .bytes
                    .map_or(String::new(), |b| format!(" ({:.1} MB)", b as f64 / 1e6));
                ui.label(format!(
                    "{}{size}: {stage}, {:.1} s",
                    l.path.display(),
                    l.job.elapsed().as_secs_f64()
                ));
                if let Some(f) = fraction {
                    ui.add(
                        egui::ProgressBar::new(f.clamp(0.0, 1.0))
                            .desired_width(160.0)
                            .show_percentage(),
                    )
                    .on_hover_text("bytes read from disk");
                }
                if ui
                    .button("Cancel")
                    .on_hover_text("Stop waiting for this file; the workbench keeps what it had")
                    .clicked()
                {
                    wb.cancel_load();
                }
                ui.separator();
            } else if wb.is_busy() {
                ui.spinner()
                    .on_hover_text("diagnostics or the co-movement map are being recomputed");
            }
            if let Some(s) = &wb.status {
                let text = RichText::new(&s.text);
                if s.error {
                    ui.colored_label(ui.visuals().error_fg_color, text);
                } else {
                    ui.label(text);
                }
            }
        });
    });
}

/// Modal questions: recover unsaved work; open a data file outside a session's folder.
pub fn questions(wb: &mut Workbench, ctx: &egui::Context) {
    let Some(ask) = wb.ask.clone() else { return };
    let mut answer: Option<bool> = None;
    egui::Modal::new(egui::Id::unique("question")).show(ctx, |ui| {
        ui.set_max_width(520.0);
        match &ask {
            Ask::Recover(s) => {
                ui.heading("Unsaved work from a previous run");
                ui.label(format!(
                    "{} exclusion(s) on {} were not saved when the workbench last closed.",
                    s.exclusions.len(),
                    s.data.path
                ));
                for e in s.exclusions.iter().take(8) {
                    ui.label(format!("  row {} — {}", e.row, e.reason));
                }
                ui.horizontal(|ui| {
                    if ui
                        .button("Restore it")
                        .on_hover_text("Open the file with these exclusions and reasons")
                        .clicked()
                    {
                        answer = Some(true);
                    }
                    if ui
                        .button("Discard it")
                        .on_hover_text("Delete the recovery copy")
                        .clicked()
                    {
                        answer = Some(false);
                    }
                });
            }
            Ask::TooLarge { path, message } => {
                ui.heading("Too large to load");
                ui.label(message);
                ui.label(format!(
                    "{} can still be read in one pass, in pieces, without holding it: the least-squares line of one column on another, Pearson r and a density image of the points. Rows cannot be excluded in that view.",
                    path.display()
                ));
                ui.horizontal(|ui| {
                    if ui
                        .button("Read it in one pass")
                        .on_hover_text("Open the one-pass view (two passes over the file, bounded memory)")
                        .clicked()
                    {
                        answer = Some(true);
                    }
                    if ui.button("Cancel").on_hover_text("Do not open the file").clicked() {
                        answer = Some(false);
                    }
                });
            }
            Ask::OutsidePath { session, data } => {
                ui.heading("The session points outside its folder");
                ui.label(format!(
                    "{} names the data file {}, which is not in the session's folder. Open it?",
                    session.display(),
                    data.display()
                ));
                ui.horizontal(|ui| {
                    if ui
                        .button("Open it")
                        .on_hover_text("Read that file (it is only read, never written)")
                        .clicked()
                    {
                        answer = Some(true);
                    }
                    if ui
                        .button("Cancel")
                        .on_hover_text("Do not open the session")
                        .clicked()
                    {
                        answer = Some(false);
                    }
                });
            }
        }
    });
    let Some(yes) = answer else { return };
    wb.ask = None;
    match (ask, yes) {
        (Ask::Recover(s), true) => wb.restore(&s),
        (Ask::Recover(_), false) => {
            if let Some(c) = &wb.config {
                crate::sessions::clear_recovery(c);
            }
        }
        (Ask::OutsidePath { session, .. }, true) => crate::files::open_session(wb, &session, true),
        (Ask::OutsidePath { .. }, false) => wb.say("session not opened"),
        (Ask::TooLarge { path, .. }, true) => wb.open_one_pass(&path, None),
        (Ask::TooLarge { .. }, false) => wb.say("file not opened"),
    }
}

/// Light, dark, or the system's choice (the default).
fn theme_choice(ui: &mut egui::Ui) {
    let mut pref = ui.ctx().options(|o| o.theme_preference);
    let before = pref;
    egui::ComboBox::from_id_salt("theme")
        .selected_text(match pref {
            egui::ThemePreference::System => "theme: system",
            egui::ThemePreference::Light => "theme: light",
            egui::ThemePreference::Dark => "theme: dark",
        })
        .show_ui(ui, |ui| {
            ui.selectable_value(
                &mut pref,
                egui::ThemePreference::System,
                "follow the system",
            );
            ui.selectable_value(&mut pref, egui::ThemePreference::Light, "light");
            ui.selectable_value(&mut pref, egui::ThemePreference::Dark, "dark");
        })
        .response
        .on_hover_text("Colours of the workbench; by default they follow the system setting");
    if pref != before {
        ui.ctx().set_theme(pref);
    }
}
