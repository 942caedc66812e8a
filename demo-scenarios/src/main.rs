//! Writes Plumbline's demo scenarios: invented measurements from a fixed seed, so the files
//! are byte-for-byte reproducible. `cargo run -p plumb-demo -- [OUT_DIR]` (default: `data/`
//! beside this crate). Each scenario's story is in `demo-scenarios/README.md`.

mod scenarios;

use std::path::PathBuf;
use std::process::ExitCode;

fn main() -> ExitCode {
    let out = std::env::args_os().nth(1).map_or_else(
        || PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("data"),
        PathBuf::from,
    );
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
