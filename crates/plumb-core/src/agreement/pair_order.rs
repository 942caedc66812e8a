//! Counting, sampling and listing the pairs of points whose slope lies in a window `[lo, hi)`
//! without forming all the slopes: the primitives of the fast Passing–Bablok route.
//!
//! Duality: for a threshold slope `t`, give each point the key `u = y − t·x`. For two points
//! with `xᵢ < xⱼ`, the slope `(yⱼ − yᵢ)/(xⱼ − xᵢ)` is below `t` exactly when `uⱼ < uᵢ`; so with
//! the points in ascending x, the pairs with a slope below `t` are the inversions of the keys.
//! Listed by their key at `lo` (ties: ascending x for a closed lower end, descending x for an
//! open one), the pairs with a slope in `[lo, hi)` are exactly the inversions of the keys at
//! `hi` (derived by hand: a pair listed in that order and inverted at `hi` has
//! `(hi − lo)·(xⱼ − xᵢ) > 0`, so its x differ and its slope lies in the window; pairs with
//! equal x never invert). Slope-selection algorithms are built on this duality (Cole, Salowe,
//! Steiger & Szemerédi 1989; Matoušek 1991; Dillencourt, Mount & Netanyahu 1992 — recalled,
//! not consulted).
//!
//! Keys are double-double: `t·x = p + e` exactly (error-free product), then
//! `u = (y − p) − e` by error-free sums, off by about `2⁻¹⁰⁶·(|y| + |t·x|)`. A count at `t` is
//! therefore the exact count of pairs whose *exact* slope (from the stored values) is below `t`,
//! unless that slope lies within about `10⁻³⁰·(|y| + |t·x|)/|Δx|` of `t`. At `t = −1` the keys
//! are exact (`p = −x`, `e = 0`), so ties at −1 are seen exactly.

use std::cmp::Ordering;

use rand::Rng;
use rand_chacha::ChaCha8Rng;
use rayon::prelude::*;

use crate::accurate::{two_prod, two_prod_split, two_sum, SPLIT_SAFE};

/// A threshold slope: −∞, a finite value, or +∞.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) enum Bound {
    /// Below every slope.
    NegInf,
    /// A finite slope.
    At(f64),
    /// Above every slope.
    PosInf,
}

/// The order key of a point along a threshold slope (see the module doc).
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) struct Key(pub(super) f64, pub(super) f64);

impl Key {
    #[inline]
    pub(super) fn less(self, other: Key) -> bool {
        self.0 < other.0 || (self.0 == other.0 && self.1 < other.1)
    }

    #[inline]
    pub(super) fn order(self, other: Key) -> Ordering {
        if self.less(other) {
            Ordering::Less
        } else if other.less(self) {
            Ordering::Greater
        } else {
            Ordering::Equal
        }
    }

    #[inline]
    pub(super) fn negated(self) -> Key {
        Key(-self.0, -self.1)
    }
}

/// Key of the point `(x, y)` at `at`: `u = y − t·x` as a normalized double-double; at −∞ the
/// pair `(x, y)` (u = y + M·x for huge M), at +∞ the pair `(−x, y)`.
#[inline]
pub(super) fn key(at: Bound, x: f64, y: f64) -> Key {
    match at {
        Bound::NegInf => Key(x, y),
        Bound::PosInf => Key(-x, y),
        Bound::At(t) => {
            let (p, e) = if t.abs() < SPLIT_SAFE && x.abs() < SPLIT_SAFE {
                two_prod_split(t, x)
            } else {
                two_prod(t, x)
            };
            let (s, err) = two_sum(y, -p);
            let (hi, lo) = two_sum(s, err - e);
            Key(hi, lo)
        }
    }
}

/// The slope of two points, computed as the brute force computes it: `(y_b − y_a)/(x_b − x_a)`
/// (IEEE negation is exact, so the order of the two points does not change the result).
#[inline]
pub(super) fn slope(xs: &[f64], ys: &[f64], a: u32, b: u32) -> f64 {
    let (a, b) = (a as usize, b as usize);
    (ys[b] - ys[a]) / (xs[b] - xs[a])
}

/// The points listed by their key at the lower end of a window, with the rank of each one's
/// key at the upper end: the window's pairs are the inversions of `rank`.
pub(super) struct Window {
    /// Point (index into the sorted columns) at each listing position.
    point: Vec<u32>,
    /// Rank of the key at `hi` at each listing position (ties broken by position, so that
    /// tied keys never form an inversion).
    rank: Vec<u32>,
    /// Listing position holding each rank.
    owner: Vec<u32>,
}

impl Window {
    /// The window `[lo, hi)` (or `(lo, hi)` when `open_low`) over the points `(xs, ys)`.
    pub(super) fn new(xs: &[f64], ys: &[f64], lo: Bound, open_low: bool, hi: Bound) -> Self {
        let n = xs.len();
        let mut listed: Vec<(Key, f64, u32)> = (0..n)
            .into_par_iter()
            .map(|i| (key(lo, xs[i], ys[i]), xs[i], i as u32))
            .collect();
        listed.par_sort_unstable_by(|a, b| {
            let by_x = a.1.partial_cmp(&b.1).unwrap_or(Ordering::Equal);
            a.0.order(b.0)
                .then(if open_low { by_x.reverse() } else { by_x })
        });
        let point: Vec<u32> = listed.iter().map(|p| p.2).collect();
        let mut upper: Vec<(Key, u32)> = point
            .par_iter()
            .enumerate()
            .map(|(pos, &i)| (key(hi, xs[i as usize], ys[i as usize]), pos as u32))
            .collect();
        upper.par_sort_unstable_by(|a, b| a.0.order(b.0).then(a.1.cmp(&b.1)));
        let owner: Vec<u32> = upper.iter().map(|p| p.1).collect();
        let mut rank = vec![0u32; n];
        for (r, &pos) in owner.iter().enumerate() {
            rank[pos as usize] = r as u32;
        }
        Self { point, rank, owner }
    }

    /// For each listing position, the number of earlier positions with a larger rank.
    fn later_counts(&self) -> Vec<u32> {
        let mut tree = Fenwick::new(self.rank.len());
        self.rank
            .iter()
            .enumerate()
            .map(|(q, &r)| {
                let c = q as u32 - tree.below(r as usize);
                tree.insert(r as usize);
                c
            })
            .collect()
    }

    /// `m` slopes drawn uniformly, with replacement, from the window's pairs (none if empty).
    pub(super) fn sample(
        &self,
        xs: &[f64],
        ys: &[f64],
        m: usize,
        rng: &mut ChaCha8Rng,
    ) -> Vec<f64> {
        let counts = self.later_counts();
        let total: u64 = counts.iter().map(|&c| u64::from(c)).sum();
        if total == 0 {
            return Vec::new();
        }
        let mut draws: Vec<u64> = (0..m).map(|_| rng.random_range(0..total)).collect();
        draws.sort_unstable();
        let mut out = Vec::with_capacity(m);
        let mut tree = Fenwick::new(self.rank.len());
        let (mut start, mut d) = (0u64, 0usize);
        for (q, (&r, &c)) in self.rank.iter().zip(&counts).enumerate() {
            let below = tree.below(r as usize);
            while d < m && draws[d] < start + u64::from(c) {
                // The (k+1)-th smallest of the earlier ranks above r.
                let k = (draws[d] - start) as u32;
                let other = self.owner[tree.kth(below + k + 1)];
                out.push(slope(xs, ys, self.point[other as usize], self.point[q]));
                d += 1;
            }
            start += u64::from(c);
            tree.insert(r as usize);
        }
        out
    }

    /// Calls `f(a, b)` for every pair in the window (points as indices into the columns).
    pub(super) fn for_each_pair(&self, mut f: impl FnMut(u32, u32)) {
        let mut v: Vec<(u32, u32)> = self
            .rank
            .iter()
            .copied()
            .zip(self.point.iter().copied())
            .collect();
        let mut scratch = v.clone();
        list_sort(&mut v, &mut scratch, &mut f);
    }
}

/// Merge sort by rank that reports every inversion as it merges.
fn list_sort(v: &mut [(u32, u32)], scratch: &mut [(u32, u32)], f: &mut impl FnMut(u32, u32)) {
    let n = v.len();
    if n < 2 {
        return;
    }
    let mid = n / 2;
    {
        let (left, right) = v.split_at_mut(mid);
        let (ls, rs) = scratch.split_at_mut(mid);
        list_sort(left, ls, f);
        list_sort(right, rs, f);
    }
    let (mut i, mut j, mut k) = (0, mid, 0);
    while i < mid && j < n {
        if v[j].0 < v[i].0 {
            for earlier in &v[i..mid] {
                f(earlier.1, v[j].1);
            }
            scratch[k] = v[j];
            j += 1;
        } else {
            scratch[k] = v[i];
            i += 1;
        }
        k += 1;
    }
    scratch[k..k + mid - i].copy_from_slice(&v[i..mid]);
    k += mid - i;
    scratch[k..n].copy_from_slice(&v[j..n]);
    v.copy_from_slice(&scratch[..n]);
}

/// Fenwick (binary indexed) tree of inserted ranks `0..n`.
struct Fenwick {
    tree: Vec<u32>,
}

impl Fenwick {
    fn new(n: usize) -> Self {
        Self {
            tree: vec![0; n + 1],
        }
    }

    fn insert(&mut self, rank: usize) {
        let mut i = rank + 1;
        while i < self.tree.len() {
            self.tree[i] += 1;
            i += i & i.wrapping_neg();
        }
    }

    /// Inserted ranks below `rank`.
    fn below(&self, rank: usize) -> u32 {
        let (mut i, mut total) = (rank, 0);
        while i > 0 {
            total += self.tree[i];
            i &= i - 1;
        }
        total
    }

    /// The `k`-th smallest inserted rank (1-based `k`, at most the number inserted).
    fn kth(&self, mut k: u32) -> usize {
        let n = self.tree.len() - 1;
        let mut pos = 0;
        let mut step = n.next_power_of_two();
        while step > 0 {
            let next = pos + step;
            if next <= n && self.tree[next] < k {
                pos = next;
                k -= self.tree[next];
            }
            step /= 2;
        }
        pos
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use rand::SeedableRng;

    fn points() -> (Vec<f64>, Vec<f64>) {
        // Sorted by (x, y), with an equal-x group and an identical pair.
        let xs = vec![0.0, 1.0, 1.0, 1.0, 2.0, 3.5, 4.0];
        let ys = vec![1.0, 0.0, 2.0, 2.0, 3.0, -1.0, 5.0];
        (xs, ys)
    }

    fn direct(xs: &[f64], ys: &[f64], keep: impl Fn(f64) -> bool) -> Vec<f64> {
        let mut out = Vec::new();
        for i in 0..xs.len() {
            for j in i + 1..xs.len() {
                if xs[i] != xs[j] {
                    let s = (ys[j] - ys[i]) / (xs[j] - xs[i]);
                    if keep(s) {
                        out.push(s);
                    }
                }
            }
        }
        out.sort_by(f64::total_cmp);
        out
    }

    #[test]
    fn windows_list_exactly_the_pairs_with_slopes_inside() {
        let (xs, ys) = points();
        for (lo, open, hi) in [
            (Bound::NegInf, false, Bound::PosInf),
            (Bound::At(-1.0), false, Bound::At(2.0)),
            (Bound::At(-1.0), true, Bound::At(2.0)),
            (Bound::At(0.5), false, Bound::PosInf),
        ] {
            let value = |b: Bound| match b {
                Bound::NegInf => f64::NEG_INFINITY,
                Bound::At(t) => t,
                Bound::PosInf => f64::INFINITY,
            };
            let (l, h) = (value(lo), value(hi));
            let expected = direct(&xs, &ys, |s| (s > l || (!open && s == l)) && s < h);
            let w = Window::new(&xs, &ys, lo, open, hi);
            let mut listed = Vec::new();
            w.for_each_pair(|a, b| listed.push(slope(&xs, &ys, a, b)));
            listed.sort_by(f64::total_cmp);
            assert_eq!(listed, expected, "window {lo:?} {open} {hi:?}");
            let total: u32 = w.later_counts().iter().sum();
            assert_eq!(total as usize, expected.len());
            let mut rng = ChaCha8Rng::seed_from_u64(1);
            for s in w.sample(&xs, &ys, 50, &mut rng) {
                assert!(
                    expected.contains(&s),
                    "sampled slope {s} outside the window"
                );
            }
        }
    }

    #[test]
    fn fenwick_finds_the_kth_inserted_rank() {
        let mut t = Fenwick::new(10);
        for r in [7, 2, 9, 4] {
            t.insert(r);
        }
        assert_eq!(
            (1..=4).map(|k| t.kth(k)).collect::<Vec<_>>(),
            vec![2, 4, 7, 9]
        );
        assert_eq!(t.below(7), 2);
    }
}
