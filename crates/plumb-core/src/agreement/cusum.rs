//! The cusum check of linearity that goes with Passing–Bablok regression (Passing & Bablok
//! 1983, section on testing linearity, as recalled).

/// 5% critical value of the Kolmogorov distribution, `h = 1.36` (the paper's value as
/// recalled; the 0.95 quantile of `sup|B(t)|` for a Brownian bridge is 1.3581).
pub const KOLMOGOROV_5_PERCENT: f64 = 1.36;

/// The cusum linearity check of a line through paired data.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Linearity {
    /// Points above the line, `l`.
    pub above: usize,
    /// Points below the line, `L`.
    pub below: usize,
    /// `max_k |Σ_{i≤k} rᵢ|` over the points in order along the line.
    pub statistic: f64,
    /// `h·√(l + L)` with `h` = [`KOLMOGOROV_5_PERCENT`].
    pub bound: f64,
    /// Approximate p-value `Q_K(statistic/√(l + L))` from the Kolmogorov distribution.
    pub p_value: f64,
    /// `statistic > bound`: the points drift to one side of the line along it.
    pub deviates: bool,
}

/// Cusum check of linearity for the line `y = a + b·x`.
///
/// Each point gets the score `rᵢ = √(L/l)` above the line, `−√(l/L)` below it and 0 on it
/// (l points above, L below; all scores 0 when either is 0). The points are put in order of
/// their projection onto the line, `Dᵢ = (xᵢ + b·(yᵢ − a))/√(1 + b²)` (for b > 0 this equals
/// the paper's `(yᵢ + xᵢ/b − a)/√(1 + 1/b²)`; for b < 0 it is that order reversed, which leaves
/// `max|cusum|` unchanged; ties keep row order), and the statistic is the largest absolute
/// cumulative sum of the scores in that order.
///
/// Normalization (our derivation): the scores sum to `√(lL) − √(lL) = 0` and their mean
/// square is `(l·L/l + L·l/L)/(l + L) = 1`, so under linearity (signs in exchangeable order)
/// the cusum is a random bridge of `l + L` unit steps, and `max|cusum|/√(l + L)` tends to the
/// Kolmogorov distribution of `sup|B(t)|`. The 5% decision is `statistic > 1.36·√(l + L)`.
/// The paper, as recalled, writes the bound `h·√(L + 1)`; with these scores that bound would
/// reject a straight line about 30% of the time (seeded simulation, numpy 2.4.6: 0.20 at
/// n = 20, 0.30 at n = 2 000, against 0.03 and 0.05 for `√(l + L)`), so the bound used here is
/// `√(l + L)`. The p-value is asymptotic and somewhat conservative for small n.
///
/// # Panics
/// If the slices differ in length (a caller bug).
pub fn cusum_linearity(x: &[f64], y: &[f64], intercept: f64, slope: f64) -> Linearity {
    assert_eq!(x.len(), y.len(), "paired slices differ in length");
    let residual: Vec<f64> = x
        .iter()
        .zip(y)
        .map(|(xi, yi)| yi - (intercept + slope * xi))
        .collect();
    let above = residual.iter().filter(|&&e| e > 0.0).count();
    let below = residual.iter().filter(|&&e| e < 0.0).count();
    let (up, down) = if above > 0 && below > 0 {
        let (l, big_l) = (above as f64, below as f64);
        ((big_l / l).sqrt(), -(l / big_l).sqrt())
    } else {
        (0.0, 0.0)
    };
    let norm = (1.0 + slope * slope).sqrt();
    let along: Vec<f64> = x
        .iter()
        .zip(y)
        .map(|(xi, yi)| (xi + slope * (yi - intercept)) / norm)
        .collect();
    let mut order: Vec<usize> = (0..x.len()).collect();
    order.sort_by(|&i, &j| along[i].total_cmp(&along[j]));
    let (mut sum, mut statistic) = (0.0_f64, 0.0_f64);
    for i in order {
        sum += if residual[i] > 0.0 {
            up
        } else if residual[i] < 0.0 {
            down
        } else {
            0.0
        };
        statistic = statistic.max(sum.abs());
    }
    let off = (above + below) as f64;
    let bound = KOLMOGOROV_5_PERCENT * off.sqrt();
    let p_value = if off > 0.0 {
        kolmogorov_upper_tail(statistic / off.sqrt())
    } else {
        1.0
    };
    Linearity {
        above,
        below,
        statistic,
        bound,
        p_value,
        deviates: statistic > bound,
    }
}

/// Upper tail of the Kolmogorov distribution, `Q(k) = P(sup|B(t)| > k)` for a Brownian bridge:
/// `Q(k) = 2·Σ_{j≥1} (−1)^{j−1} e^{−2j²k²}` for `k ≥ 1`, and
/// `Q(k) = 1 − (√(2π)/k)·Σ_{j≥1} e^{−(2j−1)²π²/(8k²)}` below 1, where that series converges
/// faster (Kolmogorov 1933; both forms are the standard theta-function identities).
pub fn kolmogorov_upper_tail(k: f64) -> f64 {
    if k.is_nan() {
        return f64::NAN;
    }
    if k <= 0.0 {
        return 1.0;
    }
    if k >= 1.0 {
        let mut total = 0.0;
        for j in 1..=100 {
            let jf = f64::from(j);
            let term = (-2.0 * jf * jf * k * k).exp();
            total += if j % 2 == 1 { term } else { -term };
            if term < 1e-300 {
                break;
            }
        }
        (2.0 * total).clamp(0.0, 1.0)
    } else {
        let pi2 = std::f64::consts::PI * std::f64::consts::PI;
        let mut total = 0.0;
        for j in 1..=100 {
            let odd = f64::from(2 * j - 1);
            let term = (-odd * odd * pi2 / (8.0 * k * k)).exp();
            total += term;
            if term < 1e-300 || term < 1e-17 * total {
                break;
            }
        }
        (1.0 - (2.0 * std::f64::consts::PI).sqrt() / k * total).clamp(0.0, 1.0)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn kolmogorov_tail_matches_scipy() {
        // scipy.special.kolmogorov (scipy 1.17.1, run for this test and pasted):
        // kolmogorov(0.5) = 0.9639452436648751, kolmogorov(1.0) = 0.26999967167735456,
        // kolmogorov(1.36) = 0.049485876755377876, kolmogorov(2.0) = 0.0006709252557796953.
        for (k, q) in [
            (0.5, 0.9639452436648751),
            (1.0, 0.26999967167735456),
            (1.36, 0.049485876755377876),
            (2.0, 0.0006709252557796953),
        ] {
            let got = kolmogorov_upper_tail(k);
            assert!((got / q - 1.0).abs() < 1e-12, "Q({k}) = {got}, scipy {q}");
        }
        assert_eq!(kolmogorov_upper_tail(0.0), 1.0);
    }

    #[test]
    fn scores_by_hand_on_a_small_case() {
        // Line y = x; points above, below, below, on, above along x (worked by hand):
        // l = 2, L = 2, scores ±1; cusum 1, 0, −1, −1, 0 → max |cusum| = 1.
        let x = [1.0, 2.0, 3.0, 4.0, 5.0];
        let y = [1.5, 1.5, 2.5, 4.0, 5.5];
        let c = cusum_linearity(&x, &y, 0.0, 1.0);
        assert_eq!((c.above, c.below), (2, 2));
        assert_eq!(c.statistic, 1.0);
        assert_eq!(c.bound, 1.36 * 2.0);
        assert!(!c.deviates);
    }
}
