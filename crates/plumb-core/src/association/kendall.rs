//! Kendall's τ-b in O(n log n).

use rayon::prelude::*;

use super::{check_pairs, Association, Pairwise};
use crate::distributions;

/// Kendall's `τ_b = (n_c − n_d) / √((n₀ − n₁)(n₀ − n₂))`, with `n₀ = n(n−1)/2`, `n₁` and
/// `n₂` the pairs tied in x and in y, counted in O(n log n) (Knight 1966): sort by (x, y),
/// count ties by runs, and count discordant pairs as inversions of y by merge sort.
///
/// p-value, as scipy's `kendalltau` chooses by default: exact (the permutation distribution
/// of the number of discordant pairs, by the Mahonian recursion) when neither variable has ties
/// and `n ≤ 33` or `min(n_d, n₀ − n_d) ≤ 1`; otherwise the normal approximation with the
/// tie-corrected variance
/// `v = (n(n−1)(2n+5) − Σt(t−1)(2t+5) − Σu(u−1)(2u+5))/18 + 2·n₁n₂/(n(n−1)) + Σt(t−1)(t−2)·Σu(u−1)(u−2)/(9n(n−1)(n−2))`,
/// `z = (n_c − n_d)/√v` (t, u: sizes of tie groups in x and y).
pub fn kendall_tau_b(x: &[f64], y: &[f64]) -> Pairwise {
    check_pairs(x, y, 3)?;
    let n = x.len();
    // Adding 0.0 turns −0.0 into +0.0, so that the total order used for sorting agrees with
    // `==` used for ties (total_cmp alone would sort −0.0 before +0.0 inside a tie).
    // The pairs themselves are sorted (not an index into them), on rayon's threads.
    let mut pairs: Vec<(f64, f64)> = x.iter().zip(y).map(|(a, b)| (a + 0.0, b + 0.0)).collect();
    pairs.par_sort_unstable_by(|a, b| a.0.total_cmp(&b.0).then(a.1.total_cmp(&b.1)));
    let joint = tie_pairs(&pairs);
    let (xs, mut ys): (Vec<f64>, Vec<f64>) = pairs.into_iter().unzip();
    let x_ties = TieCounts::of(&xs);
    let discordant = inversions(&mut ys);
    let y_ties = TieCounts::of(&ys); // ys is now sorted
    let total = (n * (n - 1) / 2) as u128;
    let con_minus_dis = total as f64 - x_ties.pairs as f64 - y_ties.pairs as f64 + joint as f64
        - 2.0 * discordant as f64;
    let tau = (con_minus_dis
        / ((total - x_ties.pairs) as f64).sqrt()
        / ((total - y_ties.pairs) as f64).sqrt())
    .clamp(-1.0, 1.0);
    let exact = x_ties.pairs == 0
        && y_ties.pairs == 0
        && (n <= 33 || discordant.min(total - discordant) <= 1);
    let p_value = if exact {
        exact_p(n, discordant.min(total - discordant))
    } else {
        let nf = n as f64;
        let m = nf * (nf - 1.0);
        let var = (m * (2.0 * nf + 5.0) - x_ties.weighted as f64 - y_ties.weighted as f64) / 18.0
            + 2.0 * x_ties.pairs as f64 * y_ties.pairs as f64 / m
            + x_ties.cubic as f64 * y_ties.cubic as f64 / (9.0 * m * (nf - 2.0));
        2.0 * distributions::normal_upper_tail(con_minus_dis.abs() / var.sqrt())
    };
    Ok(Association {
        r: tau,
        p_value: p_value.min(1.0),
        n,
        ci: None,
    })
}

/// Sums over tie groups of sizes `t`: `Σ t(t−1)/2`, `Σ t(t−1)(t−2)`, `Σ t(t−1)(2t+5)`.
struct TieCounts {
    pairs: u128,
    cubic: u128,
    weighted: u128,
}

impl TieCounts {
    /// From values sorted ascending.
    fn of(sorted: &[f64]) -> Self {
        let mut counts = Self {
            pairs: 0,
            cubic: 0,
            weighted: 0,
        };
        let mut i = 0;
        while i < sorted.len() {
            let t = sorted[i..].iter().take_while(|&&v| v == sorted[i]).count() as u128;
            if t > 1 {
                counts.pairs += t * (t - 1) / 2;
                counts.cubic += t * (t - 1) * (t - 2);
                counts.weighted += t * (t - 1) * (2 * t + 5);
            }
            i += t as usize;
        }
        counts
    }
}

/// Pairs within runs of consecutive equal items of a sorted slice.
fn tie_pairs(sorted: &[(f64, f64)]) -> u128 {
    let mut pairs = 0u128;
    let mut run = 1u128;
    for w in sorted.windows(2) {
        if w[0] == w[1] {
            run += 1;
        } else {
            pairs += run * (run - 1) / 2;
            run = 1;
        }
    }
    pairs + run * (run - 1) / 2
}

/// Below this length a piece is sorted by insertion (counting its moves).
const INSERTION_BELOW: usize = 32;
/// From this length on, the two halves are sorted on separate threads.
const PARALLEL_FROM: usize = 1 << 15;

/// Number of pairs `i < j` with `v[i] > v[j]` (strict), sorting `v` by merge sort: one
/// scratch buffer, insertion sort for short pieces, halves of long pieces in parallel.
fn inversions(v: &mut [f64]) -> u128 {
    let mut scratch = vec![0.0; v.len()];
    count_sort(v, &mut scratch)
}

fn count_sort(v: &mut [f64], scratch: &mut [f64]) -> u128 {
    let n = v.len();
    if n < INSERTION_BELOW {
        let mut count = 0u128;
        for i in 1..n {
            let item = v[i];
            let mut j = i;
            while j > 0 && v[j - 1] > item {
                v[j] = v[j - 1];
                j -= 1;
            }
            count += (i - j) as u128;
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
        if v[j] < v[i] {
            count += (mid - i) as u128;
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

/// Two-sided exact p for `c = min(n_d, n₀ − n_d)` discordant pairs among `n` untied items:
/// `2·Σ_{k≤c} M(n, k)/n!`, `M` the Mahonian numbers (permutations with `k` inversions).
fn exact_p(n: usize, c: u128) -> f64 {
    let c = c as usize;
    if n <= 2 || 4 * c >= n * (n - 1) {
        return 1.0;
    }
    // counts[k] = permutations of j items with k inversions, for k ≤ c; built up j = 1..n.
    let mut counts = vec![0.0f64; c + 1];
    counts[0] = 1.0;
    for j in 2..=n {
        // New row: M(j, k) = Σ_{i=0}^{min(k, j−1)} M(j−1, k−i), by a running window sum.
        let mut next = vec![0.0; c + 1];
        let mut window = 0.0;
        for k in 0..=c {
            window += counts[k];
            if k >= j {
                window -= counts[k - j];
            }
            next[k] = window;
        }
        // Rescale by j to keep the numbers near 1 (we want counts / j!).
        counts = next.into_iter().map(|v| v / j as f64).collect();
    }
    (2.0 * counts.iter().sum::<f64>()).min(1.0)
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    /// Direct O(n²) τ-b from its definition, as a second implementation.
    fn tau_b_direct(x: &[f64], y: &[f64]) -> f64 {
        let (mut s, mut tx, mut ty, mut n0) = (0.0, 0.0, 0.0, 0.0);
        for i in 0..x.len() {
            for j in i + 1..x.len() {
                let (a, b) = ((x[i] - x[j]).signum(), (y[i] - y[j]).signum());
                let (a, b) = (
                    if x[i] == x[j] { 0.0 } else { a },
                    if y[i] == y[j] { 0.0 } else { b },
                );
                s += a * b;
                n0 += 1.0;
                tx += f64::from(u8::from(a == 0.0));
                ty += f64::from(u8::from(b == 0.0));
            }
        }
        s / ((n0 - tx) * (n0 - ty)).sqrt()
    }

    #[test]
    fn agrees_with_the_quadratic_definition_with_ties() {
        let x = [1.0, 2.0, 2.0, 3.0, 5.0, 5.0, 5.0, 4.0, 0.5, 2.0];
        let y = [3.0, 1.0, 1.0, 4.0, 4.0, 2.0, 6.0, 6.0, 0.0, 2.0];
        assert_relative_eq!(
            kendall_tau_b(&x, &y).expect("defined").r,
            tau_b_direct(&x, &y),
            max_relative = 1e-14
        );
    }

    #[test]
    fn negative_zero_ties_with_zero() {
        let x = [0.0, -0.0, 1.0, 0.0, 2.0];
        let y = [3.0, 1.0, 2.0, 0.5, 4.0];
        assert_relative_eq!(
            kendall_tau_b(&x, &y).expect("defined").r,
            tau_b_direct(&x, &y),
            max_relative = 1e-14
        );
    }

    #[test]
    fn exact_p_for_a_perfect_ranking_is_two_over_n_factorial() {
        // All 5 pairs concordant: p = 2/5! = 1/60 (Kendall's exact distribution, by hand).
        let x = [1.0, 2.0, 3.0, 4.0, 5.0];
        let a = kendall_tau_b(&x, &x).expect("defined");
        assert_relative_eq!(a.r, 1.0, max_relative = 1e-15);
        assert_relative_eq!(a.p_value, 1.0 / 60.0, max_relative = 1e-14);
    }

    #[test]
    fn inversion_count_is_strict() {
        assert_eq!(inversions(&mut [3.0, 1.0, 2.0]), 2);
        assert_eq!(inversions(&mut [1.0, 1.0, 1.0]), 0);
    }

    #[test]
    fn parallel_merge_count_agrees_with_a_fenwick_tree_count_on_tied_data() {
        // 70 000 values from 500 levels: long enough for the parallel halves, with many ties.
        let v: Vec<f64> = (0..70_000u64)
            .map(|i| ((i * 2_654_435_761) % 500) as f64)
            .collect();
        // Independent count: for each item, how many earlier items are strictly larger.
        let mut tree = vec![0u64; 501];
        let mut expected = 0u128;
        for (seen, &x) in v.iter().enumerate() {
            let rank = x as usize + 1;
            let (mut at_most, mut i) = (0u64, rank);
            while i > 0 {
                at_most += tree[i];
                i &= i - 1;
            }
            expected += (seen as u64 - at_most) as u128;
            let mut i = rank;
            while i <= 500 {
                tree[i] += 1;
                i += i & i.wrapping_neg();
            }
        }
        let mut sorted = v.clone();
        assert_eq!(inversions(&mut sorted), expected);
        assert!(sorted.windows(2).all(|w| w[0] <= w[1]));
    }
}
