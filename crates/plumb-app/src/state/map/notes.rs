//! What the map has to say about one pair beyond its coefficient: a drift shared along the row
//! order, or structure a straight line misses. Drawn as marks on the map's cells and carried
//! into the bench's cues when the pair is open there.

use plumb_core::association::Method;
use plumb_report::text::num;
use plumb_report::wording;

use super::MapResult;

/// One of the map's reasons to look twice at a pair.
#[derive(Debug, Clone, PartialEq)]
pub enum MapNote {
    /// Both columns drift along the row order
    /// ([`plumb_core::association::CorrelationMatrix::drifts_together`]).
    SharedTrend {
        /// The row-order column.
        order: String,
        /// The map's coefficient.
        method: Method,
        /// Its value.
        r: f64,
        /// Pearson r of first differences along the order.
        differenced: Option<f64>,
        /// Pearson r after a linear trend on the order is taken out of each.
        detrended: Option<f64>,
    },
    /// Distance correlation well above |r| ([`plumb_core::association::StructureCheck::flagged`]).
    MissedStructure {
        /// Pearson r.
        r: f64,
        /// Distance correlation.
        dcor: f64,
        /// Its permutation p-value.
        p_value: f64,
    },
}

impl MapNote {
    /// The mark's name in the key and in lists.
    pub fn label(&self) -> &'static str {
        match self {
            Self::SharedTrend { .. } => "shared drift",
            Self::MissedStructure { .. } => "structure r misses",
        }
    }

    /// The full reason, with its numbers, for columns `a` and `b`.
    pub fn text(&self, a: &str, b: &str) -> String {
        let guard = |g: &Option<f64>| g.map_or_else(|| "undefined".to_string(), num);
        match self {
            Self::SharedTrend {
                order,
                method,
                r,
                differenced,
                detrended,
            } => format!(
                "{} Along {order}: {} = {}; r of first differences = {}; r after removing the \
                 trend = {}.",
                wording::shared_trend(a, b),
                method.as_str(),
                num(*r),
                guard(differenced),
                guard(detrended)
            ),
            Self::MissedStructure { r, dcor, p_value } => format!(
                "{a} and {b} depend on each other in a way a straight line misses: distance \
                 correlation {} against |r| = {} ({}).",
                num(*dcor),
                num(r.abs()),
                wording::permutation_p(*p_value)
            ),
        }
    }
}

impl MapResult {
    /// Position of column `name` in this map.
    pub fn index_of(&self, name: &str) -> Option<usize> {
        self.columns.iter().position(|c| c == name)
    }

    /// The notes on the cell of columns `i` and `j` (none on the diagonal).
    pub fn notes(&self, i: usize, j: usize) -> Vec<MapNote> {
        let m = &self.matrix;
        let mut out = Vec::new();
        if let (true, Some(order), Some(r)) = (m.drifts_together(i, j), &self.key.order, m.r[i][j])
        {
            let guard = |g: &Option<Vec<Vec<Option<f64>>>>| g.as_ref().and_then(|g| g[i][j]);
            out.push(MapNote::SharedTrend {
                order: order.clone(),
                method: self.key.method,
                r,
                differenced: guard(&m.r_differenced),
                detrended: guard(&m.r_detrended),
            });
        }
        if let Some(c) = self.structure.cell(i, j).filter(|c| c.flagged()) {
            out.push(MapNote::MissedStructure {
                r: c.r,
                dcor: c.dcor,
                p_value: c.p_value.unwrap_or(1.0),
            });
        }
        out
    }

    /// The notes on columns `a` and `b` by name, in either order; none when either is not in
    /// this map.
    pub fn notes_named(&self, a: &str, b: &str) -> Vec<MapNote> {
        match (self.index_of(a), self.index_of(b)) {
            (Some(i), Some(j)) if i != j => self.notes(i, j),
            _ => Vec::new(),
        }
    }
}
