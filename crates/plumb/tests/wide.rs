//! Wide tables: a matrix over k columns holds k² cells, so past a cap the command line and the
//! map refuse with the size they would need instead of exhausting memory; below it, a map too
//! dense for one shape a cell is drawn as an image and still counts its pairs.

mod common;

use std::path::{Path, PathBuf};
use std::time::{Duration, Instant};

use eframe::egui;
use egui_kittest::kittest::Queryable;
use egui_kittest::Harness;
use plumb_app::{Action, Workbench};

use common::run_plumb;

/// A CSV of `k` numeric columns `c0…` and 6 rows of varied values.
fn wide_csv(dir: &Path, k: usize) -> PathBuf {
    let path = dir.join(format!("wide-{k}.csv"));
    let header: Vec<String> = (0..k).map(|i| format!("c{i}")).collect();
    let mut text = header.join(",") + "\n";
    for row in 0..6usize {
        let cells: Vec<String> = (0..k)
            .map(|i| ((row * 7 + i * 13) % 11 + row).to_string())
            .collect();
        text.push_str(&(cells.join(",") + "\n"));
    }
    std::fs::write(&path, text).expect("write");
    path
}

#[test]
fn corr_refuses_a_matrix_past_the_cap_and_says_how_to_name_columns() {
    let dir = tempfile::tempdir().expect("tempdir");
    let k = plumb_core::association::MATRIX_MAX_COLUMNS + 1;
    let data = wide_csv(dir.path(), k);
    let file = data.to_string_lossy().into_owned();
    let (code, _, stderr) = run_plumb(&["corr", &file]);
    assert_eq!(code, 1, "{stderr}");
    assert!(!stderr.contains("panicked"), "{stderr}");
    let pairs = k * (k - 1) / 2;
    for part in [
        file.as_str(),
        &format!("{k} numeric columns make {pairs} pairs"),
        "--columns",
    ] {
        assert!(stderr.contains(part), "missing '{part}' in: {stderr}");
    }
    let (code, stdout, stderr) = run_plumb(&["corr", &file, "--columns", "c0,c1,c2"]);
    assert_eq!(code, 0, "{stderr}");
    assert!(stdout.contains("3 pairs of 3 columns"), "{stdout}");
}

fn workbench_on(data: &Path, config: &Path) -> Harness<'static, Workbench> {
    let mut h = Harness::builder()
        .with_size(egui::Vec2::new(1440.0, 900.0))
        .build_ui_state(
            |ui, wb: &mut Workbench| wb.show(ui),
            Workbench::new(Some(config.to_path_buf())),
        );
    h.state_mut().apply(Action::Open(data.to_path_buf()));
    settle(&mut h);
    h.get_by_label("Co-movement map").click();
    settle(&mut h);
    h
}

fn settle(h: &mut Harness<'_, Workbench>) {
    let start = Instant::now();
    while h.state().is_busy() {
        h.step();
        assert!(start.elapsed() < Duration::from_secs(120), "still busy");
        std::thread::sleep(Duration::from_millis(10));
    }
    h.run_steps(3);
}

#[test]
fn the_map_of_a_table_past_the_cap_says_why_instead_of_computing() {
    let dir = tempfile::tempdir().expect("tempdir");
    let k = plumb_core::association::MATRIX_MAX_COLUMNS + 1;
    let h = workbench_on(&wide_csv(dir.path(), k), dir.path());
    let pairs = k * (k - 1) / 2;
    assert!(h
        .query_by_label_contains(&format!("No map: {k} numeric columns make {pairs} pairs"))
        .is_some());
    assert!(h.state().map().result().is_none(), "nothing computed");
}

#[test]
fn a_dense_map_is_drawn_and_counts_every_pair() {
    let dir = tempfile::tempdir().expect("tempdir");
    // 400 columns on a 900-point grid: cells of about 2 points, drawn as one image.
    let h = workbench_on(&wide_csv(dir.path(), 400), dir.path());
    let map = h.state().map().result().expect("map computed");
    assert_eq!(map.columns.len(), 400);
    assert!(h
        .query_by_label_contains("79800 pairs tested with Pearson r")
        .is_some());
}
