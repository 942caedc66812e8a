//! Seeded simple random sampling without replacement from a stream of unknown length.

use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;

/// A uniform random sample of at most `capacity` items from a stream offered one at a time
/// (Vitter's Algorithm R, "Random sampling with a reservoir", ACM TOMS 11(1), 1985).
///
/// The first `capacity` items fill the reservoir; the i-th item after that (1-based
/// position `i > capacity` in the stream) replaces a uniformly chosen slot with probability
/// `capacity / i`, so after `n` items each of them is held with probability `capacity / n`
/// and every subset of size `capacity` is equally likely. Memory is `capacity` items whatever
/// the stream's length. The generator is ChaCha8 seeded with `seed`: the same seed and the
/// same stream give the same sample on every platform.
#[derive(Debug, Clone)]
pub struct Reservoir<T> {
    capacity: usize,
    seen: u64,
    /// Each kept item with its 0-based position in the stream.
    kept: Vec<(u64, T)>,
    rng: ChaCha8Rng,
}

impl<T> Reservoir<T> {
    /// An empty reservoir holding at most `capacity` items.
    pub fn new(capacity: usize, seed: u64) -> Self {
        Self {
            capacity,
            seen: 0,
            kept: Vec::with_capacity(capacity.min(1 << 20)),
            rng: ChaCha8Rng::seed_from_u64(seed),
        }
    }

    /// Whether the next item offered would be kept, counting it as seen. Lets a caller skip
    /// building an item (copying a record) that would be thrown away; the item is then given
    /// to [`Reservoir::keep`] with the slot returned.
    pub fn draw(&mut self) -> Option<usize> {
        let position = self.seen;
        self.seen += 1;
        if self.kept.len() < self.capacity {
            return Some(self.kept.len());
        }
        if self.capacity == 0 {
            return None;
        }
        let j = self.rng.random_range(0..=position);
        usize::try_from(j).ok().filter(|&j| j < self.capacity)
    }

    /// Stores `item` in `slot` (as returned by the last [`Reservoir::draw`]).
    pub fn keep(&mut self, slot: usize, item: T) {
        let position = self.seen - 1;
        if slot == self.kept.len() {
            self.kept.push((position, item));
        } else {
            self.kept[slot] = (position, item);
        }
    }

    /// Offers one item.
    pub fn offer(&mut self, item: T) {
        if let Some(slot) = self.draw() {
            self.keep(slot, item);
        }
    }

    /// Items offered so far.
    pub fn seen(&self) -> u64 {
        self.seen
    }

    /// The sample with each item's 0-based position in the stream, in stream order.
    pub fn into_ordered(self) -> Vec<(u64, T)> {
        let mut kept = self.kept;
        kept.sort_unstable_by_key(|(p, _)| *p);
        kept
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn sample(n: u64, k: usize, seed: u64) -> Vec<u64> {
        let mut r = Reservoir::new(k, seed);
        for i in 0..n {
            r.offer(i);
        }
        r.into_ordered()
            .into_iter()
            .map(|(p, v)| {
                assert_eq!(p, v, "positions count the items offered");
                v
            })
            .collect()
    }

    #[test]
    fn a_short_stream_is_kept_whole_and_a_long_one_gives_k_distinct_items() {
        assert_eq!(sample(5, 10, 1), vec![0, 1, 2, 3, 4]);
        let s = sample(10_000, 100, 1);
        assert_eq!(s.len(), 100);
        assert!(s.windows(2).all(|w| w[0] < w[1]), "ordered and distinct");
        assert!(*s.last().expect("some") < 10_000);
        assert!(sample(10, 0, 1).is_empty());
    }

    #[test]
    fn the_same_seed_gives_the_same_sample_and_another_seed_another() {
        assert_eq!(sample(50_000, 200, 7), sample(50_000, 200, 7));
        assert_ne!(sample(50_000, 200, 7), sample(50_000, 200, 8));
    }

    #[test]
    fn every_position_is_about_equally_likely() {
        // 2000 samples of 10 from 100: each position is kept 200 times on average
        // (binomial, SD ≈ 13.4); all 100 counts inside ±6 SD is a loose check of uniformity
        // that a sampler favouring early or late items fails (worked by hand).
        let mut counts = [0u32; 100];
        for seed in 0..2000 {
            for v in sample(100, 10, seed) {
                counts[usize::try_from(v).expect("small")] += 1;
            }
        }
        assert!(
            counts.iter().all(|&c| (120..=280).contains(&c)),
            "{counts:?}"
        );
        let early: u32 = counts[..50].iter().sum();
        assert!((9_400..=10_600).contains(&early), "{early}");
    }
}
