//! The workbench driven through its accessibility tree (egui_kittest), as an analyst would:
//! open a demo file, pick a pair, exclude a row, undo, drag a point. The displayed R² is
//! checked against `plumb fit --exclude` for the same rows, so the live engine and the
//! command line are held to one answer.

mod common;

use std::path::Path;
use std::process::Command;
use std::time::Duration;

use eframe::egui;
use egui_kittest::kittest::{NodeT, Queryable};
use egui_kittest::Harness;
use plumb_app::{Action, Workbench};

use common::{cli_fit, demo, harness, open_by_typing, settle_ui as settle, sha256};

/// `R² = …` as the workbench prints it, for `plumb fit` on the same request.
fn cli_r_squared(data: &Path, y: &str, x: &str, exclude: &str) -> String {
    let v = cli_fit(data, y, x, exclude);
    format!(
        "R² = {}",
        plumb_report::text::num(v["r_squared"].as_f64().expect("r²"))
    )
}

fn shown_r_squared(h: &Harness<'_, Workbench>) -> String {
    let lines: Vec<String> = h
        .get_all_by_label_contains("R² = ")
        // A label keeps its text in the accessibility node's value.
        .filter_map(|n| n.accesskit_node().value())
        .filter(|l| l.starts_with("R² = "))
        .collect();
    assert_eq!(lines.len(), 1, "one headline R²: {lines:?}");
    lines[0].clone()
}

fn choose(h: &mut Harness<'_, Workbench>, combo: &str, option: &str) {
    h.get_by_label(combo).click();
    h.run_steps(2);
    let options = h.get_all_by_label(option).collect::<Vec<_>>();
    options.last().expect("the option is listed").click();
    h.run_steps(2);
}

fn open_calibration(h: &mut Harness<'_, Workbench>, data: &Path) {
    open_by_typing(h, data);
    h.get_by_label("Pair bench").click();
    h.run_steps(2);
    choose(h, "y:", "absorbance");
    choose(h, "x:", "standard_mg_l");
    settle(h);
    let pair = h.state().bench().pair().expect("pair on the bench");
    assert_eq!(
        (pair.spec.y.as_str(), pair.spec.x0()),
        ("absorbance", "standard_mg_l")
    );
}

#[test]
fn excluding_a_row_shows_the_same_r_squared_as_the_command_line_and_undo_restores_it() {
    let config = tempfile::tempdir().expect("config dir");
    let data = demo("calibration-run.csv");
    let before_hash = sha256(&data);
    let mut h = harness(config.path());
    open_calibration(&mut h, &data);
    let all_rows = cli_r_squared(&data, "absorbance", "standard_mg_l", "");
    assert_eq!(shown_r_squared(&h), all_rows);

    h.get_by_label("Exclude row:").click();
    h.run_steps(1);
    h.get_by_label("Exclude row:").type_text("14");
    h.get_by_label("Exclude").click();
    // The click's action is applied after its frame; the prompt is laid out the frame after.
    h.run_steps(3);
    let prompt = h.get_by_label("Why leave out row 14?");
    prompt.click();
    h.run_steps(1);
    h.get_by_label("Why leave out row 14?")
        .type_text("standard drifted: lamp warming up");
    h.run_steps(1);
    h.get_by_label("Record reason").click();
    settle(&mut h);
    assert!(h.state().bench().prompt().is_none());
    let note = h.state().marks().excluded.get(&14).expect("row 14 is out");
    assert_eq!(note.reason, "standard drifted: lamp warming up");
    let without_14 = cli_r_squared(&data, "absorbance", "standard_mg_l", "14");
    assert_ne!(
        without_14, all_rows,
        "the exclusion must change the answer for this check to bite"
    );
    assert_eq!(shown_r_squared(&h), without_14);
    assert!(h.state().window_title().ends_with("• unsaved"));

    // The recovery copy already holds the exclusion and its reason.
    let recovery =
        plumb_report::Session::load(&config.path().join("recovery.plumb")).expect("recovery copy");
    assert_eq!(recovery.exclusions[0].row, 14);
    assert_eq!(
        recovery.exclusions[0].reason,
        "standard drifted: lamp warming up"
    );

    h.get_by_label("Undo").click();
    settle(&mut h);
    assert_eq!(shown_r_squared(&h), all_rows);
    assert!(h.state().marks().excluded.is_empty());
    h.get_by_label("Redo").click();
    settle(&mut h);
    assert_eq!(shown_r_squared(&h), without_14);
    // Ctrl+Z does the same as the button once no text field has focus.
    h.key_press_modifiers(egui::Modifiers::COMMAND, egui::Key::Z);
    settle(&mut h);
    assert_eq!(shown_r_squared(&h), all_rows);
    assert_eq!(sha256(&data), before_hash, "the data file is never written");
}

#[test]
fn dragging_a_point_changes_the_numbers_as_a_what_if_and_leaves_the_data_alone() {
    let config = tempfile::tempdir().expect("config dir");
    let data = demo("calibration-run.csv");
    let before_hash = sha256(&data);
    let mut h = harness(config.path());
    open_calibration(&mut h, &data);
    let start = shown_r_squared(&h);
    h.get_by_label("drag moves y (what-if)").click();
    h.run_steps(2);

    let (row, from) = {
        let wb = h.state();
        let pair = wb.bench().pair().expect("pair");
        let i = pair.index_of(5).expect("row 5 is in the pair");
        let t = wb.scatter_transform().expect("scatter drawn");
        let at = t.position_from_point(&egui_plot::PlotPoint::new(pair.x[i], pair.y[i]));
        (pair.rows[i], (at, pair.x[i], pair.y[i]))
    };
    let (p0, x0, y0) = from;
    let p1 = p0 + egui::vec2(0.0, -120.0);
    h.hover_at(p0);
    h.step();
    h.drag_at(p0);
    h.step();
    for k in 1..=6 {
        h.hover_at(p0 + (p1 - p0) * (k as f32 / 6.0));
        h.step();
    }
    h.drop_at(p1);
    settle(&mut h);

    let wb = h.state();
    let moved = wb
        .marks()
        .moved
        .get(&row)
        .copied()
        .expect("the row was moved");
    assert!(
        moved.0 == x0 && moved.1 > y0,
        "moved upward, its x kept (no Shift held): {moved:?} from ({x0}, {y0})"
    );
    assert_ne!(shown_r_squared(&h), start, "the numbers follow the drag");
    assert!(
        h.query_by_label_contains("WHAT-IF").is_some(),
        "marked as hypothetical"
    );
    // The table in memory and the file on disk keep the measured value.
    let table = &wb.loaded().expect("loaded").dataset.table;
    assert_eq!(
        table.numeric("absorbance").expect("column").get(row - 1),
        Some(y0)
    );
    assert_eq!(sha256(&data), before_hash);
    // One undo takes back the whole drag.
    h.get_by_label("Undo").click();
    settle(&mut h);
    assert!(!h.state().marks().is_hypothetical());
    assert_eq!(shown_r_squared(&h), start);
}

#[test]
fn the_map_counts_the_pairs_tested_and_a_strong_pair_opens_on_the_bench() {
    let config = tempfile::tempdir().expect("config dir");
    let data = demo("field-survey.csv");
    let mut h = harness(config.path());
    h.state_mut().apply(Action::Open(data.clone()));
    settle(&mut h);
    h.get_by_label("Co-movement map").click();
    settle(&mut h);
    // Seven numeric columns: 7·6/2 = 21 pairs, all adjusted together.
    assert!(h
        .query_by_label_contains(
            "21 pairs tested with Pearson r; p adjusted by Holm's step-down over all 21"
        )
        .is_some());
    h.get_by_label("visit_day and sward_height_cm").click();
    settle(&mut h);
    assert_eq!(h.state().screen(), plumb_app::Screen::Bench);
    let pair = h.state().bench().pair().expect("pair");
    assert_eq!(
        (pair.spec.y.as_str(), pair.spec.x0()),
        ("visit_day", "sward_height_cm")
    );
}

#[test]
fn a_saved_session_reopens_with_the_same_exclusions_reasons_and_numbers() {
    let config = tempfile::tempdir().expect("config dir");
    let work = tempfile::tempdir().expect("work dir");
    let data = work.path().join("calibration-run.csv");
    std::fs::copy(demo("calibration-run.csv"), &data).expect("copy");
    let mut h = harness(config.path());
    open_calibration(&mut h, &data);
    h.state_mut().apply(Action::Exclude {
        rows: vec![9, 14],
        reason: None,
    });
    h.state_mut()
        .apply(Action::RecordReason("both read during lamp warm-up".into()));
    settle(&mut h);
    let shown = shown_r_squared(&h);
    let session = work.path().join("run.plumb");
    h.state_mut().apply(Action::SaveSessionTo(session.clone()));
    h.step();
    assert!(!h.state().has_unsaved_changes(), "{:?}", h.state().status());
    assert!(
        !config.path().join("recovery.plumb").exists(),
        "a save clears the recovery copy"
    );
    let summary = work.path().join("summary.html");
    h.state_mut()
        .apply(Action::ExportSummaryTo(summary.clone()));
    let html = std::fs::read_to_string(&summary).expect("summary written");
    assert!(
        html.contains("both read during lamp warm-up"),
        "reasons are in the summary"
    );
    assert!(
        html.contains("run.plumb"),
        "it names the session that reproduces it"
    );

    let mut again = harness(config.path());
    again.state_mut().apply(Action::Open(session.clone()));
    settle(&mut again);
    again.get_by_label("Pair bench").click();
    settle(&mut again);
    let marks = again.state().marks().clone();
    assert_eq!(
        marks.excluded.keys().copied().collect::<Vec<_>>(),
        vec![9, 14]
    );
    assert!(marks
        .excluded
        .values()
        .all(|n| n.reason == "both read during lamp warm-up"));
    assert_eq!(shown_r_squared(&again), shown);
    assert_eq!(
        shown,
        cli_r_squared(&data, "absorbance", "standard_mg_l", "9,14")
    );
}

/// A file over the memory cap is offered the one-pass view; its R² must equal `plumb stream`
/// (which is itself checked against `plumb fit` on a file read whole), the data file is left
/// as it was, and the view never loads the table.
#[test]
fn a_file_over_the_memory_cap_opens_in_the_one_pass_view_with_the_command_lines_numbers() {
    let config = tempfile::tempdir().expect("config dir");
    let dir = tempfile::tempdir().expect("data dir");
    let data = dir.path().join("long-log.csv");
    let mut text = String::from("t,load_kw,temp_c\n");
    for i in 0..60_000u32 {
        let load = f64::from(i % 700) / 10.0;
        let wobble = f64::from((i * 7919) % 211) / 21.1 - 5.0;
        text.push_str(&format!(
            "{i},{load:.2},{:.3}\n",
            18.0 + 0.4 * load + wobble
        ));
    }
    std::fs::write(&data, &text).expect("write");
    let before = sha256(&data);
    let mut h = harness(config.path());
    h.state_mut().set_memory_limit(Some(1_000_000));
    common::type_path_and_open(&mut h, &data);
    h.run_steps(3);
    assert!(
        matches!(h.state().ask(), Some(plumb_app::Ask::TooLarge { .. })),
        "asked about the size: {:?}",
        h.state().ask()
    );
    h.get_by_label("Read it in one pass").click();
    h.run_steps(2);
    choose(&mut h, "y:", "temp_c");
    choose(&mut h, "x:", "load_kw");
    h.state_mut().settle(Duration::from_secs(60));
    settle(&mut h);
    assert!(h.state().loaded().is_none(), "the table was not loaded");
    let shown = shown_r_squared(&h);
    let out = Command::new(env!("CARGO_BIN_EXE_plumb"))
        .args([
            "stream",
            &data.display().to_string(),
            "--y",
            "temp_c",
            "--x",
            "load_kw",
            "--format",
            "json",
        ])
        .output()
        .expect("plumb runs");
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).expect("json");
    let cli = format!(
        "R² = {}",
        plumb_report::text::num(v["r_squared"].as_f64().expect("r²"))
    );
    assert_eq!(shown, cli);
    assert_eq!(v["n"], 60_000);
    assert_eq!(sha256(&data), before, "the data file is never written");
}

/// `R² = …` for `plumb fit DATA ARGS…`, with the scale and weighting the bench names.
fn cli_r_squared_with(data: &Path, args: &[&str], kinds: &str) -> String {
    let v = common::cli_fit_with(data, args);
    let r2 = plumb_report::text::num(v["r_squared"].as_f64().expect("r²"));
    format!("R² = {r2}{kinds}")
}

/// Model building as an analyst clicks it: a second predictor, a grouping factor, the kept
/// fit beside a smaller model with its partial F, and a log scale on the response; each
/// headline equals `plumb fit` with the same flags.
#[test]
fn a_predictor_a_factor_a_comparison_and_a_log_scale_are_built_by_clicking() {
    let config = tempfile::tempdir().expect("config dir");
    let work = tempfile::tempdir().expect("work dir");
    let data = work.path().join("jar-tests.csv");
    std::fs::copy(demo("jar-tests.csv"), &data).expect("copy");
    let mut h = harness(config.path());
    h.state_mut().apply(Action::Open(data.clone()));
    settle(&mut h);
    h.get_by_label("Pair bench").click();
    h.run_steps(2);
    choose(&mut h, "y:", "settled_ntu");
    choose(&mut h, "x:", "dose_mg_l");
    settle(&mut h);
    // A chooser without a label is found by what it shows.
    h.get_by_value("+ predictor").click();
    h.run_steps(2);
    h.get_all_by_label("raw_ntu")
        .last()
        .expect("listed")
        .click();
    settle(&mut h);
    choose(&mut h, "group by:", "analyst");
    settle(&mut h);
    let spec = h.state().bench().pair().expect("pair").spec.clone();
    assert_eq!(spec.x, ["dose_mg_l", "raw_ntu"]);
    assert_eq!(
        spec.factor.as_ref().map(|f| f.column.as_str()),
        Some("analyst")
    );
    let full = [
        "--y",
        "settled_ntu",
        "--x",
        "dose_mg_l",
        "--x",
        "raw_ntu",
        "--group",
        "analyst",
    ];
    assert_eq!(shown_r_squared(&h), cli_r_squared_with(&data, &full, ""));
    assert!(h.query_by_label_contains("Groups by analyst").is_some());

    h.get_by_label("Keep this fit to compare").click();
    settle(&mut h);
    h.get_by_label("×").click();
    settle(&mut h);
    assert_eq!(
        h.state().bench().pair().expect("pair").spec.x,
        ["dose_mg_l"]
    );
    let cli = common::cli_fit_with(
        &data,
        &[&full[..], &["--compare-without", "raw_ntu"]].concat(),
    );
    let f = &cli["comparison"]["partial_f"];
    let df = |k: &str| usize::try_from(f[k].as_u64().expect("df")).expect("small");
    let expected = format!(
        "partial F: {}",
        plumb_report::wording::numbers::f_figures(
            f["f_statistic"].as_f64().expect("F"),
            df("df_num"),
            df("df_den"),
            f["p_value"].as_f64().expect("p")
        )
    );
    assert!(
        h.query_by_label(&expected).is_some(),
        "the bench shows {expected}"
    );
    h.get_by_label("stop comparing").click();
    settle(&mut h);
    assert!(h.state().bench().kept().is_none());

    // The response's scale is the first "as measured" chooser.
    h.get_all_by_value("as measured")
        .next()
        .expect("scale")
        .click();
    h.run_steps(2);
    h.get_all_by_label("ln").last().expect("ln listed").click();
    settle(&mut h);
    let logged = [
        "--y",
        "settled_ntu",
        "--x",
        "dose_mg_l",
        "--group",
        "analyst",
        "--transform-y",
        "ln",
    ];
    assert_eq!(
        shown_r_squared(&h),
        cli_r_squared_with(&data, &logged, " (on ln(settled_ntu))")
    );
}

/// Calibration by clicking: switch the bench to calibration, type two unknowns, read them back;
/// the table shows each x̂ as `plumb calibrate` computes it, and choosing σ from the intercept
/// changes the limits shown to that route's.
#[test]
fn typed_unknowns_are_read_back_as_plumb_calibrate_reads_them() {
    let config = tempfile::tempdir().expect("config");
    let data = demo("calibration-run.csv");
    let mut h = harness(config.path());
    open_calibration(&mut h, &data);
    h.get_by_label("calibration").click();
    settle(&mut h);
    let field = "Unknowns (a name, then its readings; one sample per line):";
    h.get_by_label(field).click();
    h.run_steps(1);
    h.get_by_label(field).type_text("A7 0.412 0.418\nB2 0.305");
    h.run_steps(1);
    h.get_by_label("Read these back").click();
    settle(&mut h);
    let out = Command::new(env!("CARGO_BIN_EXE_plumb"))
        .arg("calibrate")
        .arg(&data)
        .args(["--y", "absorbance", "--x", "standard_mg_l"])
        .args(["--unknown", "A7=0.412,0.418", "--unknown", "B2=0.305"])
        .args(["--sigma", "intercept", "--format", "json"])
        .output()
        .expect("plumb runs");
    assert!(out.status.success());
    let cli: serde_json::Value = serde_json::from_slice(&out.stdout).expect("json");
    for u in cli["unknowns"].as_array().expect("unknowns") {
        // The table shows four significant digits (the full value on hover).
        let x = plumb_report::text::sig(u["x"].as_f64().expect("x̂"), 4);
        assert!(
            h.query_by_label(&x).is_some(),
            "{}'s x̂ {x} is in the table",
            u["name"]
        );
    }
    h.get_by_label("intercept's standard error").click();
    settle(&mut h);
    let lod = plumb_report::text::num(cli["limits"]["detection"].as_f64().expect("LOD"));
    let shown = h
        .get_all_by_label_contains("LOD ")
        .filter_map(|n| n.accesskit_node().value())
        .collect::<Vec<_>>();
    assert!(
        shown.iter().any(|s| s.contains(&lod)),
        "LOD {lod} from the intercept's SE: {shown:?}"
    );
}
