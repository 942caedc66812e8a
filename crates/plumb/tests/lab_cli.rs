//! The command-line contract of `plumb calibrate`, `plumb agree` and the checks in
//! `plumb fit`: their JSON fields, what they refuse and how they say it.

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

use serde_json::Value;

fn plumb(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_plumb"))
        .args(args)
        .output()
        .expect("plumb runs")
}

fn json(out: &Output) -> Value {
    assert!(
        out.status.success(),
        "plumb failed: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    serde_json::from_slice(&out.stdout).expect("one JSON object")
}

fn failure(out: &Output) -> String {
    assert_eq!(
        out.status.code(),
        Some(1),
        "{}",
        String::from_utf8_lossy(&out.stdout)
    );
    let e = String::from_utf8_lossy(&out.stderr).into_owned();
    assert!(!e.contains("panicked"), "{e}");
    e
}

fn demo(name: &str) -> String {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("../../demo-scenarios/data")
        .join(name)
        .to_string_lossy()
        .into_owned()
}

fn write(dir: &Path, name: &str, text: &str) -> PathBuf {
    let path = dir.join(name);
    std::fs::write(&path, text).expect("temp file");
    path
}

#[test]
fn calibrate_reads_the_second_file_and_flags_an_extrapolation() {
    let cal = demo("calibration-run.csv");
    let unknowns = demo("calibration-unknowns.csv");
    let v = json(&plumb(&[
        "calibrate",
        &cal,
        "--y",
        "absorbance",
        "--x",
        "standard_mg_l",
        "--unknowns-file",
        &unknowns,
        "--unknowns-sample",
        "sample",
        "--format",
        "json",
    ]));
    let u = v["unknowns"].as_array().expect("unknowns");
    let names: Vec<&str> = u
        .iter()
        .map(|u| u["name"].as_str().expect("name"))
        .collect();
    assert_eq!(
        names,
        [
            "river-north",
            "river-south",
            "spiked-blank",
            "tank-3",
            "field-blank"
        ]
    );
    let tank = &u[3];
    assert_eq!(tank["replicates"], 2);
    assert_eq!(
        tank["outside_range"], true,
        "46 mg/L is above the 40 mg/L standard"
    );
    assert_eq!(u[0]["outside_range"], false);
    // The mean of the river-north readings as written in the file (by hand).
    let mean = (0.2730 + 0.2658 + 0.2729) / 3.0;
    assert!((tank["mean_reading"].as_f64().expect("mean") - (1.0035 + 0.9962) / 2.0).abs() < 1e-12);
    assert!((u[0]["mean_reading"].as_f64().expect("mean") - mean).abs() < 1e-12);
    for key in [
        "limits",
        "limits_other_sigma",
        "lack_of_fit",
        "weightings",
        "checks",
    ] {
        assert!(v.get(key).is_some(), "{key}");
    }
    assert_eq!(v["weightings"].as_array().expect("rows").len(), 5);
    assert!(v["weightings"][1]["undefined"]
        .as_str()
        .expect("1/x")
        .contains("x = 0"));
}

#[test]
fn a_quadratic_calibration_reads_back_but_has_no_straight_line_limits() {
    let cal = demo("trace-copper.csv");
    let v = json(&plumb(&[
        "calibrate",
        &cal,
        "--y",
        "counts",
        "--x",
        "copper_ug_l",
        "--degree",
        "2",
        "--weighting",
        "1/x2",
        "--unknown",
        "S=45210",
        "--format",
        "json",
    ]));
    let x = v["unknowns"][0]["x"].as_f64().expect("x̂");
    assert!((40.0..60.0).contains(&x), "{x}");
    assert_eq!(v["unknowns"][0]["exact"]["kind"], "bounded");
    assert!(v["limits"]["undefined"]
        .as_str()
        .expect("why")
        .contains("straight line"));
}

#[test]
fn the_text_says_the_cautions_and_where_sigma_came_from() {
    let cal = demo("calibration-run.csv");
    let out = plumb(&[
        "calibrate",
        &cal,
        "--y",
        "absorbance",
        "--x",
        "standard_mg_l",
        "--unknown",
        "A=0.3",
        "--sigma",
        "intercept",
    ]);
    assert!(out.status.success());
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(
        text.contains("σ = standard error of the intercept"),
        "{text}"
    );
    assert!(text.contains("confirm them with samples near the limits"));
    assert!(text.contains("Association is not causation"));
    assert!(text.contains("validation protocol"));
}

#[test]
fn calibrate_refuses_what_is_not_a_curve_in_one_variable() {
    let cal = demo("calibration-run.csv");
    let e = failure(&plumb(&[
        "calibrate",
        &cal,
        "--y",
        "absorbance",
        "--x",
        "standard_mg_l",
        "--x",
        "lamp_hours",
    ]));
    assert!(e.contains("give one --x and no grouping"), "{e}");
    let e = failure(&plumb(&[
        "calibrate",
        &cal,
        "--y",
        "absorbance",
        "--x",
        "standard_mg_l",
        "--transform-y",
        "ln",
    ]));
    assert!(e.contains("remove the transforms"), "{e}");
}

#[test]
fn a_bad_unknowns_file_is_named_with_its_column() {
    let dir = tempfile::tempdir().expect("dir");
    let bad = write(
        dir.path(),
        "unknowns.csv",
        "sample,absorbance\nA,0.2\nB,high\n",
    );
    let cal = demo("calibration-run.csv");
    let e = failure(&plumb(&[
        "calibrate",
        &cal,
        "--y",
        "absorbance",
        "--x",
        "standard_mg_l",
        "--unknowns-file",
        &bad.to_string_lossy(),
    ]));
    assert!(
        e.contains("unknowns.csv") && e.contains("absorbance") && e.contains("row 2"),
        "{e}"
    );
    let out = plumb(&[
        "calibrate",
        &cal,
        "--y",
        "absorbance",
        "--x",
        "standard_mg_l",
        "--unknown",
        "A7=0.4,x",
    ]);
    assert_eq!(out.status.code(), Some(2), "a usage error");
    assert!(String::from_utf8_lossy(&out.stderr).contains("is not NAME=READING"));
}

#[test]
fn agree_reports_both_lines_and_refuses_one_column_twice() {
    let data = demo("chlorine-meters.csv");
    let v = json(&plumb(&[
        "agree",
        &data,
        "--reference",
        "lab_mg_l",
        "--test",
        "meter_mg_l",
        "--format",
        "json",
    ]));
    assert_eq!(v["n"], 64);
    for key in ["slope", "intercept", "interval", "linearity", "kendall_tau"] {
        assert!(v["passing_bablok"].get(key).is_some(), "{key}");
    }
    assert!(v["deming"]["slope_low"].as_f64().is_some());
    let d = &v["differences"];
    let (bias, lo, hi) = (
        d["bias"].as_f64().expect("bias"),
        d["lower"].as_f64().expect("lower"),
        d["upper"].as_f64().expect("upper"),
    );
    let (sd, z) = (
        d["sd"].as_f64().expect("sd"),
        d["multiplier"].as_f64().expect("z"),
    );
    assert!((bias - z * sd - lo).abs() < 1e-12 && (bias + z * sd - hi).abs() < 1e-12);
    let e = failure(&plumb(&[
        "agree",
        &data,
        "--reference",
        "lab_mg_l",
        "--test",
        "lab_mg_l",
    ]));
    assert!(
        e.contains("chlorine-meters.csv") && e.contains("both methods"),
        "{e}"
    );
}

#[test]
fn percentages_of_a_zero_mean_name_the_row() {
    let dir = tempfile::tempdir().expect("dir");
    let path = write(
        dir.path(),
        "m.csv",
        "a,b\n1,1.1\n2,2.1\n0,0\n3,2.9\n4,4.2\n",
    );
    let v = json(&plumb(&[
        "agree",
        &path.to_string_lossy(),
        "--reference",
        "a",
        "--test",
        "b",
        "--percent",
        "--format",
        "json",
    ]));
    let why = v["differences"]["undefined"].as_str().expect("undefined");
    assert!(
        why.contains("m.csv, row 3") && why.contains("mean is 0"),
        "{why}"
    );
}

#[test]
fn fit_checks_follow_the_order_column_only_when_one_is_named() {
    let cal = demo("calibration-run.csv");
    let base = [
        "fit",
        &cal,
        "--y",
        "absorbance",
        "--x",
        "standard_mg_l",
        "--format",
        "json",
    ];
    let plain = json(&plumb(&base));
    assert!(plain["checks"]["sequence"].is_null());
    assert_eq!(plain["checks"]["normality"]["test"], "shapiro-wilk");
    let mut ordered = base.to_vec();
    ordered.extend(["--order", "standard_mg_l"]);
    let v = json(&plumb(&ordered));
    let seq = &v["checks"]["sequence"];
    assert_eq!(seq["column"], "standard_mg_l");
    let d = seq["durbin_watson"].as_f64().expect("d");
    assert!((0.0..=4.0).contains(&d));
    let mut file = base.to_vec();
    file.push("--file-order");
    let f = json(&plumb(&file));
    assert_ne!(
        f["checks"]["sequence"]["durbin_watson"], seq["durbin_watson"],
        "the file's order is not the order of concentration"
    );
    let mut read = base.to_vec();
    read.extend(["--order", "read_order"]);
    let r = json(&plumb(&read));
    assert_eq!(
        r["checks"]["sequence"]["durbin_watson"], f["checks"]["sequence"]["durbin_watson"],
        "the rows are stored in reading order"
    );
}
