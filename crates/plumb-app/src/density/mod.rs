//! Large point clouds: binned counts for a density image (drawn as a texture, cached per
//! view), and a grid index so that hover and click find the nearest row without scanning every
//! point each frame.

mod index;
pub mod texture;

pub use index::{inside, PointIndex};
pub use texture::DensityTextures;

/// A rectangle in data units.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Bounds {
    /// Left edge.
    pub x_min: f64,
    /// Right edge.
    pub x_max: f64,
    /// Bottom edge.
    pub y_min: f64,
    /// Top edge.
    pub y_max: f64,
}

impl Bounds {
    /// The smallest rectangle holding every finite point (`None` if there is none); a
    /// zero-width side is widened to 1 so that cells have a size.
    pub fn around(points: impl Iterator<Item = (f64, f64)>) -> Option<Self> {
        let mut b: Option<Self> = None;
        for (x, y) in points.filter(|(x, y)| x.is_finite() && y.is_finite()) {
            let c = b.get_or_insert(Self {
                x_min: x,
                x_max: x,
                y_min: y,
                y_max: y,
            });
            c.x_min = c.x_min.min(x);
            c.x_max = c.x_max.max(x);
            c.y_min = c.y_min.min(y);
            c.y_max = c.y_max.max(y);
        }
        b.map(Self::widened)
    }

    /// The same rectangle with a zero-width side widened to 1, so that cells have a size.
    pub fn widened(mut self) -> Self {
        if self.x_max <= self.x_min {
            self.x_max = self.x_min + 1.0;
        }
        if self.y_max <= self.y_min {
            self.y_max = self.y_min + 1.0;
        }
        self
    }

    pub(crate) fn width(&self) -> f64 {
        self.x_max - self.x_min
    }

    pub(crate) fn height(&self) -> f64 {
        self.y_max - self.y_min
    }
}

/// Counts of points per cell of a `width × height` grid over `bounds`; row 0 is the top.
#[derive(Debug, Clone, PartialEq)]
pub struct Density {
    /// Cells across.
    pub width: usize,
    /// Cells down.
    pub height: usize,
    /// Row-major counts.
    pub counts: Vec<u32>,
    /// Largest count.
    pub max: u32,
    /// The area binned.
    pub bounds: Bounds,
}

impl Density {
    /// No points yet.
    pub fn empty(bounds: Bounds, width: usize, height: usize) -> Self {
        Self {
            width,
            height,
            counts: vec![0u32; width * height],
            max: 0,
            bounds,
        }
    }

    /// Bins more points (piece by piece, for data read in parts).
    pub fn add(&mut self, points: impl Iterator<Item = (f64, f64)>) {
        let grid = self.grid();
        for (x, y) in points {
            if let Some(c) = grid.cell(x, y) {
                self.counts[c] += 1;
            }
        }
        self.max = self.counts.iter().copied().max().unwrap_or(0);
    }

    /// The cell of `(x, y)`, if it lies inside (NaN does not; a point on the right or bottom
    /// edge belongs to the last cell).
    fn cell(&self, x: f64, y: f64) -> Option<usize> {
        self.grid().cell(x, y)
    }

    /// The cell arithmetic with its divisions done once (binning a million points must not
    /// divide two million times).
    fn grid(&self) -> Grid {
        Grid {
            x_min: self.bounds.x_min,
            y_max: self.bounds.y_max,
            sx: self.width as f64 / self.bounds.width(),
            sy: self.height as f64 / self.bounds.height(),
            width: self.width,
            height: self.height,
        }
    }

    /// Takes `points` (previously binned) out again: O(k) for k points, so a few excluded
    /// rows do not cost a second pass over all of them.
    pub fn remove(&mut self, points: impl Iterator<Item = (f64, f64)>) {
        for (x, y) in points {
            if let Some(c) = self.cell(x, y) {
                self.counts[c] = self.counts[c].saturating_sub(1);
            }
        }
        self.max = self.counts.iter().copied().max().unwrap_or(0);
    }
}

/// Cells per data unit and the grid's origin.
#[derive(Debug, Clone, Copy)]
struct Grid {
    x_min: f64,
    y_max: f64,
    sx: f64,
    sy: f64,
    width: usize,
    height: usize,
}

impl Grid {
    #[inline]
    fn cell(&self, x: f64, y: f64) -> Option<usize> {
        let u = (x - self.x_min) * self.sx;
        let v = (self.y_max - y) * self.sy;
        let inside =
            (0.0..=self.width as f64).contains(&u) && (0.0..=self.height as f64).contains(&v);
        inside.then(|| {
            (v as usize).min(self.height - 1) * self.width + (u as usize).min(self.width - 1)
        })
    }
}

/// Bins `points` (those outside `bounds` are skipped). One pass, no allocation per point.
pub fn bin(
    points: impl Iterator<Item = (f64, f64)>,
    bounds: Bounds,
    width: usize,
    height: usize,
) -> Density {
    let mut d = Density::empty(bounds, width, height);
    d.add(points);
    d
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn binning_counts_every_point_inside_once() {
        let pts: Vec<(f64, f64)> = (0..1000)
            .map(|i| (f64::from(i % 10), f64::from(i / 100)))
            .chain([(f64::NAN, 1.0), (50.0, 1.0)])
            .collect();
        let b = Bounds {
            x_min: 0.0,
            x_max: 9.0,
            y_min: 0.0,
            y_max: 9.0,
        };
        let d = bin(pts.iter().copied(), b, 3, 3);
        assert_eq!(
            d.counts.iter().sum::<u32>(),
            1000,
            "NaN and out-of-range skipped"
        );
        // Top-left cell: x in 0..3 (0, 1, 2) and y in (6, 9] (7, 8, 9): 3 × 3 × 10 points.
        assert_eq!(d.counts[0], 90);
        assert_eq!(d.max, d.counts.iter().copied().max().expect("cells"));
        let mut less = d.clone();
        less.remove(pts[..100].iter().copied());
        let direct = bin(pts[100..].iter().copied(), b, 3, 3);
        assert_eq!(less, direct, "removing points equals binning without them");
    }
}
