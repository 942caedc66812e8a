//! A grid index over a point cloud: the nearest point to the pointer without a scan, and
//! membership of a lasso polygon.

use super::Bounds;

/// Cells per side of the hover index.
const INDEX_CELLS: usize = 256;

/// Points sorted by the cell of a fixed grid over their extent.
#[derive(Debug, Clone)]
pub struct PointIndex {
    bounds: Bounds,
    /// `starts[c]..starts[c + 1]` are the positions in `entries` of the points in cell `c`.
    starts: Vec<u32>,
    entries: Vec<u32>,
}

impl PointIndex {
    /// Indexes `points` (entry `i` is the `i`-th point). `None` when there is no finite point.
    pub fn new(points: &[(f64, f64)]) -> Option<Self> {
        let bounds = Bounds::around(points.iter().copied())?;
        let cell_of = |&(x, y): &(f64, f64)| -> Option<usize> {
            let u = ((x - bounds.x_min) / bounds.width() * INDEX_CELLS as f64) as usize;
            let v = ((y - bounds.y_min) / bounds.height() * INDEX_CELLS as f64) as usize;
            (x.is_finite() && y.is_finite())
                .then(|| v.min(INDEX_CELLS - 1) * INDEX_CELLS + u.min(INDEX_CELLS - 1))
        };
        // Each point's cell is computed twice (to count, then to place) rather than kept: at
        // ten million points a vector of cells would be 160 MB for a moment, per view.
        let mut starts = vec![0u32; INDEX_CELLS * INDEX_CELLS + 1];
        for c in points.iter().filter_map(cell_of) {
            starts[c + 1] += 1;
        }
        for k in 1..starts.len() {
            starts[k] += starts[k - 1];
        }
        let mut fill = starts.clone();
        let mut entries = vec![0u32; starts[starts.len() - 1] as usize];
        for (i, c) in points.iter().enumerate() {
            if let Some(c) = cell_of(c) {
                entries[fill[c] as usize] = i as u32;
                fill[c] += 1;
            }
        }
        Some(Self {
            bounds,
            starts,
            entries,
        })
    }

    /// The point nearest to `(x, y)` within the ellipse of half-axes `(rx, ry)` (data units:
    /// a pixel radius converted per axis), measured as `(dx/rx)² + (dy/ry)²`.
    pub fn nearest(
        &self,
        points: &[(f64, f64)],
        x: f64,
        y: f64,
        rx: f64,
        ry: f64,
    ) -> Option<usize> {
        self.nearest_where(points, (x, y), (rx, ry), |_| true)
    }

    /// [`PointIndex::nearest`] among the entries `accept` lets through (same cells visited, so
    /// a filter costs nothing extra).
    pub fn nearest_where(
        &self,
        points: &[(f64, f64)],
        (x, y): (f64, f64),
        (rx, ry): (f64, f64),
        accept: impl Fn(usize) -> bool,
    ) -> Option<usize> {
        if !(rx > 0.0 && ry > 0.0) {
            return None;
        }
        let to_u = |v: f64| (v - self.bounds.x_min) / self.bounds.width() * INDEX_CELLS as f64;
        let to_v = |v: f64| (v - self.bounds.y_min) / self.bounds.height() * INDEX_CELLS as f64;
        let clamp = |f: f64| f.clamp(0.0, (INDEX_CELLS - 1) as f64) as usize;
        let (u0, u1) = (to_u(x - rx), to_u(x + rx));
        let (v0, v1) = (to_v(y - ry), to_v(y + ry));
        if u1 < 0.0 || v1 < 0.0 || u0 >= INDEX_CELLS as f64 || v0 >= INDEX_CELLS as f64 {
            return None;
        }
        let mut best: Option<(usize, f64)> = None;
        for v in clamp(v0)..=clamp(v1) {
            for u in clamp(u0)..=clamp(u1) {
                let c = v * INDEX_CELLS + u;
                for &e in &self.entries[self.starts[c] as usize..self.starts[c + 1] as usize] {
                    let (px, py) = points[e as usize];
                    let d = ((px - x) / rx).powi(2) + ((py - y) / ry).powi(2);
                    if d <= 1.0 && best.is_none_or(|(_, b)| d < b) && accept(e as usize) {
                        best = Some((e as usize, d));
                    }
                }
            }
        }
        best.map(|(e, _)| e)
    }
}

/// Whether `(x, y)` lies inside the polygon `ring` (even–odd rule; the ring need not be closed).
pub fn inside(ring: &[[f64; 2]], x: f64, y: f64) -> bool {
    let mut odd = false;
    let n = ring.len();
    for k in 0..n {
        let [xi, yi] = ring[k];
        let [xj, yj] = ring[(k + n - 1) % n];
        if (yi > y) != (yj > y) && x < (xj - xi) * (y - yi) / (yj - yi) + xi {
            odd = !odd;
        }
    }
    odd
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_index_finds_what_a_full_scan_finds() {
        let pts: Vec<(f64, f64)> = (0..5000)
            .map(|i| {
                let t = f64::from(i);
                ((t * 0.618).fract() * 100.0, (t * 0.382).fract() * 3.0)
            })
            .collect();
        let index = PointIndex::new(&pts).expect("points");
        for k in 0..200 {
            let (x, y) = (f64::from(k) * 0.5, f64::from(k % 30) * 0.1);
            let (rx, ry) = (0.7, 0.02);
            let scan = pts
                .iter()
                .enumerate()
                .map(|(i, &(px, py))| (i, ((px - x) / rx).powi(2) + ((py - y) / ry).powi(2)))
                .filter(|&(_, d)| d <= 1.0)
                .min_by(|a, b| a.1.total_cmp(&b.1))
                .map(|(i, _)| i);
            assert_eq!(index.nearest(&pts, x, y, rx, ry), scan, "query {k}");
            if let Some(hit) = scan {
                // With the nearest filtered out, the index finds the next one, as a scan does.
                let next = pts
                    .iter()
                    .enumerate()
                    .filter(|&(i, _)| i != hit)
                    .map(|(i, &(px, py))| (i, ((px - x) / rx).powi(2) + ((py - y) / ry).powi(2)))
                    .filter(|&(_, d)| d <= 1.0)
                    .min_by(|a, b| a.1.total_cmp(&b.1))
                    .map(|(i, _)| i);
                assert_eq!(
                    index.nearest_where(&pts, (x, y), (rx, ry), |e| e != hit),
                    next
                );
            }
        }
    }

    #[test]
    fn polygon_membership() {
        let square = [[0.0, 0.0], [2.0, 0.0], [2.0, 2.0], [0.0, 2.0]];
        assert!(inside(&square, 1.0, 1.0));
        assert!(!inside(&square, 3.0, 1.0));
        let notch = [[0.0, 0.0], [4.0, 0.0], [4.0, 4.0], [2.0, 1.0], [0.0, 4.0]];
        assert!(!inside(&notch, 2.0, 3.0));
        assert!(inside(&notch, 1.0, 1.0));
    }
}
