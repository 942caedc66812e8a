//! What the scatter adds in the lab's modes: the unknowns read back off a calibration (each
//! reading across to the curve, its interval along the reading), and the method comparison's
//! lines against the line of identity.

use eframe::egui;
use egui_plot::{Line, LineStyle, MarkerShape, PlotUi, Points};
use plumb_core::calibration::Interval;

use crate::palette;
use crate::state::diagnostics::Diagnostics;

/// Each unknown: a dotted line from the left edge across to x̂ at its mean reading, a thick
/// stretch over its interval (the inverted band when bounded, else the first-order one), and a
/// diamond at x̂.
pub fn unknowns(pu: &mut PlotUi<'_>, d: &Diagnostics, v: &egui::Visuals, (x0, _): (f64, f64)) {
    let Some(Ok(c)) = &d.calibration else { return };
    let colour = palette::unknown(v);
    let name = "unknowns read back";
    for (_, rb) in &c.unknowns {
        let Ok(rb) = rb else { continue };
        let y = rb.reading;
        pu.line(
            Line::new(name, vec![[x0.min(rb.x), y], [rb.x, y]])
                .color(colour.gamma_multiply(0.6))
                .style(LineStyle::dotted_loose())
                .allow_hover(false),
        );
        let (lo, hi) = match rb.exact {
            Interval::Bounded { low, high } => (low, high),
            _ => rb.approximate,
        };
        pu.line(
            Line::new(name, vec![[lo, y], [hi, y]])
                .color(colour)
                .width(4.0)
                .allow_hover(false),
        );
        pu.points(
            Points::new(name, vec![[rb.x, y]])
                .shape(MarkerShape::Diamond)
                .radius(6.0)
                .color(colour)
                .allow_hover(false),
        );
    }
}

/// The line of identity (dashed), the Passing–Bablok line and the Deming line.
pub fn method_lines(pu: &mut PlotUi<'_>, d: &Diagnostics, v: &egui::Visuals, (x0, x1): (f64, f64)) {
    let along = |a: f64, b: f64| vec![[x0, a + b * x0], [x1, a + b * x1]];
    pu.line(
        Line::new("line of identity", along(0.0, 1.0))
            .color(palette::identity(v))
            .style(LineStyle::dashed_loose())
            .allow_hover(false),
    );
    let Some(Ok(a)) = &d.agreement else { return };
    if let Ok(pb) = &a.passing_bablok {
        pu.line(
            Line::new("Passing–Bablok", along(pb.intercept, pb.slope))
                .color(palette::fit(v))
                .width(2.0)
                .allow_hover(false),
        );
    }
    if let Ok(dm) = &a.deming {
        pu.line(
            Line::new("Deming", along(dm.fit.intercept, dm.fit.slope))
                .color(palette::deming(v))
                .width(1.5)
                .style(LineStyle::dashed_dense())
                .allow_hover(false),
        );
    }
}
