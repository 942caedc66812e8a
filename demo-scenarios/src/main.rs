//! Writes Plumbline's demo scenarios: invented measurements from a fixed seed, so the files
//! are byte-for-byte reproducible. `cargo run -p plumb-demo -- [--large] [OUT_DIR]` (default:
//! `data/` beside this crate; `--large` adds the 1 M-row sensor log, which is not committed).
//! Each scenario's story is in `demo-scenarios/README.md`.

mod scenarios;

use std::io::Write;
use std::path::{Path, PathBuf};
use std::process::ExitCode;

fn main() -> ExitCode {
    let args: Vec<std::ffi::OsString> = std::env::args_os().skip(1).collect();
    let large = args.iter().any(|a| a == "--large");
    let out = args.iter().find(|a| *a != "--large").map_or_else(
        || PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("data"),
        PathBuf::from,
    );
    if large {
        if let Err(e) = write_sensor_log(&out.join("sensor-log.csv")) {
            eprintln!(
                "plumb-demo: cannot write the sensor log into {}: {e}",
                out.display()
            );
            return ExitCode::FAILURE;
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

fn write_sensor_log(path: &Path) -> std::io::Result<()> {
    let mut w = std::io::BufWriter::new(std::fs::File::create(path)?);
    scenarios::sensor_log(scenarios::SENSOR_ROWS, &mut w)?;
    w.flush()?;
    println!("wrote {}", path.display());
    Ok(())
}
