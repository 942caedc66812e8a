//! Normality of residuals: Shapiro–Wilk (Royston's approximation) and Anderson–Darling.

use rayon::prelude::*;

use super::{finite, CheckError};
use crate::distributions::{ln_normal_upper_tail, normal_upper_quantile, normal_upper_tail};

/// Largest sample Royston's Shapiro–Wilk approximation is calibrated for.
pub const SHAPIRO_WILK_MAX_N: usize = 5_000;

/// A test of normality: its statistic and p-value.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Normality {
    /// The statistic (W for Shapiro–Wilk, A² for Anderson–Darling).
    pub statistic: f64,
    /// Probability of a statistic this far from normal if the data were normal.
    pub p_value: f64,
    /// Whether `p_value` is only an upper bound: the statistic lies beyond the range the
    /// p-value's formula was published for, and the p-value is known only to be below it.
    pub p_is_bound: bool,
}

/// Largest `A*²` the D'Agostino–Stephens p-value formula covers (its table ends there;
/// beyond it the fitted curve turns up again and would give nonsense).
pub const ANDERSON_DARLING_TABLE_END: f64 = 13.0;

/// `Σ cₖ xᵏ` (coefficients from the constant up), Horner's rule.
fn poly(c: &[f64], x: f64) -> f64 {
    c.iter().rev().fold(0.0, |acc, &ck| acc * x + ck)
}

/// Φ⁻¹(q), the standard normal quantile.
fn probit(q: f64) -> f64 {
    if q < 0.5 {
        -normal_upper_quantile(q)
    } else {
        normal_upper_quantile(1.0 - q)
    }
}

/// Shapiro–Wilk test, `W = (Σ aᵢ x₍ᵢ₎)² / Σ (xᵢ − x̄)²` over the sorted sample, with the
/// coefficients `aᵢ` and the p-value of Royston (1995, Applied Statistics algorithm AS R94):
/// `mᵢ = Φ⁻¹((i − 3/8)/(n + 1/4))`, the two outermost coefficients from polynomials in `1/√n`
/// and the rest `mᵢ` rescaled so that `Σ aᵢ² = 1`; for `n = 3`, `p = (6/π)(asin √W − asin √¾)`;
/// for `4 ≤ n ≤ 11`, `−ln(γ − ln(1 − W))` with `γ = 0.459n − 2.273` is normal with mean and log-SD
/// cubic in n; for `n ≥ 12`, `ln(1 − W)` is normal with mean cubic and log-SD quadratic in ln n.
/// This is the algorithm scipy's `stats.shapiro` implements; the constants are those published
/// with AS R94.
///
/// # Errors
/// Fewer than 3 or more than [`SHAPIRO_WILK_MAX_N`] values, a non-finite value, or no spread.
pub fn shapiro_wilk(values: &[f64]) -> Result<Normality, CheckError> {
    let n = values.len();
    if n < 3 {
        return Err(CheckError::TooFew { n, needed: 3 });
    }
    if n > SHAPIRO_WILK_MAX_N {
        return Err(CheckError::TooFew {
            n: SHAPIRO_WILK_MAX_N,
            needed: n,
        });
    }
    finite(values)?;
    let mut x = values.to_vec();
    x.sort_by(f64::total_cmp);
    let mean = crate::describe::mean(&x, None);
    let ss = crate::accurate::sum(x.iter().map(|v| (v - mean) * (v - mean)));
    if ss == 0.0 {
        return Err(CheckError::NoSpread);
    }
    let half = shapiro_wilk_coefficients(n);
    // Antisymmetric weights: −a₁ … for the smallest values, +a₁ for the largest.
    let numerator = crate::accurate::sum(
        half.iter()
            .enumerate()
            .map(|(i, a)| a * (x[n - 1 - i] - x[i])),
    );
    let w = (numerator * numerator / ss).min(1.0);
    Ok(Normality {
        statistic: w,
        p_value: shapiro_wilk_p(w, n),
        p_is_bound: false,
    })
}

/// The upper half of the Shapiro–Wilk coefficients `a₁ ≥ a₂ ≥ … > 0` (Royston 1995).
fn shapiro_wilk_coefficients(n: usize) -> Vec<f64> {
    const C1: [f64; 6] = [0.0, 0.221157, -0.147981, -2.07119, 4.434685, -2.706056];
    const C2: [f64; 6] = [0.0, 0.042981, -0.293762, -1.752461, 5.682633, -3.582633];
    if n == 3 {
        return vec![std::f64::consts::FRAC_1_SQRT_2];
    }
    let nf = n as f64;
    let m: Vec<f64> = (1..=n / 2)
        .map(|i| probit((i as f64 - 0.375) / (nf + 0.25)))
        .collect();
    let summ2 = 2.0 * m.iter().map(|v| v * v).sum::<f64>();
    let ssumm2 = summ2.sqrt();
    let rsn = 1.0 / nf.sqrt();
    let a1 = poly(&C1, rsn) - m[0] / ssumm2;
    let mut a = vec![0.0; n / 2];
    a[0] = a1;
    let (first_scaled, fac) = if n > 5 {
        let a2 = -m[1] / ssumm2 + poly(&C2, rsn);
        a[1] = a2;
        let fac = ((summ2 - 2.0 * m[0] * m[0] - 2.0 * m[1] * m[1])
            / (1.0 - 2.0 * a1 * a1 - 2.0 * a2 * a2))
            .sqrt();
        (2, fac)
    } else {
        let fac = ((summ2 - 2.0 * m[0] * m[0]) / (1.0 - 2.0 * a1 * a1)).sqrt();
        (1, fac)
    };
    for i in first_scaled..n / 2 {
        a[i] = -m[i] / fac;
    }
    a
}

/// Royston's p-value of W for a sample of n.
fn shapiro_wilk_p(w: f64, n: usize) -> f64 {
    const G: [f64; 2] = [-2.273, 0.459];
    const C3: [f64; 4] = [0.544, -0.39978, 0.025054, -6.714e-4];
    const C4: [f64; 4] = [1.3822, -0.77857, 0.062767, -0.0020322];
    const C5: [f64; 4] = [-1.5861, -0.31082, -0.083751, 0.0038915];
    const C6: [f64; 3] = [-0.4803, -0.082676, 0.0030302];
    let nf = n as f64;
    if n == 3 {
        let p = 6.0 / std::f64::consts::PI * (w.sqrt().asin() - 0.75_f64.sqrt().asin());
        return p.clamp(0.0, 1.0);
    }
    if w >= 1.0 {
        return 1.0;
    }
    let w1 = (1.0 - w).ln();
    let (y, mean, sd) = if n <= 11 {
        let gamma = poly(&G, nf);
        if w1 >= gamma {
            return 0.0;
        }
        (-(gamma - w1).ln(), poly(&C3, nf), poly(&C4, nf).exp())
    } else {
        let ln_n = nf.ln();
        (w1, poly(&C5, ln_n), poly(&C6, ln_n).exp())
    };
    normal_upper_tail((y - mean) / sd)
}

/// Anderson–Darling test of normality with the mean and variance estimated from the sample:
/// `A² = −n − (1/n) Σᵢ (2i − 1)[ln Φ(z₍ᵢ₎) + ln(1 − Φ(z₍ₙ₊₁₋ᵢ₎))]`, `zᵢ = (xᵢ − x̄)/s` with the
/// n − 1 divisor in s (as scipy's `stats.anderson`). The p-value is that of D'Agostino and
/// Stephens (1986, Goodness-of-Fit Techniques, table 4.9; constants quoted from memory and
/// checked against statsmodels' `normal_ad`) for the modified `A*² = A²(1 + 0.75/n + 2.25/n²)`.
/// Above `A*² = 13`, where the published formula ends, the p-value is reported as the bound
/// at 13 (`p < 4.95e-31`, [`Normality::p_is_bound`]), as statsmodels reports 0 there.
///
/// # Errors
/// Fewer than 8 values, a non-finite value, or no spread.
pub fn anderson_darling(values: &[f64]) -> Result<Normality, CheckError> {
    let n = values.len();
    if n < 8 {
        return Err(CheckError::TooFew { n, needed: 8 });
    }
    finite(values)?;
    let mut x = values.to_vec();
    // Equal under total_cmp means the same bits, so an unstable sort gives the same order.
    x.par_sort_unstable_by(f64::total_cmp);
    let nf = n as f64;
    let mean = crate::describe::mean(&x, None);
    let sd = (crate::describe::sum_sq_dev(&x, None) / (nf - 1.0)).sqrt();
    if sd == 0.0 {
        return Err(CheckError::NoSpread);
    }
    let z = |v: f64| (v - mean) / sd;
    // The terms on all cores, then summed in order as before: the same sum to the bit.
    let terms: Vec<f64> = (0..n)
        .into_par_iter()
        .map(|i| {
            let lower = ln_normal_upper_tail(-z(x[i]));
            let upper = ln_normal_upper_tail(z(x[n - 1 - i]));
            (2.0 * i as f64 + 1.0) * (lower + upper)
        })
        .collect();
    let s = crate::accurate::sum(terms.iter().copied());
    let a2 = -nf - s / nf;
    let a = a2 * (1.0 + 0.75 / nf + 2.25 / (nf * nf));
    let beyond = a > ANDERSON_DARLING_TABLE_END;
    let a = a.min(ANDERSON_DARLING_TABLE_END);
    let p = if a >= 0.6 {
        (1.2937 - 5.709 * a + 0.0186 * a * a).exp()
    } else if a >= 0.34 {
        (0.9177 - 4.279 * a - 1.38 * a * a).exp()
    } else if a >= 0.2 {
        1.0 - (-8.318 + 42.796 * a - 59.938 * a * a).exp()
    } else {
        1.0 - (-13.436 + 101.14 * a - 223.73 * a * a).exp()
    };
    Ok(Normality {
        statistic: a2,
        p_value: p.clamp(0.0, 1.0),
        p_is_bound: beyond,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_statistic_past_the_table_gives_a_bound_not_a_p_of_one() {
        // exp of evenly spaced normal-ish scores: a strongly skewed sample of 6000 (A² in the
        // hundreds). Before the table's end was respected, p came out as 1.
        let n = 6000;
        let v: Vec<f64> = (1..=n)
            .map(|i| (3.0 * normal_upper_quantile(1.0 - (i as f64 - 0.5) / n as f64)).exp())
            .collect();
        let r = anderson_darling(&v).expect("defined");
        assert!(r.statistic > 100.0, "{}", r.statistic);
        assert!(r.p_is_bound && r.p_value < 5e-31, "{r:?}");
        // Inside the table the p-value is an ordinary one.
        let calm: Vec<f64> = (1..=200)
            .map(|i| normal_upper_quantile(1.0 - (f64::from(i) - 0.5) / 200.0))
            .collect();
        let c = anderson_darling(&calm).expect("defined");
        assert!(!c.p_is_bound && c.p_value > 0.5, "{c:?}");
    }

    #[test]
    fn coefficients_have_unit_length() {
        for n in [4, 5, 6, 11, 12, 50, 5000] {
            let a = shapiro_wilk_coefficients(n);
            let ss: f64 = 2.0 * a.iter().map(|v| v * v).sum::<f64>();
            assert!((ss - 1.0).abs() < 1e-12, "n = {n}: Σa² = {ss}");
            assert!(a.windows(2).all(|w| w[0] >= w[1]), "n = {n}: decreasing");
        }
    }

    #[test]
    fn evenly_spaced_normal_scores_look_normal_and_a_skewed_sample_does_not() {
        let n = 60;
        let scores: Vec<f64> = (1..=n)
            .map(|i| probit((i as f64 - 0.375) / (n as f64 + 0.25)))
            .collect();
        let skewed: Vec<f64> = scores.iter().map(|z| (1.5 * z).exp()).collect();
        let sw = shapiro_wilk(&scores).expect("defined");
        assert!(sw.statistic > 0.99 && sw.p_value > 0.5, "{sw:?}");
        assert!(shapiro_wilk(&skewed).expect("defined").p_value < 1e-4);
        assert!(anderson_darling(&scores).expect("defined").p_value > 0.5);
        assert!(anderson_darling(&skewed).expect("defined").p_value < 1e-3);
    }

    /// `((i·7919 mod 101)/10)^1.3 + i/10` for i = 0..37: skewed, with no ties.
    fn skewed_sample() -> Vec<f64> {
        (0..37)
            .map(|i| ((i * 7919 % 101) as f64 / 10.0).powf(1.3) + i as f64 * 0.1)
            .collect()
    }

    #[test]
    fn shapiro_wilk_matches_scipy() {
        // scipy 1.14.1 stats.shapiro on 2026-12-02, pasted: (0.9668652505040336,
        // 0.3299769138089207) for all 37, (0.9452695043687562, 0.6865407869062907) for the first
        // 7. scipy's own W is good to about 1e-9 here (its coefficients differ in the 10th digit).
        let x = skewed_sample();
        let all = shapiro_wilk(&x).expect("defined");
        let seven = shapiro_wilk(&x[..7]).expect("defined");
        assert!((all.statistic - 0.9668652505040336).abs() < 1e-9);
        assert!((all.p_value / 0.3299769138089207 - 1.0).abs() < 1e-7);
        assert!((seven.statistic - 0.9452695043687562).abs() < 1e-9);
        assert!((seven.p_value / 0.6865407869062907 - 1.0).abs() < 1e-7);
    }

    #[test]
    fn anderson_darling_matches_statsmodels() {
        // statsmodels 0.14.4 stats.diagnostic.normal_ad on 2026-12-02, pasted:
        // (0.3495744982851079, 0.4551993416013817); scipy's stats.anderson gives the same A².
        let r = anderson_darling(&skewed_sample()).expect("defined");
        assert!((r.statistic / 0.3495744982851079 - 1.0).abs() < 1e-12);
        assert!((r.p_value / 0.4551993416013817 - 1.0).abs() < 1e-12);
    }

    #[test]
    fn three_values_use_the_exact_form() {
        // Equally spaced: W = 1 exactly, p = 1 (6/π·(π/2 − π/3) = 1, by hand).
        let r = shapiro_wilk(&[1.0, 2.0, 3.0]).expect("defined");
        assert!((r.statistic - 1.0).abs() < 1e-12);
        assert!((r.p_value - 1.0).abs() < 1e-9);
    }
}
