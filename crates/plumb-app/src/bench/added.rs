//! The added-variable view of one term: the response and the term each with the other terms
//! taken out. The cloud's least-squares slope is the term's coefficient in the whole model
//! (Frisch–Waugh–Lovell), so a row that pulls the coefficient stands out here even when the
//! scatter against the first predictor hides it. Linked to the other views like the scatter.

use eframe::egui::{self, Vec2};

use super::view::{diagnostic_ui, guide, Diagnostic};
use super::{BenchUi, Scene};
use crate::action::Actions;
use crate::state::cloud::Cloud;
use crate::state::diagnostics::{AddedView, Diagnostics};

const TIP: &str = "Each axis with the model's other terms taken out: the line's slope is the term's coefficient, and a row far from it along the horizontal pulls that coefficient.";

/// The terms that have an added-variable view in the diagnostics on hand.
pub fn terms(scene: &Scene<'_>) -> Vec<String> {
    scene
        .bench
        .diagnostics()
        .map(|d| d.views.added.iter().map(|a| a.term.clone()).collect())
        .unwrap_or_default()
}

/// The line through the cloud's centre (both residuals average zero) with the coefficient as
/// slope, across the cloud's horizontal extent.
pub fn slope_line(view: &AddedView) -> Vec<[f64; 2]> {
    view.cloud
        .bounds
        .map(|b| {
            vec![
                [b.x_min, view.slope * b.x_min],
                [b.x_max, view.slope * b.x_max],
            ]
        })
        .unwrap_or_default()
}

/// Draws the view of `term` (a spinner while the diagnostics for it compute).
pub fn added_ui(
    scene: &Scene<'_>,
    own: &mut BenchUi,
    ui: &mut egui::Ui,
    size: Vec2,
    term: &str,
) -> Actions {
    let y = &scene
        .bench
        .diagnostics()
        .map_or_else(|| scene.pair.spec.y.clone(), |d| d.scale.clone());
    let x_label = format!("{term} | other terms");
    let y_label = format!("{y} | other terms");
    let k = scene.bench.diagnostics().and_then(|d| position(d, term));
    let view = Diagnostic {
        id: "added-variable",
        variant: k.map_or(0, |k| k as u64 + 1),
        title: "",
        tip: TIP,
        x_label: &x_label,
        y_label: &y_label,
        shares_scatter_x: false,
        over: None,
    };
    let pick = Pick(k);
    diagnostic_ui(
        scene,
        own,
        ui,
        size,
        &view,
        |d| pick.of(d),
        |pu, _, v| {
            if let Some(a) = scene.bench.diagnostics().and_then(|d| view_of(d, k)) {
                let name = format!(
                    "slope {} (the coefficient)",
                    plumb_report::text::num(a.slope)
                );
                pu.line(guide(&name, slope_line(a), v).width(1.5));
            }
        },
    )
}

/// Which added-variable view a frame draws.
#[derive(Clone, Copy)]
struct Pick(Option<usize>);

impl Pick {
    fn of(self, d: &Diagnostics) -> Option<(&Cloud, Option<&Cloud>)> {
        view_of(d, self.0).map(|a| (&a.cloud, None))
    }
}

fn position(d: &Diagnostics, term: &str) -> Option<usize> {
    d.views.added.iter().position(|a| a.term == term)
}

fn view_of(d: &Diagnostics, k: Option<usize>) -> Option<&AddedView> {
    d.views.added.get(k?)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_slope_line_passes_through_the_origin_across_the_cloud() {
        let view = AddedView {
            term: "dose".into(),
            slope: 2.0,
            cloud: Cloud::new(vec![(-1.0, -2.5), (0.5, 1.0), (2.0, 3.5)], vec![0, 1, 2]),
        };
        assert_eq!(slope_line(&view), vec![[-1.0, -2.0], [2.0, 4.0]]);
        let empty = AddedView {
            cloud: Cloud::default(),
            ..view
        };
        assert!(slope_line(&empty).is_empty());
    }
}
