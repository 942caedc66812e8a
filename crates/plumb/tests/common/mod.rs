//! Helpers shared by the workbench's test binaries: the demo files, `plumb fit` as the
//! reference, and file fingerprints.

#![allow(dead_code)] // each test binary uses its own share of these

use std::path::{Path, PathBuf};
use std::process::Command;

/// A demo scenario's data file.
pub fn demo(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("../../demo-scenarios/data")
        .join(name)
}

/// `plumb fit DATA --y Y --x X [--exclude ROWS] --format json`, parsed.
pub fn cli_fit(data: &Path, y: &str, x: &str, exclude: &str) -> serde_json::Value {
    let mut args = vec![
        "fit".to_string(),
        data.display().to_string(),
        "--y".into(),
        y.into(),
        "--x".into(),
        x.into(),
        "--format".into(),
        "json".into(),
    ];
    if !exclude.is_empty() {
        args.extend(["--exclude".into(), exclude.into()]);
    }
    let out = Command::new(env!("CARGO_BIN_EXE_plumb"))
        .args(&args)
        .output()
        .expect("plumb runs");
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    serde_json::from_slice(&out.stdout).expect("json")
}

/// SHA-256 of a file, hex.
pub fn sha256(path: &Path) -> String {
    use sha2::{Digest, Sha256};
    let bytes = std::fs::read(path).expect("read");
    format!("{:x}", Sha256::digest(bytes))
}
