//! The points of one view with their pair entries, indexed for hover when there are many.

use std::sync::Arc;

use rayon::prelude::*;

use crate::density::{Bounds, PointIndex};

/// Above this many points a view draws a density image instead of markers.
pub const DENSITY_FROM: usize = 20_000;
/// Above this many points hover uses the grid index instead of a scan.
const INDEX_FROM: usize = 2_000;

/// Points of a view.
#[derive(Debug, Clone, Default)]
pub struct Cloud {
    /// Positions in the view's units.
    pub points: Vec<(f64, f64)>,
    /// Pair entry of each point (shared between the views that draw the same rows).
    pub entries: Arc<[usize]>,
    /// The smallest rectangle holding every finite point.
    pub bounds: Option<Bounds>,
    index: Option<PointIndex>,
    /// Positions ordered by entry, when the entries are not ascending (the quantile view):
    /// finds a point by its entry without a scan.
    by_entry: Option<Vec<usize>>,
}

impl Cloud {
    /// A cloud; builds the index when it is large.
    pub fn new(points: Vec<(f64, f64)>, entries: impl Into<Arc<[usize]>>) -> Self {
        let entries = entries.into();
        let ascending = entries.windows(2).all(|w| w[0] < w[1]);
        let by_entry = (!ascending).then(|| {
            let mut order: Vec<usize> = (0..entries.len()).collect();
            // Entries are distinct, so the unstable sort's order is the only one.
            order.par_sort_unstable_by_key(|&k| entries[k]);
            order
        });
        Self::with_order(points, entries, by_entry)
    }

    /// A cloud whose entries do not ascend, with `by_entry` (its positions ordered by entry)
    /// already known to the caller; builds the index when it is large.
    pub fn ordered(
        points: Vec<(f64, f64)>,
        entries: impl Into<Arc<[usize]>>,
        by_entry: Vec<usize>,
    ) -> Self {
        let entries = entries.into();
        debug_assert!(by_entry.windows(2).all(|w| entries[w[0]] < entries[w[1]]));
        Self::with_order(points, entries, Some(by_entry))
    }

    /// The cloud with its bounds and, when it is large, its hover index.
    fn with_order(
        points: Vec<(f64, f64)>,
        entries: Arc<[usize]>,
        by_entry: Option<Vec<usize>>,
    ) -> Self {
        let index = (points.len() > INDEX_FROM)
            .then(|| PointIndex::new(&points))
            .flatten();
        Self {
            bounds: Bounds::around(points.iter().copied()),
            points,
            entries,
            index,
            by_entry,
        }
    }

    /// Whether the view should draw a density image.
    pub fn is_dense(&self) -> bool {
        self.points.len() > DENSITY_FROM
    }

    /// The entry nearest `(x, y)` within half-axes `(rx, ry)`, ignoring entries in `skip`.
    pub fn nearest_except(
        &self,
        x: f64,
        y: f64,
        radius: (f64, f64),
        skip: &std::collections::HashSet<usize>,
    ) -> Option<usize> {
        self.nearest_by(x, y, radius, |e| !skip.contains(&e))
    }

    /// The entry nearest `(x, y)` within half-axes `(rx, ry)`.
    pub fn nearest(&self, x: f64, y: f64, rx: f64, ry: f64) -> Option<usize> {
        self.nearest_by(x, y, (rx, ry), |_| true)
    }

    /// The nearest entry that `accept` lets through: the grid index when there is one, else a
    /// scan of the (few) points.
    fn nearest_by(
        &self,
        x: f64,
        y: f64,
        (rx, ry): (f64, f64),
        accept: impl Fn(usize) -> bool,
    ) -> Option<usize> {
        let ok = |k: usize| accept(self.entries[k]);
        let k = match &self.index {
            Some(ix) => ix.nearest_where(&self.points, (x, y), (rx, ry), ok),
            None => self
                .points
                .iter()
                .enumerate()
                .filter(|&(k, _)| ok(k))
                .map(|(k, &(px, py))| (k, ((px - x) / rx).powi(2) + ((py - y) / ry).powi(2)))
                .filter(|&(_, d)| d <= 1.0)
                .min_by(|a, b| a.1.total_cmp(&b.1))
                .map(|(k, _)| k),
        }?;
        Some(self.entries[k])
    }

    /// Position of `entry` in this view, if it is drawn here.
    pub fn position_of(&self, entry: usize) -> Option<(f64, f64)> {
        // Entries are ascending in every cloud but the quantile view's, which keeps its
        // positions ordered by entry.
        let k = match &self.by_entry {
            None => self.entries.binary_search(&entry).ok()?,
            Some(order) => {
                let at = order
                    .binary_search_by_key(&entry, |&k| self.entries[k])
                    .ok()?;
                order[at]
            }
        };
        Some(self.points[k])
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_point_is_found_by_its_entry_whether_or_not_entries_ascend() {
        let points = vec![(0.0, 1.0), (2.0, 3.0), (4.0, 5.0), (6.0, 7.0)];
        let ascending = Cloud::new(points.clone(), vec![1, 4, 7, 9]);
        assert_eq!(ascending.position_of(7), Some((4.0, 5.0)));
        assert_eq!(ascending.position_of(5), None);
        // The quantile view orders its points by residual, not by entry.
        let shuffled = Cloud::new(points, vec![9, 1, 7, 4]);
        assert_eq!(shuffled.position_of(9), Some((0.0, 1.0)));
        assert_eq!(shuffled.position_of(4), Some((6.0, 7.0)));
        assert_eq!(shuffled.position_of(5), None);
    }
}
