//! The scatter: the pair's rows with the fitted line or curve (from the live numbers), its
//! confidence band (shaded) and prediction band (dashed), the overlays and per-group lines, and
//! the pointer's work — click to exclude, lasso, or drag a point as a what-if.

use eframe::egui;
use egui_plot::{FilledArea, Line, LineStyle, PlotPoints, PlotUi};
use plumb_core::regression::{BandPoint, LiveSummary};
use plumb_data::analysis::RobustFit;

use super::pointer::PointerMode;
use super::points::{
    hovered_entry, nearest_at, points_layer, radius, title_ui, toggle, tooltip_ui, Layer, Marked,
    Shown,
};
use super::{BenchUi, Scene};
use crate::action::{Action, Actions};
use crate::axes;
use crate::density::inside;
use crate::palette;
use crate::state::diagnostics::Diagnostics;
use crate::state::marks::Marks;
use crate::state::pair::PairRows;
use crate::state::reading::BenchMode;

const TIP: &str = "The rows with the fitted line or curve, its confidence band (shaded) and prediction band (dashed). Hollow rings are excluded rows; a dashed green curve is the fit kept for comparison.";

/// Points along the drawn curve.
const CURVE_POINTS: u32 = 120;

/// The fitted curves over `[lo, hi]` from the live coefficients, in the data's units: one for
/// a model of one predictor, one per level of its grouping factor (level index, points).
/// None for a model of several predictors (its fit is not a curve in the first one alone).
pub fn curves(
    pair: &PairRows,
    s: &LiveSummary,
    (lo, hi): (f64, f64),
) -> Vec<(Option<usize>, Vec<[f64; 2]>)> {
    if pair.spec.x.len() != 1 || hi.partial_cmp(&lo) != Some(std::cmp::Ordering::Greater) {
        return Vec::new();
    }
    let model = &pair.model;
    let levels: Vec<Option<usize>> = match &model.levels {
        Some(l) => (0..l.names.len()).map(Some).collect(),
        None => vec![None],
    };
    levels
        .into_iter()
        .map(|level| {
            let points = (0..=CURVE_POINTS)
                .filter_map(|k| {
                    let x = lo + (hi - lo) * f64::from(k) / f64::from(CURVE_POINTS);
                    let row = model.row_at(&[x], level)?;
                    let t: f64 = row.iter().zip(&s.estimates).map(|(a, b)| a * b).sum();
                    Some([x, model.response_back(t)?])
                })
                .collect();
            (level, points)
        })
        .collect()
}

/// Data rows of the included entries (at their current positions) inside the lasso `ring`.
pub fn lasso_rows(pair: &PairRows, marks: &Marks, ring: &[[f64; 2]]) -> Vec<usize> {
    if ring.len() < 3 {
        return Vec::new();
    }
    (0..pair.rows.len())
        .filter(|&i| !pair.is_excluded(i, marks))
        .filter(|&i| {
            let (x, y) = pair.point(i, marks);
            inside(ring, x, y)
        })
        .map(|i| pair.rows[i])
        .collect()
}

/// The scatter's x axis is shared with the residual strip under it (same range, same pointer
/// line) when the strip is drawn against the scatter's predictor.
pub fn link_x<'a>(plot: egui_plot::Plot<'a>, scene: &Scene<'_>) -> egui_plot::Plot<'a> {
    let id = egui::Id::unique(("bench-x", scene.bench.serial()));
    plot.link_axis(id, [true, false])
        .link_cursor(id, [true, false])
}

/// Draws the scatter in the box it is given, with its title, its key above the plot and the
/// pointer's read-out, and returns what the pointer asked for.
/// `titled`: draw the view's title (not when a chooser above names it).
pub fn scatter_ui(
    scene: &Scene<'_>,
    own: &mut BenchUi,
    ui: &mut egui::Ui,
    titled: bool,
) -> Actions {
    let pair = scene.pair;
    let mut zoom = false;
    ui.horizontal(|ui| {
        if titled {
            title_ui(
                ui,
                &format!("{} against {}", pair.spec.y, pair.spec.x0()),
                TIP,
            );
        }
        if !scene.marks.excluded.is_empty() {
            zoom = ui
                .small_button("zoom to included rows")
                .on_hover_text("Fit the view to the rows in the fit, so that a far-off excluded row does not squash them (double-click the view to see every row again)")
                .clicked();
        }
    });
    let visuals = ui.visuals().clone();
    super::key::key_row_ui(ui, &super::key::scatter_keys(scene, &visuals));
    let marked = Marked::of(pair, scene.marks);
    let included = pair.points.as_ref();
    let size = ui.available_size();
    let mut plot = axes::plot(
        ("scatter", scene.bench.serial()),
        size,
        (pair.spec.x0(), &pair.spec.y),
    )
    .allow_drag(own.pointer.mode == PointerMode::Exclude);
    if scene.bench.residual_axis().is_scatter_x(&pair.spec) {
        plot = link_x(plot, scene);
    }
    if included.is_dense() {
        if let Some(b) = included.bounds {
            plot = super::dense_bounds(plot, b);
        }
    }
    if scene.bench.reading().mode == BenchMode::Agreement {
        // Two methods on one scale: equal units on both axes, so a slope of 1 looks like one.
        plot = plot.data_aspect(1.0);
    }
    let frame = zoom.then(|| included_frame(pair, scene.marks)).flatten();
    let resp = plot.show(ui, |pu| {
        if let Some(b) = frame {
            pu.set_plot_bounds(b);
        }
        draw(pu, scene, own, &marked, &visuals);
    });
    let hovered = hovered_entry(
        &resp.response,
        &resp.transform,
        &[&marked.excluded, &marked.moved],
    )
    .or_else(|| {
        let pos = resp.response.hover_pos()?;
        let v = resp.transform.value_from_position(pos);
        included.nearest_except(v.x, v.y, radius(&resp.transform), &marked.skip)
    });
    axes::readout_ui(ui, &resp.response, &resp.transform);
    axes::name_plot(&resp.response, "view: scatter");
    let saved = super::view::save_menu(&resp.response, crate::state::export::ChartView::Scatter);
    let shown = Shown {
        hovered,
        transform: resp.transform,
        response: resp.response,
    };
    own.scatter_transform = Some(shown.transform);
    let mut out = interaction(scene, own, &shown);
    out.extend(saved);
    tooltip_ui(scene, &mut own.pointer, &shown);
    out
}

/// The view's bounds around the rows in the fit (at their current positions), with a margin.
pub fn included_frame(pair: &PairRows, marks: &Marks) -> Option<egui_plot::PlotBounds> {
    let b = crate::density::Bounds::around(
        (0..pair.rows.len())
            .filter(|&i| !pair.is_excluded(i, marks))
            .map(|i| pair.point(i, marks)),
    )?;
    let (mx, my) = (b.width() * 0.05, b.height() * 0.05);
    Some(egui_plot::PlotBounds::from_min_max(
        [b.x_min - mx, b.y_min - my],
        [b.x_max + mx, b.y_max + my],
    ))
}

/// The scatter's content: bands and overlays under the points, the fitted curve and the
/// lasso over them.
fn draw(
    pu: &mut PlotUi<'_>,
    scene: &Scene<'_>,
    own: &mut BenchUi,
    marked: &Marked,
    visuals: &egui::Visuals,
) {
    let pair = scene.pair;
    let included = pair.points.as_ref();
    let colouring = scene.bench.colouring();
    let x_range = included.bounds.map_or((0.0, 0.0), |b| (b.x_min, b.x_max));
    let mode = scene.bench.reading().mode;
    if let Some(d) = scene.bench.diagnostics() {
        if mode == BenchMode::Agreement {
            super::lab_layers::method_lines(pu, d, visuals, x_range);
        } else {
            bands(pu, d, visuals);
            overlays(pu, d, visuals, x_range, &colouring.levels);
            kept_curves(pu, pair, d, visuals);
        }
        if mode == BenchMode::Calibration {
            super::lab_layers::unknowns(pu, d, visuals, x_range);
        }
    }
    let layer = Layer {
        view: "scatter",
        cloud: included,
        groups: colouring
            .of_entry
            .as_deref()
            .map(|g| (g, colouring.levels.as_slice())),
        excluded: &marked.excluded,
        skip: &marked.skip,
        extra: &marked.moved,
        focus: own.pointer.focus().map(|e| pair.point(e, scene.marks)),
        generation: scene.bench.marks_generation(),
    };
    points_layer(pu, &layer, &mut own.textures, visuals);
    origins(pu, scene, visuals);
    if let (Some(Ok(s)), false) = (scene.bench.summary(), mode == BenchMode::Agreement) {
        let names = pair.model.levels.as_ref().map(|l| l.names.as_slice());
        for (level, points) in curves(pair, &s, x_range) {
            let (name, colour) = match (level, names) {
                (Some(k), Some(n)) => (format!("fit, {}", n[k]), palette::group(k)),
                _ => (
                    "least squares".to_string(),
                    palette::fit_line(visuals, colouring.column.is_some()),
                ),
            };
            pu.line(
                Line::new(name, points)
                    .color(colour)
                    .width(2.0)
                    .allow_hover(false),
            );
        }
    }
    if own.pointer.lasso.len() > 1 {
        pu.line(
            Line::new("", PlotPoints::from(own.pointer.lasso.clone()))
                .color(palette::focus(visuals))
                .style(LineStyle::dashed_dense())
                .allow_hover(false),
        );
    }
}

/// Click, lasso or drag, as the pointer's mode says.
fn interaction(scene: &Scene<'_>, own: &mut BenchUi, shown: &Shown) -> Actions {
    let r = &shown.response;
    match own.pointer.mode {
        PointerMode::Exclude => Actions::from(
            shown
                .hovered
                .filter(|_| r.clicked())
                .map(|e| toggle(scene, e)),
        ),
        PointerMode::Move => drag(scene, own, shown),
        PointerMode::Lasso => lasso(scene, own, shown),
    }
}

fn drag(scene: &Scene<'_>, own: &mut BenchUi, shown: &Shown) -> Actions {
    let r = &shown.response;
    let mut out = Actions::none();
    if r.drag_started() {
        let origin = r.ctx.input(|i| i.pointer.press_origin());
        own.pointer.drag = origin
            .and_then(|o| nearest_at(&shown.transform, o, scene.pair, scene.marks))
            .or(shown.hovered);
    }
    if let (Some(e), Some(pos)) = (own.pointer.drag, r.interact_pointer_pos()) {
        if r.dragged() {
            let v = shown.transform.value_from_position(pos);
            let both = r.ctx.input(|i| i.modifiers.shift);
            let (x, y) = drag_target(scene.pair.point(e, scene.marks), (v.x, v.y), both);
            out.push(Action::MoveTo {
                row: scene.pair.rows[e],
                x,
                y,
            });
        }
    }
    // The button's release ends the drag wherever the pointer is (it may have left the view,
    // or the release may come with the pointer leaving the window).
    let released = r.drag_stopped() || !r.ctx.input(|i| i.pointer.primary_down());
    if released && own.pointer.drag.take().is_some() {
        out.push(Action::EndMove);
    }
    out
}

/// Where a drag to `pointer` puts a point now at `at`: only its y moves (a standard's x is
/// fixed by design), unless `both` (Shift held), when it follows the pointer in x too.
pub fn drag_target(at: (f64, f64), pointer: (f64, f64), both: bool) -> (f64, f64) {
    if both {
        pointer
    } else {
        (at.0, pointer.1)
    }
}

/// Where each moved row was in the file: a faint ring there, joined to where it is now.
fn origins(pu: &mut PlotUi<'_>, scene: &Scene<'_>, v: &egui::Visuals) {
    let ghost = palette::WHAT_IF.gamma_multiply(if v.dark_mode { 0.55 } else { 0.8 });
    let mut rings = Vec::new();
    for &row in scene.marks.moved.keys() {
        let Some(e) = scene.pair.index_of(row) else {
            continue;
        };
        let from = [scene.pair.x[e], scene.pair.y[e]];
        let (x, y) = scene.pair.point(e, scene.marks);
        pu.line(
            Line::new("", vec![from, [x, y]])
                .color(ghost)
                .style(LineStyle::dotted_dense())
                .allow_hover(false),
        );
        rings.push(from);
    }
    if !rings.is_empty() {
        pu.points(
            egui_plot::Points::new("", rings)
                .color(ghost)
                .radius(4.0)
                .filled(false)
                .allow_hover(false),
        );
    }
}

fn lasso(scene: &Scene<'_>, own: &mut BenchUi, shown: &Shown) -> Actions {
    let r = &shown.response;
    if let Some(pos) = r.interact_pointer_pos() {
        if r.drag_started() {
            own.pointer.lasso.clear();
        }
        if r.dragged() {
            let v = shown.transform.value_from_position(pos);
            own.pointer.lasso.push([v.x, v.y]);
        }
    }
    if !r.drag_stopped() {
        return Actions::none();
    }
    let ring = std::mem::take(&mut own.pointer.lasso);
    let rows = lasso_rows(scene.pair, scene.marks, &ring);
    Actions::from((!rows.is_empty()).then_some(Action::Exclude { rows, reason: None }))
}

fn bands(pu: &mut PlotUi<'_>, d: &Diagnostics, v: &egui::Visuals) {
    let Some(extras) = &d.extras else { return };
    let b = extras.bands();
    if b.len() < 2 {
        return;
    }
    let xs: Vec<f64> = b.iter().map(|p| p.x).collect();
    let lo: Vec<f64> = b.iter().map(|p| p.mean_low).collect();
    let hi: Vec<f64> = b.iter().map(|p| p.mean_high).collect();
    let c = palette::fit(v);
    pu.add(
        FilledArea::new("confidence band", &xs, &lo, &hi)
            .fill_color(c.gamma_multiply(0.22))
            .allow_hover(false),
    );
    let edges: [fn(&BandPoint) -> f64; 2] = [|p| p.predict_low, |p| p.predict_high];
    for edge in edges {
        let pts: PlotPoints = b.iter().map(|p| [p.x, edge(p)]).collect();
        pu.line(
            Line::new("prediction band", pts)
                .color(c.gamma_multiply(0.7))
                .style(LineStyle::dashed_loose())
                .allow_hover(false),
        );
    }
}

/// The kept model's curves, dashed, when it draws in the same axes.
fn kept_curves(pu: &mut PlotUi<'_>, pair: &PairRows, d: &Diagnostics, v: &egui::Visuals) {
    let Some(kept) = &d.kept else { return };
    if kept.spec.y != pair.spec.y || kept.spec.x0() != pair.spec.x0() {
        return;
    }
    for c in &kept.curves {
        let name = match &c.level {
            Some(l) => format!("kept fit, {l}"),
            None => "kept fit".to_string(),
        };
        let pts: PlotPoints = c.points.iter().map(|p| [p.x, p.fitted]).collect();
        pu.line(
            Line::new(name, pts)
                .color(palette::kept(v))
                .width(1.8)
                .style(LineStyle::dashed_loose())
                .allow_hover(false),
        );
    }
}

fn overlays(
    pu: &mut PlotUi<'_>,
    d: &Diagnostics,
    v: &egui::Visuals,
    (x_lo, x_hi): (f64, f64),
    levels: &[String],
) {
    let straight =
        |a: f64, b: f64| -> PlotPoints { vec![[x_lo, a + b * x_lo], [x_hi, a + b * x_hi]].into() };
    if let Some(extras) = &d.extras {
        if let Some(Ok(RobustFit::TheilSen(t))) = &extras.robust {
            pu.line(
                Line::new("Theil–Sen", straight(t.intercept, t.slope))
                    .color(palette::theil_sen(v))
                    .width(1.5)
                    .style(LineStyle::dashed_loose())
                    .allow_hover(false),
            );
        }
        if let Some(Ok(l)) = &extras.loess {
            let pts: PlotPoints = l.x.iter().zip(&l.fitted).map(|(&x, &y)| [x, y]).collect();
            pu.line(
                Line::new("LOESS", pts)
                    .color(palette::loess(v))
                    .width(1.5)
                    .allow_hover(false),
            );
        }
    }
    if let Some(Ok(dm)) = &d.deming {
        pu.line(
            Line::new("Deming", straight(dm.intercept, dm.slope))
                .color(palette::deming(v))
                .width(1.5)
                .style(LineStyle::dotted_dense())
                .allow_hover(false),
        );
    }
    for g in &d.group_lines {
        let name = levels.get(g.level).cloned().unwrap_or_default();
        pu.line(
            Line::new(name, straight(g.intercept, g.slope))
                .color(palette::group(g.level))
                .width(1.2)
                .allow_hover(false),
        );
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::state::marks::Note;
    use crate::state::pair::FitSpec;

    fn summary(estimates: Vec<f64>) -> LiveSummary {
        LiveSummary {
            n: 10,
            std_errors: vec![0.0; estimates.len()],
            p_values: vec![0.0; estimates.len()],
            ci: vec![(0.0, 0.0); estimates.len()],
            estimates,
            r_squared: 0.5,
            adj_r_squared: 0.4,
            residual_std_error: 1.0,
            f_test: None,
            refitted: false,
        }
    }

    #[test]
    fn the_curves_span_the_x_range_and_follow_the_live_coefficients() {
        let dir = tempfile::tempdir().expect("dir");
        let path = dir.path().join("c.csv");
        let text: String = std::iter::once("x,y,g\n".to_string())
            .chain((0..12).map(|i| {
                format!(
                    "{i},{},{}\n",
                    1.0 + f64::from(i) * 0.7 + f64::from(i % 3),
                    ["a", "b"][i as usize % 2]
                )
            }))
            .collect();
        std::fs::write(&path, text).expect("write");
        let t = plumb_data::load(&path, &Default::default()).expect("load");
        let quadratic = FitSpec {
            degree: 2,
            ..FitSpec::line("y", "x")
        };
        let pair = crate::state::pair::Pair::new(&t, quadratic).expect("pair");
        let c = curves(&pair, &summary(vec![1.0, 0.0, 2.0]), (-1.0, 3.0));
        assert_eq!(c.len(), 1);
        let points = &c[0].1;
        assert_eq!(points.len(), CURVE_POINTS as usize + 1);
        assert_eq!(points[0], [-1.0, 3.0], "1 + 2x² at x = −1");
        assert_eq!(points[points.len() - 1], [3.0, 19.0], "1 + 2x² at x = 3");
        assert!(curves(&pair, &summary(vec![1.0, 0.0, 2.0]), (2.0, 2.0)).is_empty());
        // On a log scale the line is drawn back as exp(a + b·x); grouped, one curve per level.
        let logged = FitSpec {
            response: plumb_data::analysis::ResponseScale::Fixed(
                plumb_core::regression::Transform::Ln,
            ),
            factor: Some(plumb_data::analysis::Factor {
                column: "g".into(),
                reference: None,
                separate_slopes: false,
            }),
            ..FitSpec::line("y", "x")
        };
        let pair = crate::state::pair::Pair::new(&t, logged).expect("pair");
        let c = curves(&pair, &summary(vec![0.5, 0.1, 0.3]), (0.0, 10.0));
        assert_eq!(
            c.iter().map(|(l, _)| *l).collect::<Vec<_>>(),
            [Some(0), Some(1)]
        );
        assert!((c[0].1[0][1] - 0.5f64.exp()).abs() < 1e-12);
        assert!(
            (c[1].1[0][1] - 0.8f64.exp()).abs() < 1e-12,
            "level b sits 0.3 higher"
        );
    }

    #[test]
    fn the_lasso_takes_the_included_rows_inside_it_at_their_current_positions() {
        let dir = tempfile::tempdir().expect("dir");
        let path = dir.path().join("d.csv");
        std::fs::write(&path, "x,y\n1,1\n2,2\n3,3\n4,4\n5,5\n6,6.5\n").expect("write");
        let t = plumb_data::load(&path, &Default::default()).expect("load");
        let pair = crate::state::pair::Pair::new(&t, FitSpec::line("y", "x")).expect("pair");
        let mut marks = Marks::default();
        marks.excluded.insert(
            2,
            Note {
                reason: "r".into(),
                at: String::new(),
            },
        );
        marks.moved.insert(5, (10.0, 10.0));
        let ring = [[0.0, 0.0], [4.5, 0.0], [4.5, 4.5], [0.0, 4.5]];
        assert_eq!(
            lasso_rows(&pair, &marks, &ring),
            vec![1, 3, 4],
            "row 2 is out, row 5 moved away"
        );
        assert!(lasso_rows(&pair, &marks, &ring[..2]).is_empty());
    }
}
