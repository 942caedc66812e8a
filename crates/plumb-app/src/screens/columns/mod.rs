//! The Columns screen: open a file (path, dialog, drop, recent list), see its columns (type,
//! gaps, range, mean, SD and a small histogram), its first rows, choose y and x for the bench
//! and give columns a role (group, row order, ID).

mod preview;
mod spark;
mod table;

use std::path::PathBuf;

use eframe::egui::{self, RichText};

use crate::action::{Action, Actions};
use crate::state::{DialogPurpose, Loaded, State};

pub use table::Picks;

/// What the screen keeps between frames.
#[derive(Debug, Default)]
pub struct ColumnsUi {
    /// The path being typed.
    pub path_field: String,
    /// The y and x chosen for the bench, before it opens them.
    pub picks: Picks,
}

/// Draws the screen.
pub fn columns_ui(state: &State, own: &mut ColumnsUi, ui: &mut egui::Ui) -> Actions {
    let mut out = open_row_ui(own, ui);
    ui.weak("Or drop a file onto this window.");
    out.extend(recent_ui(state.doc.recent(), ui));
    ui.separator();
    let Some(loaded) = state.loaded() else {
        ui.label("No file open yet.");
        return out;
    };
    out.extend(file_facts_ui(loaded, ui));
    own.picks.follow(state);
    out.extend(table::pick_row_ui(state, &own.picks, ui));
    ui.add_space(4.0);
    egui::ScrollArea::vertical().show(ui, |ui| {
        out.extend(table::column_table_ui(state, &mut own.picks, ui));
        ui.add_space(8.0);
        preview::preview_ui(state, ui);
    });
    out
}

fn open_row_ui(own: &mut ColumnsUi, ui: &mut egui::Ui) -> Actions {
    let mut out = Actions::none();
    ui.horizontal(|ui| {
        let label = ui.label("File:");
        let field = ui
            .add(
                egui::TextEdit::singleline(&mut own.path_field)
                    .hint_text("path to a CSV, TSV, Parquet, spreadsheet or .plumb session")
                    .desired_width(420.0),
            )
            .labelled_by(label.id)
            .on_hover_text("Type or paste a path and press Enter");
        let enter = field.lost_focus() && ui.input(|i| i.key_pressed(egui::Key::Enter));
        let open = ui
            .button("Open")
            .on_hover_text("Read the file named in the field")
            .clicked();
        let path = PathBuf::from(own.path_field.trim());
        if (open || enter) && !path.as_os_str().is_empty() {
            out.push(Action::Open(path));
        }
        if ui
            .button("Browse…")
            .on_hover_text("Choose a file with the system's dialog (Ctrl+O)")
            .clicked()
        {
            out.push(Action::PickFile(DialogPurpose::Open));
        }
    });
    out
}

fn recent_ui(recent: &[PathBuf], ui: &mut egui::Ui) -> Actions {
    let mut out = Actions::none();
    if recent.is_empty() {
        return out;
    }
    ui.add_space(6.0);
    ui.label(RichText::new("Recent").strong());
    for f in recent {
        if ui
            .link(f.display().to_string())
            .on_hover_text("Open this file again")
            .clicked()
        {
            out.push(Action::Open(f.clone()));
        }
    }
    out
}

fn file_facts_ui(loaded: &Loaded, ui: &mut egui::Ui) -> Actions {
    let d = &loaded.dataset;
    ui.heading(d.file_name());
    ui.label(format!(
        "{} data rows, {} columns ({} numeric). SHA-256 {}…",
        plumb_report::text::count(d.table.n_rows()),
        plumb_report::text::count(d.summaries.len()),
        plumb_report::text::count(d.numeric.len()),
        &loaded.sha256[..12.min(loaded.sha256.len())]
    ));
    ui.label(format!("Read as {}.", d.table.format()));
    let out = decimal_ui(loaded, ui);
    for note in d.table.notes() {
        ui.label(format!("note: {note}"));
    }
    out
}

/// How a text file is read: its decimal mark and encoding, as the file suggests or as the
/// analyst chooses (the file is read again; the work stays).
fn decimal_ui(loaded: &Loaded, ui: &mut egui::Ui) -> Actions {
    use plumb_data::{DecimalMark, TextEncoding};
    let mut out = Actions::none();
    // A sample's rows are fixed by its draw: reading them another way would mean the file.
    if loaded.dataset.sample.is_some()
        || !matches!(
            loaded.dataset.table.format(),
            plumb_data::SourceFormat::Delimited { .. }
        )
    {
        return out;
    }
    let options = &loaded.dataset.options;
    let (decimal, encoding) = (options.decimal, options.encoding);
    let mark_name = |m: Option<DecimalMark>| match m {
        None => "as the file suggests",
        Some(DecimalMark::Point) => "point (3.14)",
        Some(DecimalMark::Comma) => "comma (3,14)",
    };
    let encoding_name =
        |e: Option<TextEncoding>| e.map_or("as the file suggests", TextEncoding::as_str);
    ui.horizontal(|ui| {
        let marks = [None, Some(DecimalMark::Point), Some(DecimalMark::Comma)];
        if let Some(m) = choice(ui, "Decimal mark:", decimal, &marks, mark_name) {
            out.push(Action::ReadAs {
                decimal: m,
                encoding,
            });
        }
        let encodings: Vec<Option<TextEncoding>> = std::iter::once(None)
            .chain(TextEncoding::ALL.map(Some))
            .collect();
        if let Some(e) = choice(ui, "Encoding:", encoding, &encodings, encoding_name) {
            out.push(Action::ReadAs {
                decimal,
                encoding: e,
            });
        }
    });
    out
}

/// A labelled drop-down of `options`; the one picked, when it differs from `current`.
fn choice<T: Copy + PartialEq>(
    ui: &mut egui::Ui,
    label: &str,
    current: T,
    options: &[T],
    name: impl Fn(T) -> &'static str,
) -> Option<T> {
    let mut picked = None;
    let label = ui.label(label);
    egui::ComboBox::from_id_salt(label.id)
        .selected_text(name(current))
        .show_ui(ui, |ui| {
            for &o in options {
                if ui.selectable_label(current == o, name(o)).clicked() && current != o {
                    picked = Some(o);
                }
            }
        })
        .response
        .labelled_by(label.id);
    picked
}
