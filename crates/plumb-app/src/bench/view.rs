//! The frame the three diagnostic views share: a titled plot of the diagnostics' points with
//! the excluded rows as rings, the view's own guides underneath, hover linked to the other
//! views, and a click that picks (and, in exclude mode, excludes or puts back) the row.

use eframe::egui::{self, Vec2};
use egui_plot::PlotUi;

use super::pointer::PointerMode;
use super::points::{hovered_entry, points_layer, title_ui, toggle, tooltip_ui, Layer, Shown};
use super::{BenchUi, Scene};
use crate::action::Actions;
use crate::axes;
use crate::state::cloud::Cloud;
use crate::state::diagnostics::Diagnostics;

/// A thin line in the view's weak ink, under the points (a diagonal, a contour).
pub fn guide(name: &str, points: Vec<[f64; 2]>, v: &egui::Visuals) -> egui_plot::Line<'static> {
    egui_plot::Line::new(name.to_string(), points)
        .color(v.weak_text_color())
        .allow_hover(false)
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
}

/// Draws one diagnostic view: the points `pick` takes from the diagnostics (included rows, and
/// excluded rows drawn as rings), with `guides` drawn first. A spinner while the first
/// diagnostics compute (or while those on hand are for a model without the view).
pub fn diagnostic_ui(
    scene: &Scene<'_>,
    own: &mut BenchUi,
    ui: &mut egui::Ui,
    size: Vec2,
    view: &Diagnostic<'_>,
    pick: impl for<'d> Fn(&'d Diagnostics) -> Option<(&'d Cloud, Option<&'d Cloud>)>,
    guides: impl FnOnce(&mut PlotUi<'_>, &Cloud, &egui::Visuals),
) -> Actions {
    if !view.title.is_empty() {
        title_ui(ui, view.title, view.tip);
    }
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
    if points.is_dense() {
        if let Some(b) = points.bounds {
            plot = super::dense_bounds(plot, b);
        }
    }
    let skip = std::collections::HashSet::new();
    let textures = &mut own.textures;
    let visuals = ui.visuals().clone();
    let resp = plot.show(ui, |pu| {
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
    });
    let shown = Shown {
        hovered: hovered_entry(&resp.response, &resp.transform, &[points, excluded]),
        transform: resp.transform,
        response: resp.response,
    };
    let mut out = Actions::none();
    if let Some(e) = shown.hovered.filter(|_| shown.response.clicked()) {
        own.pointer.selected = Some(e);
        if own.pointer.mode == PointerMode::Exclude {
            out.push(toggle(scene, e));
        }
    }
    tooltip_ui(scene, &mut own.pointer, &shown);
    out
}
