//! The command-line contract: `plumb fit` JSON fields, accuracy end to end, and the errors
//! users see for bad input (exit code, and a message naming file, column or row).

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

use plumb_tests::{lre, nist_dir, parse_nist};
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

fn stderr(out: &Output) -> String {
    String::from_utf8_lossy(&out.stderr).into_owned()
}

fn write(dir: &Path, name: &str, text: &str) -> PathBuf {
    let path = dir.join(name);
    std::fs::write(&path, text).expect("temp file");
    path
}

fn demo(name: &str) -> String {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("../../demo-scenarios/data")
        .join(name)
        .to_string_lossy()
        .into_owned()
}

/// Columns `a` and `b` (0-based) of a comma-separated demo file with a header, read here
/// without Plumbline's loader.
fn columns_of(path: &str, a: usize, b: usize) -> (Vec<f64>, Vec<f64>) {
    let text = std::fs::read_to_string(path).expect("demo file");
    text.lines()
        .skip(1)
        .map(|l| {
            let f: Vec<&str> = l.split(',').collect();
            (
                f[a].parse::<f64>().expect("number"),
                f[b].parse::<f64>().expect("number"),
            )
        })
        .unzip()
}

/// Mean and SD (n − 1) by the two-pass definition.
fn mean_sd(v: &[f64]) -> (f64, f64) {
    let n = v.len() as f64;
    let m = v.iter().sum::<f64>() / n;
    (
        m,
        (v.iter().map(|x| (x - m).powi(2)).sum::<f64>() / (n - 1.0)).sqrt(),
    )
}

mod contract {
    //! Field names and shapes that later tools rely on.
    use super::*;

    /// The demo jar tests fitted as a quadratic in dose, with extra arguments.
    fn jar_quadratic(extra: &[&str]) -> Value {
        let data = demo("jar-tests.csv");
        let mut args = vec![
            "fit",
            &data,
            "--y",
            "settled_ntu",
            "--x",
            "dose_mg_l",
            "--degree",
            "2",
            "--format",
            "json",
        ];
        args.extend_from_slice(extra);
        json(&plumb(&args))
    }

    #[test]
    fn fit_json_has_every_contract_field() {
        let v = jar_quadratic(&["--exclude", "17,38"]);
        for key in [
            "n",
            "n_dropped",
            "df_residual",
            "r_squared",
            "r_squared_kind",
            "adj_r_squared",
            "residual_std_error",
            "f_statistic",
            "f_p_value",
            "aic",
            "bic",
            "excluded_rows",
            "coefficients",
        ] {
            assert!(v.get(key).is_some(), "missing {key}");
        }
        assert_eq!(v["n"], 46);
        assert_eq!(v["excluded_rows"], serde_json::json!([17, 38]));
        assert_eq!(v["r_squared_kind"], "centered");
        let coefficients = v["coefficients"].as_array().expect("list");
        let terms: Vec<&str> = coefficients
            .iter()
            .map(|c| c["term"].as_str().expect("term"))
            .collect();
        assert_eq!(terms, ["intercept", "dose_mg_l", "dose_mg_l^2"]);
        for c in coefficients {
            for key in [
                "estimate",
                "std_error",
                "t",
                "p_value",
                "ci_low",
                "ci_high",
                "standardized",
            ] {
                assert!(c.get(key).is_some(), "coefficient lacks {key}");
            }
        }
        assert!(
            coefficients[0]["standardized"].is_null(),
            "intercept has no standardized value"
        );
    }

    #[test]
    fn excluding_the_two_slipped_rows_changes_the_answer() {
        let r_all = jar_quadratic(&[])["r_squared"].as_f64().expect("R²");
        let r_kept = jar_quadratic(&["--exclude", "17,38"])["r_squared"]
            .as_f64()
            .expect("R²");
        assert!(r_all < 0.5 && r_kept > 0.9, "R² {r_all} → {r_kept}");
    }

    #[test]
    fn text_output_names_the_r_squared_kind_and_cautions() {
        let out = plumb(&[
            "fit",
            &demo("calibration-run.csv"),
            "--y",
            "absorbance",
            "--x",
            "standard_mg_l",
            "--no-intercept",
        ]);
        assert!(out.status.success(), "{}", stderr(&out));
        let text = String::from_utf8_lossy(&out.stdout);
        assert!(text.contains("R² = "), "{text}");
        assert!(text.contains("(uncentred, no intercept)"), "{text}");
        assert!(
            text.contains("variation in absorbance around zero"),
            "{text}"
        );
        assert!(text.contains("Association is not causation"), "{text}");
    }
}

mod accuracy {
    //! NIST StRD certified values reached through the whole path: CSV text → loader → fit → JSON.
    use super::*;

    #[test]
    fn nist_sets_through_the_command_line_keep_ten_digits() {
        let Some(dir) = nist_dir() else { return };
        let tmp = tempfile::tempdir().expect("tempdir");
        for name in ["Norris", "Pontius", "NoInt1", "Longley", "Wampler4"] {
            let case = parse_nist(&dir.join(format!("{name}.dat")));
            let xs: Vec<String> = (1..=case.x.len()).map(|j| format!("x{j}")).collect();
            let mut csv = format!("y,{}\n", xs.join(","));
            for i in 0..case.y.len() {
                let row: Vec<String> = std::iter::once(case.y[i])
                    .chain(case.x.iter().map(|c| c[i]))
                    .map(|v| format!("{v:?}"))
                    .collect();
                csv.push_str(&row.join(","));
                csv.push('\n');
            }
            let path = write(tmp.path(), &format!("{name}.csv"), &csv);
            let path = path.to_string_lossy();
            let mut args = vec!["fit", &path, "--y", "y", "--format", "json"];
            for x in &xs {
                args.extend(["--x", x]);
            }
            let degree = case.degree().map(|d| d.to_string());
            if let Some(d) = &degree {
                args.extend(["--degree", d]);
            }
            if !case.intercept {
                args.push("--no-intercept");
            }
            let v = json(&plumb(&args));
            for (c, got) in case
                .parameters
                .iter()
                .zip(v["coefficients"].as_array().expect("list"))
            {
                let est = lre(got["estimate"].as_f64().expect("estimate"), c.estimate);
                let sd = lre(got["std_error"].as_f64().expect("se"), c.std_dev);
                assert!(
                    est >= 10.0 && sd >= 10.0,
                    "{name}: LRE estimate {est:.1}, sd {sd:.1}"
                );
            }
            let r2 = lre(v["r_squared"].as_f64().expect("R²"), case.r_squared);
            let rsd = lre(
                v["residual_std_error"].as_f64().expect("σ"),
                case.residual_sd,
            );
            assert!(
                r2 >= 10.0 && rsd >= 10.0,
                "{name}: LRE R² {r2:.1}, residual SD {rsd:.1}"
            );
        }
    }
}

mod bad_input {
    //! Each bad input exits non-zero with one line naming the file and what to do; never a panic.
    use super::*;

    fn refused(csv: &str, args: &[&str], expect: &[&str]) {
        let tmp = tempfile::tempdir().expect("tempdir");
        let path = write(tmp.path(), "bad.csv", csv);
        let before = std::fs::read(&path).expect("read");
        let path_text = path.to_string_lossy().into_owned();
        let mut full = vec!["fit", path_text.as_str()];
        full.extend_from_slice(args);
        let out = plumb(&full);
        let err = stderr(&out);
        assert_eq!(
            out.status.code(),
            Some(1),
            "exit code for {expect:?}: {err}"
        );
        assert!(!err.contains("panicked"), "{err}");
        assert!(
            err.contains("bad.csv") || expect.iter().any(|e| e.starts_with('!')),
            "file not named: {err}"
        );
        for e in expect {
            assert!(
                err.contains(e.trim_start_matches('!')),
                "expected '{e}' in: {err}"
            );
        }
        assert_eq!(err.trim_end().lines().count(), 1, "one line: {err}");
        assert_eq!(
            std::fs::read(&path).expect("read"),
            before,
            "the data file is never written"
        );
    }

    #[test]
    fn unknown_column() {
        refused(
            "x,y\n1,2\n2,3\n3,5\n",
            &["--y", "y", "--x", "X1"],
            &["no column named 'X1'"],
        );
    }

    #[test]
    fn text_column_as_predictor() {
        refused(
            "x,y\n1,2\nlow,3\n3,5\n",
            &["--y", "y", "--x", "x"],
            &["row 2", "'low'"],
        );
    }

    #[test]
    fn all_missing_column() {
        refused(
            "x,y,z\n1,2,\n2,3,NA\n3,5,\n",
            &["--y", "y", "--x", "z"],
            &["every cell is missing"],
        );
    }

    #[test]
    fn constant_predictor() {
        refused(
            "x,y\n4,2\n4,3\n4,5\n4,1\n",
            &["--y", "y", "--x", "x"],
            &["'x' is constant"],
        );
    }

    #[test]
    fn too_few_rows() {
        refused(
            "x,y\n1,2\n2,3\n",
            &["--y", "y", "--x", "x"],
            &["2 complete rows for 2 parameters"],
        );
    }

    #[test]
    fn exact_collinearity_names_the_aliased_term() {
        refused(
            "a,b,c,y\n1,2,3,1\n2,1,3,2\n3,4,7,2\n4,3,7,5\n5,6,11,4\n",
            &["--y", "y", "--x", "a", "--x", "b", "--x", "c"],
            &["aliased", "·"],
        );
    }

    #[test]
    fn ragged_rows() {
        refused(
            "x,y\n1,2\n2\n3,5\n",
            &["--y", "y", "--x", "x"],
            &["line 3", "1 field where"],
        );
    }

    #[test]
    fn exclusion_beyond_the_table() {
        refused(
            "x,y\n1,2\n2,3\n3,5\n4,4\n",
            &["--y", "y", "--x", "x", "--exclude", "7"],
            &[
                "--exclude names rows the file does not have (7)",
                "it has 4 data rows",
            ],
        );
    }

    #[test]
    fn polynomial_of_two_predictors() {
        refused(
            "a,b,y\n1,2,1\n2,1,2\n3,4,2\n4,3,5\n",
            &["--y", "y", "--x", "a", "--x", "b", "--degree", "2"],
            &["!exactly one predictor"],
        );
    }

    #[test]
    fn missing_file() {
        let out = plumb(&["fit", "/nonexistent/plumb-test.csv", "--y", "y", "--x", "x"]);
        assert_eq!(out.status.code(), Some(1));
        assert!(
            stderr(&out).contains("/nonexistent/plumb-test.csv"),
            "{}",
            stderr(&out)
        );
    }

    #[test]
    fn non_finite_values_are_dropped_and_reported() {
        let tmp = tempfile::tempdir().expect("tempdir");
        let path = write(
            tmp.path(),
            "inf.csv",
            "x,y\n1,2\n2,inf\n3,5\n4,4\n5,7\nNaN,3\n",
        );
        let v = json(&plumb(&[
            "fit",
            &path.to_string_lossy(),
            "--y",
            "y",
            "--x",
            "x",
            "--format",
            "json",
        ]));
        assert_eq!(v["n"], 4);
        assert_eq!(v["n_dropped"], 2);
        assert_eq!(v["dropped_rows"][0]["reason"], "non-finite");
        assert_eq!(v["dropped_rows"][1]["reason"], "missing");
    }
}

mod association_and_diagnostics {
    //! `plumb corr`, `plumb influence` and the overlays of `plumb fit`.
    use super::*;

    #[test]
    fn corr_json_has_square_arrays_and_counts_its_tests() {
        let out = plumb(&[
            "corr",
            &demo("calibration-run.csv"),
            "--order",
            "read_order",
            "--format",
            "json",
        ]);
        let v = json(&out);
        let columns = v["columns"].as_array().expect("columns").len();
        assert_eq!(columns, 4, "every numeric column but the order column");
        assert_eq!(v["n_tests"], 6);
        assert_eq!(v["adjust"], "holm");
        for key in [
            "r",
            "p_value",
            "p_adjusted",
            "n",
            "reason",
            "r_differenced",
            "r_detrended",
        ] {
            let rows = v[key]
                .as_array()
                .unwrap_or_else(|| panic!("{key} is an array"));
            assert_eq!(rows.len(), columns, "{key}");
            assert!(
                rows.iter()
                    .all(|r| r.as_array().is_some_and(|c| c.len() == columns)),
                "{key} is square"
            );
        }
        assert!(v["p_value"][0][0].is_null(), "no p-value on the diagonal");
    }

    #[test]
    fn corr_names_why_a_cell_is_undefined() {
        let tmp = tempfile::tempdir().expect("tempdir");
        let path = write(
            tmp.path(),
            "flat.csv",
            "a,b,c\n1,5,2\n2,5,1\n3,5,4\n4,5,3\n",
        );
        let v = json(&plumb(&[
            "corr",
            &path.to_string_lossy(),
            "--method",
            "kendall",
            "--format",
            "json",
        ]));
        assert!(v["r"][0][1].is_null(), "b is constant");
        assert!(
            v["reason"][0][1]
                .as_str()
                .is_some_and(|r| r.starts_with("undefined because")),
            "{}",
            v["reason"]
        );
        assert_eq!(v["n_tests"], 1);
        assert_eq!(v["adjust"], "none", "one test: nothing to adjust");
    }

    #[test]
    fn influence_rows_carry_their_file_row_numbers_and_flags() {
        let data = demo("jar-tests.csv");
        let v = json(&plumb(&[
            "influence",
            &data,
            "--y",
            "settled_ntu",
            "--x",
            "dose_mg_l",
            "--degree",
            "2",
            "--exclude",
            "5",
            "--format",
            "json",
        ]));
        let rows = v["rows"].as_array().expect("rows");
        assert_eq!(rows.len(), 47);
        assert!(
            rows.iter().all(|r| r["row"] != 5),
            "the excluded row is not diagnosed"
        );
        let row38 = rows.iter().find(|r| r["row"] == 38).expect("row 38");
        assert!(
            row38["flags"]
                .as_array()
                .expect("flags")
                .iter()
                .any(|f| f == "large-residual"),
            "{row38}"
        );
        assert_eq!(row38["dfbetas"].as_array().expect("dfbetas").len(), 3);
        assert_eq!(v["thresholds"]["source"], "common practice, no source");
    }

    #[test]
    fn fit_reports_overlays_and_cues_for_one_predictor() {
        let data = demo("jar-tests.csv");
        let v = json(&plumb(&[
            "fit",
            &data,
            "--y",
            "settled_ntu",
            "--x",
            "dose_mg_l",
            "--exclude",
            "17,38",
            "--robust",
            "deming:2",
            "--loess",
            "0.6",
            "--format",
            "json",
        ]));
        assert_eq!(v["robust"]["method"], "deming");
        assert_eq!(v["robust"]["lambda"], 2.0);
        assert!(
            v["loess"]["r_squared"].as_f64().expect("loess R²")
                > v["r_squared"].as_f64().expect("R²")
        );
        assert_eq!(v["cues"]["nonlinear"], true, "the dose response is curved");
        let z = v["z_units"]["slope_squared"].as_f64().expect("z slope²");
        assert!(
            (z - v["r_squared"].as_f64().expect("R²")).abs() < 1e-12,
            "slope² in z-units equals R²"
        );
        assert_eq!(v["degree_comparison"].as_array().expect("ladder").len(), 3);
        assert_eq!(v["bands"]["x"].as_array().expect("grid").len(), 41);
    }

    #[test]
    fn reading_the_line_at_x_gives_bands_and_the_shrinkage_toward_the_mean() {
        let v = json(&plumb(&[
            "fit",
            &demo("calibration-run.csv"),
            "--y",
            "absorbance",
            "--x",
            "standard_mg_l",
            "--at",
            "35",
            "--format",
            "json",
        ]));
        let at = &v["at"];
        let f = |k: &str| at[k].as_f64().unwrap_or_else(|| panic!("{k}"));
        assert!(
            f("predict_low") < f("mean_low")
                && f("mean_low") < f("fitted")
                && f("fitted") < f("mean_high")
                && f("mean_high") < f("predict_high")
        );
        // Independently of the code's z-units view: the means and SDs from the file itself,
        // and the expected z of y from the fitted value at x = 35 (the least-squares line).
        let (xs, ys) = columns_of(&demo("calibration-run.csv"), 1, 3);
        let (mx, sx) = mean_sd(&xs);
        let (my, sy) = mean_sd(&ys);
        assert!((f("z_x") - (35.0 - mx) / sx).abs() < 1e-12);
        assert!((f("expected_z_y") - (f("fitted") - my) / sy).abs() < 1e-9);
    }

    #[test]
    fn a_falling_pair_shrinks_toward_the_mean_by_one_minus_its_size() {
        // Species count falls with slope in the survey (r < 0): the share of a distance from
        // the mean that vanishes is 1 − |r|, with r computed here from the file.
        let survey = demo("field-survey.csv");
        let (xs, ys) = columns_of(&survey, 7, 6);
        let (mx, sx) = mean_sd(&xs);
        let (my, sy) = mean_sd(&ys);
        let n = xs.len() as f64;
        let r = xs
            .iter()
            .zip(&ys)
            .map(|(x, y)| (x - mx) * (y - my))
            .sum::<f64>()
            / ((n - 1.0) * sx * sy);
        assert!(r < -0.2, "{r}");
        let v = json(&plumb(&[
            "fit",
            &survey,
            "--y",
            "species_count",
            "--x",
            "slope_deg",
            "--format",
            "json",
        ]));
        let s = v["z_units"]["shrinkage_toward_mean"]
            .as_f64()
            .expect("shrinkage");
        assert!((s - (1.0 - r.abs())).abs() < 1e-12, "{s} vs 1 − |{r}|");
    }

    #[test]
    fn the_survey_shows_its_shared_drift_and_its_ring() {
        let survey = demo("field-survey.csv");
        let out = plumb(&["corr", &survey, "--order", "visit_day"]);
        let text = String::from_utf8_lossy(&out.stdout);
        assert!(
            text.contains(
                "sward_height_cm and soil_temp_c move together mostly because both drift"
            ),
            "{text}"
        );
        let v = json(&plumb(&[
            "fit",
            &survey,
            "--y",
            "leaf_water_pct",
            "--x",
            "leaf_n_pct",
            "--format",
            "json",
        ]));
        assert!(
            v["r_squared"].as_f64().expect("R²") < 0.05,
            "the ring has almost no linear R²"
        );
        assert_eq!(v["cues"]["nonlinear"], true);
    }

    #[test]
    fn overlays_refuse_several_predictors() {
        let out = plumb(&[
            "fit",
            &demo("jar-tests.csv"),
            "--y",
            "settled_ntu",
            "--x",
            "dose_mg_l",
            "--x",
            "ph",
            "--robust",
            "theil-sen",
        ]);
        assert_eq!(out.status.code(), Some(1));
        assert!(stderr(&out).contains("one predictor"), "{}", stderr(&out));
    }
}

mod summary {
    //! `plumb report` and session files.
    use super::*;

    #[test]
    fn a_saved_session_reproduces_the_summary_exactly() {
        let tmp = tempfile::tempdir().expect("tempdir");
        let out1 = tmp.path().join("first.html");
        let session = tmp.path().join("jar.plumb");
        let data = demo("jar-tests.csv");
        let run = plumb(&[
            "report",
            &data,
            "--y",
            "settled_ntu",
            "--x",
            "dose_mg_l",
            "--degree",
            "2",
            "--exclude",
            "17,38",
            "--reason",
            "17=decimal point slipped",
            "-o",
            &out1.to_string_lossy(),
            "--save-session",
            &session.to_string_lossy(),
        ]);
        assert!(run.status.success(), "{}", stderr(&run));
        let out2 = tmp.path().join("second.html");
        let refused = plumb(&[
            "report",
            &session.to_string_lossy(),
            "-o",
            &out2.to_string_lossy(),
        ]);
        assert_eq!(
            refused.status.code(),
            Some(1),
            "the demo data lie outside the session's folder"
        );
        assert!(
            stderr(&refused).contains("--allow-outside-data"),
            "{}",
            stderr(&refused)
        );
        assert!(!tmp.path().join("second.html").exists());
        let again = plumb(&[
            "report",
            &session.to_string_lossy(),
            "-o",
            &out2.to_string_lossy(),
            "--allow-outside-data",
        ]);
        assert!(again.status.success(), "{}", stderr(&again));
        let read = |name: &str| std::fs::read(tmp.path().join(name)).expect(name);
        // Every companion file — CSVs, each chart's SVG and PNG — byte for byte.
        let mut compared = 0;
        for entry in std::fs::read_dir(tmp.path()).expect("dir") {
            let name = entry
                .expect("entry")
                .file_name()
                .to_string_lossy()
                .into_owned();
            if let Some(rest) = name.strip_prefix("first-") {
                assert_eq!(read(&name), read(&format!("second-{rest}")), "{name}");
                compared += 1;
            }
        }
        assert_eq!(compared, 10, "two CSVs and four charts as SVG and PNG");
        // The page too, but for its last line: the command that reproduces it names how it
        // was made (the data file and flags, or the session).
        let page = |name: &str| {
            let html = String::from_utf8(read(name)).expect("utf-8");
            let footer = html.find("<footer>").expect("a footer");
            html[..footer].to_string()
        };
        assert_eq!(page("first.html"), page("second.html"));
        let html = page("second.html");
        assert!(html.contains("decimal point slipped") && html.contains("no reason given"));
    }

    #[test]
    fn the_summary_says_how_the_file_was_read_and_any_assumed_decimal_mark() {
        let tmp = tempfile::tempdir().expect("tempdir");
        let out = tmp.path().join("s.html");
        let data = Path::new(env!("CARGO_MANIFEST_DIR"))
            .join("../../tests/bad-input/decimal-ambiguous.csv");
        let run = plumb(&[
            "report",
            &data.to_string_lossy(),
            "--y",
            "y",
            "--x",
            "x",
            "-o",
            &out.to_string_lossy(),
        ]);
        assert!(run.status.success(), "{}", stderr(&run));
        let html = std::fs::read_to_string(&out).expect("page");
        let read_as =
            "<dt>read as</dt><dd>text (utf-8), delimiter &#39;;&#39;, decimal point, header row</dd>";
        assert!(html.contains(read_as), "{html}");
        assert!(html.contains("Reading note: no cell settles the decimal mark"));
    }

    #[test]
    fn bad_sessions_are_refused_with_a_clear_message() {
        let tmp = tempfile::tempdir().expect("tempdir");
        let out = tmp.path().join("s.html").to_string_lossy().into_owned();
        let future = write(tmp.path(), "future.plumb", r#"{"plumbline_session": 7}"#);
        let e = plumb(&["report", &future.to_string_lossy(), "-o", &out]);
        assert_eq!(e.status.code(), Some(1));
        assert!(
            stderr(&e).contains("newer than this Plumbline"),
            "{}",
            stderr(&e)
        );
        let cut = write(
            tmp.path(),
            "cut.plumb",
            r#"{"plumbline_session": 1, "data": {"path": "x.csv", "sha"#,
        );
        assert!(
            stderr(&plumb(&["report", &cut.to_string_lossy(), "-o", &out]))
                .contains("not a readable Plumbline session")
        );
        let missing = write(
            tmp.path(),
            "gone.plumb",
            r#"{"plumbline_session": 1, "data": {"path": "nowhere.csv", "sha256": "00", "rows": 3}, "models": [{"y": "y", "x": ["x"]}]}"#,
        );
        let m = plumb(&["report", &missing.to_string_lossy(), "-o", &out]);
        assert_eq!(m.status.code(), Some(1));
        assert!(stderr(&m).contains("nowhere.csv"), "{}", stderr(&m));
    }

    #[test]
    fn a_reason_for_a_row_that_is_not_excluded_is_refused() {
        let tmp = tempfile::tempdir().expect("tempdir");
        let out = tmp.path().join("s.html").to_string_lossy().into_owned();
        let e = plumb(&[
            "report",
            &demo("jar-tests.csv"),
            "--y",
            "settled_ntu",
            "--x",
            "dose_mg_l",
            "--reason",
            "3=typo",
            "-o",
            &out,
        ]);
        assert_eq!(e.status.code(), Some(1));
        assert!(stderr(&e).contains("not in --exclude"), "{}", stderr(&e));
    }

    #[test]
    fn a_changed_data_file_is_announced() {
        let tmp = tempfile::tempdir().expect("tempdir");
        let data = write(tmp.path(), "d.csv", "x,y\n1,2\n2,3.9\n3,6.2\n4,8.1\n");
        let session = tmp.path().join("d.plumb");
        let out = tmp.path().join("s.html").to_string_lossy().into_owned();
        let first = plumb(&[
            "report",
            &data.to_string_lossy(),
            "--y",
            "y",
            "--x",
            "x",
            "-o",
            &out,
            "--save-session",
            &session.to_string_lossy(),
        ]);
        assert!(first.status.success(), "{}", stderr(&first));
        std::fs::write(&data, "x,y\n1,2\n2,3.9\n3,6.2\n4,8.1\n5,9.8\n").expect("edit");
        let again = plumb(&["report", &session.to_string_lossy(), "-o", &out]);
        let text = String::from_utf8_lossy(&again.stdout);
        assert!(
            text.contains("changed since the session was saved")
                && text.contains("4 data rows then, 5 now"),
            "{text}"
        );
    }
}

/// `plumb stream` reads a file in pieces and must report the same line as `plumb fit`, which
/// loads it whole (reference: the in-memory QR solver, itself checked against NIST StRD).
#[test]
fn stream_reports_the_same_line_as_fit_on_a_file_read_in_many_pieces() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut text = String::from("when,dose,response\n");
    for i in 0..120_000u32 {
        let x = f64::from(i % 1000) / 7.0;
        let noise = f64::from((i * 7919) % 613) / 61.3 - 5.0;
        let y = if i % 5003 == 17 {
            String::from("NA")
        } else {
            format!("{:.6}", 2.5 + 0.75 * x + noise)
        };
        text.push_str(&format!("{i},{x:.6},{y}\n"));
    }
    let path = write(dir.path(), "big.csv", &text);
    assert!(text.len() > 3 << 20, "several 1 MB pieces");
    let data = path.to_str().expect("utf-8 path");
    let common = ["--y", "response", "--x", "dose", "--format", "json"];
    let streamed = plumb(&[&["stream", data, "--chunk-mb", "1"][..], &common[..]].concat());
    assert!(streamed.status.success(), "{}", stderr(&streamed));
    let loaded = plumb(&[&["fit", data][..], &common[..]].concat());
    assert!(loaded.status.success(), "{}", stderr(&loaded));
    let (s, f) = (json(&streamed), json(&loaded));
    assert_eq!(s["n"], f["n"]);
    assert_eq!(s["n_dropped"], f["n_dropped"]);
    assert_eq!(s["first_dropped_rows"][0], 18);
    for key in [
        "r_squared",
        "adj_r_squared",
        "residual_std_error",
        "f_statistic",
    ] {
        let (a, b) = (s[key].as_f64().expect(key), f[key].as_f64().expect(key));
        assert!(lre(a, b) >= 11.0, "{key}: stream {a} vs fit {b}");
    }
    for j in 0..2 {
        for key in ["estimate", "std_error", "ci_low", "ci_high"] {
            let a = s["coefficients"][j][key].as_f64().expect(key);
            let b = f["coefficients"][j][key].as_f64().expect(key);
            assert!(
                lre(a, b) >= 11.0,
                "coefficient {j} {key}: stream {a} vs fit {b}"
            );
        }
    }
}

#[test]
fn stream_names_the_file_and_row_of_a_word_in_a_number_column() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut text = String::from("x,y\n");
    for i in 0..200_000u32 {
        if i == 150_000 {
            text.push_str("4,below-limit\n");
        } else {
            text.push_str(&format!("{i},{}\n", i % 17));
        }
    }
    let path = write(dir.path(), "words.csv", &text);
    let out = plumb(&[
        "stream",
        path.to_str().expect("utf-8"),
        "--y",
        "y",
        "--x",
        "x",
        "--chunk-mb",
        "1",
    ]);
    assert!(!out.status.success());
    let msg = stderr(&out);
    assert!(
        msg.contains("words.csv") && msg.contains("row 150001") && msg.contains("below-limit"),
        "{msg}"
    );
}
