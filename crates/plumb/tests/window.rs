//! The workbench in a real window (X server from Xvfb, OpenGL from Mesa): it starts on a demo
//! scenario, renders, writes a screenshot and exits; and after being killed mid-session the
//! next start offers the recovery copy, which holds the exclusions and their reasons.
//!
//! Needs `xvfb-run` (Debian's xvfb package). Without it these tests say so and pass, unless
//! `PLUMB_REQUIRE_DISPLAY=1` (set by CI), which makes a missing Xvfb a failure.

mod common;

use std::path::Path;

use common::demo;
use std::process::{Child, Command, Stdio};
use std::time::{Duration, Instant};

fn have_xvfb() -> bool {
    let found = Command::new("sh")
        .args(["-c", "command -v xvfb-run"])
        .stdout(Stdio::null())
        .status()
        .is_ok_and(|s| s.success());
    if !found {
        assert!(
            std::env::var("PLUMB_REQUIRE_DISPLAY").as_deref() != Ok("1"),
            "xvfb-run is not installed and PLUMB_REQUIRE_DISPLAY=1"
        );
        plumb_tests::note_skip(
            "the real-window tests: xvfb-run not installed (apt-get install xvfb)",
        );
    }
    found
}

/// Starts the workbench under `xvfb-run` in a process group of its own (so that a kill
/// reaches the script, the X server and the workbench, and nothing else).
fn workbench(config: &Path, args: &[&str]) -> Child {
    use std::os::unix::process::CommandExt;
    Command::new("xvfb-run")
        .process_group(0)
        .args(["-a", "-s", "-screen 0 1600x1000x24"])
        .arg(env!("CARGO_BIN_EXE_plumb"))
        .args(args)
        .env("PLUMB_CONFIG_DIR", config)
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .expect("xvfb-run starts")
}

#[test]
fn a_real_window_renders_the_bench_and_saves_a_screenshot() {
    if !have_xvfb() {
        return;
    }
    let dir = tempfile::tempdir().expect("dir");
    let png = dir.path().join("bench.png");
    let data = demo("calibration-run.csv");
    let out = workbench(
        dir.path(),
        &[
            &data.display().to_string(),
            "--y",
            "absorbance",
            "--x",
            "standard_mg_l",
            "--exclude",
            "14",
            "--window-size",
            "1280x800",
            "--screenshot",
            &png.display().to_string(),
        ],
    )
    .wait_with_output()
    .expect("runs");
    assert!(
        out.status.success(),
        "exit {:?}: {}",
        out.status,
        String::from_utf8_lossy(&out.stderr)
    );
    let image = image::open(&png).expect("a PNG was written").to_rgba8();
    assert_eq!(image.dimensions(), (1280, 800), "the window's size");
    // Not blank: a drawn bench has many colours and no colour covers most of the window.
    let mut counts = std::collections::HashMap::new();
    for p in image.pixels() {
        *counts.entry(p.0).or_insert(0usize) += 1;
    }
    let commonest = counts.values().copied().max().unwrap_or(0);
    assert!(counts.len() > 64, "only {} distinct colours", counts.len());
    assert!(
        commonest < image.pixels().len() * 9 / 10,
        "one colour covers {commonest} of {} pixels",
        image.pixels().len()
    );
}

#[test]
fn after_a_kill_the_recovery_copy_reproduces_the_exclusions_and_reasons() {
    if !have_xvfb() {
        return;
    }
    let config = tempfile::tempdir().expect("dir");
    let data = demo("calibration-run.csv");
    let recovery = config.path().join("recovery.plumb");
    let mut child = workbench(
        config.path(),
        &[
            &data.display().to_string(),
            "--y",
            "absorbance",
            "--x",
            "standard_mg_l",
            "--exclude",
            "9,14",
        ],
    );
    let start = Instant::now();
    while !recovery.exists() {
        assert!(
            start.elapsed() < Duration::from_secs(60),
            "no recovery copy appeared"
        );
        std::thread::sleep(Duration::from_millis(50));
    }
    // SIGKILL the whole process group: the workbench gets no chance to clean up.
    let killed = Command::new("kill")
        .args(["-KILL", "--", &format!("-{}", child.id())])
        .status()
        .expect("kill runs");
    assert!(killed.success());
    let _ = child.wait();

    let session =
        plumb_report::Session::load(&recovery).expect("the recovery copy is a whole session");
    let rows: Vec<usize> = session.exclusions.iter().map(|e| e.row).collect();
    assert_eq!(rows, vec![9, 14]);
    assert!(session
        .exclusions
        .iter()
        .all(|e| e.reason == "excluded from the command line (--exclude)"));
    assert_eq!(session.models[0].y, "absorbance");

    // The next start asks; restoring brings the same exclusions back.
    let mut wb = plumb_app::Workbench::new(Some(config.path().to_path_buf()));
    let Some(plumb_app::Ask::Recover(offer)) = wb.ask().cloned() else {
        panic!("the next start offers the recovery copy");
    };
    assert!(!offer.exclusions.is_empty());
    wb.apply(plumb_app::Action::Answer(true));
    let start = Instant::now();
    while wb.loaded().is_none() {
        assert!(
            start.elapsed() < Duration::from_secs(30),
            "restore did not load"
        );
        wb.poll();
        std::thread::sleep(Duration::from_millis(20));
    }
    let restored: Vec<(usize, String)> = wb
        .marks()
        .excluded
        .iter()
        .map(|(r, n)| (*r, n.reason.clone()))
        .collect();
    let expected: Vec<(usize, String)> = session
        .exclusions
        .iter()
        .map(|e| (e.row, e.reason.clone()))
        .collect();
    assert_eq!(restored, expected);
    assert!(
        wb.has_unsaved_changes(),
        "restored work stays unsaved until it is saved"
    );
}
