//! Descriptive statistics computed with compensated arithmetic.

use crate::accurate;

/// Weighted mean `x̄_w = Σ wᵢxᵢ / Σ wᵢ` (plain mean when `w` is `None`), with a second
/// correction pass `x̄ += Σ wᵢ(xᵢ − x̄) / Σ wᵢ` so that large offsets do not cost digits.
///
/// Returns `NaN` for an empty slice.
pub fn mean(x: &[f64], w: Option<&[f64]>) -> f64 {
    if x.is_empty() {
        return f64::NAN;
    }
    let (num, den) = match w {
        Some(w) => (accurate::dot(x, w), accurate::sum(w.iter().copied())),
        None => (accurate::sum(x.iter().copied()), x.len() as f64),
    };
    let m = num / den;
    let correction = match w {
        Some(w) => accurate::sum(x.iter().zip(w).map(|(&xi, &wi)| wi * (xi - m))),
        None => accurate::sum(x.iter().map(|&xi| xi - m)),
    };
    m + correction / den
}

/// Weighted sum of squared deviations `Σ wᵢ (xᵢ − x̄_w)²` (two-pass, compensated).
pub fn sum_sq_dev(x: &[f64], w: Option<&[f64]>) -> f64 {
    let m = mean(x, w);
    match w {
        Some(w) => accurate::sum(x.iter().zip(w).map(|(&xi, &wi)| wi * (xi - m) * (xi - m))),
        None => accurate::sum(x.iter().map(|&xi| (xi - m) * (xi - m))),
    }
}

/// `√(Σ wᵢ (xᵢ − x̄_w)²)`, computed on `x / 2^k` (k near log₂ max|x|, exact) so that it
/// neither overflows nor underflows for values near the f64 limits.
pub fn root_sum_sq_dev(x: &[f64], w: Option<&[f64]>) -> f64 {
    let peak = x.iter().fold(0.0_f64, |m, v| m.max(v.abs()));
    if peak == 0.0 || !peak.is_finite() {
        return if peak == 0.0 { 0.0 } else { f64::NAN };
    }
    if w.is_none() && (1e-140..1e140).contains(&peak) {
        // In this range no square or sum of squares can overflow or underflow: one blocked
        // pass of centred co-moments (as accurate as the compensated two-pass form).
        return crate::moments::CoMoments::of(&[x]).comoment(0, 0).sqrt();
    }
    let scale = accurate::power_of_two_near(peak);
    // Dividing by a power of two is exact, so the scaled values are formed on the fly.
    let scaled = || x.iter().map(move |v| v / scale);
    let ss = match w {
        None => {
            let n = x.len() as f64;
            let m = accurate::sum(scaled()) / n;
            let m = m + accurate::sum(scaled().map(|v| v - m)) / n;
            accurate::sum(scaled().map(|v| (v - m) * (v - m)))
        }
        Some(w) => {
            let scaled: Vec<f64> = scaled().collect();
            sum_sq_dev(&scaled, Some(w))
        }
    };
    scale * ss.sqrt()
}

/// Weighted sum of squares about zero `Σ wᵢ xᵢ²`.
pub fn sum_sq(x: &[f64], w: Option<&[f64]>) -> f64 {
    match w {
        Some(w) => accurate::sum(x.iter().zip(w).map(|(&xi, &wi)| wi * xi * xi)),
        None => accurate::dot(x, x),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn mean_of_values_with_a_huge_offset_is_exact() {
        // Offsets of 1e9 with small variation: exact mean 1e9 + 2 (by hand).
        let x = [1e9 + 1.0, 1e9 + 2.0, 1e9 + 3.0];
        assert_eq!(mean(&x, None), 1e9 + 2.0);
        assert_relative_eq!(sum_sq_dev(&x, None), 2.0, max_relative = 1e-15);
    }

    #[test]
    fn weighted_mean_matches_the_definition() {
        // (1·1 + 3·2 + 6·1) / (1 + 2 + 1) = 13/4, by hand.
        assert_relative_eq!(mean(&[1.0, 3.0, 6.0], Some(&[1.0, 2.0, 1.0])), 3.25);
    }
}
