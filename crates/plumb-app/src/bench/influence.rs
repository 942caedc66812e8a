//! The influence view: leverage against the externally studentized residual (the kind the
//! quantile view and the influence table show too), with the curves of constant Cook's
//! distance at 0.5 and 1 drawn on that kind of residual (`plumb_core::regression::cooks_contour`;
//! beyond them one row moves the fit a lot).

use eframe::egui::{self, Vec2};
use egui_plot::LineStyle;
use plumb_core::regression::cooks_contour;

use super::view::{diagnostic_ui, guide, Diagnostic};
use super::{BenchUi, Scene};
use crate::action::Actions;

const VIEW: Diagnostic<'static> = Diagnostic {
    id: "leverage",
    variant: 0,
    title: "Leverage against studentized residual",
    tip: "Far right: unusual x. Far up or down: unusual y for its x. Curves: Cook's distance 0.5 and 1 (beyond them one row moves the fit a lot).",
    x_label: "leverage (hat value)",
    y_label: "studentized residual (external)",
};

/// Cook's distances drawn as curves.
pub const COOK_CURVES: [f64; 2] = [0.5, 1.0];
/// Curves are not drawn beyond this |studentized residual|.
const CURVE_CLIP: f64 = 6.0;

/// One branch (`sign` ±1) of the curve of Cook's distance `d` for `p` terms and `df` residual
/// degrees of freedom, over leverages up to a little past the largest shown, in externally
/// studentized residuals (see [`cooks_contour`]).
pub fn cook_curve(d: f64, p: usize, df: usize, h_max: f64, sign: f64) -> Vec<[f64; 2]> {
    let reach = (h_max.max(0.05) * 1.05).min(0.999);
    (1..=80)
        .filter_map(|k| {
            let h = reach * f64::from(k) / 80.0;
            cooks_contour(d, p, df, h).map(|t| [h, sign * t])
        })
        .filter(|q| q[1].abs() < CURVE_CLIP)
        .collect()
}

/// Draws the view (a spinner until the first diagnostics arrive).
pub fn influence_ui(
    scene: &Scene<'_>,
    own: &mut BenchUi,
    ui: &mut egui::Ui,
    size: Vec2,
) -> Actions {
    let p = scene.pair.terms.len();
    diagnostic_ui(
        scene,
        own,
        ui,
        size,
        &VIEW,
        |d| Some((&d.views.leverage, None)),
        |pu, cloud, v| {
            // From the bounds kept with the cloud: no pass over the points each frame.
            let h_max = cloud.bounds.map_or(0.0, |b| b.x_max.max(0.0));
            let df = cloud.points.len().saturating_sub(p);
            let styles = [LineStyle::dashed_loose(), LineStyle::dashed_dense()];
            for (d, style) in COOK_CURVES.iter().zip(styles) {
                for sign in [1.0, -1.0] {
                    let name = format!("Cook's D = {d}");
                    pu.line(guide(&name, cook_curve(*d, p, df, h_max, sign), v).style(style));
                }
            }
        },
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_point_of_a_curve_has_that_cooks_distance() {
        // Back from the external t to the internal r, r² = t²·df/(df − 1 + t²), then Cook's
        // D = r²·h/(p(1 − h)) (its definition): each point of a curve gives its D back.
        for (d, p, df) in [(0.5, 2, 20), (1.0, 3, 9)] {
            let curve = cook_curve(d, p, df, 0.4, -1.0);
            assert!(!curve.is_empty());
            for [h, t] in curve {
                assert!(t < 0.0 && t.abs() < CURVE_CLIP);
                let df = df as f64;
                let r2 = t * t * df / (df - 1.0 + t * t);
                let cook = r2 * h / (p as f64 * (1.0 - h));
                assert!((cook - d).abs() < 1e-12, "h {h}: D {cook}");
            }
        }
        let far = cook_curve(0.5, 2, 200, 0.01, 1.0);
        assert!(
            far.last().expect("points")[0] >= 0.05,
            "reaches at least h = 0.05"
        );
    }
}
