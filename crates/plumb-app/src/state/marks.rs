//! What the analyst has done to the rows: exclusions (each with a reason) and what-if moves,
//! and the undo/redo history of both.
//!
//! Rows are named by their 1-based data row, as on the command line and in a session, so an
//! exclusion follows the row from one pair of columns to the next.

use std::collections::BTreeMap;

/// Reason recorded when the analyst accepts the prompt without writing one.
pub const DEFAULT_REASON: &str = "excluded on inspection (no reason written)";

/// One exclusion.
#[derive(Debug, Clone, PartialEq)]
pub struct Note {
    /// Why the row is out.
    pub reason: String,
    /// When it was excluded (RFC 3339, UTC).
    pub at: String,
}

/// Exclusions and hypothetical moves; a snapshot of the analyst's work.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Marks {
    /// Excluded data rows.
    pub excluded: BTreeMap<usize, Note>,
    /// What-if positions `(x, y)` of moved data rows. Never written to the data file.
    pub moved: BTreeMap<usize, (f64, f64)>,
}

impl Marks {
    /// Whether any point has been moved (the numbers are then hypothetical).
    pub fn is_hypothetical(&self) -> bool {
        !self.moved.is_empty()
    }
}

/// Undo/redo over snapshots of [`Marks`]. Snapshots are small (only the rows touched), and a
/// snapshot history cannot drift out of step with the state the way inverse commands can.
#[derive(Debug, Clone, Default)]
pub struct History {
    current: Marks,
    undo: Vec<Marks>,
    redo: Vec<Marks>,
    /// The state before a preview began (the state a drag's undo returns to).
    preview_base: Option<Marks>,
}

impl History {
    /// Starts from `marks` with nothing to undo.
    pub fn new(marks: Marks) -> Self {
        Self {
            current: marks,
            ..Self::default()
        }
    }

    /// The present state.
    pub fn current(&self) -> &Marks {
        &self.current
    }

    /// Makes `next` the present state; the old one can be undone. A no-op if unchanged.
    /// After [`History::preview`], the step undone is the one from before the preview.
    pub fn commit(&mut self, next: Marks) {
        let base = self
            .preview_base
            .take()
            .unwrap_or_else(|| self.current.clone());
        self.current = next;
        if self.current != base {
            self.undo.push(base);
            self.redo.clear();
        }
    }

    /// Shows `next` without making an undo step yet (while a drag is in progress, so that a
    /// whole drag is one step once it is committed).
    pub fn preview(&mut self, next: Marks) {
        if self.preview_base.is_none() {
            self.preview_base = Some(self.current.clone());
        }
        self.current = next;
    }

    /// Replaces the present state in place, without an undo step (a reason written for an
    /// exclusion just made belongs to that exclusion's step).
    pub fn amend(&mut self, next: Marks) {
        self.current = next;
    }

    /// Steps back; false if there is nothing to undo.
    pub fn undo(&mut self) -> bool {
        match self.undo.pop() {
            Some(prev) => {
                self.redo.push(std::mem::replace(&mut self.current, prev));
                true
            }
            None => false,
        }
    }

    /// Steps forward again; false if there is nothing to redo.
    pub fn redo(&mut self) -> bool {
        match self.redo.pop() {
            Some(next) => {
                self.undo.push(std::mem::replace(&mut self.current, next));
                true
            }
            None => false,
        }
    }

    /// Whether [`History::undo`] would do something.
    pub fn can_undo(&self) -> bool {
        !self.undo.is_empty()
    }

    /// Whether [`History::redo`] would do something.
    pub fn can_redo(&self) -> bool {
        !self.redo.is_empty()
    }
}

/// Now, as RFC 3339 seconds (UTC).
pub fn now_rfc3339() -> String {
    humantime::format_rfc3339_seconds(std::time::SystemTime::now()).to_string()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn excluding(rows: &[usize]) -> Marks {
        let mut m = Marks::default();
        for &r in rows {
            m.excluded.insert(
                r,
                Note {
                    reason: format!("row {r}"),
                    at: String::new(),
                },
            );
        }
        m
    }

    #[test]
    fn undo_and_redo_walk_the_snapshots_and_a_new_change_drops_the_redo_branch() {
        let mut h = History::default();
        h.commit(excluding(&[3]));
        h.commit(excluding(&[3, 7]));
        assert!(h.undo());
        assert_eq!(h.current(), &excluding(&[3]));
        assert!(h.redo());
        assert_eq!(h.current(), &excluding(&[3, 7]));
        assert!(h.undo() && h.undo());
        assert!(!h.undo());
        assert_eq!(h.current(), &Marks::default());
        h.commit(excluding(&[9]));
        assert!(!h.can_redo());
        h.commit(excluding(&[9]));
        assert!(h.undo());
        assert_eq!(
            h.current(),
            &Marks::default(),
            "an unchanged commit adds no step"
        );
    }

    #[test]
    fn a_previewed_drag_is_one_step() {
        let mut h = History::default();
        h.commit(excluding(&[2]));
        let mut m = h.current().clone();
        for k in 0..5 {
            m.moved.insert(4, (f64::from(k), 1.0));
            h.preview(m.clone());
        }
        h.commit(m.clone());
        assert!(h.current().is_hypothetical());
        assert!(h.undo());
        assert_eq!(
            h.current(),
            &excluding(&[2]),
            "one undo takes back the whole drag"
        );
        assert!(h.undo());
        assert!(!h.can_undo());
    }
}
