//! Spreadsheet and Parquet files, written here by their own writer libraries and read back.

use plumb_data::{load, ColumnValues, DataError, LoadOptions, SourceFormat};
use polars::prelude::{df, ParquetWriter};
use rust_xlsxwriter::Workbook;

#[test]
fn xlsx_first_sheet_and_a_named_sheet() {
    let dir = tempfile::tempdir().expect("tempdir");
    let path = dir.path().join("bench.xlsx");
    let mut book = Workbook::new();
    let first = book.add_worksheet().set_name("notes").expect("name");
    first.write_string(0, 0, "read me").expect("write");
    let data = book.add_worksheet().set_name("readings").expect("name");
    for (j, h) in ["standard", "absorbance", "who"].iter().enumerate() {
        data.write_string(0, j as u16, *h).expect("write");
    }
    let rows = [
        (0.0, Some(0.004), "IK"),
        (5.0, None, "IK"),
        (10.0, Some(0.215), "MB"),
    ];
    for (i, (s, a, who)) in rows.iter().enumerate() {
        let r = i as u32 + 1;
        data.write_number(r, 0, *s).expect("write");
        if let Some(a) = a {
            data.write_number(r, 1, *a).expect("write");
        }
        data.write_string(r, 2, *who).expect("write");
    }
    book.save(&path).expect("save xlsx");

    let options = LoadOptions {
        sheet: Some("readings".into()),
        ..LoadOptions::default()
    };
    let table = load(&path, &options).expect("named sheet loads");
    assert_eq!(
        table.format(),
        &SourceFormat::Sheet {
            name: "readings".into(),
            header: true
        }
    );
    assert_eq!(
        table
            .numeric("absorbance")
            .expect("numeric")
            .iter()
            .collect::<Vec<_>>(),
        [Some(0.004), None, Some(0.215)]
    );
    assert!(matches!(
        table.column("who").expect("who").values,
        ColumnValues::Text { .. }
    ));

    // The first sheet is read by default; here it holds a note, not a table.
    let err = load(&path, &LoadOptions::default()).expect_err("first sheet has no rows");
    assert!(
        matches!(&err, DataError::EmptySheet { sheet, .. } if sheet == "notes"),
        "{err}"
    );
    assert!(err.to_string().contains("--sheet"), "{err}");

    let missing = LoadOptions {
        sheet: Some("Sheet9".into()),
        ..LoadOptions::default()
    };
    let err = load(&path, &missing).expect_err("no such sheet");
    assert!(matches!(err, DataError::NoSuchSheet { .. }), "{err}");
    assert!(err.to_string().contains("notes, readings"), "{err}");
}

#[test]
fn parquet_numbers_and_text() {
    let dir = tempfile::tempdir().expect("tempdir");
    let path = dir.path().join("log.parquet");
    let mut frame = df!(
        "t" => [1i64, 2, 3],
        "level" => [Some(0.5f64), None, Some(1.5)],
        "site" => ["a", "b", "c"]
    )
    .expect("frame");
    let file = std::fs::File::create(&path).expect("create");
    ParquetWriter::new(file)
        .finish(&mut frame)
        .expect("write parquet");
    let table = load(&path, &LoadOptions::default()).expect("parquet loads");
    assert_eq!(
        table
            .numeric("t")
            .expect("numeric")
            .iter()
            .collect::<Vec<_>>(),
        [Some(1.0), Some(2.0), Some(3.0)]
    );
    assert_eq!(
        table
            .numeric("level")
            .expect("numeric")
            .iter()
            .collect::<Vec<_>>(),
        [Some(0.5), None, Some(1.5)]
    );
    assert!(table.numeric("site").is_err());
}

#[test]
fn a_text_file_named_like_a_spreadsheet_is_refused_clearly() {
    let dir = tempfile::tempdir().expect("tempdir");
    let path = dir.path().join("fake.xlsx");
    std::fs::write(&path, "x,y\n1,2\n").expect("write");
    let err = load(&path, &LoadOptions::default()).expect_err("not a workbook");
    assert!(
        err.to_string().contains("fake.xlsx") && err.to_string().contains("spreadsheet"),
        "{err}"
    );
}

/// The hash a table carries is of the bytes it was read from, for every format: here it must
/// equal a hash of the unchanged file taken independently (sha2 directly on the file).
#[test]
fn every_format_hashes_the_bytes_it_read() {
    use sha2::{Digest, Sha256};
    let dir = tempfile::tempdir().expect("tempdir");
    let csv = dir.path().join("a.csv");
    std::fs::write(&csv, "x,y\n1,2\n2,3\n").expect("write");
    let parquet = dir.path().join("a.parquet");
    let mut frame = df!("x" => [1.0f64, 2.0], "y" => [2.0f64, 3.5]).expect("frame");
    ParquetWriter::new(std::fs::File::create(&parquet).expect("create"))
        .finish(&mut frame)
        .expect("write parquet");
    let xlsx = dir.path().join("a.xlsx");
    let mut book = Workbook::new();
    let sheet = book.add_worksheet();
    sheet.write(0, 0, "x").expect("cell");
    sheet.write(1, 0, 1.5).expect("cell");
    sheet.write(2, 0, 2.5).expect("cell");
    book.save(&xlsx).expect("save xlsx");
    for path in [csv, parquet, xlsx] {
        let table = load(&path, &LoadOptions::default()).expect("loads");
        let independent = format!("{:x}", Sha256::digest(std::fs::read(&path).expect("read")));
        assert_eq!(table.sha256(), independent, "{}", path.display());
    }
}

/// A workbook's dates are read as days since 1970-01-01 with a note saying so, not as the
/// workbook's opaque serial numbers.
#[test]
fn workbook_dates_are_days_since_1970() {
    use rust_xlsxwriter::{ExcelDateTime, Format};
    let dir = tempfile::tempdir().expect("tempdir");
    let path = dir.path().join("dates.xlsx");
    let mut book = Workbook::new();
    let sheet = book.add_worksheet();
    let date = Format::new().set_num_format("yyyy-mm-dd hh:mm");
    sheet.write(0, 0, "taken").expect("cell");
    sheet.write(0, 1, "level").expect("cell");
    for (r, (d, h)) in [(1u8, 0u16), (2, 12), (3, 6)].iter().enumerate() {
        let when = ExcelDateTime::from_ymd(2000, 3, *d)
            .expect("date")
            .and_hms(*h, 0, 0)
            .expect("time");
        let row = r as u32 + 1;
        sheet
            .write_datetime_with_format(row, 0, &when, &date)
            .expect("date cell");
        sheet
            .write(row, 1, f64::from(r as u32) * 2.0)
            .expect("cell");
    }
    book.save(&path).expect("save");
    let table = load(&path, &LoadOptions::default()).expect("loads");
    // 2000-03-01 is day 11017 after 1970-01-01 (by hand); noon adds half a day.
    assert_eq!(
        table
            .numeric("taken")
            .expect("numeric")
            .iter()
            .collect::<Vec<_>>(),
        [Some(11_017.0), Some(11_018.5), Some(11_019.25)]
    );
    assert!(
        table
            .notes()
            .iter()
            .any(|n| n.contains("'taken' holds dates")),
        "{:?}",
        table.notes()
    );
}
