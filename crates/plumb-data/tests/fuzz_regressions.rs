//! Inputs kept from fuzzing (`fuzz/regressions/`): each once crashed a loader or is a case the
//! fuzzer found worth keeping. Every one must load or fail with a message that names the
//! file — never panic. See fuzz/README.md.

use std::path::{Path, PathBuf};

use plumb_data::{load_bytes, load_parquet_bytes, DecimalMark, HeaderMode, LoadOptions};

fn inputs(target: &str) -> Vec<PathBuf> {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("../../fuzz/regressions")
        .join(target);
    let mut files: Vec<PathBuf> = std::fs::read_dir(&dir)
        .expect("regression folder")
        .flatten()
        .map(|e| e.path())
        .filter(|p| p.file_name().is_some_and(|n| n != "README.md"))
        .collect();
    files.sort();
    files
}

/// The delimited target's options byte, decoded the same way (fuzz/fuzz_targets/delimited.rs).
fn options_of(knob: u8) -> LoadOptions {
    LoadOptions {
        delimiter: [None, Some(b','), Some(b';'), Some(b'\t')][usize::from(knob & 3)],
        header: [
            HeaderMode::Auto,
            HeaderMode::Yes,
            HeaderMode::No,
            HeaderMode::Auto,
        ][usize::from((knob >> 2) & 3)],
        decimal: [
            None,
            Some(DecimalMark::Point),
            Some(DecimalMark::Comma),
            None,
        ][usize::from((knob >> 4) & 3)],
        missing_tokens: if knob & 64 != 0 {
            vec!["-999".into()]
        } else {
            Vec::new()
        },
        ..LoadOptions::default()
    }
}

#[test]
fn delimited_inputs_from_fuzzing_load_or_fail_cleanly() {
    let files = inputs("delimited");
    assert!(
        !files.is_empty(),
        "fuzz/regressions/delimited holds the kept inputs"
    );
    for path in files {
        let bytes = std::fs::read(&path).expect("read");
        let Some((&knob, text)) = bytes.split_first() else {
            continue;
        };
        let label = Path::new("kept.csv");
        match load_bytes(label, text, false, &options_of(knob)) {
            Ok(table) => {
                for c in table.columns() {
                    let _ = c.summary();
                }
            }
            Err(e) => {
                let m = e.to_string();
                assert!(m.contains("kept.csv"), "{}: {m}", path.display());
                // The parser's panic guard must not be what handles a kept input: each was
                // fixed at its cause.
                assert!(!m.contains("reader stopped"), "{}: {m}", path.display());
            }
        }
    }
}

#[test]
fn spreadsheet_inputs_from_fuzzing_load_or_fail_cleanly() {
    let files = inputs("sheet");
    assert!(
        !files.is_empty(),
        "fuzz/regressions/sheet holds the kept inputs"
    );
    for path in files {
        let bytes = std::fs::read(&path).expect("read");
        let label = Path::new("kept.xlsx");
        if let Err(e) = load_bytes(label, &bytes, true, &LoadOptions::default()) {
            assert!(
                e.to_string().contains("kept.xlsx"),
                "{}: {e}",
                path.display()
            );
        }
    }
}

/// Kept Parquet inputs made polars-parquet 0.52 panic inside its decoder (a dictionary page whose
/// validity runs past the page; the loader contains the panic) or abort on a 2^61-byte request
/// (a negative value count in a page header; the headers are checked first).
#[test]
fn parquet_inputs_from_fuzzing_fail_cleanly_even_when_the_reader_panics() {
    plumb_data::quiet_reader_panics();
    let files = inputs("parquet");
    assert!(
        !files.is_empty(),
        "fuzz/regressions/parquet holds the kept inputs"
    );
    for path in files {
        let bytes = std::fs::read(&path).expect("read");
        let label = Path::new("kept.parquet");
        match load_parquet_bytes(label, &bytes, &LoadOptions::default()) {
            Ok(table) => {
                for c in table.columns() {
                    let _ = c.summary();
                }
            }
            Err(e) => {
                let m = e.to_string();
                assert!(m.starts_with("kept.parquet: "), "{}: {m}", path.display());
                assert!(
                    m.contains("export it as CSV") || m.contains("Parquet"),
                    "{m}"
                );
            }
        }
    }
}
