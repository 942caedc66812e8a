//! Orders the columns of a correlation matrix so that columns that move together sit together.
//!
//! Method: agglomerative clustering with average linkage (UPGMA) on the dissimilarity
//! `d(i, j) = 1 − |r(i, j)|` (an undefined `r` counts as `d = 1`, no association). At each
//! step the two closest clusters `A`, `B` merge, and the distance of the merged cluster to any
//! other `C` is the size-weighted mean `(|A|·d(A,C) + |B|·d(B,C)) / (|A| + |B|)`. The order is
//! the left-to-right leaf order of the resulting tree, with the earlier-formed (or
//! lower-numbered) cluster on the left. Ties are broken by the lowest pair of indices, so the
//! order is deterministic. Cost O(k³) for k columns, trivial for the few dozen of a heatmap.

/// Leaf order of the average-linkage tree on `1 − |r|`. `r` is a square matrix.
pub fn similarity_order(r: &[Vec<Option<f64>>]) -> Vec<usize> {
    let k = r.len();
    let dissimilarity = |i: usize, j: usize| {
        r[i].get(j)
            .copied()
            .flatten()
            .filter(|v| v.is_finite())
            .map_or(1.0, |v| 1.0 - v.abs().min(1.0))
    };
    // Each live cluster: its leaves in order. `dist[a][b]` between live clusters.
    let mut clusters: Vec<Option<Vec<usize>>> = (0..k).map(|i| Some(vec![i])).collect();
    let mut dist: Vec<Vec<f64>> = (0..k)
        .map(|i| (0..k).map(|j| dissimilarity(i, j)).collect())
        .collect();
    for _ in 1..k {
        let mut best: Option<(usize, usize, f64)> = None;
        for a in 0..k {
            if clusters[a].is_none() {
                continue;
            }
            for b in a + 1..k {
                if clusters[b].is_some() && best.is_none_or(|(_, _, d)| dist[a][b] < d) {
                    best = Some((a, b, dist[a][b]));
                }
            }
        }
        let Some((a, b, _)) = best else { break };
        let right = clusters[b].take().unwrap_or_default();
        let left = clusters[a].get_or_insert_with(Vec::new);
        let (na, nb) = (left.len() as f64, right.len() as f64);
        left.extend(right);
        for c in 0..k {
            if c != a && clusters[c].is_some() {
                let d = (na * dist[a][c] + nb * dist[b][c]) / (na + nb);
                dist[a][c] = d;
                dist[c][a] = d;
            }
        }
    }
    clusters.into_iter().flatten().flatten().collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn matrix(pairs: &[((usize, usize), f64)], k: usize) -> Vec<Vec<Option<f64>>> {
        let mut m = vec![vec![Some(0.0); k]; k];
        for (i, row) in m.iter_mut().enumerate() {
            row[i] = Some(1.0);
        }
        for &((i, j), v) in pairs {
            m[i][j] = Some(v);
            m[j][i] = Some(v);
        }
        m
    }

    #[test]
    fn interleaved_blocks_come_out_adjacent() {
        // Columns 0, 2, 4 move together (|r| ≥ 0.8), as do 1 and 3 (r = −0.9); across blocks
        // |r| ≤ 0.1. Any order that keeps each block contiguous is right; this method gives
        // the blocks in order of their first member.
        let m = matrix(
            &[
                ((0, 2), 0.9),
                ((0, 4), 0.8),
                ((2, 4), 0.85),
                ((1, 3), -0.9),
                ((0, 1), 0.1),
                ((2, 3), 0.05),
            ],
            5,
        );
        assert_eq!(similarity_order(&m), vec![0, 2, 4, 1, 3]);
    }

    #[test]
    fn undefined_cells_count_as_unrelated_and_every_column_appears_once() {
        let mut m = matrix(&[((1, 2), 0.95)], 4);
        m[0][3] = None;
        m[3][0] = None;
        let mut order = similarity_order(&m);
        let pos = |c: usize| order.iter().position(|&v| v == c).expect("present");
        assert_eq!(pos(1).abs_diff(pos(2)), 1);
        order.sort_unstable();
        assert_eq!(order, vec![0, 1, 2, 3]);
        assert!(similarity_order(&[]).is_empty());
    }
}
