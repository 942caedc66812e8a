//! The two methods' differences against their means: the bias (solid), the limits of
//! agreement (dashed) with their intervals shaded, and the differences' trend on the level.
//! Linked to the other views and excludable like them.

use eframe::egui::{self, Vec2};
use egui_plot::{HLine, Line, LineStyle, PlotUi, Polygon};
use plumb_core::agreement::AgreementLimits;

use super::view::{diagnostic_ui, Diagnostic};
use super::{BenchUi, Scene};
use crate::action::Actions;
use crate::palette;
use crate::state::cloud::Cloud;

const TIP: &str = "Each sample's difference between the methods against their mean. Solid: the mean difference (bias); dashed: the limits within which about 95% of differences fall; shaded: their confidence intervals; thin: the differences' trend with the level (a slope means a proportional difference). Hollow rings: excluded samples.";

/// Draws the view (a spinner until the comparison is computed).
pub fn differences_ui(
    scene: &Scene<'_>,
    own: &mut BenchUi,
    ui: &mut egui::Ui,
    size: Vec2,
) -> Actions {
    let percent = scene.bench.reading().agreement.percent;
    let y_label = if percent {
        format!(
            "({} − {}) as % of the mean",
            scene.pair.spec.y,
            scene.pair.spec.x0()
        )
    } else {
        format!("{} − {}", scene.pair.spec.y, scene.pair.spec.x0())
    };
    let view = Diagnostic {
        id: "differences",
        variant: u64::from(percent),
        title: "Differences against the mean of the two methods",
        tip: TIP,
        x_label: "mean of the two methods",
        y_label: &y_label,
    };
    let limits = scene
        .bench
        .diagnostics()
        .and_then(|d| d.agreement.as_ref())
        .and_then(|a| a.as_ref().ok())
        .and_then(|a| a.limits.as_ref().ok())
        .cloned();
    diagnostic_ui(
        scene,
        own,
        ui,
        size,
        &view,
        |d| {
            let (points, rings) = d.lab_views.differences.as_ref()?;
            Some((points, Some(rings)))
        },
        |pu, cloud, v| {
            if let Some(l) = &limits {
                agreement_guides(pu, cloud, l, v);
            }
        },
    )
}

/// The bias, the limits, their intervals and the trend, across the cloud's extent.
fn agreement_guides(pu: &mut PlotUi<'_>, cloud: &Cloud, l: &AgreementLimits, v: &egui::Visuals) {
    let Some(b) = cloud.bounds else { return };
    let (x0, x1) = (b.x_min, b.x_max);
    let c = palette::fit(v);
    for (lo, hi) in [l.bias_interval, l.lower_interval, l.upper_interval] {
        let strip = vec![[x0, lo], [x1, lo], [x1, hi], [x0, hi]];
        pu.polygon(
            Polygon::new("interval", strip)
                .fill_color(c.gamma_multiply(0.16))
                .stroke(egui::Stroke::NONE)
                .allow_hover(false),
        );
    }
    pu.hline(
        HLine::new("zero", 0.0)
            .color(v.weak_text_color())
            .allow_hover(false),
    );
    pu.hline(
        HLine::new("bias", l.bias)
            .color(c)
            .width(2.0)
            .allow_hover(false),
    );
    for limit in [l.lower, l.upper] {
        pu.hline(
            HLine::new("limit of agreement", limit)
                .color(c)
                .width(1.5)
                .style(LineStyle::dashed_loose())
                .allow_hover(false),
        );
    }
    if let Some(p) = l.proportional {
        pu.line(
            Line::new(
                "trend",
                vec![
                    [x0, p.intercept + p.slope * x0],
                    [x1, p.intercept + p.slope * x1],
                ],
            )
            .color(palette::focus(v).gamma_multiply(0.7))
            .allow_hover(false),
        );
    }
}
