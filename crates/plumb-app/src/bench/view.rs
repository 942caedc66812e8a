//! The frame the three diagnostic views share: a titled plot of the diagnostics' points with
//! the excluded rows as rings, the view's own guides underneath, hover linked to the other
//! views, and a click that picks (and, in exclude mode, excludes or puts back) the row.

use eframe::egui::{self, Vec2};
use egui_plot::PlotUi;

use super::pointer::PointerMode;
use super::points::{hovered_entry, points_layer, title_ui, toggle, tooltip_ui, Layer, Shown};
use super::{BenchUi, Scene};
use crate::action::{Action, Actions};
use crate::axes;
use crate::density::Bounds;
use crate::state::cloud::Cloud;
use crate::state::diagnostics::Diagnostics;
use crate::state::export::ChartView;
use crate::state::DialogPurpose;

/// A thin line in the view's weak ink, under the points (a diagonal, a contour).
pub fn guide(name: &str, points: Vec<[f64; 2]>, v: &egui::Visuals) -> egui_plot::Line<'static> {
    egui_plot::Line::new(name.to_string(), points)
        .color(v.weak_text_color())
        .allow_hover(false)
}

/// New bounds for a dense view whose current bounds miss its points entirely (the view kept
/// the range of what it showed before, e.g. another residual axis): the points' extent with a
/// margin. `None` while the view shows any part of them (the analyst's zoom is kept).
pub fn reframe(view: &egui_plot::PlotBounds, data: &Bounds) -> Option<egui_plot::PlotBounds> {
    let (lo, hi) = (view.min(), view.max());
    let misses_x = hi[0] < data.x_min || lo[0] > data.x_max;
    let misses_y = hi[1] < data.y_min || lo[1] > data.y_max;
    let broken =
        !(lo[0].is_finite() && hi[0].is_finite() && lo[1].is_finite() && hi[1].is_finite());
    (misses_x || misses_y || broken).then(|| {
        let (mx, my) = (data.width() * 0.04, data.height() * 0.04);
        egui_plot::PlotBounds::from_min_max(
            [data.x_min - mx, data.y_min - my],
            [data.x_max + mx, data.y_max + my],
        )
    })
}

/// The chart a view is saved as, if it can be saved on its own.
fn exported_as(id: &str) -> Option<ChartView> {
    match id {
        "residuals" => Some(ChartView::Residuals),
        "leverage" => Some(ChartView::Influence),
        "quantiles" => Some(ChartView::Quantiles),
        _ => None,
    }
}

/// A right click on a view offers to save it as a chart file.
pub fn save_menu(response: &egui::Response, kind: ChartView) -> Actions {
    let mut out = Actions::none();
    response.context_menu(|ui| {
        if ui
            .button("Save this view as PNG or SVG…")
            .on_hover_text("The view drawn as the summary draws it; name the file .svg for a drawing, .png for an image")
            .clicked()
        {
            out.push(Action::PickFile(DialogPurpose::ExportView(kind)));
            ui.close();
        }
    });
    out
}

/// What a diagnostic view is called and what its axes show.
pub struct Diagnostic<'a> {
    /// Keys the view's zoom memory and density image.
    pub id: &'static str,
    /// Tells apart views that share an `id` (one per model term), for the density image.
    pub variant: u64,
    /// Title above the view.
    pub title: &'a str,
    /// What the view shows, on hover of the title.
    pub tip: &'a str,
    /// Horizontal axis.
    pub x_label: &'a str,
    /// Vertical axis.
    pub y_label: &'a str,
    /// The horizontal axis is the scatter's: the two share their range (and the pointer's
    /// vertical line), so a row's residual sits under its point.
    pub shares_scatter_x: bool,
    /// Markers that stand out, drawn over the points.
    pub over: Option<&'a Over<'a>>,
}

/// What a view draws over its points.
pub type Over<'a> = dyn Fn(&mut PlotUi<'_>, &egui::Visuals) + 'a;

/// Draws one diagnostic view in `size` (its title included): the points `pick` takes from the
/// diagnostics (included rows, and excluded rows drawn as rings), with `guides` drawn first
/// and the view's `over` (markers that stand out) last. A
/// spinner while the first diagnostics compute (or while those on hand are for a model
/// without the view).
pub fn diagnostic_ui(
    scene: &Scene<'_>,
    own: &mut BenchUi,
    ui: &mut egui::Ui,
    size: Vec2,
    view: &Diagnostic<'_>,
    pick: impl for<'d> Fn(&'d Diagnostics) -> Option<(&'d Cloud, Option<&'d Cloud>)>,
    guides: impl FnOnce(&mut PlotUi<'_>, &Cloud, &egui::Visuals),
) -> Actions {
    let top = ui.cursor().top();
    if !view.title.is_empty() {
        title_ui(ui, view.title, view.tip);
    }
    let size = Vec2::new(size.x, (size.y - (ui.cursor().top() - top)).max(60.0));
    let Some((points, excluded)) = scene.bench.diagnostics().and_then(|d| pick(d)) else {
        ui.add_sized(size, egui::Spinner::new());
        return Actions::none();
    };
    let none = Cloud::default();
    let excluded = excluded.unwrap_or(&none);
    let focus = own
        .pointer
        .focus()
        .and_then(|e| points.position_of(e).or_else(|| excluded.position_of(e)));
    let mut plot = axes::plot(
        (view.id, view.variant, scene.bench.serial()),
        size,
        (view.x_label, view.y_label),
    )
    .allow_drag(true);
    if view.shares_scatter_x {
        plot = super::scatter::link_x(plot, scene);
    }
    if points.is_dense() {
        if let Some(b) = points.bounds {
            plot = super::dense_bounds(plot, b);
        }
    }
    let skip = std::collections::HashSet::new();
    let textures = &mut own.textures;
    let visuals = ui.visuals().clone();
    let dense = points.is_dense().then_some(points.bounds).flatten();
    let resp = plot.show(ui, |pu| {
        if let Some(reframed) = dense.and_then(|b| reframe(&pu.plot_bounds(), &b)) {
            pu.set_plot_bounds(reframed);
        }
        guides(pu, points, &visuals);
        let layer = Layer {
            view: view.id,
            cloud: points,
            groups: None,
            excluded,
            skip: &skip,
            extra: &none,
            focus,
            generation: scene.bench.diag_generation() ^ (view.variant << 48),
        };
        points_layer(pu, &layer, textures, &visuals);
        if let Some(over) = view.over {
            over(pu, &visuals);
        }
    });
    axes::name_plot(&resp.response, &format!("view: {}", view.id));
    let mut out = Actions::none();
    if let Some(kind) = exported_as(view.id) {
        out.extend(save_menu(&resp.response, kind));
    }
    axes::readout_ui(ui, &resp.response, &resp.transform);
    let shown = Shown {
        hovered: hovered_entry(&resp.response, &resp.transform, &[points, excluded]),
        transform: resp.transform,
        response: resp.response,
    };
    if let Some(e) = shown.hovered.filter(|_| shown.response.clicked()) {
        own.pointer.selected = Some(e);
        if own.pointer.mode == PointerMode::Exclude {
            out.push(toggle(scene, e));
        }
    }
    tooltip_ui(scene, &mut own.pointer, &shown);
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use egui_plot::PlotBounds;

    fn data() -> Bounds {
        Bounds {
            x_min: 840.0,
            x_max: 860.0,
            y_min: -3.0,
            y_max: 3.0,
        }
    }

    #[test]
    fn a_dense_view_that_misses_its_points_is_reframed_around_them() {
        // The view kept the range of another axis (row numbers 0…100 000): no point inside.
        let stale = PlotBounds::from_min_max([0.0, -100.0], [100_000.0, 100.0]);
        assert!(reframe(&stale, &data()).is_none(), "x overlaps: kept");
        let stale = PlotBounds::from_min_max([-100.0, -100.0], [100.0, 100.0]);
        let b = reframe(&stale, &data()).expect("reframed");
        assert!(b.min()[0] < 840.0 && b.max()[0] > 860.0);
        assert!(b.min()[1] < -3.0 && b.max()[1] > 3.0);
        assert!(
            b.max()[0] - b.min()[0] < 25.0,
            "around the points, not the old range"
        );
    }

    #[test]
    fn a_zoom_into_part_of_the_points_is_kept() {
        let zoom = PlotBounds::from_min_max([845.0, -1.0], [850.0, 1.0]);
        assert!(reframe(&zoom, &data()).is_none());
        let nan = PlotBounds::from_min_max([f64::NAN, -1.0], [850.0, 1.0]);
        assert!(reframe(&nan, &data()).is_some());
    }
}
