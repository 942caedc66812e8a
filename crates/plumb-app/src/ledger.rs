//! The exclusion ledger: every row left out with its reason and what it did to the answer,
//! the what-if moves, and the prompt that asks for a reason when rows are excluded.

use eframe::egui::{self, RichText};
use plumb_report::text::{num, p};

use crate::app::Workbench;
use crate::bench::Prompt;
use crate::marks::{now_rfc3339, Note, DEFAULT_REASON};

impl Workbench {
    /// Leaves data `rows` out (one undo step) and asks for a reason.
    pub fn exclude_rows(&mut self, rows: &[usize]) {
        let mut m = self.marks().clone();
        let at = now_rfc3339();
        let mut added = Vec::new();
        for &r in rows {
            if let std::collections::btree_map::Entry::Vacant(slot) = m.excluded.entry(r) {
                slot.insert(Note {
                    reason: DEFAULT_REASON.into(),
                    at: at.clone(),
                });
                added.push(r);
            }
        }
        if added.is_empty() {
            return;
        }
        self.set_marks(m, true);
        self.bench.prompt = Some(Prompt {
            rows: added,
            text: String::new(),
        });
    }

    /// Puts data `rows` back (one undo step).
    pub fn put_back(&mut self, rows: &[usize]) {
        let mut m = self.marks().clone();
        for r in rows {
            m.excluded.remove(r);
        }
        self.set_marks(m, true);
    }

    /// Excludes pair entry `e`, or puts it back if it is out.
    pub fn toggle_entry(&mut self, e: usize) {
        let Some(row) = self.bench.pair().map(|p| p.rows[e]) else {
            return;
        };
        if self.marks().excluded.contains_key(&row) {
            self.put_back(&[row]);
        } else {
            self.exclude_rows(&[row]);
        }
    }

    /// Records `reason` for the rows of the open prompt (the default text when blank) and
    /// closes it. The reason belongs to the exclusion's own undo step.
    pub fn record_reason(&mut self, reason: &str) {
        let Some(prompt) = self.bench.prompt.take() else {
            return;
        };
        let text = if reason.trim().is_empty() {
            DEFAULT_REASON.to_string()
        } else {
            reason.trim().to_string()
        };
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
    /// recovery copy is updated on every edit).
    fn set_reason(&mut self, row: usize, reason: String) {
        let mut m = self.marks().clone();
        if let Some(n) = m.excluded.get_mut(&row) {
            if n.reason != reason {
                n.reason = reason;
                self.history.amend(m);
                self.after_marks_changed(true);
            }
        }
    }
}

/// Draws the ledger.
pub fn show(wb: &mut Workbench, ui: &mut egui::Ui) {
    ui.heading("Exclusion ledger");
    ui.horizontal(|ui| {
        let label = ui.label("Exclude row:");
        let field = ui
            .add(egui::TextEdit::singleline(&mut wb.bench.row_field).desired_width(70.0).hint_text("row №"))
            .labelled_by(label.id)
            .on_hover_text("Data row number as in the file (1 = first row after the header); several as 3, 7, 12");
        let enter = field.lost_focus() && ui.input(|i| i.key_pressed(egui::Key::Enter));
        if ui.button("Exclude").on_hover_text("Leave these rows out; you will be asked why").clicked() || enter {
            exclude_typed(wb);
        }
    });
    let marks = wb.marks().clone();
    let Some(pair) = wb.bench.pair().map(crate::pair::Pair::rows) else {
        return;
    };
    if marks.excluded.is_empty() {
        ui.weak("No rows excluded. Click a point, lasso several, or type a row number.");
    }
    let effects = wb
        .bench
        .diagnostics()
        .and_then(|d| d.effects.as_ref().ok().cloned())
        .unwrap_or_default();
    let mut back = None;
    let mut reasons = Vec::new();
    egui::ScrollArea::vertical().max_height(ui.available_height() * 0.7).show(ui, |ui| {
        for (&row, note) in &marks.excluded {
            ui.separator();
            let where_ = match pair.index_of(row) {
                Some(i) => format!("row {row}: {} = {}, {} = {}", pair.spec.x, num(pair.x[i]), pair.spec.y, num(pair.y[i])),
                None => format!("row {row} (not among this pair's complete rows)"),
            };
            ui.horizontal(|ui| {
                ui.label(RichText::new(where_).strong());
                if ui.small_button("put back").on_hover_text("Include this row again").clicked() {
                    back = Some(row);
                }
            });
            let mut text = note.reason.clone();
            let r = ui
                .add(egui::TextEdit::multiline(&mut text).desired_rows(1).desired_width(f32::INFINITY))
                .on_hover_text("Why this row is out; recorded in the session and the summary");
            if r.changed() {
                reasons.push((row, text));
            }
            if !note.at.is_empty() {
                ui.weak(format!("excluded {}", note.at));
            }
            if let Some(e) = effects.iter().find(|e| e.rows == [row]) {
                ui.label(effect_line(e)).on_hover_text("The fit with this row in (other exclusions applied), and with every exclusion applied; computed on the file's values");
            }
        }
    });
    if let Some(all) = effects.last().filter(|e| e.rows.len() > 1) {
        ui.separator();
        ui.label(RichText::new(format!("all {} together", all.rows.len())).strong());
        ui.label(effect_line(all));
    }
    for (row, text) in reasons {
        wb.set_reason(row, text);
    }
    if let Some(r) = back {
        wb.put_back(&[r]);
    }
    if !marks.excluded.is_empty()
        && ui
            .button("Restore all")
            .on_hover_text("Put every excluded row back (undoable)")
            .clicked()
    {
        let rows: Vec<usize> = marks.excluded.keys().copied().collect();
        wb.put_back(&rows);
    }
    if !marks.moved.is_empty() {
        ui.separator();
        ui.label(RichText::new("What-if moves (not in the data)").strong());
        let mut undo_move = None;
        for (&row, &(x, y)) in &marks.moved {
            ui.horizontal(|ui| {
                let from = pair
                    .index_of(row)
                    .map(|i| format!("({}, {})", num(pair.x[i]), num(pair.y[i])))
                    .unwrap_or_default();
                ui.label(format!(
                    "row {row}: {from} moved to ({}, {})",
                    num(x),
                    num(y)
                ));
                if ui
                    .small_button("reset")
                    .on_hover_text("Put this point back where the file has it")
                    .clicked()
                {
                    undo_move = Some(row);
                }
            });
        }
        if let Some(r) = undo_move {
            let mut m = wb.marks().clone();
            m.moved.remove(&r);
            wb.set_marks(m, true);
        }
    }
}

fn effect_line(e: &plumb_report::Effect) -> String {
    format!(
        "with the row(s) / without:\nR² {} / {} (Δ {})\nslope {} / {} (Δ {})\nslope p {} / {}",
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

fn exclude_typed(wb: &mut Workbench) {
    let text = std::mem::take(&mut wb.bench.row_field);
    let mut rows = Vec::new();
    for part in text.split([',', ' ', ';']).filter(|s| !s.is_empty()) {
        match part.parse::<usize>() {
            Ok(r)
                if r >= 1
                    && wb
                        .loaded
                        .as_ref()
                        .is_some_and(|l| r <= l.dataset.table.n_rows()) =>
            {
                rows.push(r)
            }
            _ => {
                let n = wb.loaded.as_ref().map_or(0, |l| l.dataset.table.n_rows());
                wb.fail(format!("'{part}' is not a data row number (1 to {n})"));
                wb.bench.row_field = text;
                return;
            }
        }
    }
    wb.exclude_rows(&rows);
}

/// The reason prompt after an exclusion.
pub fn reason_prompt(wb: &mut Workbench, ctx: &egui::Context) {
    let Some(prompt) = wb.bench.prompt.clone() else {
        return;
    };
    let mut text = prompt.text.clone();
    let mut done: Option<String> = None;
    egui::Modal::new(egui::Id::unique("reason-prompt")).show(ctx, |ui| {
        ui.set_max_width(460.0);
        let rows: Vec<String> = prompt.rows.iter().map(usize::to_string).collect();
        let heading = ui.heading(format!("Why leave out row {}?", rows.join(", ")));
        ui.label("The reason is recorded with the exclusion, in the session and in the summary.");
        let field = ui
            .add(
                egui::TextEdit::multiline(&mut text)
                    .hint_text("e.g. pipette slipped at this standard (lab notebook p. 14)")
                    .desired_rows(2)
                    .desired_width(f32::INFINITY),
            )
            .labelled_by(heading.id);
        field.request_focus();
        ui.horizontal(|ui| {
            if ui
                .button("Record reason")
                .on_hover_text("Keep this reason with the exclusion")
                .clicked()
            {
                done = Some(text.clone());
            }
            if ui
                .button("Use the default text")
                .on_hover_text(format!("Record “{DEFAULT_REASON}”"))
                .clicked()
            {
                done = Some(String::new());
            }
        });
        if ui.input(|i| i.key_pressed(egui::Key::Enter) && !i.modifiers.shift) {
            done = Some(text.trim_end_matches('\n').to_string());
        }
    });
    match done {
        Some(t) => wb.record_reason(&t),
        None => {
            if let Some(p) = &mut wb.bench.prompt {
                p.text = text;
            }
        }
    }
}
