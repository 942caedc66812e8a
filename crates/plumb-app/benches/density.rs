//! Criterion benchmark of the density image: 1 M points binned into 512 × 512 cells
//! (`cargo bench -p plumb-app`). Target (performance issue): under 10 ms.

#![allow(missing_docs)] // criterion's macros generate undocumented public functions

use std::hint::black_box;

use criterion::{criterion_group, criterion_main, Criterion};
use plumb_app::density::{bin, Bounds};
use rand::{Rng, SeedableRng};

fn density(c: &mut Criterion) {
    let mut rng = rand_chacha::ChaCha8Rng::seed_from_u64(13);
    let points: Vec<(f64, f64)> = (0..1_000_000)
        .map(|_| {
            let x: f64 = (0..4).map(|_| rng.random::<f64>()).sum();
            (x, 0.5 * x + rng.random::<f64>())
        })
        .collect();
    let bounds = Bounds::around(points.iter().copied()).expect("finite points");
    c.bench_function("density: bin 1M points into 512×512", |b| {
        b.iter(|| black_box(bin(points.iter().copied(), bounds, 512, 512)));
    });
}

criterion_group!(benches, density);
criterion_main!(benches);
