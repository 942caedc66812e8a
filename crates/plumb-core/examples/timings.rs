//! Times the core's main workloads on generated data and prints one JSON object of median
//! wall-clock seconds, for `bench/compare.py` to set beside numpy, statsmodels and scipy on the
//! same data. Run in release: `cargo run --release -p plumb-core --example timings -- DATA_DIR`.
//! The data files (raw little-endian f64, one file per column) are written by the script.

use std::path::Path;
use std::time::Instant;

use plumb_core::association::{
    correlation_matrix, kendall_tau_b, pearson, spearman, Adjustment, Method,
};
use plumb_core::regression::{fit, influence, line_fit, Design, FitOptions, LiveFit};

fn column(dir: &Path, name: &str) -> Vec<f64> {
    let bytes =
        std::fs::read(dir.join(format!("{name}.f64"))).unwrap_or_else(|e| panic!("{name}: {e}"));
    bytes
        .chunks_exact(8)
        .map(|c| f64::from_le_bytes(c.try_into().expect("8 bytes")))
        .collect()
}

/// Median of `reps` runs of `f`, in seconds.
fn median(reps: usize, mut f: impl FnMut()) -> f64 {
    let mut t: Vec<f64> = (0..reps)
        .map(|_| {
            let start = Instant::now();
            f();
            start.elapsed().as_secs_f64()
        })
        .collect();
    t.sort_by(f64::total_cmp);
    t[t.len() / 2]
}

/// The memory-bandwidth floor: one pass reading both columns, `Σx + Σy` with eight
/// independent partial sums.
fn plain_pass(x: &[f64], y: &[f64]) -> f64 {
    let mut acc = [0.0; 8];
    for (a, b) in x.chunks_exact(4).zip(y.chunks_exact(4)) {
        for l in 0..4 {
            acc[l] += a[l];
            acc[4 + l] += b[l];
        }
    }
    std::hint::black_box(acc.iter().sum())
}

/// The 10 M-row line (`xl`, `yl`), when the script wrote it.
fn large(dir: &Path, o: &FitOptions, out: &mut Timings) {
    if !dir.join("xl.f64").exists() {
        return;
    }
    let (x, y) = (column(dir, "xl"), column(dir, "yl"));
    out.push((
        "plain_pass_10m",
        median(5, || {
            plain_pass(&x, &y);
        }),
    ));
    out.push((
        "line_10m",
        median(5, || {
            std::hint::black_box(line_fit(&x, &y, 0.95).expect("fits"));
        }),
    ));
    out.push((
        "ols_simple_10m",
        median(3, || {
            let d = Design::linear(&[("x", &x)], true);
            std::hint::black_box(fit(&d, &y, None, o).expect("fits"));
        }),
    ));
}

/// The 1 M × 64 Pearson matrix (`m0…m63`) and the 100 k × 32 Spearman matrix (first 100 k
/// rows of `m0…m31`), when the script wrote them.
fn matrices(dir: &Path, out: &mut Timings) {
    if !dir.join("m0.f64").exists() {
        return;
    }
    let cols: Vec<Vec<f64>> = (0..64).map(|j| column(dir, &format!("m{j}"))).collect();
    let refs: Vec<&[f64]> = cols.iter().map(Vec::as_slice).collect();
    out.push((
        "pearson_matrix_1m_64",
        median(3, || {
            std::hint::black_box(correlation_matrix(
                &refs,
                Method::Pearson,
                Adjustment::Holm,
                None,
            ));
        }),
    ));
    let small: Vec<&[f64]> = cols[..32].iter().map(|c| &c[..100_000]).collect();
    out.push((
        "spearman_matrix_100k_32",
        median(3, || {
            std::hint::black_box(correlation_matrix(
                &small,
                Method::Spearman,
                Adjustment::Holm,
                None,
            ));
        }),
    ));
}

fn main() {
    let dir = std::env::args().nth(1).expect("usage: timings DATA_DIR");
    let dir = Path::new(&dir);
    let y = column(dir, "y");
    let xs: Vec<Vec<f64>> = (0..8).map(|j| column(dir, &format!("x{j}"))).collect();
    let o = FitOptions::default();
    let mut out = Vec::new();
    lines(&xs, &y, &mut out);
    large(dir, &o, &mut out);
    matrices(dir, &mut out);
    least_squares(&xs, &y, &o, &mut out);
    influences(&xs, &y, &o, &mut out);
    pairs(&xs, &y, &mut out);
    live_changes(&xs, &y, &o, &mut out);
    let body: Vec<String> = out.iter().map(|(k, v)| format!("\"{k}\": {v:e}")).collect();
    println!("{{{}}}", body.join(", "));
}

type Timings = Vec<(&'static str, f64)>;

fn lines(xs: &[Vec<f64>], y: &[f64], out: &mut Timings) {
    out.push((
        "plain_pass_1m",
        median(5, || {
            plain_pass(&xs[0], y);
        }),
    ));
    out.push((
        "line_1m",
        median(5, || {
            std::hint::black_box(line_fit(&xs[0], y, 0.95).expect("fits"));
        }),
    ));
}

fn least_squares(xs: &[Vec<f64>], y: &[f64], o: &FitOptions, out: &mut Timings) {
    out.push((
        "ols_simple_1m",
        median(5, || {
            let d = Design::linear(&[("x0", &xs[0])], true);
            std::hint::black_box(fit(&d, y, None, o).expect("fits"));
        }),
    ));
    out.push((
        "ols_p8_1m",
        median(3, || {
            let named: Vec<(String, &[f64])> = xs
                .iter()
                .enumerate()
                .map(|(j, c)| (format!("x{j}"), c.as_slice()))
                .collect();
            let cols: Vec<(&str, &[f64])> = named.iter().map(|(n, c)| (n.as_str(), *c)).collect();
            std::hint::black_box(fit(&Design::linear(&cols, true), y, None, o).expect("fits"));
        }),
    ));
}

fn influences(xs: &[Vec<f64>], y: &[f64], o: &FitOptions, out: &mut Timings) {
    let names = ["x0", "x1", "x2", "x3"];
    let five: Vec<(&str, &[f64])> = (0..4).map(|j| (names[j], xs[j].as_slice())).collect();
    let d5 = Design::linear(&five, true);
    let f5 = fit(&d5, y, None, o).expect("fits");
    out.push((
        "influence_1m_p5",
        median(3, || {
            std::hint::black_box(influence(&d5, None, &f5, o).expect("influence"));
        }),
    ));
    // statsmodels forms DFBETAS from n leave-one-out refits, so its side is timed on 20 k rows.
    let m = 20_000;
    let five_m: Vec<(&str, &[f64])> = (0..4).map(|j| (names[j], &xs[j][..m])).collect();
    let d5m = Design::linear(&five_m, true);
    let f5m = fit(&d5m, &y[..m], None, o).expect("fits");
    out.push((
        "influence_20k_p5",
        median(5, || {
            std::hint::black_box(influence(&d5m, None, &f5m, o).expect("influence"));
        }),
    ));
}

fn pairs(xs: &[Vec<f64>], y: &[f64], out: &mut Timings) {
    let small = 100_000;
    out.push((
        "pearson_pair_1m",
        median(5, || {
            std::hint::black_box(pearson(&xs[0], y, 0.95).expect("defined"));
        }),
    ));
    out.push((
        "spearman_pair_100k",
        median(5, || {
            std::hint::black_box(spearman(&xs[0][..small], &y[..small]).expect("defined"));
        }),
    ));
    out.push((
        "kendall_pair_100k",
        median(5, || {
            std::hint::black_box(kendall_tau_b(&xs[0][..small], &y[..small]).expect("defined"));
        }),
    ));
    out.push((
        "kendall_pair_1m",
        median(3, || {
            std::hint::black_box(kendall_tau_b(&xs[0], y).expect("defined"));
        }),
    ));
}

fn live_changes(xs: &[Vec<f64>], y: &[f64], o: &FitOptions, out: &mut Timings) {
    let simple = Design::linear(&[("x0", &xs[0])], true);
    let mut live = LiveFit::new(simple, y.to_vec(), o.clone()).expect("fits");
    let mut k = 0usize;
    out.push((
        "live_toggle_1m",
        median(101, || {
            k = (k + 7919) % y.len();
            live.exclude(k);
            live.include(k);
        }) / 2.0,
    ));
    // The drift guard rebuilds the sums from the rows every REFRESH_EVERY changes: the
    // slowest of 128 single changes shows what that costs.
    let worst = (0..64)
        .map(|_| {
            k = (k + 7919) % y.len();
            let start = Instant::now();
            live.exclude(k);
            let t = start.elapsed().as_secs_f64();
            let start = Instant::now();
            live.include(k);
            t.max(start.elapsed().as_secs_f64())
        })
        .fold(0.0_f64, f64::max);
    out.push(("live_toggle_1m_worst", worst));
    live_p12(xs, y, o, out);
}

/// Twelve terms (intercept, the eight columns and three products of them) at 1 M rows: the
/// cost of opening the model (the first solve) and of each live exclusion, median and worst.
fn live_p12(xs: &[Vec<f64>], y: &[f64], o: &FitOptions, out: &mut Timings) {
    let mut cols: Vec<Vec<f64>> = xs.to_vec();
    for (a, b) in [(0, 1), (2, 3), (4, 5)] {
        cols.push(xs[a].iter().zip(&xs[b]).map(|(u, v)| u * v).collect());
    }
    let names: Vec<String> = (0..cols.len()).map(|j| format!("t{j}")).collect();
    let named: Vec<(&str, &[f64])> = names
        .iter()
        .zip(&cols)
        .map(|(n, c)| (n.as_str(), c.as_slice()))
        .collect();
    let design = Design::linear(&named, true);
    assert_eq!(design.n_terms(), 12);
    let start = Instant::now();
    let mut live = LiveFit::new(design.clone(), y.to_vec(), o.clone()).expect("fits");
    out.push(("live_open_p12_1m", start.elapsed().as_secs_f64()));
    // Each change is timed, the exclusions and the puttings back alike, so the drift guard's
    // rebuild (every REFRESH_EVERY changes) is among them.
    let mut k = 0usize;
    let mut times: Vec<f64> = Vec::with_capacity(256);
    for _ in 0..128 {
        k = (k + 7919) % y.len();
        for exclude in [true, false] {
            let start = Instant::now();
            if exclude {
                live.exclude(k);
            } else {
                live.include(k);
            }
            std::hint::black_box(live.summary().as_ref().map(|s| s.r_squared).ok());
            times.push(start.elapsed().as_secs_f64());
        }
    }
    times.sort_by(f64::total_cmp);
    out.push(("live_change_p12_1m", times[times.len() / 2]));
    out.push(("live_change_p12_1m_worst", times[times.len() - 1]));
}
