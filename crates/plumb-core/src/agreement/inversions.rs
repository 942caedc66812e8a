//! Counting strict inversions by merge sort: the pairs a threshold slope puts out of order.

use super::pair_order::Key;

/// Strict inversions (`i < j` with `v[j] < v[i]`) of `v`, which is sorted on return.
pub(super) fn inversions(v: &mut [Key]) -> u64 {
    let mut scratch = v.to_vec();
    count_sort(v, &mut scratch)
}

/// Below this length a piece is sorted by insertion (counting its moves).
const INSERTION_BELOW: usize = 32;
/// From this length on, the two halves are sorted on separate threads.
const PARALLEL_FROM: usize = 1 << 14;

fn count_sort(v: &mut [Key], scratch: &mut [Key]) -> u64 {
    let n = v.len();
    if n < INSERTION_BELOW {
        let mut count = 0u64;
        for i in 1..n {
            let item = v[i];
            let mut j = i;
            while j > 0 && item.less(v[j - 1]) {
                v[j] = v[j - 1];
                j -= 1;
            }
            count += (i - j) as u64;
            v[j] = item;
        }
        return count;
    }
    let mid = n / 2;
    let (left, right) = v.split_at_mut(mid);
    let (ls, rs) = scratch.split_at_mut(mid);
    let (a, b) = if n >= PARALLEL_FROM {
        rayon::join(|| count_sort(left, ls), || count_sort(right, rs))
    } else {
        (count_sort(left, ls), count_sort(right, rs))
    };
    let mut count = a + b;
    let (mut i, mut j, mut k) = (0, mid, 0);
    while i < mid && j < n {
        if v[j].less(v[i]) {
            count += (mid - i) as u64;
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
    scratch[k..].copy_from_slice(&v[j..n]);
    v.copy_from_slice(scratch);
    count
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn counts_strict_inversions_and_sorts() {
        let k = |v: &[f64]| v.iter().map(|&a| Key(a, 0.0)).collect::<Vec<_>>();
        assert_eq!(inversions(&mut k(&[3.0, 1.0, 2.0])), 2);
        assert_eq!(inversions(&mut k(&[1.0, 1.0, 1.0])), 0);
        // A long reversed run with ties, through the parallel merge: n(n−1)/2 minus tied pairs.
        let mut v: Vec<Key> = (0..40_000)
            .rev()
            .map(|i| Key(f64::from(i / 2), 0.0))
            .collect();
        assert_eq!(inversions(&mut v), 40_000 * 39_999 / 2 - 20_000);
        assert!(v.windows(2).all(|w| !w[1].less(w[0])));
    }
}
