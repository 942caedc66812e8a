//! Least squares against an exact reference computed in the test: the normal equations
//! `XᵀX β = Xᵀy` solved in exact rational arithmetic (num-rational over num-bigint) from the
//! very doubles the solver sees, then rounded once to f64. No cancellation is possible in the
//! reference, so the comparison measures the solver alone — on the cases where floating
//! point is weakest: a huge offset with small variation, three rows, nearly collinear
//! predictors.

use num_rational::BigRational;
use num_traits::{ToPrimitive, Zero};
use plumb_core::regression::{fit, Design, FitOptions};

fn exact(v: f64) -> BigRational {
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
                        .map(|&v| num_traits::pow(exact(v), (j + first) as usize))
                        .collect()
                })
                .collect()
        }
        None => design
            .columns()
            .iter()
            .map(|c| c.iter().map(|&v| exact(v)).collect())
            .collect(),
    }
}

/// Exact β of the design's columns on `y`.
fn exact_beta(design: &Design, y: &[f64]) -> Vec<f64> {
    let xs = exact_columns(design);
    let p = xs.len();
    let n = y.len();
    let ys: Vec<BigRational> = y.iter().map(|&v| exact(v)).collect();
    // Augmented [XᵀX | Xᵀy].
    let mut a: Vec<Vec<BigRational>> = (0..p)
        .map(|i| {
            let mut row: Vec<BigRational> = (0..p)
                .map(|j| (0..n).fold(BigRational::zero(), |s, k| s + &xs[i][k] * &xs[j][k]))
                .collect();
            row.push((0..n).fold(BigRational::zero(), |s, k| s + &xs[i][k] * &ys[k]));
            row
        })
        .collect();
    // Gauss–Jordan; exact, so any non-zero pivot will do.
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
    a.iter()
        .map(|row| row[p].to_f64().expect("representable"))
        .collect()
}

/// Log relative error, capped at 15 (the LRE of the NIST StRD convention).
fn lre(got: f64, want: f64) -> f64 {
    if got == want {
        return 15.0;
    }
    let rel = ((got - want) / if want == 0.0 { 1.0 } else { want }).abs();
    (-rel.log10()).min(15.0)
}

fn check(name: &str, design: &Design, y: &[f64], floor: f64) {
    let f = fit(design, y, None, &FitOptions::default()).expect("fits");
    let want = exact_beta(design, y);
    for (c, w) in f.coefficients.iter().zip(&want) {
        let l = lre(c.estimate, *w);
        println!(
            "{name}: {} = {:e} (exact {w:e}), LRE {l:.1}",
            c.term, c.estimate
        );
        assert!(l >= floor, "{name}: {} LRE {l:.1} below {floor}", c.term);
    }
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
        12.0,
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
