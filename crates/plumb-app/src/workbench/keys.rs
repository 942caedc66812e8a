//! Keyboard shortcuts and files dropped on the window, as actions.

use std::path::PathBuf;

use eframe::egui::{self, Key, KeyboardShortcut, Modifiers};

use crate::action::{Action, Actions};
use crate::state::DialogPurpose;

/// Ctrl+O open, Ctrl+S save (Ctrl+Shift+S save as), Ctrl+E summary, Ctrl+Z undo, Ctrl+Y or
/// Ctrl+Shift+Z redo (only while no text field has focus: fields keep their own undo), and the
/// first file dropped on the window.
pub fn shortcuts(ctx: &egui::Context) -> Actions {
    let mut out = Actions::none();
    let command = |key| KeyboardShortcut::new(Modifiers::COMMAND, key);
    let shifted = |key| KeyboardShortcut::new(Modifiers::COMMAND | Modifiers::SHIFT, key);
    let typing = ctx.memory(|m| m.focused().is_some());
    let pressed = |s: KeyboardShortcut| ctx.input_mut(|i| i.consume_shortcut(&s));
    if pressed(command(Key::O)) {
        out.push(Action::PickFile(DialogPurpose::Open));
    }
    if pressed(shifted(Key::S)) {
        out.push(Action::PickFile(DialogPurpose::SaveSessionAs));
    } else if pressed(command(Key::S)) {
        out.push(Action::SaveSession);
    }
    if pressed(command(Key::E)) {
        out.push(Action::PickFile(DialogPurpose::ExportSummary));
    }
    if !typing {
        if pressed(shifted(Key::Z)) || pressed(command(Key::Y)) {
            out.push(Action::Redo);
        } else if pressed(command(Key::Z)) {
            out.push(Action::Undo);
        }
    }
    out.push_some(dropped_file(ctx).map(Action::Open));
    out
}

fn dropped_file(ctx: &egui::Context) -> Option<PathBuf> {
    ctx.input(|i| {
        i.raw
            .dropped_files
            .iter()
            .map(|f| f.path().to_path_buf())
            .find(|p| !p.as_os_str().is_empty())
    })
}
