//! What the state does when the analyst changes the rows: excluding (with a reason), putting
//! back, what-if moves, undo and redo; and changing the model on the bench. Every change of the
//! marks goes through [`State::set_marks`], which feeds the history, the live fit and the
//! recovery copy.

use super::diagnostics::Overlays;
use super::marks::{now_rfc3339, Marks, Note, DEFAULT_REASON};
use super::pair::FitSpec;
use super::{Prompt, State};

impl State {
    /// Replaces the marks, as one undo step (`commit`) or as a preview during a drag.
    fn set_marks(&mut self, next: Marks, commit: bool) {
        if commit {
            self.history.commit(next);
        } else {
            self.history.preview(next);
        }
        self.after_marks_changed(commit);
    }

    /// Brings the bench in line with the marks; a committed change is also written to the
    /// recovery copy.
    fn after_marks_changed(&mut self, persist: bool) {
        let marks = self.history.current().clone();
        self.bench.apply(&marks);
        if persist {
            self.write_recovery();
        }
    }

    /// Leaves data `rows` out (one undo step). With a `reason` it is recorded at once; without
    /// one the default text is recorded and the reason prompt opens.
    pub(crate) fn exclude_rows(&mut self, rows: &[usize], reason: Option<&str>) {
        let n_rows = self
            .doc
            .loaded
            .as_ref()
            .map_or(0, |l| l.dataset.table.n_rows());
        if let Some(&bad) = rows.iter().find(|&&r| r == 0 || r > n_rows) {
            return self.fail(format!("'{bad}' is not a data row number (1 to {n_rows})"));
        }
        let text = reason.map_or(DEFAULT_REASON.to_string(), reason_text);
        let mut m = self.marks().clone();
        let at = now_rfc3339();
        let mut added = Vec::new();
        for &r in rows {
            if let std::collections::btree_map::Entry::Vacant(slot) = m.excluded.entry(r) {
                slot.insert(Note {
                    reason: text.clone(),
                    at: at.clone(),
                });
                added.push(r);
            }
        }
        if added.is_empty() {
            return;
        }
        self.set_marks(m, true);
        if reason.is_none() {
            self.bench.prompt = Some(Prompt { rows: added });
        }
    }

    /// Puts data `rows` back (one undo step).
    pub(crate) fn put_back(&mut self, rows: &[usize]) {
        let mut m = self.marks().clone();
        for r in rows {
            m.excluded.remove(r);
        }
        self.set_marks(m, true);
    }

    /// Records `reason` for the rows of the open prompt (the default text when blank) and
    /// closes it. The reason belongs to the exclusion's own undo step.
    pub(crate) fn record_reason(&mut self, reason: &str) {
        let Some(prompt) = self.bench.prompt.take() else {
            return;
        };
        let text = reason_text(reason);
        let mut m = self.marks().clone();
        for r in &prompt.rows {
            if let Some(n) = m.excluded.get_mut(r) {
                n.reason = text.clone();
            }
        }
        self.history.amend(m);
        self.after_marks_changed(true);
    }

    /// Rewrites the reason of an exclusion in place (part of that exclusion's undo step; the
    /// recovery copy follows every edit).
    pub(crate) fn edit_reason(&mut self, row: usize, reason: String) {
        let mut m = self.marks().clone();
        if let Some(n) = m.excluded.get_mut(&row) {
            if n.reason != reason {
                n.reason = reason;
                self.history.amend(m);
                self.after_marks_changed(true);
            }
        }
    }

    /// Shows data row `row` at the hypothetical position `(x, y)` while a drag goes on (no undo
    /// step until [`State::end_move`]).
    pub(crate) fn move_point(&mut self, row: usize, x: f64, y: f64) {
        if !(x.is_finite() && y.is_finite()) {
            return;
        }
        let mut m = self.marks().clone();
        m.moved.insert(row, (x, y));
        self.set_marks(m, false);
    }

    /// Ends a drag: the whole drag becomes one undo step.
    pub(crate) fn end_move(&mut self) {
        let m = self.marks().clone();
        self.set_marks(m, true);
    }

    /// Puts moved rows back where the data file has them (`None`: every moved row).
    pub(crate) fn reset_moves(&mut self, row: Option<usize>) {
        let mut m = self.marks().clone();
        match row {
            Some(r) => {
                m.moved.remove(&r);
            }
            None => m.moved.clear(),
        }
        self.set_marks(m, true);
    }

    /// Undoes the last change (nothing if there is none).
    pub(crate) fn undo(&mut self) {
        if self.history.undo() {
            self.after_marks_changed(true);
        }
    }

    /// Redoes the last undone change (nothing if there is none).
    pub(crate) fn redo(&mut self) {
        if self.history.redo() {
            self.after_marks_changed(true);
        }
    }

    /// Starts putting model `spec` on the bench (keeping the marks); it is fitted on a worker
    /// and a failure is reported when the worker is done.
    pub(crate) fn open_pair(&mut self, spec: FitSpec) {
        if let Some(loaded) = &self.doc.loaded {
            self.bench.open(&loaded.dataset, spec, &self.waker);
        }
    }

    /// Keeps the model on the bench beside the ones that follow, or stops comparing.
    pub(crate) fn keep_for_comparison(&mut self, keep: bool) {
        let spec = keep
            .then(|| self.bench.pair().map(|p| p.spec.clone()))
            .flatten();
        if keep && spec.is_none() {
            return self.fail("open a pair on the bench first");
        }
        self.bench.keep(spec);
        self.write_recovery();
    }

    /// Changes what the bench reads beside the fit; the unknowns are work, so the recovery
    /// copy follows.
    pub(crate) fn set_reading(&mut self, reading: super::reading::Reading) {
        let unknowns_changed = reading.unknowns() != self.bench.reading().unknowns();
        self.bench.set_reading(reading);
        if unknowns_changed {
            self.write_recovery();
        }
    }

    /// Reads the calibration's unknowns from a second file. Such files are small: it is read
    /// here, under a memory cap of [`UNKNOWNS_FILE_CAP`] bytes so a wrong choice cannot stall
    /// the workbench.
    pub(crate) fn read_unknowns(
        &mut self,
        path: &std::path::Path,
        reading: &str,
        sample: Option<&str>,
    ) {
        if path.as_os_str().is_empty() {
            return self.fail("unknowns: type the path of the file that holds them");
        }
        let options = plumb_data::LoadOptions {
            memory_limit: Some(UNKNOWNS_FILE_CAP),
            ..plumb_data::LoadOptions::default()
        };
        let read = plumb_data::load(path, &options)
            .map_err(|e| e.to_string())
            .and_then(|t| {
                plumb_data::analysis::unknowns_from_table(&t, reading, sample)
                    .map_err(|e| e.to_string())
            });
        match read {
            Ok(unknowns) => {
                let n = unknowns.len();
                let mut next = self.bench.reading().clone();
                next.calibration.unknowns = unknowns;
                self.set_reading(next);
                self.say(format!("read {n} unknowns from {}", path.display()));
            }
            Err(e) => self.fail(format!("unknowns: {e}")),
        }
    }

    /// Sets the scatter's overlays.
    pub(crate) fn set_overlays(&mut self, overlays: Overlays) {
        self.bench.set_overlays(overlays);
    }

    /// Colours the points by a text column (and fits a line per group), or by nothing.
    pub(crate) fn colour_by(&mut self, column: Option<String>) {
        if let Some(l) = &self.doc.loaded {
            self.bench.colour_by(&l.dataset, column);
        }
    }
}

/// Largest file of unknowns read (bytes of memory the loader may need).
pub const UNKNOWNS_FILE_CAP: u64 = 64 << 20;

/// The reason as recorded: trimmed, or the default text when blank.
fn reason_text(reason: &str) -> String {
    let t = reason.trim();
    if t.is_empty() {
        DEFAULT_REASON.to_string()
    } else {
        t.to_string()
    }
}
