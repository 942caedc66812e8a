//! Normal quantiles of the residuals: points on the diagonal look normal; bends at the ends
//! mean heavy or light tails; a lone point off the line is an outlier.

use eframe::egui::{self, Vec2};

use super::view::{diagnostic_ui, guide, Diagnostic};
use super::{BenchUi, Scene};
use crate::action::Actions;
use crate::state::cloud::Cloud;

const VIEW: Diagnostic<'static> = Diagnostic {
    id: "quantiles",
    variant: 0,
    title: "Normal quantiles of residuals",
    tip: "Points on the diagonal: residuals look normal. Bends at the ends: heavy or light tails; a lone point off the line: an outlier.",
    x_label: "expected normal score",
    y_label: "studentized residual (external)",
};

/// The diagonal `y = x` over the widest normal score (at least ±1).
pub fn diagonal(points: &Cloud) -> [[f64; 2]; 2] {
    // From the bounds kept with the cloud: no pass over the points each frame.
    let m = points
        .bounds
        .map_or(1.0, |b| b.x_min.abs().max(b.x_max.abs()).max(1.0));
    [[-m, -m], [m, m]]
}

/// Draws the view (a spinner until the first diagnostics arrive).
pub fn quantiles_ui(
    scene: &Scene<'_>,
    own: &mut BenchUi,
    ui: &mut egui::Ui,
    size: Vec2,
) -> Actions {
    diagnostic_ui(
        scene,
        own,
        ui,
        size,
        &VIEW,
        |d| Some((&d.views.quantile, None)),
        |pu, cloud, v| {
            pu.line(guide("y = x", diagonal(cloud).to_vec(), v));
        },
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_diagonal_covers_the_widest_score() {
        let c = Cloud::new(vec![(-2.2, -1.0), (0.0, 0.1), (1.9, 3.0)], vec![3, 1, 2]);
        assert_eq!(diagonal(&c), [[-2.2, -2.2], [2.2, 2.2]]);
        assert_eq!(diagonal(&Cloud::default()), [[-1.0, -1.0], [1.0, 1.0]]);
    }
}
