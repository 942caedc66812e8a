//! The workbench driven by its actions alone, without pixels: exclude, undo, redo, a what-if
//! move, save and reopen, the reason prompt and the questions. Every number the bench shows is
//! checked against `plumb fit` on the same rows — for a what-if move, against `plumb fit` on a
//! copy of the file with the moved values written in, an independent route to the same fit.

mod common;

use std::path::Path;

use common::{assert_same_numbers, cli_fit, cli_fit_with, close, demo, live, settle};

use plumb_app::{Action, Ask, FitSpec, Screen, Workbench};

fn calibration(config: &Path, data: &Path) -> Workbench {
    let mut wb = Workbench::new(Some(config.to_path_buf()));
    wb.apply(Action::Open(data.to_path_buf()));
    settle(&mut wb);
    assert!(wb.loaded().is_some(), "{:?}", wb.status());
    wb.apply(Action::OpenPair(FitSpec::line(
        "absorbance",
        "standard_mg_l",
    )));
    wb.apply(Action::Show(Screen::Bench));
    settle(&mut wb);
    wb
}

#[test]
fn exclude_undo_and_redo_keep_the_command_lines_numbers() {
    let config = tempfile::tempdir().expect("config");
    let data = demo("calibration-run.csv");
    let mut wb = calibration(config.path(), &data);
    let all = cli_fit(&data, "absorbance", "standard_mg_l", "");
    let without = cli_fit(&data, "absorbance", "standard_mg_l", "9,14");
    assert_same_numbers(&live(&wb), &all);

    wb.apply(Action::Exclude {
        rows: vec![9, 14],
        reason: Some("read during lamp warm-up".into()),
    });
    assert!(
        wb.bench().prompt().is_none(),
        "a reason was given: no prompt"
    );
    settle(&mut wb);
    assert_same_numbers(&live(&wb), &without);
    let d = wb.bench().diagnostics().expect("diagnostics");
    let full = d.fit.as_ref().expect("the diagnostics' fit");
    assert!(close(
        full.r_squared,
        without["r_squared"].as_f64().expect("r²")
    ));
    assert_eq!(d.cases.len(), 25, "27 rows, 2 out");

    wb.apply(Action::Undo);
    settle(&mut wb);
    assert!(wb.marks().excluded.is_empty());
    assert_same_numbers(&live(&wb), &all);
    wb.apply(Action::Redo);
    settle(&mut wb);
    assert_same_numbers(&live(&wb), &without);
    assert!(wb
        .marks()
        .excluded
        .values()
        .all(|n| n.reason == "read during lamp warm-up"));
    wb.apply(Action::PutBack(vec![9]));
    settle(&mut wb);
    assert_same_numbers(
        &live(&wb),
        &cli_fit(&data, "absorbance", "standard_mg_l", "14"),
    );
}

#[test]
fn an_exclusion_without_a_reason_asks_for_one_and_the_reason_joins_its_step() {
    let config = tempfile::tempdir().expect("config");
    let data = demo("calibration-run.csv");
    let mut wb = calibration(config.path(), &data);
    wb.apply(Action::Exclude {
        rows: vec![14],
        reason: None,
    });
    assert_eq!(wb.bench().prompt().map(|p| p.rows.clone()), Some(vec![14]));
    wb.apply(Action::RecordReason("  standard drifted  ".into()));
    assert!(wb.bench().prompt().is_none());
    assert_eq!(wb.marks().excluded[&14].reason, "standard drifted");
    let recovery =
        plumb_report::Session::load(&config.path().join("recovery.plumb")).expect("recovery copy");
    assert_eq!(recovery.exclusions[0].reason, "standard drifted");
    // One undo takes back the exclusion and its reason together.
    wb.apply(Action::Undo);
    assert!(wb.marks().excluded.is_empty());
    assert!(!wb.can_undo());
    // A row beyond the table is refused with the range.
    wb.apply(Action::Exclude {
        rows: vec![99],
        reason: None,
    });
    let status = wb.status().expect("a message");
    assert!(
        status.error && status.text.contains("1 to 27"),
        "{status:?}"
    );
    assert!(wb.marks().excluded.is_empty());
}

#[test]
fn a_committed_what_if_move_equals_a_fit_of_the_file_with_the_moved_values() {
    let config = tempfile::tempdir().expect("config");
    let work = tempfile::tempdir().expect("work");
    let data = demo("calibration-run.csv");
    let before = std::fs::read(&data).expect("read");
    let mut wb = calibration(config.path(), &data);
    let start = live(&wb);
    // A drag: several positions, then the release.
    for y in [0.5, 0.6, 0.71] {
        wb.apply(Action::MoveTo { row: 5, x: 10.0, y });
    }
    wb.apply(Action::EndMove);
    settle(&mut wb);
    assert!(wb.marks().is_hypothetical());

    // The same fit by another route: the file with row 5's cells replaced, read afresh.
    let moved = work.path().join("moved.csv");
    let text = String::from_utf8(before.clone()).expect("utf-8");
    let header: Vec<&str> = text.lines().next().expect("header").split(',').collect();
    let (xi, yi) = (
        header
            .iter()
            .position(|h| *h == "standard_mg_l")
            .expect("x"),
        header.iter().position(|h| *h == "absorbance").expect("y"),
    );
    let rewritten: Vec<String> = text
        .lines()
        .enumerate()
        .map(|(k, line)| {
            if k != 5 {
                return line.to_string();
            }
            let mut cells: Vec<String> = line.split(',').map(str::to_string).collect();
            cells[xi] = "10".into();
            cells[yi] = "0.71".into();
            cells.join(",")
        })
        .collect();
    std::fs::write(&moved, rewritten.join("\n") + "\n").expect("write");
    let reference = cli_fit(&moved, "absorbance", "standard_mg_l", "");
    assert_same_numbers(&live(&wb), &reference);
    let d = wb.bench().diagnostics().expect("diagnostics");
    let full = d.fit.as_ref().expect("fit");
    assert!(close(
        full.r_squared,
        reference["r_squared"].as_f64().expect("r²")
    ));

    // One undo takes back the whole drag; the data file was never written.
    wb.apply(Action::Undo);
    settle(&mut wb);
    assert!(!wb.marks().is_hypothetical());
    assert!(close(live(&wb).r_squared, start.r_squared));
    assert_eq!(std::fs::read(&data).expect("read"), before);
}

#[test]
fn a_saved_session_reopens_with_the_same_rows_reasons_and_numbers() {
    let config = tempfile::tempdir().expect("config");
    let work = tempfile::tempdir().expect("work");
    let data = work.path().join("calibration-run.csv");
    std::fs::copy(demo("calibration-run.csv"), &data).expect("copy");
    let mut wb = calibration(config.path(), &data);
    wb.apply(Action::Exclude {
        rows: vec![9, 14],
        reason: Some("both read during lamp warm-up".into()),
    });
    settle(&mut wb);
    let session = work.path().join("run");
    wb.apply(Action::SaveSessionTo(session.clone()));
    let saved = work.path().join("run.plumb");
    assert!(saved.exists(), "the extension is added: {:?}", wb.status());
    assert!(!wb.has_unsaved_changes());

    let mut again = Workbench::new(Some(config.path().to_path_buf()));
    again.apply(Action::Open(saved));
    settle(&mut again);
    assert_eq!(again.screen(), Screen::Bench, "a session opens on its pair");
    let rows: Vec<usize> = again.marks().excluded.keys().copied().collect();
    assert_eq!(rows, vec![9, 14]);
    assert!(!again.has_unsaved_changes());
    assert_same_numbers(
        &live(&again),
        &cli_fit(&data, "absorbance", "standard_mg_l", "9,14"),
    );
}

#[test]
fn questions_are_answered_by_actions() {
    let config = tempfile::tempdir().expect("config");
    let dir = tempfile::tempdir().expect("data");
    let big = dir.path().join("log.csv");
    let text: String = std::iter::once("t,a,b\n".to_string())
        .chain((0..5000).map(|i| format!("{i},{},{}\n", i % 17, (i * 7) % 23)))
        .collect();
    std::fs::write(&big, text).expect("write");
    let mut wb = Workbench::new(Some(config.path().to_path_buf()));
    wb.set_memory_limit(Some(10_000));
    wb.apply(Action::Open(big.clone()));
    assert!(
        matches!(wb.ask(), Some(Ask::TooLarge { .. })),
        "{:?}",
        wb.ask()
    );
    wb.apply(Action::Answer(false));
    assert!(wb.ask().is_none());
    assert_eq!(
        wb.status().map(|s| s.text.as_str()),
        Some("file not opened")
    );
    wb.apply(Action::Open(big));
    wb.apply(Action::Answer(true));
    settle(&mut wb);
    assert_eq!(wb.screen(), Screen::OnePass);
    assert!(wb.one_pass().and_then(|o| o.r_squared_line()).is_some());
    assert!(wb.loaded().is_none(), "the table was not loaded");
}

/// The workbench never writes onto its data file, whatever name it is reached by: a session
/// saved to a hard link of the data file, a summary written to one, both refused with a
/// message on the status line, and the data file unchanged.
#[test]
fn saving_or_writing_onto_the_data_file_is_refused() {
    let config = tempfile::tempdir().expect("config");
    let work = tempfile::tempdir().expect("work");
    let data = work.path().join("calibration-run.csv");
    std::fs::copy(demo("calibration-run.csv"), &data).expect("copy");
    let before = std::fs::read(&data).expect("read");
    let mut wb = calibration(config.path(), &data);
    let session_link = work.path().join("alias.plumb");
    std::fs::hard_link(&data, &session_link).expect("link");
    wb.apply(Action::SaveSessionTo(session_link.clone()));
    let status = wb.status().expect("a message");
    assert!(
        status.error && status.text.contains("would overwrite"),
        "{status:?}"
    );
    let summary_link = work.path().join("alias.html");
    std::fs::hard_link(&data, &summary_link).expect("link");
    wb.apply(Action::ExportSummaryTo(summary_link));
    let status = wb.status().expect("a message");
    assert!(
        status.error && status.text.contains("would overwrite"),
        "{status:?}"
    );
    assert_eq!(
        std::fs::read(&data).expect("read"),
        before,
        "the data file is unchanged"
    );
    assert!(
        !work.path().join("alias-statistics.csv").exists(),
        "nothing half-written"
    );
}

#[test]
fn choosing_the_decimal_mark_rereads_the_file_and_keeps_the_work() {
    let config = tempfile::tempdir().expect("config");
    let data =
        Path::new(env!("CARGO_MANIFEST_DIR")).join("../../tests/bad-input/decimal-ambiguous.csv");
    let mut wb = Workbench::new(Some(config.path().to_path_buf()));
    wb.apply(Action::Open(data.clone()));
    settle(&mut wb);
    let table = &wb.loaded().expect("loaded").dataset.table;
    assert!(table
        .notes()
        .iter()
        .any(|n| n.contains("no cell settles the decimal mark")));
    assert_eq!(table.numeric("y").expect("y").get(0), Some(1234.0));
    wb.apply(Action::OpenPair(FitSpec::line("y", "x")));
    wb.apply(Action::Exclude {
        rows: vec![3],
        reason: Some("cuvette cracked".into()),
    });
    settle(&mut wb);

    wb.apply(Action::ReadAs {
        decimal: Some(plumb_data::DecimalMark::Comma),
        encoding: None,
    });
    settle(&mut wb);
    let dataset = &wb.loaded().expect("loaded").dataset;
    assert_eq!(dataset.table.numeric("y").expect("y").get(0), Some(1.234));
    assert!(dataset.table.notes().is_empty());
    assert_eq!(wb.marks().excluded.len(), 1, "the exclusion stays");
    // Every number, estimates included (R² alone would not see y scaled by 1000).
    let comma = [
        "--y",
        "y",
        "--x",
        "x",
        "--exclude",
        "3",
        "--decimal",
        "comma",
    ];
    assert_same_numbers(&live(&wb), &cli_fit_with(&data, &comma));
    let session = config.path().join("read.plumb");
    wb.apply(Action::SaveSessionTo(session.clone()));
    let saved = std::fs::read_to_string(&session).expect("session");
    assert!(
        saved.contains("decimal = \"comma\"") || saved.contains("\"decimal\": \"comma\""),
        "{saved}"
    );
}

#[test]
fn a_pipe_with_no_writer_does_not_hold_the_workbench() {
    let config = tempfile::tempdir().expect("config");
    let dir = tempfile::tempdir().expect("data");
    let fifo = dir.path().join("feed.csv");
    let made = std::process::Command::new("mkfifo").arg(&fifo).status();
    assert!(
        made.is_ok_and(|s| s.success()),
        "mkfifo (coreutils) makes the pipe"
    );
    let mut wb = Workbench::new(Some(config.path().to_path_buf()));
    // The read blocks on its own thread (as `cat` would); the workbench answers and can stop it.
    wb.apply(Action::Open(fifo.clone()));
    assert!(wb.is_busy(), "reading");
    assert!(
        !wb.settle(std::time::Duration::from_millis(300)),
        "no writer: still reading"
    );
    wb.apply(Action::CancelLoad);
    assert!(!wb.is_busy());
    assert!(
        wb.status()
            .is_some_and(|s| format!("{s:?}").contains("stopped reading")),
        "{:?}",
        wb.status()
    );
    assert!(wb.loaded().is_none());
}
