//! The columns screen driven through its accessibility tree (egui_kittest): pick y and x in the
//! column table and open them on the bench; give a column the ID role and see its cells name
//! the rows in the ledger and the influence table; and a role saved in a session comes back.

mod common;

use std::path::{Path, PathBuf};

use egui_kittest::kittest::{NodeT, Queryable};
use egui_kittest::Harness;
use plumb_app::Workbench;

use common::{demo, harness, open_by_typing, settle_ui as settle, sha256};

fn open(h: &mut Harness<'_, Workbench>, data: &Path) {
    open_by_typing(h, data);
}

/// Texts of the labels containing `part` (a label keeps its text in the node's value).
fn texts_with(h: &Harness<'_, Workbench>, part: &str) -> Vec<String> {
    h.get_all_by_label_contains(part)
        .filter_map(|n| n.accesskit_node().value().or(n.accesskit_node().label()))
        .collect()
}

#[test]
fn picking_y_and_x_in_the_column_table_opens_that_pair_on_the_bench() {
    let config = tempfile::tempdir().expect("config dir");
    let data = demo("field-survey.csv");
    let mut h = harness(config.path());
    open(&mut h, &data);
    let first = h.state().bench().pair().map(|p| p.spec.y.clone());
    assert_ne!(
        first.as_deref(),
        Some("leaf_n_pct"),
        "the pair picked must differ from the one opened at first for this check to bite"
    );
    h.get_by_label("y: leaf_n_pct").click();
    h.run_steps(2);
    h.get_by_label("x: soil_temp_c").click();
    h.run_steps(2);
    assert_eq!(texts_with(&h, "y = leaf_n_pct, x = soil_temp_c").len(), 1);
    h.get_by_label("Open on the bench").click();
    settle(&mut h);
    let pair = h.state().bench().pair().expect("a pair on the bench");
    assert_eq!(
        (pair.spec.y.as_str(), pair.spec.x0()),
        ("leaf_n_pct", "soil_temp_c")
    );
    assert_eq!(h.state().screen(), plumb_app::Screen::Bench);
}

/// A file whose first text column (`tag`) is suggested as ID, with a second one (`label`)
/// the analyst chooses instead.
fn labelled_file(dir: &Path) -> PathBuf {
    let path = dir.join("labelled.csv");
    let mut text = String::from("tag,label,x,y\n");
    for i in 1..=30 {
        let x = f64::from(i);
        let y = 2.0 + 0.5 * x + if i == 7 { 9.0 } else { (x * 1.3).sin() };
        text.push_str(&format!("t{i},bottle-{i},{x},{y}\n"));
    }
    std::fs::write(&path, text).expect("write");
    path
}

fn choose_role(h: &mut Harness<'_, Workbench>, column: &str, role: &str) {
    h.get_by_label(&format!("role of {column}")).click();
    h.run_steps(2);
    // The open list is laid out last ("—" also marks empty cells of the table).
    let options = h.get_all_by_label(role).collect::<Vec<_>>();
    options.last().expect("the role is listed").click();
    h.run_steps(3);
}

#[test]
fn an_id_column_names_the_rows_in_the_ledger_and_travels_with_the_session() {
    let config = tempfile::tempdir().expect("config dir");
    let dir = tempfile::tempdir().expect("data dir");
    let data = labelled_file(dir.path());
    let before = sha256(&data);
    let mut h = harness(config.path());
    open(&mut h, &data);
    assert_eq!(
        h.state().id_column(),
        Some("tag"),
        "the leftmost complete text column without repeats is suggested"
    );
    choose_role(&mut h, "label", "ID");
    assert_eq!(
        h.state().id_column(),
        Some("label"),
        "one ID column at a time"
    );
    assert_eq!(h.state().row_name(7).as_deref(), Some("bottle-7"));

    h.get_by_label("y: y").click();
    h.get_by_label("x: x").click();
    h.run_steps(2);
    h.get_by_label("Open on the bench").click();
    settle(&mut h);
    assert!(
        !texts_with(&h, "7 · bottle-7").is_empty(),
        "the influence table names its most influential row"
    );
    h.get_by_label("Exclude row:").click();
    h.run_steps(1);
    h.get_by_label("Exclude row:").type_text("7");
    h.get_by_label("Exclude").click();
    h.run_steps(3);
    h.get_by_label("Record reason").click();
    settle(&mut h);
    let ledger = texts_with(&h, "row 7 (bottle-7): x = 7");
    assert_eq!(ledger.len(), 1, "the ledger names the row: {ledger:?}");

    // The role is saved with the session and read back.
    let session = dir.path().join("work.plumb");
    h.state_mut()
        .apply(plumb_app::Action::SaveSessionTo(session.clone()));
    let saved = plumb_report::Session::load(&session).expect("saved");
    assert_eq!(saved.roles().id, Some(Some("label".to_string())));
    let mut again = harness(config.path());
    again
        .state_mut()
        .apply(plumb_app::Action::Open(session.clone()));
    settle(&mut again);
    assert_eq!(again.state().id_column(), Some("label"));
    assert_eq!(sha256(&data), before, "the data file is never written");
}

#[test]
fn a_group_role_colours_the_bench_and_a_row_order_feeds_the_checks() {
    let config = tempfile::tempdir().expect("config dir");
    let data = demo("jar-tests.csv");
    let mut h = harness(config.path());
    open(&mut h, &data);
    choose_role(&mut h, "analyst", "group");
    settle(&mut h);
    assert_eq!(
        h.state().bench().colouring().column.as_deref(),
        Some("analyst")
    );
    choose_role(&mut h, "morning", "row order");
    assert_eq!(
        h.state().bench().reading().order,
        plumb_data::analysis::RowOrder::Column("morning".into())
    );
    assert_eq!(h.state().map().key().order.as_deref(), Some("morning"));
    choose_role(&mut h, "analyst", "—");
    assert_eq!(h.state().bench().colouring().column, None);
}
