//! Cross-crate checks of the path file → plumb-data → plumb-core.

use std::path::Path;

use plumb_data::analysis::{analyze, FitRequest, Wanted};
use plumb_data::{load, LoadOptions};

fn demo(name: &str) -> std::path::PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("../demo-scenarios/data")
        .join(name)
}

#[test]
fn decimal_comma_export_fits_like_the_same_numbers_written_with_points() {
    let jar = load(&demo("jar-tests.csv"), &LoadOptions::default()).expect("demo loads");
    let dir = tempfile::tempdir().expect("tempdir");
    let text = std::fs::read_to_string(demo("jar-tests.csv")).expect("read");
    let converted: String = text.replace(',', ".").replace(';', ",");
    let path = dir.path().join("points.csv");
    std::fs::write(&path, converted).expect("write");
    let points = load(&path, &LoadOptions::default()).expect("converted loads");
    let request = FitRequest {
        y: "settled_ntu".into(),
        x: vec!["dose_mg_l".into()],
        degree: 2,
        exclude: vec![17, 38],
        ..FitRequest::default()
    };
    let a = analyze(&jar, &request, Wanted::default()).expect("fits");
    let b = analyze(&points, &request, Wanted::default()).expect("fits");
    assert_eq!(a.fit, b.fit, "identical numbers give identical fits");
    assert_eq!(a.rows.selection.rows.len(), 46);
}

#[test]
fn weights_column_with_a_zero_names_its_row() {
    let dir = tempfile::tempdir().expect("tempdir");
    let path = dir.path().join("w.csv");
    std::fs::write(&path, "x,y,w\n1,2,1\n2,3,1\n3,5,0\n4,4,2\n").expect("write");
    let table = load(&path, &LoadOptions::default()).expect("loads");
    let request = FitRequest {
        y: "y".into(),
        x: vec!["x".into()],
        weights: Some("w".into()),
        ..FitRequest::default()
    };
    let err = analyze(&table, &request, Wanted::default()).expect_err("zero weight");
    let message = err.to_string();
    assert!(
        message.contains("row 3") && message.contains("column 'w'"),
        "{message}"
    );
}
