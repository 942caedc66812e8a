//! What the pointer is doing on the bench: its mode (click excludes, lasso, drag moves), the
//! row under it in any view (ringed in all of them), the row picked in the influence table,
//! and a drag or lasso in progress. UI state only: the workbench's marks change through the
//! actions the views return.

/// What a press on a point does.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum PointerMode {
    /// A click leaves the row out (or puts it back).
    #[default]
    Exclude,
    /// A drag moves the point to a hypothetical position.
    Move,
    /// A drag draws a loop; the rows inside are left out.
    Lasso,
}

/// The pointer's state across frames.
#[derive(Debug, Clone, Default)]
pub struct Pointer {
    /// What a press does.
    pub mode: PointerMode,
    /// Pair entry under the pointer in the last frame (drawn highlighted in every view).
    pub hovered: Option<usize>,
    /// Pair entry under the pointer in this frame (becomes `hovered` at the frame's end).
    pub hovered_next: Option<usize>,
    /// Pair entry picked in the influence table or a diagnostic view.
    pub selected: Option<usize>,
    /// Pair entry being dragged.
    pub drag: Option<usize>,
    /// The lasso loop drawn so far, in the scatter's units.
    pub lasso: Vec<[f64; 2]>,
    /// The pair these entries belong to (a new pair forgets them).
    serial: u64,
}

impl Pointer {
    /// Forgets entries of an earlier pair.
    pub fn follow(&mut self, serial: u64) {
        if self.serial != serial {
            *self = Self {
                mode: self.mode,
                serial,
                ..Self::default()
            };
        }
    }

    /// The entry to ring in every view: the hovered one, else the picked one.
    pub fn focus(&self) -> Option<usize> {
        self.hovered.or(self.selected)
    }

    /// Ends the frame: what was hovered now (or the row being dragged) is ringed next frame.
    pub fn end_frame(&mut self) {
        self.hovered = self.hovered_next.take().or(self.drag);
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_new_pair_forgets_the_entries_but_keeps_the_mode() {
        let mut p = Pointer {
            mode: PointerMode::Lasso,
            selected: Some(4),
            ..Pointer::default()
        };
        p.follow(1);
        assert_eq!(p.selected, None);
        assert_eq!(p.mode, PointerMode::Lasso);
        p.selected = Some(2);
        p.follow(1);
        assert_eq!(p.selected, Some(2), "the same pair keeps its pick");
        p.hovered_next = Some(7);
        p.end_frame();
        assert_eq!(p.focus(), Some(7));
        p.end_frame();
        assert_eq!(
            p.focus(),
            Some(2),
            "back to the pick once the pointer leaves"
        );
    }
}
