//! Times the core's main workloads on generated data and prints one JSON object of median
//! wall-clock seconds, for `bench/compare.py` to set beside numpy, statsmodels and scipy on the
//! same data. Run in release: `cargo run --release -p plumb-core --example timings -- DATA_DIR`.
//! The data files (raw little-endian f64, one file per column) are written by the script.

use std::path::Path;
use std::time::Instant;

use plumb_core::association::{kendall_tau_b, pearson, spearman};
use plumb_core::regression::{fit, influence, Design, FitOptions, LiveFit};

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

fn main() {
    let dir = std::env::args().nth(1).expect("usage: timings DATA_DIR");
    let dir = Path::new(&dir);
    let y = column(dir, "y");
    let xs: Vec<Vec<f64>> = (0..8).map(|j| column(dir, &format!("x{j}"))).collect();
    let o = FitOptions::default();
    let mut out = Vec::new();

    let simple = Design::linear(&[("x0", &xs[0])], true);
    out.push((
        "ols_simple_1m",
        median(5, || {
            let d = Design::linear(&[("x0", &xs[0])], true);
            std::hint::black_box(fit(&d, &y, None, &o).expect("fits"));
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
            std::hint::black_box(fit(&Design::linear(&cols, true), &y, None, &o).expect("fits"));
        }),
    ));
    let five: Vec<(&str, &[f64])> = (0..4)
        .map(|j| (["x0", "x1", "x2", "x3"][j], xs[j].as_slice()))
        .collect();
    let d5 = Design::linear(&five, true);
    let f5 = fit(&d5, &y, None, &o).expect("fits");
    out.push((
        "influence_1m_p5",
        median(3, || {
            std::hint::black_box(influence(&d5, None, &f5, &o).expect("influence"));
        }),
    ));
    // statsmodels forms DFBETAS from n leave-one-out refits, so its side is timed on 20 k rows.
    let m = 20_000;
    let five_m: Vec<(&str, &[f64])> = (0..4)
        .map(|j| (["x0", "x1", "x2", "x3"][j], &xs[j][..m]))
        .collect();
    let d5m = Design::linear(&five_m, true);
    let f5m = fit(&d5m, &y[..m], None, &o).expect("fits");
    out.push((
        "influence_20k_p5",
        median(5, || {
            std::hint::black_box(influence(&d5m, None, &f5m, &o).expect("influence"));
        }),
    ));
    let small = 100_000;
    out.push((
        "pearson_pair_1m",
        median(5, || {
            std::hint::black_box(pearson(&xs[0], &y, 0.95).expect("defined"));
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
            std::hint::black_box(kendall_tau_b(&xs[0], &y).expect("defined"));
        }),
    ));
    let mut live = LiveFit::new(simple, y.clone(), o.clone()).expect("fits");
    let mut k = 0usize;
    out.push((
        "live_toggle_1m",
        median(101, || {
            k = (k + 7919) % y.len();
            live.exclude(k);
            live.include(k);
        }) / 2.0,
    ));
    let body: Vec<String> = out.iter().map(|(k, v)| format!("\"{k}\": {v:e}")).collect();
    println!("{{{}}}", body.join(", "));
}
