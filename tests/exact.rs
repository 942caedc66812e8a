//! Least squares against an exact reference computed in the test: the normal equations
//! `XᵀX β = Xᵀy` solved in exact rational arithmetic (num-rational over num-bigint) from the
//! very doubles the solver sees, then rounded once to f64. No cancellation is possible in the
//! reference, so the comparison measures the solver alone — on the cases where floating
//! point is weakest: a huge offset with small variation, three rows, nearly collinear
//! predictors.

use num_rational::BigRational;
use num_traits::{One, ToPrimitive, Zero};
use plumb_core::regression::{fit, Design, FitOptions};
use plumb_tests::lre;

fn rational(v: f64) -> BigRational {
    BigRational::from_float(v).expect("finite")
}

/// The design's columns as exact rationals. A polynomial's powers are taken of its source x
/// exactly (the solver works from x too, not from rounded powers).
fn exact_columns(design: &Design) -> Vec<Vec<BigRational>> {
    match design.polynomial_source() {
        Some(x) => {
            let first = u32::from(!design.has_intercept());
            (0..design.n_terms() as u32)
                .map(|j| {
                    x.iter()
                        .map(|&v| num_traits::pow(rational(v), (j + first) as usize))
                        .collect()
                })
                .collect()
        }
        None => design
            .columns()
            .iter()
            .map(|c| c.iter().map(|&v| rational(v)).collect())
            .collect(),
    }
}

/// The exact least-squares numbers of a design on `y`, each rounded once to f64 at the end.
struct Exact {
    beta: Vec<f64>,
    se: Vec<f64>,
    sigma: f64,
    r_squared: f64,
}

/// Solves `XᵀX β = Xᵀy` and inverts `XᵀX` in exact rational arithmetic (Gauss–Jordan on
/// `[XᵀX | Xᵀy | I]`), then forms `RSS`, `σ̂² = RSS/(n − p)`, `SEⱼ = √(σ̂²·[(XᵀX)⁻¹]ⱼⱼ)` and
/// `R² = 1 − RSS/TSS` exactly (the square roots are taken of the exact values rounded once).
fn exact(design: &Design, y: &[f64]) -> Exact {
    let xs = exact_columns(design);
    let p = xs.len();
    let n = y.len();
    let ys: Vec<BigRational> = y.iter().map(|&v| rational(v)).collect();
    let dot = |a: &[BigRational], b: &[BigRational]| {
        a.iter()
            .zip(b)
            .fold(BigRational::zero(), |s, (u, v)| s + u * v)
    };
    let mut a: Vec<Vec<BigRational>> = (0..p)
        .map(|i| {
            let mut row: Vec<BigRational> = (0..p).map(|j| dot(&xs[i], &xs[j])).collect();
            row.push(dot(&xs[i], &ys));
            row.extend((0..p).map(|j| {
                if i == j {
                    BigRational::one()
                } else {
                    BigRational::zero()
                }
            }));
            row
        })
        .collect();
    gauss_jordan(&mut a, p);
    let beta: Vec<BigRational> = a.iter().map(|row| row[p].clone()).collect();
    let residual: Vec<BigRational> = (0..n)
        .map(|k| {
            let fitted = (0..p).fold(BigRational::zero(), |s, j| s + &xs[j][k] * &beta[j]);
            &ys[k] - fitted
        })
        .collect();
    let rss = dot(&residual, &residual);
    let s2 = &rss / BigRational::from_integer(((n - p) as i64).into());
    let tss = if design.has_intercept() {
        let mean = ys.iter().fold(BigRational::zero(), |s, v| s + v)
            / BigRational::from_integer((n as i64).into());
        ys.iter()
            .map(|v| (v - &mean) * (v - &mean))
            .fold(BigRational::zero(), |s, v| s + v)
    } else {
        dot(&ys, &ys)
    };
    let f = |v: &BigRational| v.to_f64().expect("representable");
    Exact {
        beta: beta.iter().map(f).collect(),
        se: (0..p)
            .map(|j| f(&(&s2 * &a[j][p + 1 + j])).sqrt())
            .collect(),
        sigma: f(&s2).sqrt(),
        r_squared: f(&(BigRational::one() - &rss / &tss)),
    }
}

/// Gauss–Jordan elimination of the first `p` columns of `a`; exact, so any non-zero pivot
/// will do.
fn gauss_jordan(a: &mut [Vec<BigRational>], p: usize) {
    for col in 0..p {
        let pivot = (col..p).find(|&r| !a[r][col].is_zero()).expect("full rank");
        a.swap(col, pivot);
        let lead = a[col][col].clone();
        for v in a[col].iter_mut() {
            *v = &*v / &lead;
        }
        let pivot_row = a[col].clone();
        for (r, row) in a.iter_mut().enumerate() {
            if r != col && !row[col].is_zero() {
                let f = row[col].clone();
                for (v, pv) in row.iter_mut().zip(&pivot_row).skip(col) {
                    *v = &*v - &f * pv;
                }
            }
        }
    }
}

/// Fits and checks every reported number against the exact reference: estimates, standard
/// errors, t (from the exact estimate and SE), interval ends (with the fit's own t quantile,
/// so they measure the estimate and SE), σ̂ and R² — each LRE at least `floor`.
fn check(name: &str, design: &Design, y: &[f64], floor: f64) {
    let f = fit(design, y, None, &FitOptions::default()).expect("fits");
    let want = exact(design, y);
    let first = &f.coefficients[0];
    let q = (first.ci_high - first.estimate) / first.std_error;
    let mut scores = Vec::new();
    for (j, c) in f.coefficients.iter().enumerate() {
        let (b, se) = (want.beta[j], want.se[j]);
        for (what, got, exact) in [
            ("estimate", c.estimate, b),
            ("SE", c.std_error, se),
            ("t", c.t, b / se),
            ("interval low", c.ci_low, b - q * se),
            ("interval high", c.ci_high, b + q * se),
        ] {
            scores.push((format!("{} {what}", c.term), lre(got, exact), got, exact));
        }
    }
    let (s, r2) = (f.residual_std_error, f.r_squared);
    scores.push(("σ̂".into(), lre(s, want.sigma), s, want.sigma));
    scores.push(("R²".into(), lre(r2, want.r_squared), r2, want.r_squared));
    for (what, l, got, exact) in &scores {
        println!("{name}: {what} = {got:e} (exact {exact:e}), LRE {l:.1}");
    }
    let (what, worst, ..) = scores
        .iter()
        .min_by(|a, b| a.1.total_cmp(&b.1))
        .expect("numbers");
    assert!(
        *worst >= floor,
        "{name}: {what} LRE {worst:.1} below {floor}"
    );
}

/// A small deterministic wobble in [−0.5, 0.5).
fn wobble(k: usize) -> f64 {
    ((k * 7919 + 13) % 101) as f64 / 101.0 - 0.5
}

#[test]
fn a_huge_offset_with_small_variation_keeps_its_digits() {
    // x = 1e9 + k/10: the variation lives in the last 6 or 7 of the 16 digits.
    let x: Vec<f64> = (1..=40).map(|k| 1e9 + f64::from(k) / 10.0).collect();
    let y: Vec<f64> = (1..=40)
        .map(|k| 5.0 + 0.8 * f64::from(k) / 10.0 + 0.05 * wobble(k as usize))
        .collect();
    check(
        "offset 1e9, line",
        &Design::linear(&[("x", &x)], true),
        &y,
        11.0,
    );
    // The response offset too.
    let y_big: Vec<f64> = y.iter().map(|v| v + 1e8).collect();
    check(
        "offset 1e9 in x and 1e8 in y",
        &Design::linear(&[("x", &x)], true),
        &y_big,
        11.0,
    );
}

/// A deterministic stand-in for standard normal noise: the sum of four wobbles, scaled to
/// unit variance (each wobble is close to uniform on [−0.5, 0.5), variance 1/12).
fn noise(k: usize) -> f64 {
    (0..4).map(|j| wobble(k * 4 + j + 1)).sum::<f64>() * 3f64.sqrt()
}

#[test]
fn large_offsets_keep_eleven_digits_in_every_reported_number() {
    // x = offset + spread·N(0, 1), y = 1e8 + 300·(x − offset) + noise: the case where a solver
    // that only scales its columns keeps eight digits in the slope's standard error.
    for (offset, spread, sd) in [
        (1e6, 0.01, 1.0),
        (1e3, 1.0, 0.1),
        (1e8, 0.5, 10.0),
        (1e6, 0.01, 1e-3),
        (1e9, 0.5, 10.0),
    ] {
        let x: Vec<f64> = (0..200).map(|k| offset + spread * noise(k)).collect();
        let y: Vec<f64> = x
            .iter()
            .enumerate()
            .map(|(k, &v)| 1e8 + 300.0 * (v - offset) + sd * noise(k + 1000))
            .collect();
        let name = format!("offset {offset:e}, spread {spread}, noise {sd}");
        check(&name, &Design::linear(&[("x", &x)], true), &y, 11.0);
        // A second predictor with its own offset.
        let z: Vec<f64> = (0..200).map(|k| -5e4 + 3.0 * noise(k + 500)).collect();
        let y2: Vec<f64> = y.iter().zip(&z).map(|(v, w)| v + 0.7 * (w + 5e4)).collect();
        check(
            &format!("{name}, two predictors"),
            &Design::linear(&[("x", &x), ("z", &z)], true),
            &y2,
            11.0,
        );
    }
}

#[test]
fn a_grouped_line_far_from_the_origin_keeps_its_digits() {
    // Three groups with slopes of their own at x = 1e4 + a spread of 0.01: the design of
    // `--group --separate-slopes` (indicators, and x times each indicator).
    let x: Vec<f64> = (0..120).map(|k| 1e4 + 0.01 * noise(k)).collect();
    let level: Vec<usize> = (0..120).map(|k| k % 3).collect();
    let y: Vec<f64> = x
        .iter()
        .zip(&level)
        .enumerate()
        .map(|(k, (&v, &l))| {
            20.0 + 2.0 * l as f64 + (1e3 + 400.0 * l as f64) * (v - 1e4) + 0.5 * noise(k + 7)
        })
        .collect();
    let indicator =
        |l: usize| -> Vec<f64> { level.iter().map(|&g| f64::from(u8::from(g == l))).collect() };
    let product = |l: usize| -> Vec<f64> {
        x.iter()
            .zip(&level)
            .map(|(&v, &g)| if g == l { v } else { 0.0 })
            .collect()
    };
    let (i1, i2, p1, p2) = (indicator(1), indicator(2), product(1), product(2));
    let d = Design::linear(
        &[
            ("x", &x),
            ("g=1", &i1),
            ("g=2", &i2),
            ("x×g=1", &p1),
            ("x×g=2", &p2),
        ],
        true,
    );
    // The products x·I are not centred (their zeros are far from 1e4), so the design keeps
    // part of its offset's conditioning; the floor says how much.
    check("three groups at 1e4", &d, &y, 9.0);
}

#[test]
fn a_quadratic_far_from_the_origin_keeps_its_digits() {
    let x: Vec<f64> = (0..30).map(|k| 1e4 + f64::from(k) * 0.25).collect();
    let y: Vec<f64> = x
        .iter()
        .enumerate()
        .map(|(k, &v)| 3.0 - 0.002 * (v - 1e4) + 0.01 * (v - 1e4).powi(2) + 0.01 * wobble(k))
        .collect();
    let d = Design::polynomial("x", &x, 2, true).expect("design");
    // The exact reference is in powers of x itself; the coefficients are huge and cancel, so
    // the floor is lower than for the line (the NIST Filip floor is 7).
    check("quadratic at 1e4", &d, &y, 8.0);
}

#[test]
fn three_rows_and_nearly_collinear_predictors() {
    let x = [1.0, 2.0, 4.0];
    let y = [2.1, 3.9, 8.2];
    check("n = 3", &Design::linear(&[("x", &x)], true), &y, 13.0);
    // x2 = x1 + 1e-7·u: condition number ~1e8.
    let x1: Vec<f64> = (0..25).map(|k| f64::from(k) * 0.4).collect();
    let x2: Vec<f64> = x1
        .iter()
        .enumerate()
        .map(|(k, &v)| v + 1e-7 * wobble(k))
        .collect();
    let y: Vec<f64> = x1
        .iter()
        .zip(&x2)
        .enumerate()
        .map(|(k, (&a, &b))| 1.0 + a + 2.0 * b + 0.1 * wobble(k + 3))
        .collect();
    let d = Design::linear(&[("x1", &x1), ("x2", &x2)], true);
    let f = fit(&d, &y, None, &FitOptions::default()).expect("fits");
    assert!(
        f.condition_number > 1e6,
        "reported condition {:e}",
        f.condition_number
    );
    check("near-collinear", &d, &y, 7.0);
}
