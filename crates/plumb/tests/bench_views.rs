//! The bench's views at the three window sizes the project checks (1024×640, 1440×900,
//! 1920×1080), driven through the accessibility tree (egui_kittest): every view is laid out
//! large enough for three labelled ticks on each axis, no key entry sits on a plot, the views
//! never overlap, and a dense file (above the density threshold) gets its residual strip.

mod common;

use eframe::egui;
use egui_kittest::kittest::{NodeT, Queryable};
use egui_kittest::Harness;
use plumb_app::{Action, FitSpec, Overlays, Workbench};

use common::{demo, harness_sized, settle_ui as settle};

const SIZES: [(f32, f32); 3] = [(1024.0, 640.0), (1440.0, 900.0), (1920.0, 1080.0)];

/// The smallest plot (points) on which each axis shows three labelled ticks: three x labels
/// of up to 60 points each, three y labels 28 points apart (the room `axes` gives a label;
/// egui_plot hides a label only when ticks come closer than 24 points across, 16 up).
const MIN_PLOT: (f32, f32) = (3.0 * 60.0, 3.0 * 28.0);

fn open(h: &mut Harness<'_, Workbench>, file: &std::path::Path, y: &str, x: &str) {
    h.state_mut().apply(Action::Open(file.to_path_buf()));
    settle(h);
    h.state_mut().apply(Action::OpenPair(FitSpec::line(y, x)));
    h.state_mut().apply(Action::Show(plumb_app::Screen::Bench));
    settle(h);
}

/// The rectangle of the node labelled exactly `label`.
fn rect_of(h: &Harness<'_, Workbench>, label: &str) -> egui::Rect {
    let node = h.get_by_label(label);
    let b = node
        .accesskit_node()
        .bounding_box()
        .unwrap_or_else(|| panic!("{label}: no bounds"));
    egui::Rect::from_min_max(
        egui::pos2(b.x0 as f32, b.y0 as f32),
        egui::pos2(b.x1 as f32, b.y1 as f32),
    )
}

fn plots(h: &Harness<'_, Workbench>) -> Vec<(String, egui::Rect)> {
    ["scatter", "residuals", "leverage", "quantiles"]
        .iter()
        .map(|v| (v.to_string(), rect_of(h, &format!("view: {v}"))))
        .collect()
}

#[test]
fn every_view_has_room_for_its_axes_and_no_view_covers_another_at_three_sizes() {
    let data = demo("field-survey.csv");
    for size in SIZES {
        let config = tempfile::tempdir().expect("config dir");
        let mut h = harness_sized(size, config.path());
        open(&mut h, &data, "leaf_n_pct", "soil_temp_c");
        let shown = plots(&h);
        for (name, r) in &shown {
            assert!(
                r.width() >= MIN_PLOT.0 && r.height() >= MIN_PLOT.1,
                "{size:?}: the {name} view is {} × {}",
                r.width(),
                r.height()
            );
            assert!(
                r.right() <= size.0 && r.bottom() <= size.1,
                "{size:?}: the {name} view runs off the window: {r:?}"
            );
            // Three to five labelled ticks along each side, whatever the size (the spacer
            // asks for as many as fit; see `axes`).
            for (lo, hi) in [(7.9, 17.7), (-0.52, 0.51), (0.005, 0.033)] {
                let (ticks, _) = plumb_app::ticks_for(lo, hi, r.width());
                assert!((3..=5).contains(&ticks.len()), "{size:?} {name}: {ticks:?}");
            }
        }
        for (a, (na, ra)) in shown.iter().enumerate() {
            for (nb, rb) in shown.iter().skip(a + 1) {
                assert!(
                    !ra.shrink(1.0).intersects(rb.shrink(1.0)),
                    "{size:?}: {na} {ra:?} overlaps {nb} {rb:?}"
                );
            }
        }
        // The residual strip sits under the scatter on the same x axis.
        let (scatter, residuals) = (shown[0].1, shown[1].1);
        assert!(residuals.top() >= scatter.bottom() - 1.0, "{size:?}");
        assert!(
            (residuals.left() - scatter.left()).abs() <= 2.0
                && (residuals.right() - scatter.right()).abs() <= 2.0,
            "{size:?}: strip {residuals:?} under scatter {scatter:?}"
        );
    }
}

#[test]
fn the_keys_sit_outside_the_plots_with_every_overlay_and_groups_on() {
    let data = demo("jar-tests.csv");
    for size in SIZES {
        let config = tempfile::tempdir().expect("config dir");
        let mut h = harness_sized(size, config.path());
        open(&mut h, &data, "settled_ntu", "dose_mg_l");
        h.state_mut().apply(Action::SetOverlays(Overlays {
            theil_sen: true,
            deming: true,
            loess: true,
            ..Overlays::default()
        }));
        h.state_mut()
            .apply(Action::ColourBy(Some("analyst".to_string())));
        h.state_mut().apply(Action::Exclude {
            rows: vec![3],
            reason: Some("a key test".into()),
        });
        settle(&mut h);
        let scatter = rect_of(&h, "view: scatter");
        let leverage = rect_of(&h, "view: leverage");
        let mut keys = vec![
            "least squares",
            "Theil–Sen",
            "Deming",
            "LOESS",
            "excluded",
            "flagged: Cook's rule",
        ];
        keys.push("ordinary");
        let analysts: Vec<String> = h
            .state()
            .bench()
            .colouring()
            .levels
            .iter()
            .map(|l| format!("analyst: {l}"))
            .collect();
        assert!(analysts.len() >= 2, "groups are keyed: {analysts:?}");
        for name in keys
            .iter()
            .copied()
            .chain(analysts.iter().map(String::as_str))
        {
            let nodes: Vec<_> = h.get_all_by_label(name).collect();
            assert!(!nodes.is_empty(), "{size:?}: key entry {name} is shown");
            for n in nodes {
                let b = n.accesskit_node().bounding_box().expect("bounds");
                let r = egui::Rect::from_min_max(
                    egui::pos2(b.x0 as f32, b.y0 as f32),
                    egui::pos2(b.x1 as f32, b.y1 as f32),
                );
                for (view, plot) in [("scatter", scatter), ("leverage", leverage)] {
                    assert!(
                        !r.intersects(plot.shrink(1.0)),
                        "{size:?}: key entry {name} {r:?} lies on the {view} view {plot:?}"
                    );
                }
            }
        }
    }
}

#[test]
fn a_dense_file_gets_its_residual_strip_and_influence_view() {
    // Above the density threshold the views draw images: the points they are built from lie
    // where the data put them, and every view still gets room for its axes.
    let dir = tempfile::tempdir().expect("dir");
    let path = dir.path().join("dense.csv");
    let n = plumb_app::state::cloud::DENSITY_FROM + 5_000;
    let mut text = String::from("x,y\n");
    for i in 0..n {
        let x = 800.0 + (i % 997) as f64 * 0.1;
        let y = 2.0 * x + ((i * 7919) % 1000) as f64 * 0.01;
        text.push_str(&format!("{x},{y}\n"));
    }
    std::fs::write(&path, text).expect("write");
    let config = tempfile::tempdir().expect("config dir");
    let mut h = harness_sized((1440.0, 900.0), config.path());
    open(&mut h, &path, "y", "x");
    let d = h.state().bench().diagnostics().expect("diagnostics");
    assert!(
        d.views.residual.is_dense(),
        "the strip draws a density image"
    );
    let b = d.views.residual.bounds.expect("bounds");
    assert!(b.x_min >= 800.0 && b.x_max <= 900.0, "{b:?}: along x");
    assert!(b.y_min > -10.0 && b.y_max < 10.0, "{b:?}: residuals");
    for view in ["residuals", "leverage", "quantiles"] {
        let r = rect_of(&h, &format!("view: {view}"));
        assert!(r.width() > MIN_PLOT.0, "{view}: {r:?}");
    }
    // Against the row order the strip's points are built along the data rows (the view's
    // frame follows them when its old range misses them: `reframe`, tested in bench/view.rs).
    h.state_mut().apply(Action::ResidualsAgainst(
        plumb_app::state::views::ResidualAxis::RowOrder,
    ));
    settle(&mut h);
    let b = h
        .state()
        .bench()
        .diagnostics()
        .expect("diagnostics")
        .views
        .residual
        .bounds
        .expect("bounds");
    assert!(b.x_min >= 1.0 && b.x_max <= n as f64, "{b:?}");
}

#[test]
fn each_view_saves_as_its_own_chart_file() {
    use plumb_app::state::export::ChartView;
    let data = demo("field-survey.csv");
    let config = tempfile::tempdir().expect("config dir");
    let out = tempfile::tempdir().expect("out dir");
    let mut h = harness_sized((1440.0, 900.0), config.path());
    open(&mut h, &data, "leaf_n_pct", "soil_temp_c");
    h.state_mut().apply(Action::Exclude {
        rows: vec![133],
        reason: Some("export test".into()),
    });
    settle(&mut h);
    let n = h.state().bench().pair().expect("pair").rows.len();
    for view in [
        ChartView::Scatter,
        ChartView::Residuals,
        ChartView::Influence,
        ChartView::Quantiles,
    ] {
        let svg = out.path().join(format!("{}.svg", view.stem()));
        h.state_mut().apply(Action::ExportViewTo(view, svg.clone()));
        let text = std::fs::read_to_string(&svg).expect("the SVG is written");
        let circles = text.matches("<circle").count();
        // One marker per row drawn: all rows in the scatter and the residual strip (the
        // excluded one as a ring), the rows in the fit in the two others; the influence
        // chart's key adds one swatch per class.
        let rows = match view {
            ChartView::Scatter | ChartView::Residuals => n,
            ChartView::Influence => n - 1 + 3,
            ChartView::Quantiles => n - 1,
        };
        assert_eq!(circles, rows, "{view:?}: {circles} markers for {rows} rows");
        let png = out.path().join(view.stem());
        h.state_mut().apply(Action::ExportViewTo(view, png.clone()));
        let bytes = std::fs::read(png.with_extension("png")).expect("a PNG is written");
        assert_eq!(&bytes[1..4], b"PNG", "{view:?}");
    }
    let status = h.state().status().expect("said").text.clone();
    assert!(status.contains("saved the quantiles view"), "{status}");
}
