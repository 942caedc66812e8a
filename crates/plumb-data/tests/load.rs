//! Loading real files from disk: formats, sniffing, typing and the errors users see.

use std::io::Write;
use std::path::PathBuf;

use plumb_data::{
    load, ColumnValues, DataError, DecimalMark, HeaderMode, LoadOptions, SourceFormat,
};

fn write(dir: &tempfile::TempDir, name: &str, bytes: &[u8]) -> PathBuf {
    let path = dir.path().join(name);
    std::fs::File::create(&path)
        .and_then(|mut f| f.write_all(bytes))
        .expect("temp file");
    path
}

fn numbers(table: &plumb_data::Table, name: &str) -> Vec<Option<f64>> {
    table
        .numeric(name)
        .expect("numeric column")
        .iter()
        .collect()
}

#[test]
fn semicolon_export_with_bom_decimal_commas_and_crlf() {
    let dir = tempfile::tempdir().expect("tempdir");
    let path = write(
        &dir,
        "jar.csv",
        b"\xEF\xBB\xBFdose;turbidity\r\n1,5;12,25\r\n2,0;NA\r\n2,5;7,75\r\n",
    );
    let table = load(&path, &LoadOptions::default()).expect("loads");
    assert_eq!(
        table.format(),
        &SourceFormat::Delimited {
            encoding: plumb_data::TextEncoding::Utf8,
            delimiter: b';',
            decimal: DecimalMark::Comma,
            header: true
        }
    );
    assert_eq!(
        table.columns()[0].name,
        "dose",
        "BOM is not part of the first name"
    );
    assert_eq!(
        numbers(&table, "turbidity"),
        [Some(12.25), None, Some(7.75)]
    );
    let original = std::fs::read(&path).expect("read back");
    assert!(
        original.starts_with(b"\xEF\xBB\xBF"),
        "the source file is never written"
    );
}

#[test]
fn headerless_tab_file_gets_numbered_columns() {
    let dir = tempfile::tempdir().expect("tempdir");
    let path = write(&dir, "plain.tsv", b"1\t2\n3\t4\n\n5\t6\n");
    let table = load(&path, &LoadOptions::default()).expect("loads");
    assert_eq!(table.n_rows(), 3, "the blank line is not a row");
    assert_eq!(
        numbers(&table, "column2"),
        [Some(2.0), Some(4.0), Some(6.0)]
    );
}

#[test]
fn user_missing_tokens_and_forced_header() {
    let dir = tempfile::tempdir().expect("tempdir");
    let path = write(&dir, "codes.csv", b"2019,2020\n-999,4\n5,6\n");
    let options = LoadOptions {
        header: HeaderMode::Yes,
        missing_tokens: vec!["-999".into()],
        ..LoadOptions::default()
    };
    let table = load(&path, &options).expect("loads");
    assert_eq!(numbers(&table, "2019"), [None, Some(5.0)]);
}

#[test]
fn ragged_row_names_line_and_row() {
    let dir = tempfile::tempdir().expect("tempdir");
    let path = write(&dir, "ragged.csv", b"a,b,c\n1,2,3\n4,5\n6,7,8\n");
    let err = load(&path, &LoadOptions::default()).expect_err("ragged");
    let message = err.to_string();
    assert!(
        matches!(
            err,
            DataError::Ragged {
                line: 3,
                row: 2,
                found: 2,
                expected: 3,
                ..
            }
        ),
        "{message}"
    );
    assert!(
        message.contains("ragged.csv") && message.contains("line 3"),
        "{message}"
    );
}

#[test]
fn legacy_bytes_are_read_as_windows_1252_with_a_note_naming_the_line() {
    let dir = tempfile::tempdir().expect("tempdir");
    let path = write(&dir, "latin1.csv", b"site,value\nA,1\nM\xFCnchen,2\n");
    let table = load(&path, &LoadOptions::default()).expect("read as Windows-1252");
    assert!(matches!(
        table.columns()[0].values,
        ColumnValues::Text { ref values, .. } if values.get(1) == Some("München")
    ));
    let notes = table.notes().join("\n");
    assert!(notes.contains("not UTF-8 (first at line 3)"), "{notes}");
    assert!(table
        .format()
        .to_string()
        .starts_with("text (windows-1252)"));
    // Asked for UTF-8, the same bytes are refused with their line.
    let utf8 = LoadOptions {
        encoding: Some(plumb_data::TextEncoding::Utf8),
        ..LoadOptions::default()
    };
    let err = load(&path, &utf8).expect_err("not UTF-8");
    assert!(matches!(err, DataError::NotUtf8 { line: 3, .. }), "{err}");
}

#[test]
fn a_word_in_a_numeric_column_is_reported_by_row() {
    let dir = tempfile::tempdir().expect("tempdir");
    let path = write(&dir, "lod.csv", b"x,y\n1,2\n2,<LOD\n3,4\n");
    let table = load(&path, &LoadOptions::default()).expect("loads");
    assert!(matches!(
        table.columns()[1].values,
        ColumnValues::Text { .. }
    ));
    let err = table.numeric("y").expect_err("text column");
    let message = err.to_string();
    assert!(
        message.contains("row 2") && message.contains("<LOD") && message.contains("--missing"),
        "{message}"
    );
}

#[test]
fn unknown_column_suggests_close_names() {
    let dir = tempfile::tempdir().expect("tempdir");
    let path = write(&dir, "t.csv", b"Dose_mg,turbidity\n1,2\n3,4\n");
    let table = load(&path, &LoadOptions::default()).expect("loads");
    let err = table.numeric("dose").expect_err("unknown");
    assert!(err.to_string().contains("did you mean Dose_mg"), "{err}");
}

#[test]
fn complete_rows_account_for_every_row() {
    let dir = tempfile::tempdir().expect("tempdir");
    let path = write(
        &dir,
        "gaps.csv",
        b"x,y,z\n1,2,a\n,3,b\n3,inf,c\n4,5,d\n5,6,e\n",
    );
    let table = load(&path, &LoadOptions::default()).expect("loads");
    let sel = table.complete_rows(&["x", "y"], &[5]).expect("selects");
    assert_eq!(sel.rows, [1, 4]);
    assert_eq!(
        (&*sel.columns[0], &*sel.columns[1]),
        (&[1.0, 4.0][..], &[2.0, 5.0][..])
    );
    let dropped: Vec<(usize, &str, &str)> = sel
        .dropped
        .iter()
        .map(|d| (d.row, d.column.as_str(), d.reason.as_str()))
        .collect();
    assert_eq!(dropped, [(2, "x", "missing"), (3, "y", "non-finite")]);
    assert_eq!(sel.excluded, [5]);
    let err = table
        .complete_rows(&["x"], &[9])
        .expect_err("row 9 does not exist");
    assert!(err.to_string().contains("row 9 does not exist"), "{err}");
}

#[test]
fn empty_and_header_only_files_are_refused_clearly() {
    let dir = tempfile::tempdir().expect("tempdir");
    let empty = write(&dir, "empty.csv", b"\n  \n");
    assert!(matches!(
        load(&empty, &LoadOptions::default()),
        Err(DataError::Empty { .. })
    ));
    let header_only = write(&dir, "header.csv", b"x,y\n");
    assert!(matches!(
        load(&header_only, &LoadOptions::default()),
        Err(DataError::NoDataRows { .. })
    ));
}

#[test]
fn quoted_fields_keep_their_delimiters() {
    let dir = tempfile::tempdir().expect("tempdir");
    let path = write(
        &dir,
        "q.csv",
        b"site,note,value\n\"A, north\",\"said \"\"ok\"\"\",1.5\nB,plain,2.5\n",
    );
    let table = load(&path, &LoadOptions::default()).expect("loads");
    let ColumnValues::Text { values, .. } = &table.columns()[0].values else {
        panic!("site is text");
    };
    assert_eq!(values.get(0), Some("A, north"));
    assert_eq!(numbers(&table, "value"), [Some(1.5), Some(2.5)]);
}

#[test]
fn an_unsettled_decimal_mark_is_assumed_with_a_note_and_a_late_cell_settles_it() {
    let dir = tempfile::tempdir().expect("tempdir");
    // Only grouped thousands: 1,234 is 1234 with a point or 1.234 with a comma.
    let path = write(&dir, "open.csv", b"mass;n\n1,234;1\n2,5;2\n");
    let table = load(&path, &LoadOptions::default()).expect("loads");
    // 2,5 votes for the comma, so nothing is left open.
    assert_eq!(numbers(&table, "mass"), [Some(1.234), Some(2.5)]);
    assert!(table.notes().is_empty(), "{:?}", table.notes());

    let path = write(&dir, "open.csv", b"mass;n\n12;1\n1,234;2\n");
    let table = load(&path, &LoadOptions::default()).expect("loads");
    assert_eq!(numbers(&table, "mass"), [Some(12.0), Some(1234.0)]);
    let note = table.notes().join("\n");
    assert!(
        note.contains("'1,234' (column 'mass', row 2) reads as 1234 with a decimal point or 1.234 with a decimal comma"),
        "{note}"
    );
    assert!(note.contains("--decimal comma"), "{note}");
    let asked = LoadOptions {
        decimal: Some(DecimalMark::Comma),
        ..LoadOptions::default()
    };
    let table = load(&path, &asked).expect("loads");
    assert_eq!(numbers(&table, "mass"), [Some(12.0), Some(1.234)]);
    assert!(table.notes().is_empty(), "a chosen mark is no guess");

    // Past the 200 sniffed rows, a 7,5 settles the mark for the whole file.
    let mut text = String::from("mass;n\n");
    for i in 0..250 {
        text.push_str(&format!("{};{i}\n", if i == 240 { "7,5" } else { "1,250" }));
    }
    let path = write(&dir, "late.csv", text.as_bytes());
    let table = load(&path, &LoadOptions::default()).expect("loads");
    assert_eq!(numbers(&table, "mass")[0], Some(1.25));
    assert_eq!(numbers(&table, "mass")[240], Some(7.5));
    assert!(table.notes().is_empty(), "{:?}", table.notes());
}

#[test]
fn inputs_of_unknown_size_are_read_up_to_the_budget() {
    let small = LoadOptions {
        memory_limit: Some(16 << 20),
        ..LoadOptions::default()
    };
    // /dev/zero reports a size of 0 and never ends: refused after 1 MB, not read forever.
    for name in ["/dev/zero", "zeros.parquet", "zeros.xlsx"] {
        let dir = tempfile::tempdir().expect("tempdir");
        let path = if name.starts_with('/') {
            PathBuf::from(name)
        } else {
            let link = dir.path().join(name);
            std::os::unix::fs::symlink("/dev/zero", &link).expect("symlink");
            link
        };
        let err = load(&path, &small).expect_err("endless");
        assert!(matches!(err, DataError::TooLarge { .. }), "{name}: {err}");
        assert!(err.to_string().contains(name), "{err}");
    }
    // A pipe: a small table written into it loads; a large one is refused by bytes read.
    let dir = tempfile::tempdir().expect("tempdir");
    let fifo = dir.path().join("feed.csv");
    let made = std::process::Command::new("mkfifo").arg(&fifo).status();
    assert!(
        made.is_ok_and(|s| s.success()),
        "mkfifo (coreutils) makes the pipe"
    );
    for (rows, fits) in [(100usize, true), (400_000, false)] {
        let writer = {
            let fifo = fifo.clone();
            std::thread::spawn(move || {
                let mut f = std::fs::OpenOptions::new()
                    .write(true)
                    .open(&fifo)
                    .expect("open pipe");
                let _ = f.write_all(b"x,y\n");
                for i in 0..rows {
                    if f.write_all(format!("{i},{}\n", i * 2).as_bytes()).is_err() {
                        break; // the reader stopped: refused
                    }
                }
            })
        };
        let read = load(&fifo, &small);
        writer.join().expect("writer");
        match read {
            Ok(t) => assert!(fits && t.n_rows() == rows, "{rows} rows"),
            Err(e) => assert!(!fits && matches!(e, DataError::TooLarge { .. }), "{e}"),
        }
    }
}

fn names(table: &plumb_data::Table) -> Vec<&str> {
    table.columns().iter().map(|c| c.name.as_str()).collect()
}

#[test]
fn only_the_columns_asked_for_are_read_when_that_changes_nothing_else() {
    let dir = tempfile::tempdir().expect("tempdir");
    let mut text = String::from("run,site,y,x\n");
    for i in 0..300 {
        text.push_str(&format!("{i},s{},{}.5,{}\n", i % 4, i * 3, i % 17));
    }
    let path = write(&dir, "runs.csv", text.as_bytes());
    let all = load(&path, &LoadOptions::default()).expect("loads");
    let asked = |only: &[&str]| LoadOptions {
        only: Some(only.iter().map(|s| s.to_string()).collect()),
        ..LoadOptions::default()
    };
    // Asked for in any order, with a repeat: file order, each once, the same values.
    let some = load(&path, &asked(&["x", "y", "x"])).expect("loads");
    assert_eq!(names(&some), ["y", "x"]);
    assert_eq!(some.n_rows(), all.n_rows());
    assert_eq!(numbers(&some, "x"), numbers(&all, "x"));
    assert_eq!(numbers(&some, "y"), numbers(&all, "y"));
    assert_eq!(some.sha256(), all.sha256());
    // A name the header does not hold: every column, so the message can list them.
    let unknown = load(&path, &asked(&["y", "dose"])).expect("loads");
    assert_eq!(names(&unknown), ["run", "site", "y", "x"]);
    // Without the hash: the same table, and an empty hash rather than a wrong one.
    let unhashed = LoadOptions {
        skip_hash: true,
        ..LoadOptions::default()
    };
    let quick = load(&path, &unhashed).expect("loads");
    assert_eq!(quick.columns(), all.columns());
    assert_eq!((quick.sha256(), all.sha256().len()), ("", 64));
}

#[test]
fn every_column_is_read_when_the_header_repeats_a_name_or_the_mark_is_open() {
    let dir = tempfile::tempdir().expect("tempdir");
    let only = LoadOptions {
        only: Some(vec!["y".into()]),
        ..LoadOptions::default()
    };
    let repeated = write(&dir, "dup.csv", b"y,x,x\n1,2,3\n4,5,6\n");
    let table = load(&repeated, &only).expect("loads");
    assert_eq!(names(&table), ["y", "x", "x_2"]);
    // "1,234" under a comma delimiter cannot be told apart in the sample: a vote of every
    // cell decides, so every column is read.
    let open = write(&dir, "open.tsv", b"y\tx\n1,234\t2\n5,678\t3\n");
    let table = load(&open, &only).expect("loads");
    assert_eq!(names(&table), ["y", "x"]);
}
