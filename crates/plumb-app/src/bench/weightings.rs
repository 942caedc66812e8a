//! The calibration's weighted residuals under each weighting, side by side: the weighting that
//! evens out the spread along the standards is the one the data support. Linked to the other
//! views (hover and click) like them.

use eframe::egui::{self, Vec2};

use super::view::{diagnostic_ui, Diagnostic};
use super::{BenchUi, Scene};
use crate::action::Actions;

const TIP: &str = "The same calibration under each weighting: its weighted residuals √w·e against the standards. The aim is an even band around zero from the lowest standard to the highest; a funnel means the weighting does not match how the spread grows.";

/// Draws one small view per weighting, stacked, each of `panel` size (the heading taken from
/// their share); a spinner until they are computed.
pub fn weightings_ui(
    scene: &Scene<'_>,
    own: &mut BenchUi,
    ui: &mut egui::Ui,
    panel: Vec2,
) -> Actions {
    let d = scene.bench.diagnostics();
    let labels: Vec<String> = d
        .map(|d| d.lab_views.weightings.iter().map(|w| w.0.clone()).collect())
        .unwrap_or_default();
    let log_x = d.is_some_and(|d| d.lab_views.weightings_log_x);
    let x_label = if log_x {
        format!("log₁₀ {}", scene.pair.spec.x0())
    } else {
        scene.pair.spec.x0().to_string()
    };
    let top = ui.cursor().top();
    super::points::title_ui(ui, "Weighted residuals under each weighting", TIP);
    if labels.is_empty() {
        ui.add_sized(panel, egui::Spinner::new());
        return Actions::none();
    }
    // The heading's height comes out of the panels' share, so the last one is never pushed
    // off the bottom.
    let heading = ui.cursor().top() - top;
    let n = labels.len() as f32;
    let panel = Vec2::new(panel.x, (panel.y - heading / n).floor().max(80.0));
    let in_use = d
        .and_then(|d| d.calibration.as_ref())
        .and_then(|c| c.as_ref().ok())
        .map(|c| c.weighting.clone())
        .unwrap_or_default();
    let mut out = Actions::none();
    ui.vertical(|ui| {
        for (k, label) in labels.iter().enumerate() {
            ui.vertical(|ui| {
                ui.set_width(panel.x);
                let title = if *label == in_use {
                    format!("{label} (in use)")
                } else {
                    label.clone()
                };
                let view = Diagnostic {
                    id: "weightings",
                    variant: k as u64 + 1,
                    title: &title,
                    tip: TIP,
                    x_label: &x_label,
                    y_label: "√w · residual",
                    shares_scatter_x: false,
                    over: None,
                };
                out.extend(diagnostic_ui(
                    scene,
                    own,
                    ui,
                    panel,
                    &view,
                    |d| {
                        let (_, cloud) = d.lab_views.weightings.iter().find(|w| w.0 == *label)?;
                        Some((cloud, None))
                    },
                    |pu, _, v| {
                        pu.hline(
                            egui_plot::HLine::new("zero", 0.0)
                                .color(v.weak_text_color())
                                .allow_hover(false),
                        );
                    },
                ));
            });
        }
    });
    out
}
