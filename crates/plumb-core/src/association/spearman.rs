//! Spearman's rank correlation.

use super::pearson::{p_from_r, pearson};
use super::rank::average_ranks;
use super::{check_pairs, Association, Pairwise};

/// Spearman's `ρ`: Pearson's r of the average ranks (ties share their mean rank).
///
/// p-value: the t approximation `t = ρ√(n−2)/√(1−ρ²)` on `n − 2` degrees of freedom (as
/// scipy's `spearmanr` computes it by default). No interval is given.
pub fn spearman(x: &[f64], y: &[f64]) -> Pairwise {
    check_pairs(x, y, 3)?;
    let (rx, ry) = (average_ranks(x), average_ranks(y));
    let r = pearson(&rx, &ry, 0.95)?.r;
    Ok(Association {
        r,
        p_value: p_from_r(r, (x.len() - 2) as f64),
        n: x.len(),
        ci: None,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn monotone_but_curved_is_one() {
        let x = [1.0, 2.0, 3.0, 4.0, 5.0];
        let y: Vec<f64> = x.iter().map(|v: &f64| v.exp()).collect();
        approx::assert_relative_eq!(
            spearman(&x, &y).expect("defined").r,
            1.0,
            max_relative = 1e-15
        );
    }
}
