//! The colleague summary end to end: contents, determinism, and the session round trip.

use std::path::Path;

use plumb_data::analysis::{
    agree, analyze, calibrate, AgreementRequest, CalibrationRequest, FitRequest, RowOrder, Unknown,
    Wanted,
};
use plumb_data::{load, LoadOptions};
use plumb_report::report::{build, write, ReportInput};
use plumb_report::{file_sha256, Exclusion};

fn jar() -> std::path::PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../../demo-scenarios/data/jar-tests.csv")
}

fn input_for(table: &plumb_data::Table) -> ReportInput<'_> {
    ReportInput {
        table,
        sha256: file_sha256(&jar()).expect("hash"),
        request: FitRequest {
            y: "settled_ntu".into(),
            x: vec!["dose_mg_l".into()],
            degree: 2,
            exclude: vec![17, 38],
            ..FitRequest::default()
        },
        exclusions: vec![Exclusion {
            row: 17,
            reason: "decimal point slipped".into(),
            at: Some("2026-12-02T09:00:00Z".into()),
        }],
        reproduce: "plumb report jar.plumb -o summary.html".into(),
        comparison: None,
        calibration: None,
        agreement: None,
        order: RowOrder::None,
    }
}

#[test]
fn the_same_inputs_give_byte_identical_files() {
    let table = load(&jar(), &LoadOptions::default()).expect("demo loads");
    let a = build(&input_for(&table)).expect("builds");
    let b = build(&input_for(&table)).expect("builds");
    assert_eq!(a, b);
    let dir = tempfile::tempdir().expect("tempdir");
    let data = jar();
    let inputs = [plumb_report::guard::Input {
        path: &data,
        what: "the data file",
    }];
    let files = write(&a, &dir.path().join("summary.html"), &inputs).expect("writes");
    assert_eq!(files.len(), 11, "html, two csv, four charts as svg and png");
    for f in &files {
        assert!(
            std::fs::metadata(f).expect("written").len() > 0,
            "{}",
            f.display()
        );
    }
    let png = std::fs::read(dir.path().join("summary-pair.png")).expect("png");
    assert_eq!(&png[..8], b"\x89PNG\r\n\x1a\n");
}

#[test]
fn the_page_shows_what_was_excluded_and_why() {
    let table = load(&jar(), &LoadOptions::default()).expect("demo loads");
    let r = build(&input_for(&table)).expect("builds");
    for needle in [
        "decimal point slipped",
        "2026-12-02T09:00:00Z",
        "no reason given",
        "all exclusions together",
        "<b>R² = ",
        "of the variation in settled_ntu around its mean",
        "whole-model test",
        "± standard error",
        "Association is not causation",
        "validation protocol",
        "plumb report jar.plumb -o summary.html",
        "<svg",
    ] {
        assert!(r.html.contains(needle), "missing {needle}");
    }
    for fetch in ["<script", "<link", " src=", "url("] {
        assert!(
            !r.html.contains(fetch),
            "the page loads nothing from elsewhere ({fetch})"
        );
    }
    assert!(
        r.exclusions_csv.lines().count() == 4,
        "{}",
        r.exclusions_csv
    );
    assert!(
        r.statistics_csv
            .contains("coefficient,estimate,dose_mg_l^2,"),
        "{}",
        r.statistics_csv
    );
}

/// The value of `section,name,term` in the statistics CSV.
fn stat(csv: &str, key: &str) -> f64 {
    csv.lines()
        .find_map(|l| l.strip_prefix(key)?.strip_prefix(',')?.parse().ok())
        .unwrap_or_else(|| panic!("{key} not in\n{csv}"))
}

#[test]
fn a_kept_model_and_a_grouping_factor_reach_the_page_and_the_statistics() {
    let table = load(&jar(), &LoadOptions::default()).expect("demo loads");
    let mut input = input_for(&table);
    input.comparison = Some(FitRequest {
        degree: 1,
        ..input.request.clone()
    });
    let r = build(&input).expect("builds");
    for needle in ["Beside another model", "Partial F", "other model"] {
        assert!(r.html.contains(needle), "missing {needle}");
    }
    // One added term: the partial F is the square of its t (textbook identity), from the fit's
    // own coefficient table.
    let t = stat(&r.statistics_csv, "coefficient,t,dose_mg_l^2");
    let f = stat(&r.statistics_csv, "comparison,partial_f,f_statistic");
    assert!((f - t * t).abs() < 1e-8 * f, "F {f}, t² {}", t * t);
    let svg = &r.charts[0].svg;
    assert!(
        svg.contains("other model"),
        "the kept curve has a legend entry"
    );

    let mut grouped = input_for(&table);
    grouped.request.degree = 1;
    grouped.request.factor = Some(plumb_data::analysis::Factor {
        column: "analyst".into(),
        reference: Some("MB".into()),
        separate_slopes: true,
    });
    grouped.request.response =
        plumb_data::analysis::ResponseScale::Fixed(plumb_core::regression::Transform::Ln);
    let r = build(&grouped).expect("builds");
    for needle in [
        "Groups by analyst",
        "Reference level MB",
        "equal slopes of dose_mg_l",
        "ln(settled_ntu) =",
        "the typical miss and the residuals are on ln(settled_ntu)",
        "fit, MB",
    ] {
        assert!(
            r.html.contains(needle) || r.charts[0].svg.contains(needle),
            "missing {needle}"
        );
    }
    let n: f64 = ["MB", "IK", "TS"]
        .iter()
        .map(|l| stat(&r.statistics_csv, &format!("group_slope,n,{l}")))
        .sum();
    assert_eq!(
        n,
        stat(&r.statistics_csv, "rows,used,"),
        "the groups share out the rows"
    );
    assert!(r.statistics_csv.contains("scale,response,,ln"));
}

fn demo(name: &str) -> std::path::PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("../../demo-scenarios/data")
        .join(name)
}

#[test]
fn a_calibration_summary_carries_its_unknowns_limits_and_weightings() {
    let path = demo("trace-copper.csv");
    let table = load(&path, &LoadOptions::default()).expect("demo loads");
    let request = FitRequest {
        y: "counts".into(),
        x: vec!["copper_ug_l".into()],
        weight_rule: Some(plumb_core::calibration::WeightRule::InverseX2),
        ..FitRequest::default()
    };
    let calibration = CalibrationRequest {
        unknowns: vec![Unknown {
            name: "rinse-7".into(),
            readings: vec![4620.0, 4575.0],
        }],
        ..CalibrationRequest::default()
    };
    let input = ReportInput {
        table: &table,
        sha256: file_sha256(&path).expect("hash"),
        request: request.clone(),
        exclusions: Vec::new(),
        reproduce: "plumb report trace.plumb -o s.html".into(),
        comparison: None,
        calibration: Some(calibration.clone()),
        agreement: None,
        order: RowOrder::Column("run".into()),
    };
    let report = build(&input).expect("builds");
    // The same numbers through the analysis route directly, formatted as the page does.
    let a = analyze(&table, &request, Wanted::default()).expect("fits");
    let c = calibrate(&request, &a, &calibration).expect("a calibration");
    let rb = c.unknowns[0].1.as_ref().expect("reads back");
    let x = plumb_report::text::num(rb.x);
    assert!(report.html.contains("<h2>Calibration</h2>"));
    assert!(
        report.html.contains("<td>rinse-7</td><td>2</td>"),
        "the unknown's row"
    );
    assert!(report.html.contains(&x), "x̂ {x} on the page");
    let lod = plumb_report::text::num(c.limits.as_ref().expect("a line").detection);
    assert!(report.html.contains(&lod), "LOD {lod} on the page");
    assert!(
        report.html.contains("Durbin–Watson"),
        "checks along the run order"
    );
    assert!(report.charts.iter().any(|ch| ch.name == "weightings"));
    let csv_x = format!("unknown,x,rinse-7,{}", plumb_report::text::exact(rb.x));
    assert!(report.statistics_csv.contains(&csv_x), "{csv_x}");
}

#[test]
fn a_method_comparison_summary_carries_both_lines_and_the_limits() {
    let path = demo("chlorine-meters.csv");
    let table = load(&path, &LoadOptions::default()).expect("demo loads");
    let request = FitRequest {
        y: "meter_mg_l".into(),
        x: vec!["lab_mg_l".into()],
        exclude: vec![23],
        ..FitRequest::default()
    };
    let agreement = AgreementRequest {
        reference: "lab_mg_l".into(),
        test: "meter_mg_l".into(),
        exclude: vec![23],
        ..AgreementRequest::default()
    };
    let input = ReportInput {
        table: &table,
        sha256: file_sha256(&path).expect("hash"),
        request,
        exclusions: vec![Exclusion {
            row: 23,
            reason: "bubble in the cuvette".into(),
            at: None,
        }],
        reproduce: "plumb report chlorine.plumb -o s.html".into(),
        comparison: None,
        calibration: None,
        agreement: Some(agreement.clone()),
        order: RowOrder::None,
    };
    let report = build(&input).expect("builds");
    let direct = agree(&table, &agreement).expect("compares");
    assert_eq!(direct.selection.rows.len(), 63, "row 23 is left out");
    let pb = direct.passing_bablok.as_ref().expect("a line");
    let l = direct.limits.as_ref().expect("limits");
    assert!(report.html.contains("<h2>Method comparison</h2>"));
    for v in [pb.slope, pb.intercept, l.bias, l.lower, l.upper] {
        let shown = plumb_report::text::num(v);
        assert!(report.html.contains(&shown), "{shown} on the page");
    }
    let names: Vec<&str> = report.charts.iter().map(|c| c.name).collect();
    assert!(names.contains(&"differences"), "{names:?}");
    let mut unique = names.clone();
    unique.sort_unstable();
    unique.dedup();
    assert_eq!(unique.len(), names.len(), "one file per chart: {names:?}");
    assert!(report.statistics_csv.contains(&format!(
        "passing_bablok,slope,,{}",
        plumb_report::text::exact(pb.slope)
    )));
}

#[test]
fn a_column_called_intercept_is_not_taken_for_the_intercept() {
    // y = 1 + 2x with x in a column named "intercept": the exclusion log's slope is 2-ish
    // (the column's coefficient), not the intercept's 1.
    let dir = tempfile::tempdir().expect("dir");
    let path = dir.path().join("ic.csv");
    std::fs::write(&path, "intercept,y\n1,3.1\n2,4.9\n3,7.2\n4,8.8\n5,11.1\n").expect("write");
    let table = load(&path, &LoadOptions::default()).expect("loads");
    let request = FitRequest {
        y: "y".into(),
        x: vec!["intercept".into()],
        exclude: vec![2],
        ..FitRequest::default()
    };
    let effects = plumb_report::exclusion_effects(&table, &request).expect("effects");
    // Least squares on rows 1, 3, 4, 5 by hand: x̄ = 3.25, ȳ = 7.55, Sxy = 17.25, Sxx = 8.75.
    assert!(
        (effects[0].after.slope - 17.25 / 8.75).abs() < 1e-12,
        "{:?}",
        effects[0]
    );
    let a = analyze(&table, &request, Wanted::default()).expect("fits");
    let names: Vec<&str> = a.fit.coefficients.iter().map(|c| c.term.as_str()).collect();
    assert_eq!(names, ["(intercept)", "intercept"]);
}
