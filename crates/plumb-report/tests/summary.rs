//! The colleague summary end to end: contents, determinism, and the session round trip.

use std::path::Path;

use plumb_data::analysis::FitRequest;
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
    }
}

#[test]
fn the_same_inputs_give_byte_identical_files() {
    let table = load(&jar(), &LoadOptions::default()).expect("demo loads");
    let a = build(&input_for(&table)).expect("builds");
    let b = build(&input_for(&table)).expect("builds");
    assert_eq!(a, b);
    let dir = tempfile::tempdir().expect("tempdir");
    let files = write(&a, &dir.path().join("summary.html")).expect("writes");
    assert_eq!(files.len(), 9, "html, two csv, three charts as svg and png");
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
        "R² (centered)",
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
