//! Ranks with ties shared.

/// Ranks `1..=n` with tied values given the average of the ranks they span
/// (e.g. `[10, 20, 20, 30]` → `[1, 2.5, 2.5, 4]`).
pub fn average_ranks(x: &[f64]) -> Vec<f64> {
    let mut order: Vec<usize> = (0..x.len()).collect();
    order.sort_by(|&a, &b| x[a].total_cmp(&x[b]));
    let mut ranks = vec![0.0; x.len()];
    let mut i = 0;
    while i < order.len() {
        let j = i + order[i..]
            .iter()
            .take_while(|&&k| x[k] == x[order[i]])
            .count();
        let shared = (i + j + 1) as f64 / 2.0;
        for &k in &order[i..j] {
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
