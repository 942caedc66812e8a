//! The two methods' differences against their means: the bias (solid), the limits of
//! agreement (dashed) with their intervals shaded, and the differences' trend on the level.
//! Linked to the other views and excludable like them.

use eframe::egui::{self, Vec2};
use egui_plot::{HLine, Line, LineStyle, PlotUi};
use plumb_core::agreement::AgreementLimits;

use super::view::{diagnostic_ui, Diagnostic};
use super::{BenchUi, Scene};
use crate::action::Actions;
use crate::palette;
use crate::state::cloud::Cloud;

const TIP: &str = "Each sample's difference between the methods against their mean. Solid: the mean difference (bias); dashed: the limits within which about 95% of differences fall; the capped bars at the right: their confidence intervals; thin: the differences' trend with the level (a slope means a proportional difference). Hollow rings: excluded samples.";

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
    let top = ui.cursor().top();
    super::points::title_ui(ui, "Differences against the mean of the two methods", TIP);
    let trend = scene
        .bench
        .diagnostics()
        .and_then(|d| d.agreement.as_ref())
        .and_then(|a| a.as_ref().ok())
        .and_then(|a| a.limits.as_ref().ok())
        .is_some_and(|l| l.proportional.is_some());
    super::key::key_row_ui(ui, &differences_keys(ui.visuals(), trend));
    let size = size - Vec2::new(0.0, ui.cursor().top() - top);
    let view = Diagnostic {
        id: "differences",
        variant: u64::from(percent),
        title: "",
        tip: TIP,
        x_label: "mean of the two methods",
        y_label: &y_label,
        shares_scatter_x: false,
        over: None,
    };
    let limits = scene
        .bench
        .diagnostics()
        .and_then(|d| d.agreement.as_ref())
        .and_then(|a| a.as_ref().ok())
        .and_then(|a| a.limits.as_ref().ok())
        .cloned();
    let beyond = scene
        .bench
        .diagnostics()
        .map(|d| beyond_text(scene, &d.lab_views.differences_beyond))
        .unwrap_or_default();
    let size = if beyond.is_empty() {
        size
    } else {
        size - Vec2::new(0.0, 18.0)
    };
    let out = diagnostic_ui(
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
    );
    if !beyond.is_empty() {
        ui.weak(beyond);
    }
    out
}

/// The excluded samples too far out to draw, by data row with their differences.
fn beyond_text(scene: &Scene<'_>, beyond: &[(usize, f64)]) -> String {
    if beyond.is_empty() {
        return String::new();
    }
    let rows: Vec<String> = beyond
        .iter()
        .take(4)
        .map(|&(e, d)| {
            format!(
                "{} ({})",
                scene.names.label(scene.pair.rows[e]),
                plumb_report::text::sig(d, 3)
            )
        })
        .collect();
    let more = beyond.len().saturating_sub(4);
    let tail = if more > 0 {
        format!(" and {more} more")
    } else {
        String::new()
    };
    format!(
        "excluded, far outside the view (difference): {}{tail}",
        rows.join(", ")
    )
}

/// The view's key, in the colours and strokes [`agreement_guides`] draws with.
fn differences_keys(v: &egui::Visuals, trend: bool) -> Vec<super::key::Key> {
    use super::key::{Key, Swatch};
    let c = palette::fit(v);
    let mut keys = vec![
        Key {
            swatch: Swatch::Line(c, 2.0),
            name: "bias (mean difference)".into(),
        },
        Key {
            swatch: Swatch::Dashed(c),
            name: "limits of agreement".into(),
        },
        Key {
            swatch: Swatch::Line(c, 3.0),
            name: "their 95 % intervals (bars at the right)".into(),
        },
    ];
    if trend {
        keys.push(Key {
            swatch: Swatch::Line(palette::focus(v).gamma_multiply(0.7), 1.0),
            name: "trend with the level".into(),
        });
    }
    keys
}

/// The bias, the limits, their intervals and the trend, across the cloud's extent.
fn agreement_guides(pu: &mut PlotUi<'_>, cloud: &Cloud, l: &AgreementLimits, v: &egui::Visuals) {
    let Some(b) = cloud.bounds else { return };
    let (x0, x1) = (b.x_min, b.x_max);
    let c = palette::fit(v);
    // Each interval as a capped bar just right of the points.
    let (at, cap) = (x1 + 0.08 * (x1 - x0), 0.015 * (x1 - x0));
    for (lo, hi) in [l.bias_interval, l.lower_interval, l.upper_interval] {
        let bar = vec![
            [at - cap, lo],
            [at + cap, lo],
            [at, lo],
            [at, hi],
            [at - cap, hi],
            [at + cap, hi],
        ];
        pu.line(
            Line::new("interval", bar)
                .color(c)
                .width(2.5)
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
