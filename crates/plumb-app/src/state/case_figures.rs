//! What the bench keeps of each included row's case diagnostics, column by column.

use plumb_core::regression::{CaseInfluence, Flags};

/// The case diagnostics the bench shows (the tooltip, the influence table): residual,
/// leverage, externally studentized residual, Cook's distance and flags. 33 bytes a row
/// instead of a full case's 64 — the internally studentized residual and DFFITS are not
/// shown, and a fitted value is read from the fit (`views::against_fit`). Two sets are alive
/// while the diagnostics recompute, so at ten million rows this is 0.6 GB less.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct CaseFigures {
    residual: Vec<f64>,
    leverage: Vec<f64>,
    studentized: Vec<f64>,
    cooks: Vec<f64>,
    flags: Vec<Flags>,
}

/// One row's [`CaseFigures`].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CaseFigure {
    /// Residual `eᵢ = yᵢ − ŷᵢ` on the model's scale.
    pub residual: f64,
    /// Leverage `hᵢᵢ`.
    pub leverage: f64,
    /// Externally studentized residual `tᵢ`.
    pub studentized_external: f64,
    /// Cook's distance `Dᵢ`.
    pub cooks_distance: f64,
    /// The rule-of-thumb thresholds crossed.
    pub flags: Flags,
}

impl CaseFigures {
    /// The figures of `cases`, in their order.
    pub fn of(cases: &[CaseInfluence]) -> Self {
        let column = |pick: fn(&CaseInfluence) -> f64| cases.iter().map(pick).collect();
        Self {
            residual: column(|c| c.residual),
            leverage: column(|c| c.leverage),
            studentized: column(|c| c.studentized_external),
            cooks: column(|c| c.cooks_distance),
            flags: cases.iter().map(|c| c.flags).collect(),
        }
    }

    /// Rows held.
    pub fn len(&self) -> usize {
        self.cooks.len()
    }

    /// Whether there are none (the analysis failed).
    pub fn is_empty(&self) -> bool {
        self.cooks.is_empty()
    }

    /// Row `k`'s figures (`k` indexes the included rows).
    pub fn get(&self, k: usize) -> Option<CaseFigure> {
        Some(CaseFigure {
            residual: *self.residual.get(k)?,
            leverage: self.leverage[k],
            studentized_external: self.studentized[k],
            cooks_distance: self.cooks[k],
            flags: self.flags[k],
        })
    }

    /// Every row's figures, in order.
    pub fn iter(&self) -> impl Iterator<Item = CaseFigure> + '_ {
        (0..self.len()).filter_map(|k| self.get(k))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use plumb_core::regression::InfluenceFlag;

    #[test]
    fn the_figures_are_the_cases_own_numbers_row_by_row() {
        let cases: Vec<CaseInfluence> = (0..5)
            .map(|k| CaseInfluence {
                fitted: 100.0,
                residual: f64::from(k) - 2.0,
                leverage: 0.1 * f64::from(k),
                studentized_internal: 9.0,
                studentized_external: -f64::from(k),
                cooks_distance: f64::from(k * k),
                dffits: 9.0,
                flags: Flags::of(if k == 4 {
                    &[InfluenceFlag::LargeCooksDistance]
                } else {
                    &[]
                }),
            })
            .collect();
        let f = CaseFigures::of(&cases);
        assert_eq!(f.len(), 5);
        for (k, (c, g)) in cases.iter().zip(f.iter()).enumerate() {
            let want = CaseFigure {
                residual: c.residual,
                leverage: c.leverage,
                studentized_external: c.studentized_external,
                cooks_distance: c.cooks_distance,
                flags: c.flags,
            };
            assert_eq!(g, want, "row {k}");
        }
        assert_eq!(f.get(5), None);
        assert!(CaseFigures::default().is_empty());
    }
}
