//! Ranks with ties shared.

use rayon::prelude::*;

/// Ranks `1..=n` with tied values given the average of the ranks they span
/// (e.g. `[10, 20, 20, 30]` → `[1, 2.5, 2.5, 4]`).
pub fn average_ranks(x: &[f64]) -> Vec<f64> {
    // Sort (value, position) pairs themselves, not an index into `x`: contiguous compares,
    // on rayon's threads.
    let mut sorted: Vec<(f64, usize)> = x.iter().copied().zip(0..).collect();
    sorted.par_sort_unstable_by(|a, b| a.0.total_cmp(&b.0));
    let mut ranks = vec![0.0; x.len()];
    let mut i = 0;
    while i < sorted.len() {
        let v = sorted[i].0;
        let j = i + sorted[i..].iter().take_while(|s| s.0 == v).count();
        let shared = (i + j + 1) as f64 / 2.0;
        for &(_, k) in &sorted[i..j] {
            ranks[k] = shared;
        }
        i = j;
    }
    ranks
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ties_share_the_average_rank() {
        assert_eq!(
            average_ranks(&[10.0, 20.0, 20.0, 30.0]),
            [1.0, 2.5, 2.5, 4.0]
        );
        assert_eq!(average_ranks(&[3.0, 1.0, 2.0]), [3.0, 1.0, 2.0]);
    }
}
