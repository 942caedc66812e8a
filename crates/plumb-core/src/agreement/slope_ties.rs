//! Windows of (nearly) tied slopes, as rounded data produce: exact ties counted, near ties
//! tallied by computed value (see the `slope_rank` module doc).

use std::collections::HashMap;

use super::pair_order::{slope, Bound, Window};
use super::slope_rank::{Bracket, PairSlopes};

impl PairSlopes {
    /// Resolves a window stuck on slopes (nearly) tied at `v`: exact ties by counting, near
    /// ties by listing them. Returns `None` (after narrowing `w` where it can) when the wanted
    /// ranks are not in the tie.
    pub(super) fn cluster(&self, v: f64, w: &mut Bracket) -> Option<Vec<f64>> {
        let below = self.count(v, false);
        let not_above = self.finite - self.count(v, true);
        let h = self.band(v);
        if below < w.first
            && w.last <= not_above
            && self.count(v - h, false) == below
            && self.count(v + h, false) == not_above
        {
            return Some(vec![v; (w.last - w.first + 1) as usize]);
        }
        let lo = self.clean_beside(v, -1.0);
        let hi = self.clean_beside(v, 1.0);
        for (t, c) in lo.into_iter().chain(hi) {
            w.narrow(t, c);
        }
        let tight = lo.is_some_and(|l| w.lo == Bound::At(l.0))
            && hi.is_some_and(|u| w.hi == Bound::At(u.0));
        if tight && w.below_hi - w.below_lo > self.tuning.cap {
            let parts = [(w.lo, false, Bound::At(v)), (Bound::At(v), true, w.hi)];
            return Some(self.pick_streamed(&parts, Some((v, not_above - below)), w));
        }
        None
    }

    /// Picks the wanted ranks from counts of each computed value over the windows `parts`
    /// (lower bound, open lower end, upper bound), plus `extra = (value, count)`; the slopes
    /// are tallied as they are listed, never stored.
    pub(super) fn pick_streamed(
        &self,
        parts: &[(Bound, bool, Bound)],
        extra: Option<(f64, u64)>,
        w: &Bracket,
    ) -> Vec<f64> {
        let (xs, ys) = (&self.xs, &self.ys);
        let mut tally = Tally::default();
        if let Some((v, c)) = extra {
            tally.add(v, c);
        }
        for &(lo, open, hi) in parts {
            Window::new(xs, ys, lo, open, hi)
                .for_each_pair(|a, b| tally.add(slope(xs, ys, a, b), 1));
        }
        let mut seen = w.below_lo;
        let wanted = (w.last - w.first + 1) as usize;
        let mut out = Vec::with_capacity(wanted);
        for (v, c) in tally.sorted() {
            seen += c;
            while out.len() < wanted && w.first + out.len() as u64 <= seen {
                out.push(v);
            }
        }
        out
    }
}

/// Counts by value for a window of (nearly) tied slopes: a short sorted list with the last
/// value found remembered, turning into a hash map if the values turn out to be many.
#[derive(Default)]
struct Tally {
    few: Vec<(f64, u64)>,
    last: usize,
    many: HashMap<u64, u64>,
}

/// Distinct values kept in the sorted list before moving to the hash map.
const FEW: usize = 256;

impl Tally {
    fn add(&mut self, v: f64, count: u64) {
        if !self.many.is_empty() {
            *self.many.entry(v.to_bits()).or_default() += count;
            return;
        }
        if let Some(e) = self.few.get_mut(self.last) {
            if e.0.to_bits() == v.to_bits() {
                e.1 += count;
                return;
            }
        }
        match self.few.binary_search_by(|e| e.0.total_cmp(&v)) {
            Ok(i) => {
                self.few[i].1 += count;
                self.last = i;
            }
            Err(i) if self.few.len() < FEW => {
                self.few.insert(i, (v, count));
                self.last = i;
            }
            Err(_) => {
                self.many = self.few.drain(..).map(|(a, c)| (a.to_bits(), c)).collect();
                *self.many.entry(v.to_bits()).or_default() += count;
            }
        }
    }

    fn sorted(self) -> Vec<(f64, u64)> {
        let mut all: Vec<(f64, u64)> = self
            .many
            .into_iter()
            .map(|(b, c)| (f64::from_bits(b), c))
            .chain(self.few)
            .collect();
        all.sort_unstable_by(|a, b| a.0.total_cmp(&b.0));
        all
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_tally_counts_each_value_once_in_order() {
        let mut t = Tally::default();
        for i in 0..1_000u32 {
            t.add(f64::from(i % 300) * 0.5, 1);
        }
        t.add(-0.0, 5);
        let s = t.sorted();
        assert_eq!(s.len(), 301);
        assert_eq!(s[0], (-0.0, 5));
        assert_eq!(s[1], (0.0, 4));
        assert_eq!(s.iter().map(|p| p.1).sum::<u64>(), 1_005);
    }
}
