//! Residuals against fitted values: a curve or a funnel here means the model misses structure.
//! Excluded rows are drawn against the current fit, as rings.

use eframe::egui::{self, Vec2};

use super::view::{diagnostic_ui, Diagnostic};
use super::{BenchUi, Scene};
use crate::action::Actions;
use crate::state::cloud::Cloud;
use crate::state::diagnostics::{Diagnostics, Views};

const VIEW: Diagnostic = Diagnostic {
    id: "residuals",
    title: "Residuals against fitted values",
    tip: "A pattern (curve, funnel) means the model misses structure. Hollow rings: excluded rows against the current fit.",
    x_label: "fitted value",
    y_label: "residual",
};

/// The view's points: included rows as (fitted, residual), excluded rows as (prediction of the
/// current fit, y − prediction).
pub fn residual_points(v: &Views) -> (&Cloud, &Cloud) {
    (&v.residual, &v.excluded_residuals)
}

fn pick(d: &Diagnostics) -> (&Cloud, Option<&Cloud>) {
    let (points, rings) = residual_points(&d.views);
    (points, Some(rings))
}

/// Draws the view (a spinner until the first diagnostics arrive).
pub fn residuals_ui(
    scene: &Scene<'_>,
    own: &mut BenchUi,
    ui: &mut egui::Ui,
    size: Vec2,
) -> Actions {
    diagnostic_ui(scene, own, ui, size, &VIEW, pick, |pu, _, v| {
        pu.hline(
            egui_plot::HLine::new("zero", 0.0)
                .color(v.weak_text_color())
                .allow_hover(false),
        );
    })
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
        assert_eq!(points.entries, vec![0, 2]);
        assert_eq!(rings.entries, vec![1]);
        let b = points.bounds.expect("bounds");
        assert_eq!((b.x_min, b.x_max, b.y_min, b.y_max), (1.0, 2.0, -0.5, 0.5));
    }
}
