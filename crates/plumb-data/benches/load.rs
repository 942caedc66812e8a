//! Criterion benchmarks of reading delimited text (`cargo bench -p plumb-data`):
//! the whole-file loader on a 100 MB file, and one streaming pass over a generated 1 GB file
//! (bounded memory; the in-memory loader would need about 13 GB for it). The files are
//! generated once, seeded, under `target/bench-data/` (set `PLUMB_BENCH_CSV_MB` for another
//! size of the large file).

#![allow(missing_docs)] // criterion's macros generate undocumented public functions

use std::hint::black_box;
use std::io::Write;
use std::ops::ControlFlow;
use std::path::{Path, PathBuf};
use std::time::Duration;

use criterion::{criterion_group, criterion_main, Criterion};
use plumb_core::moments::CoMoments;
use plumb_data::{load, stream_columns, LoadOptions, StreamOptions};

/// A seeded file of about `mb` megabytes: a row counter and three measurement columns.
fn generated(mb: u64) -> PathBuf {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("../../target/bench-data");
    std::fs::create_dir_all(&dir).expect("bench data folder");
    let path = dir.join(format!("readings-{mb}mb.csv"));
    if path.exists() {
        return path;
    }
    let tmp = path.with_extension("part");
    let mut w = std::io::BufWriter::new(std::fs::File::create(&tmp).expect("create"));
    writeln!(w, "row,pressure_kpa,flow_l_min,temp_c").expect("write");
    let mut state: u64 = 0x5EED;
    let mut next = || {
        // xorshift64*: a fixed, fast stream; the values only need to look like readings.
        state ^= state >> 12;
        state ^= state << 25;
        state ^= state >> 27;
        (state.wrapping_mul(0x2545_F491_4F6C_DD1D) >> 11) as f64 / (1u64 << 53) as f64
    };
    let mut written = 0u64;
    let mut row = 0u64;
    while written < mb << 20 {
        let p = 90.0 + 20.0 * next();
        let line = format!(
            "{row},{p:.3},{:.2},{:.2}\n",
            2.0 * p + 5.0 * next(),
            15.0 + 10.0 * next()
        );
        written += line.len() as u64;
        w.write_all(line.as_bytes()).expect("write");
        row += 1;
    }
    w.flush().expect("flush");
    std::fs::rename(&tmp, &path).expect("rename");
    path
}

fn reading(c: &mut Criterion) {
    let mut g = c.benchmark_group("read delimited text");
    g.sample_size(10).measurement_time(Duration::from_secs(30));
    let small = generated(100);
    g.bench_function("load whole file, 100 MB", |b| {
        b.iter(|| black_box(load(&small, &LoadOptions::default()).expect("loads")));
    });
    let mb = std::env::var("PLUMB_BENCH_CSV_MB")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(1024);
    let large = generated(mb);
    g.bench_function(format!("stream one pass (line moments), {mb} MB"), |b| {
        b.iter(|| {
            let mut m = CoMoments::new(2);
            let s = stream_columns(
                &large,
                &["pressure_kpa", "flow_l_min"],
                &StreamOptions::default(),
                |p| {
                    m.add(&[&p.columns[0], &p.columns[1]]);
                    ControlFlow::Continue(())
                },
            )
            .expect("streams");
            black_box((s.rows, m.comoment(0, 1)))
        });
    });
    g.finish();
}

criterion_group!(benches, reading);
criterion_main!(benches);
