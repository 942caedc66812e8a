//! Writes Plumbline's demo scenarios: invented measurements from a fixed seed, so the files
//! are byte-for-byte reproducible. `cargo run -p plumb-demo -- [--large] [OUT_DIR]` (default:
//! `data/` beside this crate; `--large` adds the 1 M-row sensor log, which is not committed;
//! `--large --rows N` writes only an N-row log, `sensor-log-N.csv`, for benchmarks).
//! Each scenario's story is in `demo-scenarios/README.md`.

mod lab;
mod scenarios;

use std::io::Write;
use std::path::{Path, PathBuf};
use std::process::ExitCode;

fn main() -> ExitCode {
    let mut args: Vec<std::ffi::OsString> = std::env::args_os().skip(1).collect();
    // `--rows N` (with --large): a sensor log of N rows instead, named sensor-log-N.csv, for
    // the large-file benchmarks (10 M rows is about 390 MB).
    let rows = match args.iter().position(|a| a == "--rows") {
        Some(i) => {
            let value = args
                .get(i + 1)
                .and_then(|v| v.to_str()?.parse::<usize>().ok());
            let Some(n) = value else {
                eprintln!("plumb-demo: --rows needs a whole number of rows, e.g. --rows 10000000");
                return ExitCode::FAILURE;
            };
            args.drain(i..=i + 1);
            Some(n)
        }
        None => None,
    };
    let large = args.iter().any(|a| a == "--large");
    let out = args.iter().find(|a| *a != "--large").map_or_else(
        || PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("data"),
        PathBuf::from,
    );
    if large {
        let (n, name) = match rows {
            Some(n) => (n, format!("sensor-log-{n}.csv")),
            None => (scenarios::SENSOR_ROWS, "sensor-log.csv".to_string()),
        };
        if let Err(e) = write_sensor_log(&out.join(name), n) {
            eprintln!(
                "plumb-demo: cannot write the sensor log into {}: {e}",
                out.display()
            );
            return ExitCode::FAILURE;
        }
        if rows.is_some() {
            return ExitCode::SUCCESS;
        }
    }
    match scenarios::write_all(&out) {
        Ok(files) => {
            for f in files {
                println!("wrote {}", f.display());
            }
            ExitCode::SUCCESS
        }
        Err(e) => {
            eprintln!("plumb-demo: cannot write into {}: {e}", out.display());
            ExitCode::FAILURE
        }
    }
}

fn write_sensor_log(path: &Path, rows: usize) -> std::io::Result<()> {
    let mut w = std::io::BufWriter::new(std::fs::File::create(path)?);
    scenarios::sensor_log(rows, &mut w)?;
    w.flush()?;
    println!("wrote {}", path.display());
    Ok(())
}
