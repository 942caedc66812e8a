//! The co-movement map driven through its accessibility tree (egui_kittest): its keys, leaving
//! a column out, and a pair the map flags whose reason follows it onto the bench's cues.

mod common;

use std::path::Path;

use egui_kittest::kittest::{NodeT, Queryable};
use egui_kittest::Harness;
use plumb_app::{Action, Screen, Workbench};

use common::{demo, harness, settle_ui as settle};

/// The field survey open on the map.
fn survey_on_the_map(config: &Path) -> Harness<'static, Workbench> {
    let mut h = harness(config);
    h.state_mut().apply(Action::Open(demo("field-survey.csv")));
    settle(&mut h);
    h.get_by_label("Co-movement map").click();
    settle(&mut h);
    h
}

fn shown(h: &Harness<'_, Workbench>, text: &str) -> bool {
    h.query_by_label_contains(text).is_some()
}

/// Opens the first button labelled `pair` (a pair can be both flagged and among the
/// strongest) and waits for the bench.
fn open_pair(h: &mut Harness<'_, Workbench>, pair: &str) {
    h.get_all_by_label(pair)
        .next()
        .unwrap_or_else(|| panic!("{pair} is listed"))
        .click();
    settle(h);
    assert_eq!(h.state().screen(), Screen::Bench);
}

#[test]
fn the_map_shows_its_keys_and_an_unticked_column_leaves_it() {
    let config = tempfile::tempdir().expect("config dir");
    let mut h = survey_on_the_map(config.path());
    assert!(shown(&h, "Colour: Pearson r"), "the colour key");
    assert!(shown(&h, "Marks on cells"), "the marks' key");
    assert!(shown(&h, "Structure checked on 21 of 21 pairs."));
    assert!(shown(&h, "21 pairs tested with Pearson r"));
    h.get_by_label_contains("Columns in the map: 7 of 7")
        .click();
    h.run_steps(2);
    h.get_by_label("slope_deg").click();
    settle(&mut h);
    assert!(
        shown(&h, "15 pairs tested with Pearson r"),
        "6 columns left"
    );
    assert!(shown(&h, "Columns in the map: 6 of 7"));
    assert!(shown(&h, "Left out of the map: slope_deg."));
    let named = h
        .get_all_by_label_contains("slope_deg")
        .filter(|n| {
            n.accesskit_node()
                .label()
                .is_some_and(|l| l.contains(" and "))
        })
        .count();
    assert_eq!(named, 0, "no listed pair names the column left out");
    h.get_by_label("Put them back").click();
    settle(&mut h);
    assert!(shown(&h, "21 pairs tested with Pearson r"));
}

#[test]
fn a_pair_with_structure_r_misses_carries_the_reason_into_the_bench_cues() {
    let config = tempfile::tempdir().expect("config dir");
    let mut h = survey_on_the_map(config.path());
    // Leaf nitrogen and leaf water lie on a ring (demo-scenarios): r near 0, dCor well above.
    assert!(!shown(&h, "From the map:"));
    open_pair(&mut h, "leaf_n_pct and leaf_water_pct");
    let pair = h.state().bench().pair().expect("pair");
    assert_eq!(
        (pair.spec.y.as_str(), pair.spec.x0()),
        ("leaf_n_pct", "leaf_water_pct")
    );
    assert!(shown(&h, "From the map:"));
    assert!(shown(
        &h,
        "leaf_n_pct and leaf_water_pct depend on each other in a way a straight line misses"
    ));
}

#[test]
fn a_drift_shared_along_the_row_order_reaches_the_bench_and_spares_the_order_column() {
    let config = tempfile::tempdir().expect("config dir");
    let mut h = survey_on_the_map(config.path());
    let key = plumb_app::state::map::MapKey {
        order: Some("visit_day".into()),
        ..h.state().map().key().clone()
    };
    h.state_mut().apply(Action::MapSettings(key));
    settle(&mut h);
    assert!(shown(
        &h,
        "shared drift: the pair's link fades along visit_day"
    ));
    let map = h.state().map();
    let numeric = &h.state().loaded().expect("loaded").dataset.numeric;
    assert!(
        numeric
            .iter()
            .all(|c| map.pair_notes("visit_day", c).is_empty()),
        "no note on the order column with any other"
    );
    open_pair(&mut h, "sward_height_cm and soil_temp_c");
    assert!(shown(&h, "From the map:"));
    assert!(shown(
        &h,
        "move together mostly because both drift along the row order. Along visit_day"
    ));
}
