//! The bench's calibration and method-comparison modes driven by actions alone: every number
//! they show is checked against `plumb calibrate`, `plumb agree` and `plumb fit` on the same
//! rows, before and after exclusions, and the mode with its unknowns survives a session.

mod common;

use std::path::Path;
use std::process::Command;

use common::{assert_same_numbers, cli_fit_with, close, demo, live, settle};

use plumb_app::{Action, BenchMode, FitSpec, Reading, Screen, Workbench};
use plumb_core::calibration::{Interval, WeightRule};
use plumb_data::analysis::Unknown;

/// `plumb SUBCOMMAND DATA ARGS… --format json`, parsed.
fn cli_json(sub: &str, data: &Path, args: &[&str]) -> serde_json::Value {
    let out = Command::new(env!("CARGO_BIN_EXE_plumb"))
        .arg(sub)
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

fn bench(config: &Path, data: &Path, spec: FitSpec, reading: Reading) -> Workbench {
    let mut wb = Workbench::new(Some(config.to_path_buf()));
    wb.apply(Action::Open(data.to_path_buf()));
    settle(&mut wb);
    wb.apply(Action::SetReading(reading));
    wb.apply(Action::OpenPair(spec));
    wb.apply(Action::Show(Screen::Bench));
    settle(&mut wb);
    wb
}

fn copper() -> FitSpec {
    FitSpec {
        weight_rule: Some(WeightRule::InverseX2),
        ..FitSpec::line("counts", "copper_ug_l")
    }
}

fn unknowns() -> Vec<Unknown> {
    vec![
        Unknown {
            name: "rinse-7".into(),
            readings: vec![4620.0, 4575.0],
        },
        Unknown {
            name: "rinse-9".into(),
            readings: vec![61200.0],
        },
    ]
}

/// The bench's calibration equals `plumb calibrate`'s JSON: x̂, SE, both intervals, the
/// limits and lack of fit.
fn assert_same_calibration(wb: &Workbench, cli: &serde_json::Value) {
    let d = wb.bench().diagnostics().expect("diagnostics");
    let c = d
        .calibration
        .as_ref()
        .expect("calibration mode")
        .as_ref()
        .expect("a calibration");
    let f = |v: &serde_json::Value, k: &str| v[k].as_f64().unwrap_or_else(|| panic!("{k}"));
    for ((u, rb), j) in c
        .unknowns
        .iter()
        .zip(cli["unknowns"].as_array().expect("list"))
    {
        let rb = rb.as_ref().expect("reads back");
        assert_eq!(u.name, j["name"].as_str().expect("name"));
        for (ours, key) in [
            (rb.x, "x"),
            (rb.std_error, "std_error"),
            (rb.approximate.0, "approx_low"),
            (rb.approximate.1, "approx_high"),
        ] {
            assert!(
                close(ours, f(j, key)),
                "{key}: bench {ours}, cli {}",
                f(j, key)
            );
        }
        let Interval::Bounded { low, high } = rb.exact else {
            panic!("a bounded band for {}", u.name)
        };
        assert!(close(low, f(&j["exact"], "low")) && close(high, f(&j["exact"], "high")));
    }
    let lod = c.limits.as_ref().expect("a line").detection;
    assert!(close(lod, f(&cli["limits"], "detection")));
    let lof = c.lack_of_fit.as_ref().expect("replicates").p_value;
    assert!(close(lof, f(&cli["lack_of_fit"], "p_value")));
}

#[test]
fn a_weighted_calibration_reads_unknowns_back_as_plumb_calibrate_does() {
    let config = tempfile::tempdir().expect("config");
    let data = demo("trace-copper.csv");
    let mut reading = Reading {
        mode: BenchMode::Calibration,
        ..Reading::default()
    };
    reading.calibration.unknowns = unknowns();
    let mut wb = bench(config.path(), &data, copper(), reading);
    let args = |exclude: &'static str| {
        let mut a = vec![
            "--y",
            "counts",
            "--x",
            "copper_ug_l",
            "--weighting",
            "1/x2",
            "--unknown",
            "rinse-7=4620,4575",
            "--unknown",
            "rinse-9=61200",
        ];
        if !exclude.is_empty() {
            a.extend(["--exclude", exclude]);
        }
        a
    };
    assert_same_calibration(&wb, &cli_json("calibrate", &data, &args("")));
    let before = wb.bench().diagnostics().expect("d").calibration.clone();
    wb.apply(Action::Exclude {
        rows: vec![4],
        reason: Some("nebulizer sputtered".into()),
    });
    settle(&mut wb);
    assert_same_calibration(&wb, &cli_json("calibrate", &data, &args("4")));
    assert_ne!(
        wb.bench().diagnostics().expect("d").calibration,
        before,
        "the read-back follows the exclusion"
    );
    // The live numbers are the weighted fit's.
    assert_same_numbers(
        &live(&wb),
        &cli_fit_with(
            &data,
            &[
                "--y",
                "counts",
                "--x",
                "copper_ug_l",
                "--weighting",
                "1/x2",
                "--exclude",
                "4",
            ],
        ),
    );
}

#[test]
fn inverse_variance_weights_follow_each_exclusion_live() {
    let config = tempfile::tempdir().expect("config");
    let data = demo("trace-copper.csv");
    let spec = FitSpec {
        weight_rule: Some(WeightRule::InverseLevelVariance),
        ..FitSpec::line("counts", "copper_ug_l")
    };
    let mut wb = bench(config.path(), &data, spec, Reading::default());
    let fit = |exclude: &str| {
        let mut a = vec!["--y", "counts", "--x", "copper_ug_l", "--weighting", "1/s2"];
        if !exclude.is_empty() {
            a.extend(["--exclude", exclude]);
        }
        cli_fit_with(&data, &a)
    };
    assert_same_numbers(&live(&wb), &fit(""));
    // Rows 1 and 2 are two of the three 200 µg/L readings: leaving one out re-weighs the
    // other two.
    wb.apply(Action::Exclude {
        rows: vec![1],
        reason: Some("carry-over".into()),
    });
    settle(&mut wb);
    assert_same_numbers(&live(&wb), &fit("1"));
    let third = (1..=27)
        .find(|&r| {
            r > 2 && {
                let t = plumb_data::load(&data, &Default::default()).expect("load");
                t.numeric("copper_ug_l").expect("x").get(r - 1) == Some(200.0)
            }
        })
        .expect("a third 200 reading");
    wb.apply(Action::Exclude {
        rows: vec![third],
        reason: Some("carry-over".into()),
    });
    settle(&mut wb);
    let e = wb
        .bench()
        .summary()
        .expect("a pair")
        .expect_err("one reading left at 200");
    assert!(e.contains("x = 200 has one left"), "{e}");
    wb.apply(Action::Undo);
    settle(&mut wb);
    assert_same_numbers(&live(&wb), &fit("1"));
}

#[test]
fn two_methods_on_the_bench_compare_as_plumb_agree_does() {
    let config = tempfile::tempdir().expect("config");
    let data = demo("chlorine-meters.csv");
    let reading = Reading {
        mode: BenchMode::Agreement,
        ..Reading::default()
    };
    let mut wb = bench(
        config.path(),
        &data,
        FitSpec::line("meter_mg_l", "lab_mg_l"),
        reading,
    );
    wb.apply(Action::Exclude {
        rows: vec![23],
        reason: Some("bubble in the cuvette".into()),
    });
    settle(&mut wb);
    let cli = cli_json(
        "agree",
        &data,
        &[
            "--reference",
            "lab_mg_l",
            "--test",
            "meter_mg_l",
            "--exclude",
            "23",
        ],
    );
    let d = wb.bench().diagnostics().expect("diagnostics");
    let a = d
        .agreement
        .as_ref()
        .expect("method-comparison mode")
        .as_ref()
        .expect("compares");
    let pb = a.passing_bablok.as_ref().expect("a line");
    let i = pb.interval.as_ref().expect("an interval");
    let j = &cli["passing_bablok"];
    let f = |v: &serde_json::Value, k: &str| v[k].as_f64().unwrap_or_else(|| panic!("{k}"));
    for (ours, theirs) in [
        (pb.slope, f(j, "slope")),
        (pb.intercept, f(j, "intercept")),
        (i.slope_low, f(&j["interval"], "slope_low")),
        (i.intercept_high, f(&j["interval"], "intercept_high")),
    ] {
        assert!(close(ours, theirs), "bench {ours}, plumb agree {theirs}");
    }
    let l = a.limits.as_ref().expect("limits");
    let k = &cli["differences"];
    for (ours, key) in [(l.bias, "bias"), (l.lower, "lower"), (l.upper, "upper")] {
        assert!(close(ours, f(k, key)), "{key}");
    }
    let (points, rings) = d.lab_views.differences.as_ref().expect("the view's points");
    assert_eq!(points.points.len(), 63);
    assert_eq!(*rings.entries, [22], "row 23 is entry 22, drawn as a ring");
}

#[test]
fn the_calibration_with_its_unknowns_survives_a_session_and_reaches_the_summary() {
    let config = tempfile::tempdir().expect("config");
    let work = tempfile::tempdir().expect("work");
    let data = work.path().join("trace-copper.csv");
    std::fs::copy(demo("trace-copper.csv"), &data).expect("copy");
    let mut wb = bench(config.path(), &data, copper(), Reading::default());
    wb.apply(Action::SetReading(Reading {
        mode: BenchMode::Calibration,
        ..Reading::default()
    }));
    wb.apply(Action::ReadUnknowns {
        path: demo("calibration-unknowns.csv"),
        reading: "absorbance".into(),
        sample: Some("sample".into()),
    });
    assert_eq!(
        wb.bench().reading().unknowns().len(),
        5,
        "{:?}",
        wb.status()
    );
    wb.apply(Action::SetReading(Reading {
        calibration: plumb_data::analysis::CalibrationRequest {
            unknowns: unknowns(),
            sigma: plumb_core::calibration::SigmaSource::InterceptSe,
        },
        ..wb.bench().reading().clone()
    }));
    settle(&mut wb);
    let session = work.path().join("copper.plumb");
    wb.apply(Action::SaveSessionTo(session.clone()));
    let mut again = Workbench::new(Some(config.path().to_path_buf()));
    again.apply(Action::Open(session.clone()));
    settle(&mut again);
    let back = again.bench().reading();
    assert_eq!(back.mode, BenchMode::Calibration);
    assert_eq!(back.unknowns(), unknowns().as_slice());
    assert_eq!(
        again.bench().spec().and_then(|s| s.weight_rule),
        Some(WeightRule::InverseX2)
    );
    let html = work.path().join("summary.html");
    let out = Command::new(env!("CARGO_BIN_EXE_plumb"))
        .args(["report"])
        .arg(&session)
        .arg("-o")
        .arg(&html)
        .output()
        .expect("plumb runs");
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let page = std::fs::read_to_string(&html).expect("summary");
    assert!(page.contains("<h2>Calibration</h2>") && page.contains("rinse-9"));
    assert!(
        page.contains("standard error of the intercept"),
        "σ's source is said"
    );
}
