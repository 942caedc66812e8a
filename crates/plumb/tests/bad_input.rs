//! The bad-input corpus (`tests/bad-input/`, small files made by us): each file is run through
//! the command line and must give the expected exit code and a message that names the file and
//! says what is wrong; nothing panics, and no input file is ever written.

mod common;

use std::path::{Path, PathBuf};

use common::run_plumb;

fn corpus(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("../../tests/bad-input")
        .join(name)
}

/// `(file, extra arguments, exit code, text expected on stderr — or on stdout when the exit code is 0)`.
const CASES: &[(&str, &[&str], i32, &str)] = &[
    (
        "ragged-short-row.csv",
        &[],
        1,
        "1 field where the first row has 2",
    ),
    (
        "ragged-long-row.csv",
        &[],
        1,
        "3 fields where the first row has 2",
    ),
    ("bom.csv", &[], 0, "variation in y around its mean"),
    ("mixed-types.csv", &[], 1, "row 2 holds 'three'"),
    (
        "all-missing-column.csv",
        &["--x", "z"],
        1,
        "every cell is missing",
    ),
    (
        "near-max-values.csv",
        &[],
        0,
        "variation in y around its mean",
    ),
    ("nan-inf-tokens.csv", &[], 0, "3 dropped for gaps"),
    ("empty.csv", &[], 1, "the file is empty"),
    ("whitespace-only.csv", &[], 1, "the file is empty"),
    ("header-only.csv", &[], 1, "no data rows"),
    ("one-row.csv", &[], 1, "1 complete rows for 2 parameters"),
    ("constant-predictor.csv", &[], 1, "'x' is constant"),
    ("constant-response.csv", &[], 1, "the response is constant"),
    (
        "exact-collinearity.csv",
        &["--x", "a", "--x", "b", "--x", "c"],
        1,
        "aliased",
    ),
    (
        "n-not-above-p.csv",
        &["--x", "a", "--x", "b", "--x", "c"],
        1,
        "3 complete rows for 4 parameters",
    ),
    ("non-utf8.csv", &[], 0, "read as Windows-1252"),
    (
        "non-utf8.csv",
        &["--encoding", "utf-8"],
        1,
        "line 2: the bytes are not valid UTF-8, which was asked for",
    ),
    ("utf16le-bom.csv", &[], 0, "4 used of 4"),
    ("utf16be-bom.csv", &[], 0, "4 used of 4"),
    ("windows-1252-units.csv", &[], 0, "read as Windows-1252"),
    (
        "duplicate-names.csv",
        &["--x", "x_2"],
        0,
        "repeats the name 'x'",
    ),
    ("quoted-delimiters.csv", &[], 0, "4 used of 4"),
    ("crlf.csv", &[], 0, "4 used of 4"),
    ("decimal-comma-thousands.csv", &[], 0, "1234.46"),
    (
        "decimal-ambiguous.csv",
        &[],
        0,
        "no cell settles the decimal mark: '1,234' (column 'y', row 1) reads as 1234",
    ),
    ("unclosed-quote.csv", &[], 1, "never closes"),
    ("text-predictor.csv", &[], 1, "row 1 holds 'low'"),
    (
        "negative-weight.csv",
        &["--weights", "w"],
        1,
        "weight -1 is not positive",
    ),
    (
        "zero-weight.csv",
        &["--weights", "w"],
        1,
        "weight 0 is not positive",
    ),
    (
        "numeric-header.csv",
        &["--y", "2020", "--x", "2019"],
        1,
        "the columns are: column1, column2",
    ),
    ("trailing-delimiter.csv", &[], 0, "4 used of 4"),
    ("blank-lines.csv", &[], 0, "4 used of 4"),
    ("not-a-workbook.xlsx", &[], 1, "not a readable spreadsheet"),
    ("not-parquet.parquet", &[], 1, "not a readable Parquet file"),
    // Kept from fuzzing: polars-parquet panics on this page; the loader contains it.
    (
        "parquet-damaged-page.parquet",
        &[],
        1,
        "the Parquet reader stopped on this file",
    ),
    // Kept from fuzzing: a page header with a negative value count made the decoder ask for
    // 2^61 bytes and abort; the page headers are now checked first.
    (
        "parquet-negative-count.parquet",
        &[],
        1,
        "a page of column 'level' (row group 1) claims -19 values",
    ),
    ("tiny-spread.csv", &[], 0, "variation in y around its mean"),
    ("huge-offset.csv", &[], 0, "variation in y around its mean"),
    (
        "parquet-many-types.parquet",
        &["--y", "level", "--x", "reading"],
        0,
        "column 'taken_at' holds timestamp values, which are not read",
    ),
    (
        "parquet-no-rows.parquet",
        &["--y", "level", "--x", "reading"],
        1,
        "no data rows",
    ),
    (
        "blank-standard.csv",
        &["--weighting", "1/x"],
        1,
        "column 'x', row 1: 1/x weighting needs a value other than 0",
    ),
    (
        "single-reading-level.csv",
        &["--weighting", "1/s2"],
        1,
        "column 'x', row 3: the level 2 is measured once",
    ),
    (
        "flat-replicates.csv",
        &["--weighting", "1/s2"],
        1,
        "level 2 (first at row 3): its readings are all equal",
    ),
];

/// Sessions go through `plumb report`.
const SESSIONS: &[(&str, &str)] = &[
    ("missing-data.plumb", "data file cannot be used"),
    ("truncated.plumb", "not a readable Plumbline session"),
    ("future-version.plumb", "newer than this Plumbline"),
    ("no-model.plumb", "names no model"),
];

fn check(name: &str, args: &[&str], code: i32, expect: &str) -> Result<(), String> {
    let path = corpus(name);
    let before = std::fs::read(&path).map_err(|e| format!("{name}: {e}"))?;
    let (got, stdout, stderr) = run_plumb(args);
    let after = std::fs::read(&path).map_err(|e| format!("{name}: {e}"))?;
    let shown = if code == 0 { &stdout } else { &stderr };
    let mut problems = Vec::new();
    if got != code {
        problems.push(format!("exit code {got}, expected {code}"));
    }
    if stderr.contains("panicked") {
        problems.push("panicked".into());
    }
    if !shown.contains(expect) {
        problems.push(format!("expected '{expect}'"));
    }
    if code != 0 && !stderr.contains(name) {
        problems.push("the message does not name the file".into());
    }
    if before != after {
        problems.push("the input file was written".into());
    }
    if problems.is_empty() {
        Ok(())
    } else {
        Err(format!(
            "{name}: {}\n  stdout: {}\n  stderr: {}",
            problems.join("; "),
            stdout.lines().next().unwrap_or(""),
            stderr.trim()
        ))
    }
}

#[test]
fn every_corpus_file_gets_its_expected_answer() {
    let mut failures = Vec::new();
    for (name, extra, code, expect) in CASES {
        let path = corpus(name).to_string_lossy().into_owned();
        let mut args = vec!["fit", path.as_str()];
        let has_y = extra.contains(&"--y");
        let has_x = extra.contains(&"--x");
        if !has_y {
            args.extend(["--y", "y"]);
        }
        if !has_x {
            args.extend(["--x", "x"]);
        }
        args.extend_from_slice(extra);
        if let Err(e) = check(name, &args, *code, expect) {
            failures.push(e);
        }
    }
    for (name, expect) in SESSIONS {
        let out = std::env::temp_dir().join(format!("plumb-bad-input-{}.html", std::process::id()));
        let path = corpus(name).to_string_lossy().into_owned();
        let out = out.to_string_lossy().into_owned();
        if let Err(e) = check(name, &["report", &path, "-o", &out], 1, expect) {
            failures.push(e);
        }
    }
    let files = std::fs::read_dir(corpus(""))
        .expect("corpus folder")
        .count();
    assert!(
        files >= 30,
        "the corpus has {files} files; keep at least 30"
    );
    assert!(failures.is_empty(), "{}", failures.join("\n"));
}

#[test]
fn a_ten_megabyte_line_is_refused_with_a_short_message() {
    // Made here rather than committed: one data row whose response cell is 10 MB of text.
    let dir = tempfile::tempdir().expect("tempdir");
    let path = dir.path().join("long-line.csv");
    let mut text = String::from("x,y\n1,");
    text.push_str(&"z".repeat(10 * 1024 * 1024));
    text.push_str("\n2,3\n3,4\n");
    std::fs::write(&path, &text).expect("write");
    let (code, _, stderr) = run_plumb(&["fit", &path.to_string_lossy(), "--y", "y", "--x", "x"]);
    assert_eq!(code, 1, "{}", &stderr[..stderr.len().min(300)]);
    assert!(
        stderr.contains("not a number") && stderr.len() < 1000,
        "message of {} bytes",
        stderr.len()
    );
}

/// The workbench opens files through `Dataset::load` (the same loader): for every data file
/// of the corpus it must either load, or fail with the very message the command line prints;
/// where the command line refuses the default model, the bench must refuse it too.
#[test]
fn the_workbench_loader_answers_the_corpus_as_the_command_line_does() {
    use plumb_app::state::dataset::Dataset;
    use plumb_app::state::pair::{FitSpec, Pair};
    let mut failures = Vec::new();
    for (name, extra, code, _) in CASES {
        let path = corpus(name);
        let before = std::fs::read(&path).expect("read");
        let p = path.to_string_lossy().into_owned();
        let mut args = vec!["fit", p.as_str()];
        if !extra.contains(&"--y") {
            args.extend(["--y", "y"]);
        }
        if !extra.contains(&"--x") {
            args.extend(["--x", "x"]);
        }
        args.extend_from_slice(extra);
        let (cli_code, _, stderr) = run_plumb(&args);
        let loaded = std::panic::catch_unwind(|| Dataset::load(&path, &Default::default()));
        match loaded {
            Err(_) => failures.push(format!("{name}: the workbench loader panicked")),
            Ok(Err(e)) => {
                if !stderr.contains(&e.to_string()) {
                    failures.push(format!(
                        "{name}: workbench says '{e}', command line '{}'",
                        stderr.trim()
                    ));
                }
            }
            Ok(Ok(data)) if extra.is_empty() && *code == 1 && cli_code == 1 => {
                let bench = Pair::new(&data.table, FitSpec::line("y", "x"));
                let refused = bench.as_ref().map_or(true, |p| p.summary().is_err());
                if !refused {
                    failures.push(format!(
                        "{name}: the command line refuses the model, the bench fits it"
                    ));
                }
                if let Err(e) = bench {
                    if !e.to_string().contains(name) {
                        failures.push(format!(
                            "{name}: the bench's message does not name the file: {e}"
                        ));
                    }
                }
            }
            Ok(Ok(_)) => {}
        }
        if std::fs::read(&path).expect("read") != before {
            failures.push(format!("{name}: the input file was written"));
        }
    }
    // Sessions go through the workbench itself: open, wait for the loader, read the status.
    for (name, _) in SESSIONS {
        let config = tempfile::tempdir().expect("config");
        let mut wb = plumb_app::Workbench::new(Some(config.path().to_path_buf()));
        wb.apply(plumb_app::Action::Open(corpus(name)));
        let start = std::time::Instant::now();
        while wb.is_loading() && start.elapsed() < std::time::Duration::from_secs(30) {
            wb.poll();
            std::thread::sleep(std::time::Duration::from_millis(10));
        }
        match (wb.status(), wb.loaded()) {
            (Some(s), None) if s.error && s.text.contains(name) => {}
            // A session with no model still opens its data; the bench then waits for a pair.
            (_, Some(_)) if *name == "no-model.plumb" => {}
            (s, _) => failures.push(format!("{name}: workbench status {s:?}")),
        }
    }
    assert!(failures.is_empty(), "{}", failures.join("\n"));
}

/// The corpus files that load must also fit to the right numbers, not merely print an R²:
/// slope and R² against a two-pass least-squares line computed here from the file's values
/// (x shifted by an exact constant first, y scaled by an exact power of two, so nothing here
/// loses digits to the files' offsets or magnitudes).
#[test]
fn the_files_that_load_fit_to_the_numbers_worked_here() {
    for (name, shift, scale) in [
        ("bom.csv", 0.0, 1.0),
        ("near-max-values.csv", 0.0, 2f64.powi(-1000)),
        ("tiny-spread.csv", 1.0, 1.0),
        ("huge-offset.csv", 1e9, 1.0),
    ] {
        let path = corpus(name);
        let text = std::fs::read_to_string(&path).expect("read");
        let (x, y): (Vec<f64>, Vec<f64>) = text
            .trim_start_matches('\u{feff}')
            .lines()
            .skip(1)
            .filter(|l| !l.trim().is_empty())
            .map(|l| {
                let (a, b) = l.split_once(',').expect("two fields");
                let a: f64 = a.trim().parse().expect("x");
                let b: f64 = b.trim().parse().expect("y");
                // Sterbenz: a − shift is exact for a within a factor 2 of shift.
                (a - shift, b * scale)
            })
            .unzip();
        let n = x.len() as f64;
        let (mx, my) = (x.iter().sum::<f64>() / n, y.iter().sum::<f64>() / n);
        let sxx: f64 = x.iter().map(|a| (a - mx).powi(2)).sum();
        let sxy: f64 = x.iter().zip(&y).map(|(a, b)| (a - mx) * (b - my)).sum();
        let syy: f64 = y.iter().map(|b| (b - my).powi(2)).sum();
        let slope = sxy / sxx / scale;
        let r2 = sxy * sxy / (sxx * syy);
        let p = path.to_string_lossy().into_owned();
        let (code, out, err) = run_plumb(&["fit", &p, "--y", "y", "--x", "x", "--format", "json"]);
        assert_eq!(code, 0, "{name}: {err}");
        let v: serde_json::Value = serde_json::from_str(&out).expect("json");
        let got_slope = v["coefficients"][1]["estimate"].as_f64().expect("slope");
        let got_r2 = v["r_squared"].as_f64().expect("R²");
        assert!(
            (got_slope / slope - 1.0).abs() < 1e-9,
            "{name}: slope {got_slope} vs {slope}"
        );
        assert!((got_r2 - r2).abs() < 1e-9, "{name}: R² {got_r2} vs {r2}");
    }
}

/// No output may replace an input, whatever it is called: the summary onto its data file, a
/// companion CSV named like the data file, the session onto the data file or onto itself, an
/// output through a hard or symbolic link to the data, onto a device. Each is refused with a
/// message naming the output and exit 1, nothing is written, and every input is unchanged.
#[test]
fn outputs_never_overwrite_inputs() {
    let dir = tempfile::tempdir().expect("dir");
    let d = |name: &str| dir.path().join(name).to_string_lossy().into_owned();
    let table = "x,y\n1,2.1\n2,3.9\n3,6.2\n4,7.8\n5,10.1\n";
    for name in ["data.csv", "s-statistics.csv", "d3.csv"] {
        std::fs::write(d(name), table).expect("write");
    }
    std::fs::hard_link(d("data.csv"), d("hard.html")).expect("hard link");
    #[cfg(unix)]
    std::os::unix::fs::symlink(d("data.csv"), d("soft.html")).expect("symlink");
    let (code, _, err) = run_plumb(&[
        "report",
        &d("data.csv"),
        "--y",
        "y",
        "--x",
        "x",
        "-o",
        &d("keep.html"),
        "--save-session",
        &d("keep.plumb"),
    ]);
    assert_eq!(code, 0, "{err}");
    let snapshot = |names: &[&str]| -> Vec<Vec<u8>> {
        names
            .iter()
            .map(|n| std::fs::read(d(n)).expect("read"))
            .collect()
    };
    let inputs = ["data.csv", "s-statistics.csv", "d3.csv", "keep.plumb"];
    let before = snapshot(&inputs);
    let cases: Vec<(Vec<String>, &str)> = vec![
        (
            vec![
                "report".into(),
                d("data.csv"),
                "--y".into(),
                "y".into(),
                "--x".into(),
                "x".into(),
                "-o".into(),
                d("data.csv"),
            ],
            "would overwrite the data file",
        ),
        (
            vec![
                "report".into(),
                d("s-statistics.csv"),
                "--y".into(),
                "y".into(),
                "--x".into(),
                "x".into(),
                "-o".into(),
                d("s.html"),
            ],
            "would overwrite the data file",
        ),
        (
            vec![
                "report".into(),
                d("d3.csv"),
                "--y".into(),
                "y".into(),
                "--x".into(),
                "x".into(),
                "-o".into(),
                d("r.html"),
                "--save-session".into(),
                d("d3.csv"),
            ],
            "would overwrite the data file",
        ),
        (
            vec![
                "report".into(),
                d("keep.plumb"),
                "-o".into(),
                d("keep.plumb"),
                "--allow-outside-data".into(),
            ],
            "would overwrite the session",
        ),
        (
            vec![
                "report".into(),
                d("data.csv"),
                "--y".into(),
                "y".into(),
                "--x".into(),
                "x".into(),
                "-o".into(),
                d("hard.html"),
            ],
            "would overwrite the data file",
        ),
        #[cfg(unix)]
        (
            vec![
                "report".into(),
                d("data.csv"),
                "--y".into(),
                "y".into(),
                "--x".into(),
                "x".into(),
                "-o".into(),
                d("soft.html"),
            ],
            "symbolic link",
        ),
        #[cfg(unix)]
        (
            vec![
                "report".into(),
                d("data.csv"),
                "--y".into(),
                "y".into(),
                "--x".into(),
                "x".into(),
                "-o".into(),
                "/dev/null".into(),
            ],
            "not a regular file",
        ),
    ];
    for (args, expect) in cases {
        let args: Vec<&str> = args.iter().map(String::as_str).collect();
        let (code, _, err) = run_plumb(&args);
        assert_eq!(code, 1, "{args:?}: {err}");
        assert!(
            err.contains("refusing to write") && err.contains(expect),
            "{args:?}: {err}"
        );
        assert!(!err.contains("panicked"));
    }
    assert_eq!(snapshot(&inputs), before, "every input is unchanged");
    for never in ["s.html", "r.html", "data-statistics.csv"] {
        assert!(
            !dir.path().join(never).exists(),
            "{never} was written before the refusal"
        );
    }
}
