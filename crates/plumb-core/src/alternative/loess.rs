//! LOESS: locally weighted polynomial regression of y on x.

use super::{check, AlternativeError};
use crate::describe;

/// Largest n accepted: each of the n local fits looks at every point (O(n²) in all).
pub const LOESS_MAX_N: usize = 5_000;

/// Fitted LOESS curve at the data's x values.
#[derive(Debug, Clone, PartialEq)]
pub struct LoessFit {
    /// Fraction of the data in each local fit.
    pub span: f64,
    /// Local polynomial degree (1 or 2).
    pub degree: u32,
    /// x values, ascending.
    pub x: Vec<f64>,
    /// Smoothed value at each x.
    pub fitted: Vec<f64>,
    /// Share of the variance of y that the smooth accounts for, `1 − Σ(y − ŷ)²/Σ(y − ȳ)²`.
    pub r_squared: f64,
}

/// LOESS without robustness iterations: at each `x₀`, the `q = ⌈span·n⌉` nearest points get
/// tricube weights `w = (1 − (d/d_max)³)³` (`d_max` the q-th smallest distance, widened by
/// `span` when `span > 1`) and a weighted least-squares polynomial of `degree` is evaluated at `x₀`;
/// where fewer than `degree + 1` distinct x carry weight, the window's weighted mean is used.
///
/// # Errors
/// More than [`LOESS_MAX_N`] pairs, fewer than `degree + 2`, constant x, `span` not in (0, ∞) or giving fewer than
/// `degree + 1` points per fit, or `degree` outside 1..=2.
pub fn loess(x: &[f64], y: &[f64], span: f64, degree: u32) -> Result<LoessFit, AlternativeError> {
    check(x, y, degree as usize + 2)?;
    if x.len() > LOESS_MAX_N {
        return Err(AlternativeError::TooLarge {
            n: x.len(),
            max: LOESS_MAX_N,
        });
    }
    if !(1..=2).contains(&degree) {
        return Err(AlternativeError::InvalidOption(format!(
            "LOESS degree {degree} must be 1 or 2"
        )));
    }
    let n = x.len();
    let q = (span * n as f64).ceil() as usize;
    if !(span.is_finite() && span > 0.0) || q < degree as usize + 1 {
        return Err(AlternativeError::InvalidOption(format!(
            "LOESS span {span} takes {q} of {n} points per local fit; it needs at least {} (try 0.5 to 0.8)",
            degree + 1
        )));
    }
    let q = q.min(n);
    let mut order: Vec<usize> = (0..n).collect();
    order.sort_by(|&a, &b| x[a].total_cmp(&x[b]));
    let xs: Vec<f64> = order.iter().map(|&i| x[i]).collect();
    let ys: Vec<f64> = order.iter().map(|&i| y[i]).collect();
    let fitted: Vec<f64> = xs
        .iter()
        .map(|&x0| local_value(&xs, &ys, x0, q, span, degree))
        .collect();
    let rss: f64 = ys.iter().zip(&fitted).map(|(a, b)| (a - b) * (a - b)).sum();
    let r_squared = 1.0 - rss / describe::sum_sq_dev(&ys, None);
    Ok(LoessFit {
        span,
        degree,
        x: xs,
        fitted,
        r_squared,
    })
}

fn local_value(xs: &[f64], ys: &[f64], x0: f64, q: usize, span: f64, degree: u32) -> f64 {
    let mut dist: Vec<f64> = xs.iter().map(|v| (v - x0).abs()).collect();
    let mut sorted = dist.clone();
    sorted.sort_by(f64::total_cmp);
    let mut d_max = sorted[q - 1];
    if span > 1.0 {
        d_max *= span;
    }
    if d_max == 0.0 {
        d_max = f64::MIN_POSITIVE;
    }
    for d in &mut dist {
        let u = (*d / d_max).min(1.0);
        *d = (1.0 - u * u * u).powi(3);
    }
    // Weighted least squares in powers of (x − x₀): the value at x₀ is the constant term.
    let p = degree as usize + 1;
    let mut xtwx = nalgebra::DMatrix::<f64>::zeros(p, p);
    let mut xtwy = nalgebra::DVector::<f64>::zeros(p);
    for ((xi, yi), wi) in xs.iter().zip(ys).zip(&dist) {
        if *wi == 0.0 {
            continue;
        }
        let t = xi - x0;
        let powers = [1.0, t, t * t];
        for a in 0..p {
            xtwy[a] += wi * powers[a] * yi;
            for b in 0..p {
                xtwx[(a, b)] += wi * powers[a] * powers[b];
            }
        }
    }
    // Too few distinct x with weight in the window for the local polynomial (fewer than its
    // p terms): its system is singular, whatever rounding makes of it, so the weighted mean is
    // used — decided by counting, not by whether a factorization happens to succeed (which
    // would make the result change when x is merely rescaled).
    let mut weighted_x: Vec<f64> = xs
        .iter()
        .zip(&dist)
        .filter(|(_, w)| **w > 0.0)
        .map(|(x, _)| *x)
        .collect();
    weighted_x.sort_by(f64::total_cmp);
    weighted_x.dedup();
    let mean = || xtwy[0] / xtwx[(0, 0)];
    if weighted_x.len() < p {
        return mean();
    }
    match xtwx.clone().cholesky() {
        Some(ch) => ch.solve(&xtwy)[0],
        None => mean(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn a_window_of_two_distinct_x_uses_the_weighted_mean_at_any_scale() {
        // x on three values: at the ends a window of span 0.7 holds two distinct x, too few for
        // a local quadratic. The value must not depend on the units of x (found by the
        // cross-check: 0.3/0.7/1.1 and 3/7/11 once gave different answers).
        let base = [0.3, 0.7, 1.1];
        let x: Vec<f64> = (0..30).map(|i| base[i % 3]).collect();
        let y: Vec<f64> = (0..30)
            .map(|i| f64::from(i % 3) * 2.0 + ((i * 7) % 5) as f64 * 0.1)
            .collect();
        let tenfold: Vec<f64> = x.iter().map(|v| v * 10.0).collect();
        let a = loess(&x, &y, 0.7, 2).expect("defined");
        let b = loess(&tenfold, &y, 0.7, 2).expect("defined");
        for (u, v) in a.fitted.iter().zip(&b.fitted) {
            assert_relative_eq!(*u, *v, max_relative = 1e-12);
        }
    }

    #[test]
    fn reproduces_a_polynomial_of_its_own_degree() {
        let x: Vec<f64> = (0..30).map(|k| f64::from(k) * 0.37).collect();
        let line: Vec<f64> = x.iter().map(|v| 3.0 - 0.5 * v).collect();
        let quad: Vec<f64> = x.iter().map(|v| 1.0 + v - 0.2 * v * v).collect();
        let f1 = loess(&x, &line, 0.4, 1).expect("defined");
        let f2 = loess(&x, &quad, 0.4, 2).expect("defined");
        for (k, xv) in f1.x.iter().enumerate() {
            assert_relative_eq!(f1.fitted[k], 3.0 - 0.5 * xv, epsilon = 1e-9);
            assert_relative_eq!(f2.fitted[k], 1.0 + xv - 0.2 * xv * xv, epsilon = 1e-9);
        }
        assert_relative_eq!(f2.r_squared, 1.0, epsilon = 1e-12);
    }

    #[test]
    fn follows_a_bend_that_a_line_misses() {
        let x: Vec<f64> = (0..40).map(f64::from).collect();
        let y: Vec<f64> = x.iter().map(|v| (v / 6.0).sin()).collect();
        assert!(loess(&x, &y, 0.3, 2).expect("defined").r_squared > 0.99);
    }

    #[test]
    fn refuses_a_span_too_small() {
        let x = [1.0, 2.0, 3.0, 4.0, 5.0];
        assert!(loess(&x, &x, 0.1, 2).is_err());
    }
}
