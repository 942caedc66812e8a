//! How much each row pulls the fit: leverage across, the externally studentized (leave-one-out)
//! residual up, and Cook's distance told by each marker's size and colour in three classes
//! (ordinary; flagged by the influence table's rule; strong, at or above the median of
//! `F(p, n − p)`), with a key above the view. Thin dotted lines mark the table's leverage and
//! residual flags.

use eframe::egui;
use egui_plot::{LineStyle, Points};
use plumb_core::regression::{Pull as PullClass, LEVERAGE_FLAG_FACTOR, STUDENTIZED_FLAG};

use super::key::{key_row_ui, Key, Swatch};
use super::view::{diagnostic_ui, guide, Diagnostic};
use super::{BenchUi, Scene};
use crate::action::Actions;
use crate::palette;
use crate::state::views::Pull;

const VIEW: Diagnostic<'static> = Diagnostic {
    id: "leverage",
    variant: 0,
    title: "How much each row pulls the fit",
    tip: "Leverage (how unusual a row's x is) across, studentized residual (how far its y is from a fit made without it, in its own standard errors) up. Size and colour: Cook's distance D, how far the estimates move when the row is left out — flagged by the influence table's rule, or strong at D ≥ the median of F(p, n − p), where leaving the row out moves the estimates to the edge of their 50 % confidence region. Thin lines: the leverage and residual flags of the influence table.",
    x_label: "leverage",
    y_label: "studentized residual",
    shares_scatter_x: false,
    over: None,
};

/// Marker radius of each pull class (ordinary, flagged, strong), in points.
pub const PULL_RADIUS: [f32; 3] = [2.5, 4.5, 6.5];

/// The view's key: what the marker sizes mean, with the strong class's threshold.
pub fn pull_keys(pull: &Pull, v: &egui::Visuals) -> Vec<Key> {
    let strong = if pull.strong_from.is_finite() {
        format!(
            "strong: D ≥ {}",
            plumb_report::text::sig(pull.strong_from, 3)
        )
    } else {
        "strong: D ≥ median of F".to_string()
    };
    vec![
        Key {
            swatch: Swatch::Sized(palette::influence(0, v), PULL_RADIUS[0]),
            name: "ordinary".into(),
        },
        Key {
            swatch: Swatch::Sized(palette::influence(1, v), PULL_RADIUS[1]),
            name: "flagged: Cook's rule".into(),
        },
        Key {
            swatch: Swatch::Sized(palette::influence(2, v), PULL_RADIUS[2]),
            name: strong,
        },
    ]
}

/// Draws the view in the box it is given (a spinner until the first diagnostics arrive).
pub fn influence_ui(scene: &Scene<'_>, own: &mut BenchUi, ui: &mut egui::Ui) -> Actions {
    let p = scene.pair.terms.len();
    let empty = Pull::default();
    let pull = scene.bench.diagnostics().map_or(&empty, |d| &d.views.pull);
    let visuals = ui.visuals().clone();
    super::points::title_ui(ui, VIEW.title, VIEW.tip);
    key_row_ui(ui, &pull_keys(pull, &visuals));
    let size = ui.available_size();
    let over = |pu: &mut egui_plot::PlotUi<'_>, v: &egui::Visuals| pull_markers(pu, pull, v);
    let untitled = Diagnostic {
        title: "",
        over: Some(&over),
        ..VIEW
    };
    diagnostic_ui(
        scene,
        own,
        ui,
        size,
        &untitled,
        |d| Some((&d.views.leverage, None)),
        |pu, cloud, v| {
            // From the bounds kept with the cloud: no pass over the points each frame.
            let n = cloud.points.len().max(1) as f64;
            let h_cut = LEVERAGE_FLAG_FACTOR * p as f64 / n;
            let (h_lo, h_hi) = cloud.bounds.map_or((0.0, 1.0), |b| (b.x_min, b.x_max));
            let t = STUDENTIZED_FLAG;
            for y in [t, -t] {
                pu.line(
                    guide("", vec![[h_lo.min(0.0), y], [h_hi.max(h_cut), y]], v)
                        .style(LineStyle::dotted_loose()),
                );
            }
            pu.line(
                guide("", vec![[h_cut, -t * 1.5], [h_cut, t * 1.5]], v)
                    .style(LineStyle::dotted_loose()),
            );
        },
    )
}

/// The flagged and strong rows as larger markers in their class colour, drawn over the
/// ordinary points (or over the density image).
fn pull_markers(pu: &mut egui_plot::PlotUi<'_>, pull: &Pull, v: &egui::Visuals) {
    for class in [PullClass::Flagged, PullClass::Strong] {
        let pts: Vec<[f64; 2]> = pull
            .notable
            .iter()
            .filter(|n| n.2 == class)
            .map(|n| [n.1 .0, n.1 .1])
            .collect();
        if pts.is_empty() {
            continue;
        }
        pu.points(
            Points::new("", pts)
                .color(palette::influence(class as usize, v))
                .radius(PULL_RADIUS[class as usize])
                .filled(true)
                .allow_hover(false),
        );
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_key_names_the_strong_threshold_and_grows_with_the_class() {
        let pull = Pull {
            strong_from: 0.743_49,
            ..Pull::default()
        };
        let v = egui::Visuals::dark();
        let keys = pull_keys(&pull, &v);
        assert_eq!(keys.len(), 3);
        assert!(keys[2].name.contains("0.743"), "{}", keys[2].name);
        assert!(PULL_RADIUS.windows(2).all(|w| w[0] < w[1]));
        let colours: Vec<_> = (0..3).map(|k| palette::influence(k, &v)).collect();
        assert!(colours[0] != colours[1] && colours[1] != colours[2]);
    }
}
