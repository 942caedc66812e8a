//! Criterion benchmarks of the core's main workloads on seeded generated data:
//! `cargo bench -p plumb-core` (add a filter such as `-- line` to run one group).
//! The side-by-side comparison with numpy, statsmodels and scipy is `bench/compare.py`;
//! BENCHMARKS.md holds both sets of figures.

#![allow(missing_docs)] // criterion's macros generate undocumented public functions

use std::hint::black_box;
use std::time::Duration;

use criterion::{criterion_group, criterion_main, BatchSize, Criterion};
use plumb_core::agreement::{passing_bablok, passing_bablok_brute};
use plumb_core::association::{correlation_matrix, kendall_tau_b, Adjustment, Method};
use plumb_core::regression::{fit, influence, line_fit, Design, FitOptions, LiveFit};
use rand::{Rng, SeedableRng};

const MILLION: usize = 1_000_000;

/// `k` columns of `n` standard-normal-ish values (sum of uniforms), seeded.
fn columns(n: usize, k: usize, seed: u64) -> Vec<Vec<f64>> {
    let mut rng = rand_chacha::ChaCha8Rng::seed_from_u64(seed);
    (0..k)
        .map(|_| {
            (0..n)
                .map(|_| (0..4).map(|_| rng.random::<f64>()).sum::<f64>() - 2.0)
                .collect()
        })
        .collect()
}

/// `y = 3 + Σ cⱼxⱼ + noise`.
fn response(xs: &[Vec<f64>], seed: u64) -> Vec<f64> {
    let mut rng = rand_chacha::ChaCha8Rng::seed_from_u64(seed);
    (0..xs[0].len())
        .map(|i| {
            3.0 + xs
                .iter()
                .enumerate()
                .map(|(j, c)| (j as f64 * 0.37 - 1.0) * c[i])
                .sum::<f64>()
                + rng.random::<f64>()
                - 0.5
        })
        .collect()
}

fn named(xs: &[Vec<f64>]) -> (Vec<String>, Vec<&[f64]>) {
    (
        (0..xs.len()).map(|j| format!("x{j}")).collect(),
        xs.iter().map(Vec::as_slice).collect(),
    )
}

fn design<'a>(names: &'a [String], cols: &[&'a [f64]]) -> Design {
    let pairs: Vec<(&str, &[f64])> = names
        .iter()
        .map(String::as_str)
        .zip(cols.iter().copied())
        .collect();
    Design::linear(&pairs, true)
}

/// The floor: one pass reading x and y (`Σx + Σy`).
fn plain_pass(x: &[f64], y: &[f64]) -> f64 {
    let mut acc = [0.0; 8];
    for (a, b) in x.chunks_exact(4).zip(y.chunks_exact(4)) {
        for l in 0..4 {
            acc[l] += a[l];
            acc[4 + l] += b[l];
        }
    }
    acc.iter().sum()
}

fn simple_ols(c: &mut Criterion) {
    let o = FitOptions::default();
    let mut g = c.benchmark_group("simple OLS + R²");
    g.sample_size(10).measurement_time(Duration::from_secs(8));
    for n in [MILLION, 10 * MILLION] {
        let xs = columns(n, 1, 1);
        let y = response(&xs, 2);
        let label = format!("{}M", n / MILLION);
        g.bench_function(format!("plain pass (floor), {label}"), |b| {
            b.iter(|| black_box(plain_pass(&xs[0], &y)));
        });
        g.bench_function(format!("one-pass line, {label}"), |b| {
            b.iter(|| black_box(line_fit(&xs[0], &y, 0.95).expect("fits")));
        });
        g.bench_function(format!("full fit with residuals, {label}"), |b| {
            b.iter(|| {
                let d = Design::linear(&[("x", &xs[0])], true);
                black_box(fit(&d, &y, None, &o).expect("fits"))
            });
        });
    }
    g.finish();
}

fn ols_p8(c: &mut Criterion) {
    let o = FitOptions::default();
    let xs = columns(MILLION, 8, 3);
    let y = response(&xs, 4);
    let (names, cols) = named(&xs);
    let mut g = c.benchmark_group("OLS p = 8");
    g.sample_size(10);
    g.bench_function("fit with inference, 1M", |b| {
        b.iter(|| black_box(fit(&design(&names, &cols), &y, None, &o).expect("fits")));
    });
    g.finish();
}

fn influence_measures(c: &mut Criterion) {
    let o = FitOptions::default();
    let xs = columns(MILLION, 4, 5);
    let y = response(&xs, 6);
    let (names, cols) = named(&xs);
    let d = design(&names, &cols);
    let f = fit(&d, &y, None, &o).expect("fits");
    let mut g = c.benchmark_group("influence");
    g.sample_size(10);
    g.bench_function("1M × p = 5", |b| {
        b.iter(|| black_box(influence(&d, None, &f, &o).expect("influence")));
    });
    g.finish();
}

fn matrices(c: &mut Criterion) {
    let mut g = c.benchmark_group("correlation matrices");
    g.sample_size(10);
    let wide = columns(MILLION, 64, 7);
    let refs: Vec<&[f64]> = wide.iter().map(Vec::as_slice).collect();
    g.bench_function("Pearson 1M × 64, Holm", |b| {
        b.iter(|| {
            black_box(correlation_matrix(
                &refs,
                Method::Pearson,
                Adjustment::Holm,
                None,
            ))
        });
    });
    drop(wide);
    let ranks = columns(100_000, 32, 8);
    let refs: Vec<&[f64]> = ranks.iter().map(Vec::as_slice).collect();
    g.bench_function("Spearman 100k × 32, Holm", |b| {
        b.iter(|| {
            black_box(correlation_matrix(
                &refs,
                Method::Spearman,
                Adjustment::Holm,
                None,
            ))
        });
    });
    g.finish();
}

fn kendall(c: &mut Criterion) {
    let mut g = c.benchmark_group("Kendall τ-b, one pair");
    g.sample_size(10);
    for n in [100_000, MILLION] {
        let xs = columns(n, 1, 9);
        let y = response(&xs, 10);
        g.bench_function(format!("{}k", n / 1000), |b| {
            b.iter(|| black_box(kendall_tau_b(&xs[0], &y).expect("defined")));
        });
    }
    g.finish();
}

fn live_toggle(c: &mut Criterion) {
    let xs = columns(MILLION, 1, 11);
    let y = response(&xs, 12);
    let o = FitOptions::default();
    let d = Design::linear(&[("x", &xs[0])], true);
    let mut live = LiveFit::new(d.clone(), y.clone(), o.clone()).expect("fits");
    let mut g = c.benchmark_group("live exclusion, 1M rows");
    let mut k = 0usize;
    g.bench_function("exclude + include one row", |b| {
        b.iter(|| {
            k = (k + 7919) % MILLION;
            live.exclude(k);
            live.include(k);
            black_box(live.summary().as_ref().map(|s| s.r_squared).ok())
        });
    });
    g.sample_size(10);
    g.bench_function("full refit without one row", |b| {
        b.iter_batched(
            || {
                k = (k + 7919) % MILLION;
                let keep: Vec<usize> = (0..MILLION).filter(|&i| i != k).collect();
                let x: Vec<f64> = keep.iter().map(|&i| xs[0][i]).collect();
                let yy: Vec<f64> = keep.iter().map(|&i| y[i]).collect();
                (x, yy)
            },
            |(x, yy)| {
                black_box(fit(&Design::linear(&[("x", &x)], true), &yy, None, &o).expect("fits"))
            },
            BatchSize::LargeInput,
        );
    });
    g.finish();
}

/// Two methods measuring the same quantity: `y = 0.5 + 1.02·x + noise`, x spread over 0..100.
fn method_pair(n: usize, seed: u64) -> (Vec<f64>, Vec<f64>) {
    let c = columns(n, 2, seed);
    let x: Vec<f64> = c[0].iter().map(|v| 50.0 + 25.0 * v).collect();
    let y: Vec<f64> = x
        .iter()
        .zip(&c[1])
        .map(|(v, e)| 0.5 + 1.02 * v + 2.0 * e)
        .collect();
    (x, y)
}

fn passing_bablok_line(c: &mut Criterion) {
    let mut g = c.benchmark_group("Passing-Bablok line");
    g.sample_size(10);
    let (x, y) = method_pair(1_000, 13);
    g.bench_function("passing_bablok 1k", |b| {
        b.iter(|| black_box(passing_bablok(&x, &y, 0.95).expect("defined")));
    });
    g.bench_function("passing_bablok_brute 1k", |b| {
        b.iter(|| black_box(passing_bablok_brute(&x, &y, 0.95).expect("defined")));
    });
    let (x, y) = method_pair(100_000, 14);
    g.bench_function("passing_bablok 100k", |b| {
        b.iter(|| black_box(passing_bablok(&x, &y, 0.95).expect("defined")));
    });
    // Lab values are written to a few decimals: many slopes tie exactly.
    let round = |v: &[f64]| -> Vec<f64> { v.iter().map(|a| (a * 100.0).round() / 100.0).collect() };
    let (xr, yr) = (round(&x), round(&y));
    g.bench_function("passing_bablok 100k rounded to 0.01", |b| {
        b.iter(|| black_box(passing_bablok(&xr, &yr, 0.95).expect("defined")));
    });
    g.finish();
}

criterion_group!(
    benches,
    simple_ols,
    ols_p8,
    influence_measures,
    matrices,
    kendall,
    live_toggle,
    passing_bablok_line
);
criterion_main!(benches);
