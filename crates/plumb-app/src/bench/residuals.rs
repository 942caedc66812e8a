//! Residuals against the fitted values, a predictor, another numeric column (a time or
//! sequence column) or the data row order: a curve or a funnel against the fitted values means
//! the model misses structure; a drift along the row order points at the instrument.
//! Excluded rows are drawn against the current fit, as rings.

use eframe::egui::{self, Vec2};
use plumb_report::text::sig;

use super::view::{diagnostic_ui, Diagnostic};
use super::{BenchUi, Scene};
use crate::action::{Action, Actions};
use crate::state::cloud::Cloud;
use crate::state::diagnostics::{Diagnostics, ResidualAxis, Views};

const TIP: &str = "Each row's residual (observed minus fitted). Against the predictor it sits right under its point in the scatter. A pattern (curve, funnel) means the model misses structure; against the row order or a time column, a drift means the measurements moved while they were taken. Hollow rings: excluded rows against the current fit.";

/// The view's points: included rows as (axis, residual), excluded rows as (axis, y −
/// prediction of the current fit).
pub fn residual_points(v: &Views) -> (&Cloud, &Cloud) {
    (&v.residual, &v.excluded_residuals)
}

fn pick(d: &Diagnostics) -> Option<(&Cloud, Option<&Cloud>)> {
    let (points, rings) = residual_points(&d.views);
    Some((points, Some(rings)))
}

/// The axes offered: the predictor under the scatter (one predictor), the fitted values, the
/// model's other predictors, the other numeric columns of the file and the data row order.
pub fn axes_offered(scene: &Scene<'_>) -> Vec<ResidualAxis> {
    let spec = &scene.pair.spec;
    let mut out = Vec::new();
    if spec.x.len() == 1 {
        out.push(ResidualAxis::Predictor);
    }
    out.push(ResidualAxis::Fitted);
    out.extend(
        spec.x
            .iter()
            .skip(usize::from(spec.x.len() == 1))
            .cloned()
            .map(ResidualAxis::Column),
    );
    out.extend(
        scene
            .columns
            .iter()
            .filter(|c| **c != spec.y && !spec.x.contains(c))
            .cloned()
            .map(ResidualAxis::Column),
    );
    out.push(ResidualAxis::RowOrder);
    out
}

/// How the chooser names an axis: the predictor by its column, said to be shared.
fn offered_label(axis: &ResidualAxis, scene: &Scene<'_>) -> String {
    match axis {
        ResidualAxis::Predictor => format!("{} (as above)", scene.pair.spec.x0()),
        other => other.label(),
    }
}

/// Draws the residual strip with its axis chooser in the box it is given (a spinner until
/// the first diagnostics arrive). Against the scatter's predictor it shares the scatter's
/// horizontal range, so a residual sits right under its point.
pub fn residuals_ui(scene: &Scene<'_>, own: &mut BenchUi, ui: &mut egui::Ui) -> Actions {
    let mut out = Actions::none();
    let asked = scene.bench.residual_axis();
    ui.horizontal(|ui| {
        super::points::title_ui(ui, "Residuals against", TIP);
        egui::ComboBox::from_id_salt("residual-axis")
            .selected_text(offered_label(asked, scene))
            .show_ui(ui, |ui| {
                for axis in axes_offered(scene) {
                    let label = offered_label(&axis, scene);
                    if ui.selectable_label(*asked == axis, label).clicked() && *asked != axis {
                        out.push(Action::ResidualsAgainst(axis));
                    }
                }
            })
            .response
            .on_hover_text(TIP);
    });
    let spec = &scene.pair.spec;
    let drawn = scene
        .bench
        .diagnostics()
        .map(|d| (d.views.residual_axis.clone(), d.scale.clone()));
    let (axis, scale) = drawn.unwrap_or_else(|| (asked.resolved(spec), spec.y.clone()));
    let y_label = if scale == spec.y {
        "residual".to_string()
    } else {
        format!("residual on {scale}")
    };
    let x_label = axis.label();
    let view = Diagnostic {
        id: "residuals",
        variant: 0,
        title: "",
        tip: TIP,
        x_label: &x_label,
        y_label: &y_label,
        shares_scatter_x: axis.is_scatter_x(spec) && own.added_term.is_none(),
        over: None,
    };
    let beyond = scene
        .bench
        .diagnostics()
        .map(|d| beyond_text(scene, &d.views))
        .unwrap_or_default();
    let below = if beyond.is_empty() { 0.0 } else { 18.0 };
    let size = ui.available_size() - Vec2::new(0.0, below);
    out.extend(diagnostic_ui(scene, own, ui, size, &view, pick, zero_line));
    if !beyond.is_empty() {
        ui.weak(beyond);
    }
    out
}

fn zero_line(pu: &mut egui_plot::PlotUi<'_>, _: &Cloud, v: &egui::Visuals) {
    pu.hline(
        egui_plot::HLine::new("zero", 0.0)
            .color(v.weak_text_color())
            .allow_hover(false),
    );
}

/// The excluded rows too far out to draw, by data row with their residuals.
pub fn beyond_text(scene: &Scene<'_>, v: &Views) -> String {
    if v.beyond.is_empty() {
        return String::new();
    }
    let rows: Vec<String> = v
        .beyond
        .iter()
        .take(4)
        .map(|&(i, e)| format!("{} ({})", scene.names.label(scene.pair.rows[i]), sig(e, 3)))
        .collect();
    let more = v.beyond.len().saturating_sub(4);
    let tail = if more > 0 {
        format!(" and {more} more")
    } else {
        String::new()
    };
    format!(
        "excluded, far outside the view (residual): {}{tail}",
        rows.join(", ")
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn included_rows_are_points_and_excluded_rows_are_rings() {
        let v = Views {
            residual: Cloud::new(vec![(1.0, 0.5), (2.0, -0.5)], vec![0, 2]),
            excluded_residuals: Cloud::new(vec![(1.5, 4.0)], vec![1]),
            ..Views::default()
        };
        let (points, rings) = residual_points(&v);
        assert_eq!(*points.entries, [0, 2]);
        assert_eq!(*rings.entries, [1]);
        let b = points.bounds.expect("bounds");
        assert_eq!((b.x_min, b.x_max, b.y_min, b.y_max), (1.0, 2.0, -0.5, 0.5));
    }
}
