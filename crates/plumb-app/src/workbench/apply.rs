//! The one place where the workbench changes: each action, applied to the state.

use crate::action::Action;
use crate::state::{Ask, State};

use super::Workbench;

impl Workbench {
    /// Applies one action (the frame loop applies the panels' actions after drawing; tests
    /// and programs without a window call this directly).
    pub fn apply(&mut self, action: Action) {
        let s = &mut self.state;
        match action {
            Action::Open(path) => s.open_path(&path),
            Action::OpenOnePass { path, pair } => s.open_one_pass(&path, pair),
            Action::CancelLoad => s.cancel_load(),
            Action::ReadAs { decimal, encoding } => s.read_as(decimal, encoding),
            Action::PickFile(purpose) => s.pick_file(purpose),
            Action::SaveSession => s.save_session(),
            Action::SaveSessionTo(path) => s.save_session_to(&path),
            Action::ExportSummaryTo(path) => s.export_summary_to(&path),
            Action::ExportViewTo(view, path) => s.export_view_to(view, &path),
            Action::Answer(yes) => answer(s, yes),
            Action::Show(screen) => s.screen = screen,
            Action::OpenPair(spec) => s.open_pair(spec),
            Action::KeepForComparison(keep) => s.keep_for_comparison(keep),
            Action::ResidualsAgainst(axis) => s.bench.set_residual_axis(axis),
            Action::SetReading(reading) => s.set_reading(reading),
            Action::ReadUnknowns {
                path,
                reading,
                sample,
            } => s.read_unknowns(&path, &reading, sample.as_deref()),
            Action::SetOverlays(o) => s.set_overlays(o),
            Action::ColourBy(column) => s.colour_by(column),
            Action::SetRole { column, role } => s.set_role(&column, role),
            Action::Exclude { rows, reason } => s.exclude_rows(&rows, reason.as_deref()),
            Action::PutBack(rows) => s.put_back(&rows),
            Action::RecordReason(text) => s.record_reason(&text),
            Action::EditReason { row, reason } => s.edit_reason(row, reason),
            Action::MoveTo { row, x, y } => s.move_point(row, x, y),
            Action::EndMove => s.end_move(),
            Action::ResetMoves(row) => s.reset_moves(row),
            Action::Undo => s.undo(),
            Action::Redo => s.redo(),
            Action::MapSettings(key) => s.map.set_key(key),
            Action::OnePassPair { y, x } => one_pass_pair(s, y, x),
            Action::OnePassStop => {
                if let Some(o) = &mut s.one_pass {
                    o.cancel();
                }
            }
            Action::OnePassSample => s.draw_sample(),
            Action::Tell(status) => s.status = Some(status),
        }
    }
}

/// The analyst's answer to the open question.
fn answer(s: &mut State, yes: bool) {
    let Some(ask) = s.ask.take() else { return };
    match (ask, yes) {
        (Ask::Recover(session), true) => s.restore(&session),
        (Ask::Recover(_), false) => s.discard_recovery(),
        (Ask::OutsidePath { session, .. }, true) => s.open_session(&session, true),
        (Ask::OutsidePath { .. }, false) => s.say("session not opened"),
        (Ask::TooLarge { path, .. }, true) => s.open_one_pass(&path, None),
        (Ask::TooLarge { .. }, false) => s.say("file not opened"),
    }
}

fn one_pass_pair(s: &mut State, y: String, x: String) {
    if let Some(o) = &mut s.one_pass {
        o.choose(y, x);
        o.start(&s.waker);
    }
}
