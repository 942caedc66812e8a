//! Tail probabilities and quantiles of Student's t and Fisher's F.
//!
//! Upper tails are taken straight from the regularized incomplete beta function
//! `I_x(a, b)` (statrs), never as `1 − cdf`, so that a p-value of 1e-40 is as accurate
//! relative to itself as one of 0.3.

use statrs::distribution::{ContinuousCDF, Normal, StudentsT};

use statrs::function::beta::beta_reg;
use statrs::function::gamma::{gamma_ur, ln_gamma};

/// Two-sided p-value of a t statistic with `df` degrees of freedom:
/// `p = P(|T| ≥ |t|) = I_{df/(df+t²)}(df/2, 1/2)`.
///
/// `t = ±∞` gives 0; `NaN` gives `NaN`.
///
/// From [`T_SERIES_FROM`] degrees of freedom on, where `x = ν/(ν + t²)` lies so close to 1 that
/// the incomplete beta loses digits (1e-6 relative at ν = 10⁹, measured against scipy), a
/// moderate t is mapped to the normal deviate `z` with the same tail by inverting
/// [`t_from_normal`] (Newton), and `p = 2Q(z)`; a large t (`t² > ν/100`, p far below 1e-200)
/// keeps the beta route, which is accurate there.
pub fn t_two_sided_p(t: f64, df: f64) -> f64 {
    if t.is_nan() || df.is_nan() || df <= 0.0 {
        return f64::NAN;
    }
    if t.is_infinite() {
        return 0.0;
    }
    if df >= T_SERIES_FROM && t * t <= df / 100.0 {
        return 2.0 * normal_upper_tail(normal_from_t(t.abs(), df));
    }
    let x = df / (df + t * t);
    beta_reg(0.5 * df, 0.5, x)
}

/// Degrees of freedom from which Student's t is taken from its expansion about the normal
/// ([`t_from_normal`]): its first omitted term is below 1e-20 relative there for the
/// deviates the expansion is used for (`z² ≤ ν/100`).
pub const T_SERIES_FROM: f64 = 1e5;

/// The t quantile that has the tail of the normal deviate `z`, by the Cornish–Fisher expansion
/// in `1/ν` (Abramowitz & Stegun 26.7.5):
/// `t = z + g₁/ν + g₂/ν² + g₃/ν³ + g₄/ν⁴` with `g₁ = (z³ + z)/4`,
/// `g₂ = (5z⁵ + 16z³ + 3z)/96`, `g₃ = (3z⁷ + 19z⁵ + 17z³ − 15z)/384`,
/// `g₄ = (79z⁹ + 776z⁷ + 1482z⁵ − 1920z³ − 945z)/92160`.
pub fn t_from_normal(z: f64, df: f64) -> f64 {
    let (z2, r) = (z * z, 1.0 / df);
    let g1 = (z2 + 1.0) * z / 4.0;
    let g2 = ((5.0 * z2 + 16.0) * z2 + 3.0) * z / 96.0;
    let g3 = (((3.0 * z2 + 19.0) * z2 + 17.0) * z2 - 15.0) * z / 384.0;
    let g4 = ((((79.0 * z2 + 776.0) * z2 + 1482.0) * z2 - 1920.0) * z2 - 945.0) * z / 92160.0;
    z + r * (g1 + r * (g2 + r * (g3 + r * g4)))
}

/// The normal deviate with the tail of `t` (`t ≥ 0`), by Newton's method on
/// [`t_from_normal`], which is increasing in z.
fn normal_from_t(t: f64, df: f64) -> f64 {
    let mut z = t;
    for _ in 0..20 {
        let h = 1e-6 * z.abs().max(1e-3);
        let slope = (t_from_normal(z + h, df) - t_from_normal(z - h, df)) / (2.0 * h);
        let step = (t_from_normal(z, df) - t) / slope;
        z -= step;
        if step.abs() <= 1e-16 * z.abs().max(1e-300) {
            break;
        }
    }
    z
}

/// Density of Student's t: `f(t) = Γ((ν+1)/2) / (√(νπ) Γ(ν/2)) · (1 + t²/ν)^{−(ν+1)/2}`.
pub fn t_density(t: f64, df: f64) -> f64 {
    let ln = ln_gamma(0.5 * (df + 1.0))
        - ln_gamma(0.5 * df)
        - 0.5 * (df * std::f64::consts::PI).ln()
        - 0.5 * (df + 1.0) * (t * t / df).ln_1p();
    ln.exp()
}

/// Upper quantile `q` with `P(T > q) = alpha` for Student's t with `df` degrees of freedom
/// (e.g. `alpha = 0.025` gives the multiplier of a 95% two-sided interval).
///
/// Starts from statrs' inverse CDF and polishes with Newton steps on
/// `g(q) = ½·I_{ν/(ν+q²)}(ν/2, ½) − alpha`, `g'(q) = −f(q)`, so the result is accurate to a
/// few units in the last place. From [`T_SERIES_FROM`] degrees of freedom on it is
/// [`t_from_normal`] of the normal quantile (statrs' inverse CDF does not return at about
/// 1.5e7 df).
///
/// # Panics
/// If `alpha` is not in (0, 0.5] or `df` is not positive (caller bugs: levels are validated
/// where users type them).
pub fn t_upper_quantile(alpha: f64, df: f64) -> f64 {
    assert!(alpha > 0.0 && alpha <= 0.5, "alpha must be in (0, 0.5]");
    assert!(df > 0.0, "degrees of freedom must be positive");
    if alpha == 0.5 {
        return 0.0;
    }
    if df >= T_SERIES_FROM {
        // statrs' inverse CDF does not return at ~1.5e7 df; the expansion is exact to rounding.
        let z = normal_upper_quantile(alpha);
        if z * z <= df / 100.0 {
            return t_from_normal(z, df);
        }
    }
    let dist = StudentsT::new(0.0, 1.0, df.min(T_SERIES_FROM)).expect("df > 0 was checked");
    let mut q = dist.inverse_cdf(1.0 - alpha);
    for _ in 0..4 {
        let g = 0.5 * t_two_sided_p(q, df) - alpha;
        let step = g / t_density(q, df);
        q += step;
        if step.abs() <= 1e-16 * q.abs() {
            break;
        }
    }
    q
}

/// Upper-tail probability of Fisher's F with `(d1, d2)` degrees of freedom:
/// `P(F ≥ f) = I_{d2/(d2+d1·f)}(d2/2, d1/2)`; with `d1 = 1`, the two-sided t p-value of `√f`.
/// For `d1 > 1` and millions of `d2` the argument lies close to 1 and digits are lost
/// (against 50-digit values: 2e-11 relative at d2 = 10⁵, 1e-9 at 10⁶, 7e-9 at 10⁷, 2e-6 at
/// 10⁹; the complement route does no better in statrs); it always returns at once.
pub fn f_upper_tail(f: f64, d1: f64, d2: f64) -> f64 {
    if f.is_nan() || d1 <= 0.0 || d2 <= 0.0 {
        return f64::NAN;
    }
    if f.is_infinite() {
        return 0.0;
    }
    if f <= 0.0 {
        return 1.0;
    }
    if d1 == 1.0 {
        // F(1, ν) is t² on ν df: the t route keeps its digits at any ν.
        return t_two_sided_p(f.sqrt(), d2);
    }
    beta_reg(0.5 * d2, 0.5 * d1, d2 / (d2 + d1 * f))
}

/// Median of Fisher's F with `(d1, d2)` degrees of freedom: the `f` with
/// `P(F ≥ f) = ½`, found by bisection on [`f_upper_tail`] (monotone in `f`) to 1e-12
/// relative. `NaN` for non-positive degrees of freedom.
pub fn f_median(d1: f64, d2: f64) -> f64 {
    if !(d1 > 0.0 && d2 > 0.0) {
        return f64::NAN;
    }
    let (mut lo, mut hi) = (0.0f64, 1.0f64);
    while f_upper_tail(hi, d1, d2) > 0.5 {
        hi *= 2.0;
    }
    for _ in 0..200 {
        let mid = 0.5 * (lo + hi);
        if f_upper_tail(mid, d1, d2) > 0.5 {
            lo = mid;
        } else {
            hi = mid;
        }
        if hi - lo <= 1e-12 * hi {
            break;
        }
    }
    0.5 * (lo + hi)
}

/// Where the `i`-th smallest of `n` independent standard normal values lies with probability
/// `1 − alpha`, pointwise: its uniform counterpart `U₍ᵢ₎` follows `Beta(i, n + 1 − i)`, so the
/// interval is `[Φ⁻¹(B⁻¹(α/2)), Φ⁻¹(B⁻¹(1 − α/2))]`. `None` unless `1 ≤ i ≤ n` and
/// `0 < alpha < 1`.
///
/// Above [`ORDER_BAND_EXACT_UP_TO`] values statrs' incomplete beta loses digits (its inverse
/// did not return at all at 10⁷), so the band comes from large-sample forms instead: for the
/// [`ORDER_BAND_GAMMA_RANKS`] ranks nearest either end `U₍ᵢ₎ ≈ Gᵢ/(n + 1)` with
/// `Gᵢ ~ Gamma(i, 1)`, elsewhere `U₍ᵢ₎` normal with mean `p = i/(n + 1)` and variance
/// `p(1 − p)/(n + 2)`. The ends mirror each other exactly. Against the beta route at
/// 2·10⁵ values they agree to within 0.005 in z (tested).
pub fn normal_order_band(i: usize, n: usize, alpha: f64) -> Option<(f64, f64)> {
    if i == 0 || i > n || !(alpha > 0.0 && alpha < 1.0) {
        return None;
    }
    if n <= ORDER_BAND_EXACT_UP_TO {
        return exact_order_band(i, n, alpha);
    }
    let j = n + 1 - i;
    if j < i {
        // The upper half mirrors the lower.
        let (lo, hi) = large_sample_order_band(j, n, alpha)?;
        return Some((-hi, -lo));
    }
    large_sample_order_band(i, n, alpha)
}

/// Sizes up to which [`normal_order_band`] inverts the beta distribution itself.
pub const ORDER_BAND_EXACT_UP_TO: usize = 200_000;
/// Ranks from either end for which the large-sample band uses the gamma form.
pub const ORDER_BAND_GAMMA_RANKS: usize = 1_000;

/// The band through `U₍ᵢ₎ ~ Beta(i, n + 1 − i)`, inverted by statrs.
fn exact_order_band(i: usize, n: usize, alpha: f64) -> Option<(f64, f64)> {
    let b = statrs::distribution::Beta::new(i as f64, (n + 1 - i) as f64).ok()?;
    let z = |q: f64| -normal_upper_quantile(b.inverse_cdf(q));
    Some((z(alpha / 2.0), z(1.0 - alpha / 2.0)))
}

/// The band of rank `i ≤ (n + 1)/2` from the large-sample forms of [`normal_order_band`].
fn large_sample_order_band(i: usize, n: usize, alpha: f64) -> Option<(f64, f64)> {
    let m = (n + 1) as f64;
    let (u_lo, u_hi) = if i <= ORDER_BAND_GAMMA_RANKS {
        let g = statrs::distribution::Gamma::new(i as f64, 1.0).ok()?;
        (
            g.inverse_cdf(alpha / 2.0) / m,
            g.inverse_cdf(1.0 - alpha / 2.0) / m,
        )
    } else {
        let p = i as f64 / m;
        let sd = (p * (1.0 - p) / (m + 1.0)).sqrt();
        let k = normal_upper_quantile(alpha / 2.0);
        (p - k * sd, p + k * sd)
    };
    let z = |u: f64| -normal_upper_quantile(u);
    Some((z(u_lo), z(u_hi)))
}

/// The band of [`normal_order_band`] along a quantile plot of `n` ranks, `score(i)` the
/// plotted normal score of rank `i` (1-based), at up to `points` ranks spread over `1..=n`
/// (the first and last included): `[score, low, high]` per rank. Empty below three ranks.
pub fn normal_order_bands(
    n: usize,
    score: impl Fn(usize) -> f64,
    points: usize,
    alpha: f64,
) -> Vec<[f64; 3]> {
    if n < 3 || points < 2 {
        return Vec::new();
    }
    let steps = points.min(n);
    let mut ranks: Vec<usize> = (0..steps).map(|k| 1 + k * (n - 1) / (steps - 1)).collect();
    ranks.dedup();
    ranks
        .into_iter()
        .filter_map(|i| {
            let (lo, hi) = normal_order_band(i, n, alpha)?;
            Some([score(i), lo, hi])
        })
        .collect()
}

/// Upper tail of the standard normal: `Q(z) = P(Z ≥ z) = ½·erfc(z/√2)`, with the
/// complementary error function of `libm` (the FreeBSD/musl implementation, under one ulp; for
/// negative arguments it returns `2 − erfc(−x)`, so `Q(−3)` keeps its digits too). The one
/// rounding of `z/√2` costs about `z²·ε` relative (7e-15 at z = 8). It replaced the regularized
/// incomplete gamma `½·Γ(½, z²/2)/Γ(½)`, as accurate but about ten times slower, which the
/// normality checks called twice per row.
pub fn normal_upper_tail(z: f64) -> f64 {
    if z.is_nan() {
        return f64::NAN;
    }
    0.5 * libm::erfc(z * std::f64::consts::FRAC_1_SQRT_2)
}

/// `ln Q(z)`, finite however far out z lies: `ln` of [`normal_upper_tail`] up to z = 30, beyond
/// it the asymptotic series `ln Q(z) = −z²/2 − ln(z√(2π)) + ln(1 − 1/z² + 3/z⁴ − 15/z⁶)`
/// (Abramowitz & Stegun 26.2.12; its next term is below 1e-10 relative at z = 30), where
/// `Q(z)` itself would underflow (near z = 38).
pub fn ln_normal_upper_tail(z: f64) -> f64 {
    if z <= 30.0 {
        return normal_upper_tail(z).ln();
    }
    if z.is_infinite() {
        return f64::NEG_INFINITY;
    }
    let r = 1.0 / (z * z);
    -0.5 * z * z - (z * (2.0 * std::f64::consts::PI).sqrt()).ln()
        + (1.0 - r + 3.0 * r * r - 15.0 * r * r * r).ln()
}

/// Upper tail of the chi-square distribution with `df` degrees of freedom:
/// `P(X ≥ x) = Γ(df/2, x/2)/Γ(df/2)` (the regularized upper incomplete gamma).
pub fn chi_square_upper_tail(x: f64, df: f64) -> f64 {
    if x.is_nan() || df.is_nan() || df <= 0.0 {
        return f64::NAN;
    }
    if x <= 0.0 {
        return 1.0;
    }
    if x.is_infinite() {
        return 0.0;
    }
    gamma_ur(0.5 * df, 0.5 * x)
}

/// Upper quantile `z` with `Q(z) = alpha`, from statrs' inverse CDF polished by Newton steps
/// on `Q(z) − alpha` with `Q'(z) = −φ(z) = −e^{−z²/2}/√(2π)`.
///
/// # Panics
/// If `alpha` is not in (0, 1) (a caller bug).
pub fn normal_upper_quantile(alpha: f64) -> f64 {
    assert!(alpha > 0.0 && alpha < 1.0, "alpha must be in (0, 1)");
    let dist = Normal::new(0.0, 1.0).expect("unit normal");
    let mut z = dist.inverse_cdf(1.0 - alpha);
    for _ in 0..3 {
        let density = (-0.5 * z * z).exp() / (2.0 * std::f64::consts::PI).sqrt();
        let step = (normal_upper_tail(z) - alpha) / density;
        z += step;
        if step.abs() <= 1e-16 * z.abs() {
            break;
        }
    }
    z
}

#[cfg(test)]
mod median_tests {
    use super::*;

    #[test]
    fn f_medians_match_scipy() {
        // scipy.stats.f.median(d1, d2), printed by scipy 1.14.1 in this repository's venv.
        for (d1, d2, want) in [
            (2.0, 10.0, 0.743_491_774_985_175_2),
            (1.0, 1.0, 1.0),
            (3.0, 100.0, 0.794_068_738_114_036_2),
        ] {
            let got = f_median(d1, d2);
            assert!((got - want).abs() <= 1e-9 * want, "F({d1}, {d2}): {got}");
        }
        assert!(f_median(0.0, 3.0).is_nan());
    }

    #[test]
    fn large_sample_order_bands_agree_with_the_beta_route_where_both_work() {
        let n = ORDER_BAND_EXACT_UP_TO;
        for i in [
            1,
            2,
            10,
            500,
            1_000,
            1_001,
            5_000,
            50_000,
            100_000,
            n - 999,
            n,
        ] {
            let exact = exact_order_band(i, n, 0.05).expect("beta");
            let j = n + 1 - i;
            let large = if j < i {
                large_sample_order_band(j, n, 0.05).map(|(lo, hi)| (-hi, -lo))
            } else {
                large_sample_order_band(i, n, 0.05)
            }
            .expect("large");
            assert!(
                (exact.0 - large.0).abs() < 0.005 && (exact.1 - large.1).abs() < 0.005,
                "rank {i}: {exact:?} vs {large:?}"
            );
        }
        // Ten million values: the band still comes back, ordered, and symmetric.
        let n = 10_000_000;
        let (lo, hi) = normal_order_band(1, n, 0.05).expect("first");
        assert!(lo < hi && hi < -4.0, "{lo} {hi}");
        assert_eq!(normal_order_band(n, n, 0.05), Some((-hi, -lo)));
        let (a, b) = normal_order_band(n / 2, n, 0.05).expect("middle");
        assert!(a < 0.0 && b > 0.0 && b - a < 0.01, "{a} {b}");
    }

    #[test]
    fn normal_order_bands_match_scipy() {
        // norm.ppf(beta.ppf([0.025, 0.975], i, n + 1 - i)), scipy 1.14.1 in this repository's venv.
        for (i, n, lo, hi) in [
            (1, 20, -3.019_708_708_861_97, -0.960_374_152_634_741_4),
            (10, 20, -0.606_902_379_169_195_4, 0.480_944_047_403_354_67),
            (100, 100, 1.796_384_512_330_064_6, 3.477_405_192_764_768_2),
        ] {
            let (a, b) = normal_order_band(i, n, 0.05).expect("band");
            assert!(
                (a - lo).abs() < 1e-7 && (b - hi).abs() < 1e-7,
                "{i} of {n}: {a} {b}"
            );
        }
        assert!(normal_order_band(0, 5, 0.05).is_none());
        let scores: Vec<f64> = (0..20).map(f64::from).collect();
        let bands = normal_order_bands(20, |i| scores[i - 1], 5, 0.05);
        assert_eq!(bands.len(), 5);
        assert_eq!(
            (bands[0][0], bands[4][0]),
            (0.0, 19.0),
            "first and last rank"
        );
        assert!((bands[0][1] - -3.019_708_708_861_97).abs() < 1e-7);
        assert!(normal_order_bands(2, |i| scores[i - 1], 5, 0.05).is_empty());
        assert!(normal_order_band(6, 5, 0.05).is_none());
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    // Reference values: scipy.stats 1.14.1 (t.sf, t.isf, f.sf), computed on 2026-12-02 and
    // pasted here. statrs' incomplete beta is good to about 1e-10 relative, hence the tolerances.

    #[test]
    fn two_sided_p_of_t_matches_scipy() {
        // scipy: 2*t.sf(2.0, 10) = 0.07338803477074039
        assert_relative_eq!(
            t_two_sided_p(2.0, 10.0),
            0.073_388_034_770_740_39,
            max_relative = 1e-10
        );
        assert_eq!(t_two_sided_p(0.0, 5.0), 1.0);
        assert_eq!(t_two_sided_p(f64::INFINITY, 5.0), 0.0);
    }

    #[test]
    fn tiny_p_values_keep_relative_accuracy() {
        // scipy: 2*t.sf(30, 20) = 4.19522532399964e-18
        assert_relative_eq!(
            t_two_sided_p(30.0, 20.0),
            4.195_225_323_999_64e-18,
            max_relative = 1e-10
        );
    }

    #[test]
    fn t_quantile_matches_scipy() {
        // scipy: t.isf(0.025, 10) = 2.2281388519649385; t.isf(0.005, 3) = 5.8409093097333535
        assert_relative_eq!(
            t_upper_quantile(0.025, 10.0),
            2.228_138_851_964_938_5,
            max_relative = 1e-10
        );
        assert_relative_eq!(
            t_upper_quantile(0.005, 3.0),
            5.840_909_309_733_353_5,
            max_relative = 1e-10
        );
    }

    #[test]
    fn f_tail_matches_scipy_and_the_closed_form() {
        // scipy: f.sf(3.5, 2, 20) = 0.04973502207609711; for d1 = 2 the tail is
        // (1 + d1·f/d2)^(−d2/2) = 1.35^−10 exactly (closed form of the F distribution).
        assert_relative_eq!(
            f_upper_tail(3.5, 2.0, 20.0),
            0.049_735_022_076_097_11,
            max_relative = 1e-10
        );
        assert_relative_eq!(
            f_upper_tail(3.5, 2.0, 20.0),
            1.35_f64.powi(-10),
            max_relative = 1e-10
        );
    }

    #[test]
    fn normal_quantile_matches_scipy() {
        // scipy 1.14.1: norm.isf(0.025) = 1.9599639845400545; norm.sf(3) = 0.0013498980316300933.
        assert_relative_eq!(
            normal_upper_quantile(0.025),
            1.959_963_984_540_054_5,
            max_relative = 1e-14
        );
        assert_relative_eq!(
            normal_upper_tail(3.0),
            0.001_349_898_031_630_093_3,
            max_relative = 1e-14
        );
        assert_relative_eq!(
            normal_upper_tail(-3.0),
            1.0 - 0.001_349_898_031_630_093_3,
            max_relative = 1e-15
        );
        assert_eq!(normal_upper_tail(0.0), 0.5);
    }

    #[test]
    fn density_is_the_derivative_of_the_tail() {
        // d/dt of the two-sided p is −2 f(t): check by central difference.
        let (t, df, h) = (1.3, 7.0, 1e-5);
        let deriv = (t_two_sided_p(t + h, df) - t_two_sided_p(t - h, df)) / (2.0 * h);
        assert_relative_eq!(-0.5 * deriv, t_density(t, df), max_relative = 1e-7);
    }
}

#[cfg(test)]
mod ln_tail_tests {
    use super::*;

    #[test]
    fn the_tail_from_erfc_agrees_with_the_incomplete_gamma_across_the_range() {
        // Q(z) = ½·Γ(½, z²/2)/Γ(½) for z ≥ 0 and ½ + ½·P(½, z²/2) below (statrs' regularized
        // incomplete gamma, the formula used before, itself good to a few ulps): the two agree
        // to a few ulps, growing as z²·ε with the rounding of z/√2.
        for k in (-320..=740).filter(|&k| k != 0) {
            let z = f64::from(k) * 0.05;
            let h = 0.5 * z * z;
            let by_gamma = if z >= 0.0 {
                0.5 * gamma_ur(0.5, h)
            } else {
                0.5 + 0.5 * statrs::function::gamma::gamma_lr(0.5, h)
            };
            let q = normal_upper_tail(z);
            let tol = 2e-15 * (1.0 + z * z);
            assert!(
                (q / by_gamma - 1.0).abs() <= tol,
                "z = {z}: {q} vs {by_gamma}"
            );
        }
        assert_eq!(normal_upper_tail(0.0), 0.5);
        assert_eq!(normal_upper_tail(f64::INFINITY), 0.0);
        assert_eq!(normal_upper_tail(f64::NEG_INFINITY), 1.0);
        assert!(normal_upper_tail(f64::NAN).is_nan());
    }

    #[test]
    fn the_log_tail_joins_the_tail_and_stays_finite_far_out() {
        // Both routes at z = 29 and 31 against the series and the direct value: the join is
        // smooth to 1e-9 relative; far out the value is finite (ln Q(100) ≈ −5005.52, by the
        // series written out by hand: −5000 − ln(100·√(2π)) + ln(1 − 1e-4 + 3e-8)).
        for z in [25.0, 29.0, 30.0] {
            let direct = normal_upper_tail(z).ln();
            let r = 1.0 / (z * z);
            let series = -0.5 * z * z - (z * (2.0 * std::f64::consts::PI).sqrt()).ln()
                + (1.0 - r + 3.0 * r * r - 15.0 * r * r * r).ln();
            assert!(
                (direct / series - 1.0).abs() < 1e-9,
                "{z}: {direct} {series}"
            );
        }
        let far = ln_normal_upper_tail(100.0);
        let by_hand = -5000.0 - (100.0 * (2.0 * std::f64::consts::PI).sqrt()).ln()
            + (1.0 - 1e-4 + 3e-8 - 15e-12_f64).ln();
        assert!((far - by_hand).abs() < 1e-9, "{far}");
        assert!(ln_normal_upper_tail(1e3).is_finite());
    }
}

#[cfg(test)]
mod large_df_tests {
    use super::*;

    /// scipy 1.14.1 `2·stats.t.sf(t, df)` and `stats.t.isf(alpha, df)` on 2026-12-03, pasted.
    const SCIPY: [(f64, f64, f64, f64, f64); 5] = [
        // df, p(|T| ≥ 2.5), p(|T| ≥ 7), q(0.025), q(1e-10)
        (
            1e6,
            0.012419489502163228,
            2.5612241113740765e-12,
            1.959966356814107,
            6.361406848876743,
        ),
        (
            1e7,
            0.012419346536578451,
            2.5597849498534544e-12,
            1.9599642217672055,
            6.361347496998616,
        ),
        (
            1.5e7,
            0.012419341241568854,
            2.5597316614984977e-12,
            1.959964142691482,
            6.361345298799129,
        ),
        (
            1e8,
            0.012419332240054539,
            2.559641073577156e-12,
            1.9599640082627667,
            6.361341561862986,
        ),
        (
            1e9,
            0.01241933081040251,
            2.559626686348195e-12,
            1.9599639869123255,
            6.3613409683499444,
        ),
    ];

    #[test]
    fn t_at_millions_to_billions_of_df_matches_scipy_and_returns() {
        for (df, p25, p7, q025, q1e10) in SCIPY {
            let rel = |a: f64, b: f64| (a / b - 1.0).abs();
            assert!(
                rel(t_two_sided_p(2.5, df), p25) < 1e-12,
                "df {df}: {}",
                t_two_sided_p(2.5, df)
            );
            assert!(
                rel(t_two_sided_p(-7.0, df), p7) < 1e-9,
                "df {df}: {}",
                t_two_sided_p(7.0, df)
            );
            assert!(rel(t_upper_quantile(0.025, df), q025) < 1e-14, "df {df}");
            assert!(rel(t_upper_quantile(1e-10, df), q1e10) < 1e-13, "df {df}");
        }
    }

    #[test]
    #[allow(clippy::excessive_precision)] // the 50-digit values as printed, rounded by the compiler
    fn f_at_huge_denominator_df_keeps_its_digits() {
        // mpmath 1.4.1 betainc at 50 digits on 2026-12-03, pasted: (d2, P(F ≥ 1.01; 3, d2),
        // P(F ≥ 25; 3, d2), P(F ≥ 4; 1, d2)). scipy 1.14.1's own stats.f.sf is off by up to
        // 3e-8 at d2 = 1e9, so the high-precision values are the reference here.
        let cases = [
            (
                1e5,
                0.38702754896986298692,
                3.6732558247460476921e-16,
                0.045502963457506463249,
            ),
            (
                1e6,
                0.38702332403889436089,
                3.6282845487239402304e-16,
                0.045500533851319208421,
            ),
            (
                1e7,
                0.38702290153984131717,
                3.6238155913291427127e-16,
                0.04550029089184295328,
            ),
            (
                1e9,
                0.38702285506487936752,
                3.6233243174918405448e-16,
                0.045500264166313247095,
            ),
        ];
        // d1 > 1 loses digits as d2 grows (measured, documented on f_upper_tail); d1 = 1
        // goes through t and keeps them.
        let tolerance = |d2: f64| if d2 <= 1e7 { 1e-8 } else { 1e-5 };
        for (d2, a, b, c) in cases {
            let rel = |x: f64, y: f64| (x / y - 1.0).abs();
            let (fa, fb, fc) = (
                f_upper_tail(1.01, 3.0, d2),
                f_upper_tail(25.0, 3.0, d2),
                f_upper_tail(4.0, 1.0, d2),
            );
            assert!(rel(fa, a) < tolerance(d2), "d2 {d2}: {fa} vs {a}");
            assert!(rel(fb, b) < tolerance(d2), "d2 {d2}: {fb} vs {b}");
            assert!(rel(fc, c) < 1e-13, "d2 {d2}: {fc} vs {c}");
        }
    }

    #[test]
    fn the_expansion_and_the_beta_route_agree_where_they_meet() {
        // At 1e5 df both routes are accurate: they must agree closely.
        for t in [0.5, 1.96, 4.0, 10.0] {
            let series = 2.0 * normal_upper_tail(normal_from_t(t, 1e5));
            let beta = beta_reg(0.5e5, 0.5, 1e5 / (1e5 + t * t));
            assert!(
                (series / beta - 1.0).abs() < 1e-9,
                "t {t}: {series} vs {beta}"
            );
        }
    }
}
