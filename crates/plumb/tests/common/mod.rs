//! Helpers shared by the workbench's test binaries: the demo files, `plumb fit` as the
//! reference, and file fingerprints.

#![allow(dead_code)] // each test binary uses its own share of these

use std::path::{Path, PathBuf};
use std::process::Command;
use std::time::Duration;

use plumb_app::Workbench;
use plumb_core::regression::LiveSummary;

/// `plumb ARGS…`: exit code, standard output, standard error.
pub fn run_plumb(args: &[&str]) -> (i32, String, String) {
    let out = Command::new(env!("CARGO_BIN_EXE_plumb"))
        .args(args)
        .output()
        .expect("plumb runs");
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&out.stdout).into_owned(),
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}

/// A demo scenario's data file.
pub fn demo(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("../../demo-scenarios/data")
        .join(name)
}

/// `plumb fit DATA --y Y --x X [--exclude ROWS] --format json`, parsed.
pub fn cli_fit(data: &Path, y: &str, x: &str, exclude: &str) -> serde_json::Value {
    let mut args = vec!["--y", y, "--x", x];
    if !exclude.is_empty() {
        args.extend(["--exclude", exclude]);
    }
    cli_fit_with(data, &args)
}

/// `plumb fit DATA ARGS… --format json`, parsed.
pub fn cli_fit_with(data: &Path, args: &[&str]) -> serde_json::Value {
    let out = Command::new(env!("CARGO_BIN_EXE_plumb"))
        .arg("fit")
        .arg(data)
        .args(args)
        .args(["--format", "json"])
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

/// Whether `a` and `b` agree to 1e-9 relative.
pub fn close(a: f64, b: f64) -> bool {
    (a - b).abs() <= 1e-9 * a.abs().max(b.abs()).max(1e-300)
}

/// The live numbers equal the command line's: R², adjusted R², σ̂, and every coefficient's
/// estimate, SE, p and interval.
pub fn assert_same_numbers(live: &LiveSummary, cli: &serde_json::Value) {
    let f = |k: &str| cli[k].as_f64().unwrap_or_else(|| panic!("{k} in {cli}"));
    assert_eq!(live.n as u64, cli["n"].as_u64().expect("n"));
    for (ours, key) in [
        (live.r_squared, "r_squared"),
        (live.adj_r_squared, "adj_r_squared"),
        (live.residual_std_error, "residual_std_error"),
    ] {
        assert!(
            close(ours, f(key)),
            "{key}: live {ours}, plumb fit {}",
            f(key)
        );
    }
    let coefficients = cli["coefficients"].as_array().expect("coefficients");
    assert_eq!(coefficients.len(), live.estimates.len());
    for (j, c) in coefficients.iter().enumerate() {
        let g = |k: &str| c[k].as_f64().expect("number");
        let pairs = [
            (live.estimates[j], g("estimate")),
            (live.std_errors[j], g("std_error")),
            (live.p_values[j], g("p_value")),
            (live.ci[j].0, g("ci_low")),
            (live.ci[j].1, g("ci_high")),
        ];
        for (ours, theirs) in pairs {
            assert!(
                close(ours, theirs),
                "term {j}: live {ours}, plumb fit {theirs}"
            );
        }
    }
}

pub fn settle(wb: &mut Workbench) {
    assert!(
        wb.settle(Duration::from_secs(60)),
        "background work did not finish"
    );
}

pub fn live(wb: &Workbench) -> LiveSummary {
    wb.bench().summary().expect("a pair").expect("a fit")
}

/// The workbench in a test harness of `size` points, its settings in `config`.
pub fn harness_sized(size: (f32, f32), config: &Path) -> egui_kittest::Harness<'static, Workbench> {
    egui_kittest::Harness::builder()
        .with_size(eframe::egui::Vec2::new(size.0, size.1))
        .build_ui_state(
            |ui, wb: &mut Workbench| wb.show(ui),
            Workbench::new(Some(config.to_path_buf())),
        )
}

/// The workbench in a 1440 × 900 test harness, its settings in `config`.
pub fn harness(config: &Path) -> egui_kittest::Harness<'static, Workbench> {
    harness_sized((1440.0, 900.0), config)
}

/// Steps frames until background work is done (the loader, the map and the diagnostics run
/// on threads), for at most two minutes.
pub fn settle_ui(h: &mut egui_kittest::Harness<'_, Workbench>) {
    let start = std::time::Instant::now();
    loop {
        h.step();
        if !h.state().is_busy() {
            h.run_steps(4);
            if !h.state().is_busy() {
                return;
            }
        }
        assert!(
            start.elapsed() < Duration::from_secs(120),
            "background work did not finish"
        );
        std::thread::sleep(Duration::from_millis(10));
    }
}

/// Types `data`'s path into the columns screen's field and presses Open (one frame drawn
/// after each step; the load itself is not waited for).
pub fn type_path_and_open(h: &mut egui_kittest::Harness<'_, Workbench>, data: &Path) {
    use egui_kittest::kittest::Queryable;
    h.get_by_label("File:").click();
    h.run_steps(1);
    h.get_by_label("File:")
        .type_text(&data.display().to_string());
    h.run_steps(1);
    h.get_by_label("Open").click();
}

/// Opens `data` as an analyst would ([`type_path_and_open`]), waits for the load, and
/// requires it to have succeeded.
pub fn open_by_typing(h: &mut egui_kittest::Harness<'_, Workbench>, data: &Path) {
    type_path_and_open(h, data);
    settle_ui(h);
    assert!(
        h.state().loaded().is_some(),
        "status: {:?}",
        h.state().status()
    );
}
