//! The window's frame around the screens: the tool bar, the status line, and the questions
//! that must be answered before work goes on.

use eframe::egui::{self, RichText};

use crate::action::{Action, Actions};
use crate::state::{Ask, DialogPurpose, Loading, Screen, State};

/// Tool bar: file actions, undo/redo and the screen switch.
pub fn top_bar_ui(state: &State, ui: &mut egui::Ui) -> Actions {
    egui::Panel::top("toolbar")
        .show(ui, |ui| {
            ui.horizontal_wrapped(|ui| {
                ui.label(RichText::new("Plumbline").strong());
                ui.separator();
                let mut out = file_buttons_ui(state, ui);
                ui.separator();
                out.extend(history_buttons_ui(state, ui));
                ui.separator();
                out.extend(screen_buttons_ui(state, ui));
                ui.with_layout(egui::Layout::right_to_left(egui::Align::Center), |ui| {
                    theme_choice_ui(ui);
                });
                out
            })
            .inner
        })
        .inner
}

fn file_buttons_ui(state: &State, ui: &mut egui::Ui) -> Actions {
    let mut out = Actions::none();
    let has_data = state.loaded().is_some();
    if ui
        .button("Open…")
        .on_hover_text("Open a data file (CSV, TSV, Parquet, spreadsheet) or a .plumb session — Ctrl+O. You can also drop a file on the window.")
        .clicked()
    {
        out.push(Action::PickFile(DialogPurpose::Open));
    }
    let blocked = state.why_no_session();
    let why_not = blocked.as_deref().unwrap_or("Open a data file first");
    if ui
        .add_enabled(has_data && blocked.is_none(), egui::Button::new("Save session"))
        .on_hover_text("Save the exclusions, their reasons and the model to a .plumb session — Ctrl+S (Ctrl+Shift+S: save as). The data file is never written.")
        .on_disabled_hover_text(why_not)
        .clicked()
    {
        out.push(Action::SaveSession);
    }
    let can_export = has_data && blocked.is_none() && state.bench().pair().is_some();
    let why_not = blocked
        .as_deref()
        .unwrap_or("Open a data file and a pair on the bench first");
    if ui
        .add_enabled(can_export, egui::Button::new("Write summary…"))
        .on_hover_text("Write the colleague summary: HTML with charts, the statistics and exclusion log as CSV, and the session that reproduces it — Ctrl+E")
        .on_disabled_hover_text(why_not)
        .clicked()
    {
        out.push(Action::PickFile(DialogPurpose::ExportSummary));
    }
    out
}

fn history_buttons_ui(state: &State, ui: &mut egui::Ui) -> Actions {
    let mut out = Actions::none();
    if ui
        .add_enabled(state.can_undo(), egui::Button::new("Undo"))
        .on_hover_text("Take back the last exclusion, restoration or move — Ctrl+Z")
        .clicked()
    {
        out.push(Action::Undo);
    }
    if ui
        .add_enabled(state.can_redo(), egui::Button::new("Redo"))
        .on_hover_text("Do again what was undone — Ctrl+Y or Ctrl+Shift+Z")
        .clicked()
    {
        out.push(Action::Redo);
    }
    out
}

fn screen_buttons_ui(state: &State, ui: &mut egui::Ui) -> Actions {
    let mut out = Actions::none();
    let has_data = state.loaded().is_some();
    for (screen, name, tip) in [
        (
            Screen::Columns,
            "Columns",
            "The file's columns: type, missing cells, range",
        ),
        (
            Screen::Map,
            "Co-movement map",
            "How every pair of numeric columns moves together, with adjusted p-values",
        ),
        (
            Screen::Bench,
            "Pair bench",
            "One pair: the fit, its residuals and leverage, live numbers and the exclusion ledger",
        ),
        (
            Screen::OnePass,
            "One-pass view",
            "A file too large to load: the line and a density image from passes over the file",
        ),
    ] {
        if screen == Screen::OnePass && state.one_pass().is_none() {
            continue;
        }
        let enabled = matches!(screen, Screen::Columns | Screen::OnePass) || has_data;
        if ui
            .add_enabled(
                enabled,
                egui::Button::selectable(state.screen() == screen, name),
            )
            .on_hover_text(tip)
            .clicked()
        {
            out.push(Action::Show(screen));
        }
    }
    out
}

/// Status line: the last message, a running load with its cancel button, background work.
pub fn status_bar_ui(state: &State, ui: &mut egui::Ui) -> Actions {
    egui::Panel::bottom("status")
        .show(ui, |ui| {
            ui.horizontal(|ui| {
                let mut out = Actions::none();
                if let Some(l) = state.doc.loading() {
                    out.extend(loading_ui(l, ui));
                } else if state.is_busy() {
                    ui.spinner()
                        .on_hover_text("diagnostics or the co-movement map are being recomputed");
                }
                if let Some(s) = state.status() {
                    let text = RichText::new(&s.text);
                    if s.error {
                        ui.colored_label(ui.visuals().error_fg_color, text);
                    } else {
                        ui.label(text);
                    }
                }
                out
            })
            .inner
        })
        .inner
}

fn loading_ui(l: &Loading, ui: &mut egui::Ui) -> Actions {
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
    let cancel = ui
        .button("Cancel")
        .on_hover_text("Stop waiting for this file; the workbench keeps what it had")
        .clicked();
    ui.separator();
    Actions::from(cancel.then_some(Action::CancelLoad))
}

/// Modal questions: recover unsaved work; read a file too large to load in one pass; open a
/// data file outside a session's folder.
pub fn questions_ui(ask: Option<&Ask>, ctx: &egui::Context) -> Actions {
    let Some(ask) = ask else {
        return Actions::none();
    };
    let answer = egui::Modal::new(egui::Id::unique("question"))
        .show(ctx, |ui| {
            ui.set_max_width(520.0);
            match ask {
                Ask::Recover(s) => {
                    ui.heading("Unsaved work from a previous run");
                    ui.label(format!(
                        "{} on {} were not saved when the workbench last closed.",
                        plumb_report::text::plural(s.exclusions.len(), "exclusion", "exclusions"),
                        s.data.path
                    ));
                    for e in s.exclusions.iter().take(8) {
                        ui.label(format!("  row {} — {}", e.row, e.reason));
                    }
                    yes_no_ui(
                        ui,
                        ("Restore it", "Open the file with these exclusions and reasons"),
                        ("Discard it", "Delete the recovery copy"),
                    )
                }
                Ask::TooLarge { path, message } => {
                    ui.heading("Too large to load");
                    ui.label(message);
                    ui.label(format!(
                        "{} can still be read in one pass, in pieces, without holding it: the least-squares line of one column on another, Pearson r and a density image of the points. Rows cannot be excluded in that view.",
                        path.display()
                    ));
                    yes_no_ui(
                        ui,
                        ("Read it in one pass", "Open the one-pass view (two passes over the file, bounded memory)"),
                        ("Cancel", "Do not open the file"),
                    )
                }
                Ask::OutsidePath { session, data } => {
                    ui.heading("The session points outside its folder");
                    ui.label(format!(
                        "{} names the data file {}, which is not in the session's folder. Open it?",
                        session.display(),
                        data.display()
                    ));
                    yes_no_ui(
                        ui,
                        ("Open it", "Read that file (it is only read, never written)"),
                        ("Cancel", "Do not open the session"),
                    )
                }
            }
        })
        .inner;
    Actions::from(answer.map(Action::Answer))
}

/// Two buttons, `(label, tooltip)` each: `Some(true)` for the first, `Some(false)` for the second.
fn yes_no_ui(ui: &mut egui::Ui, yes: (&str, &str), no: (&str, &str)) -> Option<bool> {
    ui.horizontal(|ui| {
        if ui.button(yes.0).on_hover_text(yes.1).clicked() {
            Some(true)
        } else if ui.button(no.0).on_hover_text(no.1).clicked() {
            Some(false)
        } else {
            None
        }
    })
    .inner
}

/// Light, dark, or the system's choice (the default). The theme is the window's, not the
/// workbench's: it is set on the context directly.
fn theme_choice_ui(ui: &mut egui::Ui) {
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
