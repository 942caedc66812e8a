//! Order statistics of the pairwise slopes `(yⱼ − yᵢ)/(xⱼ − xᵢ)` of points with different x,
//! found without forming all n(n−1)/2 of them.
//!
//! Method (randomized slope selection; Matoušek 1991 and Dillencourt, Mount & Netanyahu 1992
//! describe the idea — recalled, not consulted). Keep a window `[lo, hi)` of slope values known
//! to hold the wanted ranks, with the number of slopes below each end counted exactly by
//! [`super::pair_order`] in O(n log n). Draw a seeded uniform sample of the slopes inside the
//! window, read the sample quantiles around the wanted ranks, and move the ends to thresholds
//! between sample values; repeat until at most `cap` slopes remain, then list those slopes
//! (computed by the same division as the brute force), and pick.
//!
//! The counts see exact slopes; the brute force sorts computed ones, which differ from the
//! exact ones by at most about 3 units of roundoff (one rounding each for `Δy`, `Δx` and the
//! quotient). A threshold `t` is only used when its band `t ± η·(|t| + s)` holds no slope
//! (`η` = [`BAND`], `s` = max|y|/max|x|), checked as `count(t − h) = count(t + h)`: then every
//! pair falls on the same side of `t` computed or exact, and the count at `t` is the brute
//! force's count. A window whose slopes cannot be split because they are (nearly) tied — rounded
//! data — is resolved by counting the slopes exactly equal to one value (`count(s ≤ v) −
//! count(s < v)`; pairs whose exact slope is `v` are taken to compute to `v`, which holds when
//! their differences are exact, as for integer or binary-fraction data) and listing only the
//! near ties around it, whose counts by computed value are gathered without storing them.

use std::ops::Range;

use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;
use rayon::prelude::*;

use super::inversions::inversions;
use super::pair_order::{key, slope, Bound, Key, Window};

/// Relative half-width of the empty band required around a threshold: `2⁻⁴⁶ ≈ 1.4·10⁻¹⁴`,
/// 64 times the ~3 units of roundoff between a computed and an exact slope, and narrow enough
/// that a band rarely catches a slope (about 10⁻⁴ of them among 10¹⁰ slopes spread over a unit).
pub(super) const BAND: f64 = 1.0 / (1u64 << 46) as f64;

/// Rounds of window narrowing before the remaining window is listed regardless of its size.
const MAX_ROUNDS: usize = 60;

/// Sizes that trade memory against passes.
#[derive(Debug, Clone, Copy)]
pub(super) struct Tuning {
    /// Largest window listed and sorted explicitly.
    pub(super) cap: u64,
    /// Slopes drawn per narrowing round.
    pub(super) sample: usize,
}

impl Tuning {
    /// `cap = max(4n, 10⁶)`, 100 000 draws per round.
    pub(super) fn for_n(n: usize) -> Self {
        Self {
            cap: (4 * n as u64).max(1_000_000),
            sample: 100_000,
        }
    }
}

/// Pairs of points sharing their x, by the sign of their "slope" (`i < j` in row order).
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq)]
pub(super) struct EqualX {
    /// Identical points.
    pub(super) identical: u64,
    /// `yⱼ < yᵢ`: slope −∞.
    pub(super) down: u64,
    /// `yⱼ > yᵢ`: slope +∞.
    pub(super) up: u64,
}

/// The points sorted by (x, y), ready for counting slopes.
pub(super) struct PairSlopes {
    pub(super) xs: Vec<f64>,
    pub(super) ys: Vec<f64>,
    /// Runs of equal x with more than one point.
    pub(super) groups: Vec<Range<usize>>,
    /// Pairs with equal x.
    pub(super) equal_x: EqualX,
    /// Pairs with different x (finite slopes).
    pub(super) finite: u64,
    /// `max|y| / max|x|`: the slope scale of the band.
    pub(super) scale: f64,
    pub(super) tuning: Tuning,
}

impl PairSlopes {
    /// Sorts the points and counts the pairs that share their x.
    ///
    /// # Panics
    /// If the columns differ in length or hold non-finite values (callers check first).
    pub(super) fn new(x: &[f64], y: &[f64], tuning: Tuning) -> Self {
        assert_eq!(x.len(), y.len(), "paired slices differ in length");
        let n = x.len();
        let mut rows: Vec<usize> = (0..n).collect();
        rows.par_sort_unstable_by(|&a, &b| {
            (x[a] + 0.0)
                .partial_cmp(&(x[b] + 0.0))
                .expect("finite")
                .then(a.cmp(&b))
        });
        let mut pts: Vec<(f64, f64)> = rows.iter().map(|&r| (x[r] + 0.0, y[r] + 0.0)).collect();
        let mut groups = Vec::new();
        let (mut equal_x, mut pairs) = (EqualX::default(), 0u64);
        let mut start = 0;
        while start < n {
            let end = start
                + pts[start..]
                    .iter()
                    .take_while(|p| p.0 == pts[start].0)
                    .count();
            if end - start > 1 {
                let g = (end - start) as u64;
                pairs += g * (g - 1) / 2;
                // In row order: a later row lower in y is a −∞ slope (a strict inversion).
                let mut keys: Vec<Key> = pts[start..end].iter().map(|p| Key(p.1, 0.0)).collect();
                equal_x.down += inversions(&mut keys);
                let mut i = 0;
                while i < keys.len() {
                    let t = keys[i..].iter().take_while(|k| k.0 == keys[i].0).count() as u64;
                    equal_x.identical += t * (t - 1) / 2;
                    i += t as usize;
                }
                pts[start..end].sort_unstable_by(|a, b| a.1.total_cmp(&b.1));
                groups.push(start..end);
            }
            start = end;
        }
        equal_x.up = pairs - equal_x.identical - equal_x.down;
        let (xs, ys): (Vec<f64>, Vec<f64>) = pts.into_iter().unzip();
        let peak = |v: &[f64]| v.iter().fold(0.0_f64, |m, a| m.max(a.abs()));
        let (px, py) = (peak(&xs), peak(&ys));
        let nn = n as u64;
        Self {
            xs,
            ys,
            groups,
            equal_x,
            finite: nn * (nn.saturating_sub(1)) / 2 - pairs,
            scale: if px > 0.0 { py / px } else { 1.0 },
            tuning,
        }
    }

    /// Pairs with different x whose exact slope is below `t` (or above it, with `above`).
    pub(super) fn count(&self, t: f64, above: bool) -> u64 {
        let at = Bound::At(t);
        let mut keys: Vec<Key> = self
            .xs
            .par_iter()
            .zip(&self.ys)
            .map(|(&x, &y)| {
                let k = key(at, x, y);
                if above {
                    k.negated()
                } else {
                    k
                }
            })
            .collect();
        for g in &self.groups {
            keys[g.clone()].sort_unstable_by(|a, b| a.order(*b));
        }
        inversions(&mut keys)
    }

    pub(super) fn band(&self, t: f64) -> f64 {
        BAND * (t.abs() + self.scale)
    }

    /// The count below `t` when no slope lies in the band around `t`.
    fn clean(&self, t: f64) -> Option<u64> {
        let h = self.band(t);
        let below = self.count(t - h, false);
        (below == self.count(t + h, false)).then_some(below)
    }

    /// A clean threshold beside `v` (below it for `direction < 0`), stepping away by growing
    /// multiples of the band.
    pub(super) fn clean_beside(&self, v: f64, direction: f64) -> Option<(f64, u64)> {
        let mut d = 4.0 * self.band(v);
        for _ in 0..24 {
            let t = v + direction * d;
            if let Some(c) = self.clean(t) {
                return Some((t, c));
            }
            d *= 4.0;
        }
        None
    }

    /// `(K, E)`: computed slopes below −1 and exactly −1, among pairs with different x.
    /// Exact slopes below (above) −1 compute to at most (at least) −1, because rounding is
    /// monotone and −1 is a double; pairs whose exact slope is −1 compute to −1 exactly.
    pub(super) fn minus_one(&self) -> (u64, u64) {
        let below = self.count(-1.0, false);
        let not_above = self.finite - self.count(-1.0, true);
        let exact = not_above - below;
        let h = self.band(-1.0);
        if self.count(-1.0 - h, false) == below && self.count(-1.0 + h, false) == not_above {
            return (below, exact);
        }
        // Near −1 but not exactly: look at those pairs' computed slopes.
        let lo = self
            .clean_beside(-1.0, -1.0)
            .map_or(Bound::NegInf, |b| Bound::At(b.0));
        let hi = self
            .clean_beside(-1.0, 1.0)
            .map_or(Bound::PosInf, |b| Bound::At(b.0));
        let (xs, ys) = (&self.xs, &self.ys);
        let (mut moved, mut extra) = (0u64, 0u64);
        Window::new(xs, ys, lo, false, Bound::At(-1.0))
            .for_each_pair(|a, b| moved += u64::from(slope(xs, ys, a, b) == -1.0));
        Window::new(xs, ys, Bound::At(-1.0), true, hi)
            .for_each_pair(|a, b| extra += u64::from(slope(xs, ys, a, b) == -1.0));
        (below - moved, exact + moved + extra)
    }

    /// The computed slopes of ranks `first..=last` (1-based, ascending) among the finite ones.
    ///
    /// # Panics
    /// If the ranks are not within `1..=finite` or `first > last` (a caller bug).
    pub(super) fn select(&self, first: u64, last: u64, seed: u64) -> Vec<f64> {
        assert!(
            1 <= first && first <= last && last <= self.finite,
            "ranks out of range"
        );
        let mut rng = ChaCha8Rng::seed_from_u64(seed);
        let mut w = Bracket {
            lo: Bound::NegInf,
            below_lo: 0,
            hi: Bound::PosInf,
            below_hi: self.finite,
            first,
            last,
        };
        for _ in 0..MAX_ROUNDS {
            let width = w.below_hi - w.below_lo;
            if width <= self.tuning.cap {
                return self.pick(&w);
            }
            let window = Window::new(&self.xs, &self.ys, w.lo, false, w.hi);
            let mut sample = window.sample(&self.xs, &self.ys, self.tuning.sample, &mut rng);
            sample.retain(|s| s.is_finite());
            if sample.is_empty() {
                break;
            }
            sample.sort_unstable_by(f64::total_cmp);
            let m = sample.len() as f64;
            let pa = (first - w.below_lo - 1) as f64 / width as f64;
            let pb = (last - w.below_lo) as f64 / width as f64;
            let spread = |p: f64| 4.0 * (p * (1.0 - p) / m).sqrt() + 2.0 / m;
            let ia = ((pa - spread(pa)) * m).floor();
            let ib = ((pb + spread(pb)) * m).ceil();
            if ia >= 1.0 {
                if let Some((t, c)) = self.gap(&sample, ia as usize, false, &mut rng) {
                    w.narrow(t, c);
                }
            }
            if ib < m {
                if let Some((t, c)) = self.gap(&sample, ib as usize, true, &mut rng) {
                    w.narrow(t, c);
                }
            }
            if (w.below_hi - w.below_lo).saturating_mul(4) > width {
                // Little progress: the slopes near the target are (nearly) tied.
                let at = (0.5 * (pa + pb) * m) as usize;
                if let Some(found) = self.cluster(sample[at.min(sample.len() - 1)], &mut w) {
                    return found;
                }
            }
        }
        self.pick_streamed(&[(w.lo, false, w.hi)], None, &w)
    }

    /// A clean threshold in a gap between distinct sample values, starting at sample index
    /// `from` and moving outward (up with `upward`), with its count.
    fn gap(
        &self,
        s: &[f64],
        from: usize,
        upward: bool,
        rng: &mut ChaCha8Rng,
    ) -> Option<(f64, u64)> {
        let mut tries = 0;
        let mut j = from;
        loop {
            let (a, b) = if upward {
                (*s.get(j)?, *s.get(j + 1)?)
            } else {
                if j == 0 {
                    return None;
                }
                (s[j - 1], s[j])
            };
            if a < b {
                for _ in 0..3 {
                    let r: f64 = rng.random_range(0.2..0.8);
                    let t = a * (1.0 - r) + b * r;
                    if t > a && t < b {
                        if let Some(c) = self.clean(t) {
                            return Some((t, c));
                        }
                    }
                    tries += 1;
                }
                if tries >= 24 {
                    return None;
                }
            }
            if upward {
                j += 1;
            } else {
                j -= 1;
            }
        }
    }

    /// Lists the window's slopes and picks the wanted ranks.
    fn pick(&self, w: &Bracket) -> Vec<f64> {
        let (xs, ys) = (&self.xs, &self.ys);
        let mut slopes = Vec::with_capacity((w.below_hi - w.below_lo) as usize);
        Window::new(xs, ys, w.lo, false, w.hi)
            .for_each_pair(|a, b| slopes.push(slope(xs, ys, a, b)));
        debug_assert_eq!(slopes.len() as u64, w.below_hi - w.below_lo, "window count");
        let ra = (w.first - w.below_lo - 1) as usize;
        let rb = (w.last - w.below_lo - 1) as usize;
        let (_, &mut a, upper) = slopes.select_nth_unstable_by(ra, f64::total_cmp);
        let mut out = vec![a];
        if rb > ra {
            out.push(upper.iter().copied().min_by(f64::total_cmp).unwrap_or(a));
        }
        out
    }
}

/// The current window and the wanted ranks.
pub(super) struct Bracket {
    pub(super) lo: Bound,
    pub(super) below_lo: u64,
    pub(super) hi: Bound,
    pub(super) below_hi: u64,
    pub(super) first: u64,
    pub(super) last: u64,
}

impl Bracket {
    /// Moves an end of the window to the clean threshold `t` with `count` slopes below it,
    /// when that keeps the wanted ranks inside and tightens the window.
    pub(super) fn narrow(&mut self, t: f64, count: u64) {
        if count < self.first && count >= self.below_lo {
            self.lo = Bound::At(t);
            self.below_lo = count;
        } else if count >= self.last && count <= self.below_hi {
            self.hi = Bound::At(t);
            self.below_hi = count;
        }
    }
}
