//! A p = 8 least-squares fit on 1 M generated rows, repeated, for a profiler
//! (`perf record -g target/release/examples/profile_fit` or `valgrind --tool=callgrind`).
//! Usage: `profile_fit [ROWS] [REPEATS]`.

use plumb_core::regression::{fit, Design, FitOptions};
use rand::{Rng, SeedableRng};

fn main() {
    let mut args = std::env::args().skip(1);
    let n: usize = args
        .next()
        .and_then(|a| a.parse().ok())
        .unwrap_or(1_000_000);
    let repeats: usize = args.next().and_then(|a| a.parse().ok()).unwrap_or(5);
    let mut rng = rand_chacha::ChaCha8Rng::seed_from_u64(42);
    let xs: Vec<Vec<f64>> = (0..8)
        .map(|_| (0..n).map(|_| rng.random::<f64>() - 0.5).collect())
        .collect();
    let y: Vec<f64> = (0..n)
        .map(|i| xs.iter().map(|c| c[i]).sum::<f64>() + rng.random::<f64>())
        .collect();
    let names: Vec<String> = (0..8).map(|j| format!("x{j}")).collect();
    let cols: Vec<(&str, &[f64])> = names
        .iter()
        .map(String::as_str)
        .zip(xs.iter().map(Vec::as_slice))
        .collect();
    for _ in 0..repeats {
        let f = fit(
            &Design::linear(&cols, true),
            &y,
            None,
            &FitOptions::default(),
        )
        .expect("fits");
        std::hint::black_box(f);
    }
}
