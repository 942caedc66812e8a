//! Tests of Passing–Bablok regression: cases worked by hand, the fast selection against the
//! brute force on many seeded and generated data sets, and the linearity check.

use proptest::prelude::*;
use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;

use super::passing_bablok::passing_bablok_tuned;
use super::slope_rank::Tuning;
use super::*;

/// Windows this small force many narrowing rounds, gap searches and tie handling.
const TIGHT: Tuning = Tuning {
    cap: 30,
    sample: 40,
};
const MEDIUM: Tuning = Tuning {
    cap: 2_000,
    sample: 500,
};

fn same(a: f64, b: f64) -> bool {
    a == b || (a - b).abs() <= 1e-12 * a.abs().max(b.abs())
}

/// The fast route with `tuning` against the brute force: the same counts, and slope,
/// intercept and interval ends equal to 1e-12 relative (or the same error).
fn agree(x: &[f64], y: &[f64], tuning: Tuning, what: &str) {
    let fast = passing_bablok_tuned(x, y, 0.95, tuning);
    let brute = passing_bablok_brute(x, y, 0.95);
    match (&fast, &brute) {
        (Ok(f), Ok(b)) => {
            assert_eq!(
                (f.slopes, f.below_minus_one, f.minus_one),
                (b.slopes, b.below_minus_one, b.minus_one),
                "{what}: counts"
            );
            assert!(
                same(f.slope, b.slope),
                "{what}: slope {} vs {}",
                f.slope,
                b.slope
            );
            assert!(
                same(f.intercept, b.intercept),
                "{what}: intercept {} vs {}",
                f.intercept,
                b.intercept
            );
            match (&f.interval, &b.interval) {
                (Ok(p), Ok(q)) => {
                    for (u, v) in [
                        (p.slope_low, q.slope_low),
                        (p.slope_high, q.slope_high),
                        (p.intercept_low, q.intercept_low),
                        (p.intercept_high, q.intercept_high),
                    ] {
                        assert!(same(u, v), "{what}: interval {p:?} vs {q:?}");
                    }
                }
                (p, q) => assert_eq!(p, q, "{what}: interval"),
            }
        }
        (f, b) => assert_eq!(f.as_ref().err(), b.as_ref().err(), "{what}: outcome"),
    }
}

fn normal(rng: &mut ChaCha8Rng) -> f64 {
    (0..12).map(|_| rng.random::<f64>()).sum::<f64>() - 6.0
}

fn round_to(v: f64, decimals: i32) -> f64 {
    let s = 10f64.powi(decimals);
    (v * s).round() / s
}

/// `y = a + b·x + sd·noise`, with x uniform on [0, 100), both rounded to `decimals` (if any).
fn line(
    n: usize,
    a: f64,
    b: f64,
    sd: f64,
    decimals: Option<i32>,
    seed: u64,
) -> (Vec<f64>, Vec<f64>) {
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    let r = |v: f64| decimals.map_or(v, |d| round_to(v, d));
    (0..n)
        .map(|_| {
            let x = 100.0 * rng.random::<f64>();
            let y = a + b * x + sd * normal(&mut rng);
            (r(x), r(y))
        })
        .unzip()
}

#[test]
fn a_small_case_worked_by_hand() {
    // Rows A(0,0), B(1,3), C(1,1), D(2,0). Slopes in row order: AB 3, AC 1, AD 0, BC −∞
    // (equal x, later y lower), BD −3, CD −1 (left out). Kept: −∞, −3, 0, 1, 3: N = 5, K = 2;
    // b = S₍3+2₎ = 3; a = median(0, 0, −2, −6) = −1. n = 4: C = 1.96·√(4·3·13/18) ≈ 5.77,
    // M₁ = round(−0.39) = 0, so no interval (all by hand).
    let (x, y) = ([0.0, 1.0, 1.0, 2.0], [0.0, 3.0, 1.0, 0.0]);
    for f in [
        passing_bablok(&x, &y, 0.95),
        passing_bablok_brute(&x, &y, 0.95),
    ] {
        let f = f.expect("defined");
        assert_eq!((f.slopes, f.below_minus_one, f.minus_one), (5, 2, 1));
        assert_eq!((f.slope, f.intercept), (3.0, -1.0));
        assert!(matches!(
            f.interval,
            Err(IntervalUndefined::TooFewSlopes { m1: 0, .. })
        ));
    }
}

#[test]
fn order_statistics_of_a_parabola_worked_by_hand() {
    // y = x², x = 0..9: slopes are i + j (i < j), 45 of them, none below −1. Counts of each
    // sum s = 1..17: 1,1,2,2,3,3,4,4,5,4,4,3,3,2,2,1,1, so S₍23₎ = 9, S₍12₎ = 6, S₍34₎ = 12.
    // C = 1.959964·√(10·9·25/18) = 21.91, M₁ = round(11.54) = 12, M₂ = 34.
    // a = median(x² − 9x) = −14, a_L = median(x² − 12x) = −29.5, a_U = median(x² − 6x) = −2.5.
    // (All by hand.)
    let x: Vec<f64> = (0..10).map(f64::from).collect();
    let y: Vec<f64> = x.iter().map(|v| v * v).collect();
    let f = passing_bablok(&x, &y, 0.95).expect("defined");
    assert_eq!((f.slope, f.intercept), (9.0, -14.0));
    let i = f.interval.expect("defined");
    assert_eq!((i.slope_low, i.slope_high), (6.0, 12.0));
    assert_eq!((i.intercept_low, i.intercept_high), (-29.5, -2.5));
    assert!(f.association.tau > 0.99 && !f.association.doubtful);
}

#[test]
fn fast_and_brute_force_agree_on_seeded_data() {
    let mut seed = 0;
    let mut next = || {
        seed += 1;
        seed
    };
    for &n in &[3usize, 4, 5, 7, 10, 25, 60, 150, 400] {
        for decimals in [None, Some(2), Some(1), Some(0)] {
            for (a, b, sd) in [
                (1.0, 1.0, 3.0),
                (-5.0, 0.8, 10.0),
                (50.0, -0.5, 2.0),
                (100.0, -1.0, 0.0),
            ] {
                let (x, y) = line(n, a, b, sd, decimals, next());
                let what = format!("n {n}, decimals {decimals:?}, line {a} + {b}x ± {sd}");
                agree(&x, &y, TIGHT, &what);
                agree(&x, &y, Tuning::for_n(n), &what);
            }
        }
    }
}

#[test]
fn fast_and_brute_force_agree_on_slopes_of_minus_one_and_shared_x() {
    // Integer data around y = 40 − x: many slopes exactly −1; one decimal: near −1 but not
    // exactly, from inexact decimal values; x on a coarse grid: equal-x groups of every size.
    for seed in 0..6 {
        let mut rng = ChaCha8Rng::seed_from_u64(100 + seed);
        let n = 40 + 30 * seed as usize;
        let x: Vec<f64> = (0..n)
            .map(|_| (20.0 * rng.random::<f64>()).round())
            .collect();
        let exact: Vec<f64> = x
            .iter()
            .map(|v| 40.0 - v + (3.0 * normal(&mut rng)).round())
            .collect();
        agree(&x, &exact, TIGHT, "integers around y = 40 − x");
        let xd: Vec<f64> = x.iter().map(|v| v / 10.0 + 0.1).collect();
        let yd: Vec<f64> = exact.iter().map(|v| v / 10.0 + 0.3).collect();
        agree(&xd, &yd, TIGHT, "one decimal around y = 4 − x");
        let rising: Vec<f64> = x.iter().map(|v| 2.0 * v + 5.0 * normal(&mut rng)).collect();
        agree(&x, &rising, TIGHT, "equal-x groups, continuous y");
        agree(&x, &rising, MEDIUM, "equal-x groups, continuous y");
    }
}

#[test]
fn fast_and_brute_force_agree_on_larger_rounded_data() {
    for (n, decimals, seed) in [(1_200, Some(1), 7), (2_000, None, 8), (3_000, Some(0), 9)] {
        let (x, y) = line(n, 2.0, 1.05, 4.0, decimals, seed);
        agree(&x, &y, MEDIUM, &format!("n {n}, decimals {decimals:?}"));
        agree(
            &x,
            &y,
            Tuning::for_n(n),
            &format!("n {n}, decimals {decimals:?}, default"),
        );
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(200))]

    #[test]
    fn fast_agrees_with_brute_force_on_generated_columns(
        points in prop::collection::vec((0i32..30, -40i32..40, 0u8..3), 3..70),
        scale in prop::sample::select(vec![1.0, 0.1, 0.01, 0.25]),
        slope in prop::sample::select(vec![1.0, -1.0, 0.5, 2.0, -0.3]),
    ) {
        let x: Vec<f64> = points.iter().map(|p| f64::from(p.0) * scale).collect();
        let y: Vec<f64> = points
            .iter()
            .map(|p| slope * f64::from(p.0) * scale + f64::from(p.1 / (1 + i32::from(p.2))) * scale)
            .collect();
        agree(&x, &y, TIGHT, "generated");
    }
}

#[test]
fn errors_name_the_problem() {
    assert_eq!(
        passing_bablok(&[1.0, 2.0, f64::INFINITY], &[1.0, 2.0, 3.0], 0.95).err(),
        Some(AgreementError::NonFinite {
            column: "x",
            row: 2
        })
    );
    assert_eq!(
        passing_bablok(&[2.0, 2.0, 2.0], &[1.0, 2.0, 3.0], 0.95).err(),
        Some(AgreementError::Constant {
            column: "x",
            value: 2.0
        })
    );
    assert_eq!(
        passing_bablok(&[1.0, 2.0], &[1.0, 2.0], 0.95).err(),
        Some(AgreementError::TooFewPairs { n: 2, needed: 3 })
    );
    // y = 10 − x: every slope is −1.
    assert_eq!(
        passing_bablok(&[1.0, 2.0, 3.0], &[9.0, 8.0, 7.0], 0.95).err(),
        Some(AgreementError::NoSlopes)
    );
    // y = −3x: every slope is −3, below −1, which pushes the shifted median out.
    assert!(matches!(
        passing_bablok(&[1.0, 2.0, 3.0, 4.0], &[-3.0, -6.0, -9.0, -12.0], 0.95),
        Err(AgreementError::ShiftOutOfRange {
            slopes: 6,
            below_minus_one: 6
        })
    ));
    assert!(matches!(
        passing_bablok(&[1.0, 2.0, 3.0], &[1.0, 3.0, 2.0], 1.5),
        Err(AgreementError::InvalidOption(_))
    ));
}

#[test]
fn a_straight_line_has_the_identity_as_its_fit() {
    // y = 2x + 1 exactly: every slope is 2, so b, both slope ends and a are exact (by hand);
    // n = 10: M₁ = 12, M₂ = 34 of N = 45.
    let x: Vec<f64> = (0..10).map(f64::from).collect();
    let y: Vec<f64> = x.iter().map(|v| 2.0 * v + 1.0).collect();
    let f = passing_bablok(&x, &y, 0.95).expect("defined");
    assert_eq!((f.slope, f.intercept), (2.0, 1.0));
    let i = f.interval.expect("defined");
    assert_eq!(
        (i.slope_low, i.slope_high, i.intercept_low, i.intercept_high),
        (2.0, 2.0, 1.0, 1.0)
    );
    assert_eq!(f.linearity.statistic, 0.0);
}

#[test]
fn the_cusum_check_flags_a_curve_and_passes_a_line() {
    let mut rng = ChaCha8Rng::seed_from_u64(42);
    let x: Vec<f64> = (1..=80).map(f64::from).collect();
    let curved: Vec<f64> = x
        .iter()
        .map(|v| v * v / 40.0 + 0.5 * normal(&mut rng))
        .collect();
    let straight: Vec<f64> = x
        .iter()
        .map(|v| 3.0 + 1.1 * v + 4.0 * normal(&mut rng))
        .collect();
    let c = passing_bablok(&x, &curved, 0.95)
        .expect("defined")
        .linearity;
    let s = passing_bablok(&x, &straight, 0.95)
        .expect("defined")
        .linearity;
    assert!(c.deviates && c.p_value < 0.01, "curve: {c:?}");
    assert!(!s.deviates && s.p_value > 0.05, "line: {s:?}");
}

#[test]
fn a_doubtful_association_is_flagged() {
    // Unrelated columns: τ near 0 (p well above 0.05).
    let mut rng = ChaCha8Rng::seed_from_u64(5);
    let x: Vec<f64> = (0..40).map(|_| rng.random::<f64>()).collect();
    let y: Vec<f64> = (0..40).map(|_| rng.random::<f64>()).collect();
    let f = passing_bablok(&x, &y, 0.95).expect("defined");
    assert!(f.association.doubtful, "{:?}", f.association);
}
