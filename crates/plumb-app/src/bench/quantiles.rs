//! The residuals against a normal sample: each studentized residual, in rank order, against
//! the normal score of its rank, inside the shaded band where 95 % of normal samples of the
//! same size would put that rank. Points along the diagonal and inside the band look normal;
//! ends bending out of it mean heavy or light tails; a lone point outside it, an outlier.

use eframe::egui;

use super::view::{diagnostic_ui, guide, Diagnostic};
use super::{BenchUi, Scene};
use crate::action::Actions;
use crate::state::cloud::Cloud;

const VIEW: Diagnostic<'static> = Diagnostic {
    id: "quantiles",
    variant: 0,
    title: "Residuals vs a normal sample",
    tip: "Each studentized (leave-one-out) residual, in rank order, against the normal score of its rank. Shaded: where 95 % of normal samples of this size put each rank (pointwise; the residuals follow t rather than the normal, so with few rows the band is a little narrow at the ends). Along the diagonal and inside the band: the residuals look normal. Ends bending out: heavy or light tails; a lone point outside: an outlier.",
    x_label: "normal score of the rank",
    y_label: "studentized residual",
    shares_scatter_x: false,
        over: None,
};

/// The diagonal `y = x` over the widest normal score (at least ±1).
pub fn diagonal(points: &Cloud) -> [[f64; 2]; 2] {
    // From the bounds kept with the cloud: no pass over the points each frame.
    let m = points
        .bounds
        .map_or(1.0, |b| b.x_min.abs().max(b.x_max.abs()).max(1.0));
    [[-m, -m], [m, m]]
}

/// Draws the view in the box it is given (a spinner until the first diagnostics arrive).
pub fn quantiles_ui(scene: &Scene<'_>, own: &mut BenchUi, ui: &mut egui::Ui) -> Actions {
    let band: &[[f64; 3]] = scene
        .bench
        .diagnostics()
        .map_or(&[], |d| d.views.quantile_band.as_slice());
    diagnostic_ui(
        scene,
        own,
        ui,
        ui.available_size(),
        &VIEW,
        |d| Some((&d.views.quantile, None)),
        |pu, cloud, v| {
            if band.len() > 1 {
                let xs: Vec<f64> = band.iter().map(|b| b[0]).collect();
                let lo: Vec<f64> = band.iter().map(|b| b[1]).collect();
                let hi: Vec<f64> = band.iter().map(|b| b[2]).collect();
                pu.add(
                    egui_plot::FilledArea::new("", &xs, &lo, &hi)
                        .fill_color(crate::palette::fit(v).gamma_multiply(0.16))
                        .allow_hover(false),
                );
            }
            pu.line(guide("", diagonal(cloud).to_vec(), v));
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
