//! The lab's charts: two methods' differences against their means with the bias and the
//! limits of agreement, and a calibration's weighted residuals under each weighting side by
//! side.

use plotters::coord::Shift;
use plotters::prelude::*;

use super::{axes, dots_series, range, render, Chart, Dot, Paint, FIT, FONT, GUIDE, OUT};
use crate::Result;

/// What the differences chart shows.
#[derive(Debug, Clone, PartialEq)]
pub struct DifferencesChart {
    /// `(mean, difference)` per pair; excluded pairs hollow.
    pub dots: Vec<Dot>,
    /// The bias and its interval `(value, low, high)`.
    pub bias: (f64, f64, f64),
    /// The lower limit and its interval.
    pub lower: (f64, f64, f64),
    /// The upper limit and its interval.
    pub upper: (f64, f64, f64),
    /// The differences' regression on the means `(intercept, slope)`, when drawn.
    pub trend: Option<(f64, f64)>,
    /// Axis label of the differences.
    pub y_label: String,
}

/// Differences against means: the bias (solid) and the limits (dashed) with their intervals
/// as capped bars at the right edge, and the differences' trend on the level (thin).
pub fn differences_chart(data: &DifferencesChart, title: String) -> Result<Chart> {
    render("differences", title, data)
}

impl Paint for DifferencesChart {
    fn paint<DB: DrawingBackend>(
        &self,
        root: &DrawingArea<DB, Shift>,
    ) -> std::result::Result<(), String> {
        root.fill(&WHITE).map_err(|e| e.to_string())?;
        let (x0, x1) = range(self.dots.iter().map(|d| d.x));
        // Room at the right for the intervals' bars.
        let (x0, x1) = (x0, x1 + 0.05 * (x1 - x0));
        let ends = [self.bias, self.lower, self.upper];
        let (y0, y1) = range(
            self.dots
                .iter()
                .map(|d| d.y)
                .chain(ends.iter().flat_map(|e| [e.1, e.2]))
                .chain([0.0]),
        );
        let mut chart = axes(
            root,
            x0..x1,
            y0..y1,
            "mean of the two methods",
            &self.y_label,
        )?;
        chart
            .draw_series(LineSeries::new(
                [(x0, 0.0), (x1, 0.0)],
                GUIDE.stroke_width(1),
            ))
            .map_err(|e| e.to_string())?;
        chart
            .draw_series(LineSeries::new(
                [(x0, self.bias.0), (x1, self.bias.0)],
                FIT.stroke_width(2),
            ))
            .map_err(|e| e.to_string())?;
        for limit in [self.lower.0, self.upper.0] {
            chart
                .draw_series(DashedLineSeries::new(
                    [(x0, limit), (x1, limit)],
                    8,
                    5,
                    FIT.stroke_width(2),
                ))
                .map_err(|e| e.to_string())?;
        }
        // Each interval as a capped bar at the right edge.
        let (at, cap) = (x1 - 0.025 * (x1 - x0), 0.01 * (x1 - x0));
        for (_, lo, hi) in ends {
            let bar = vec![
                (at - cap, lo),
                (at + cap, lo),
                (at, lo),
                (at, hi),
                (at - cap, hi),
                (at + cap, hi),
            ];
            chart
                .draw_series(LineSeries::new(bar, FIT.stroke_width(2)))
                .map_err(|e| e.to_string())?;
        }
        if let Some((a, b)) = self.trend {
            chart
                .draw_series(LineSeries::new(
                    [(x0, a + b * x0), (x1, a + b * x1)],
                    OUT.mix(0.8).stroke_width(1),
                ))
                .map_err(|e| e.to_string())?;
        }
        dots_series(&mut chart, &self.dots)
    }
}

/// Standards spanning this ratio or more are drawn on a log x axis.
const LOG_AXIS_FROM: f64 = 50.0;

/// One weighting's panel: its label and the weighted residuals against x.
#[derive(Debug, Clone, PartialEq)]
pub struct WeightingPanel {
    /// `none`, `1/x`, …
    pub label: String,
    /// `(x, √w·e)`.
    pub points: Vec<(f64, f64)>,
}

/// The weighted residuals of each weighting side by side, each panel on its own vertical
/// scale (the weightings put the residuals in different units), against the standards'
/// concentration.
pub fn weightings_chart(panels: &[WeightingPanel], x_label: &str, title: String) -> Result<Chart> {
    render(
        "weightings",
        title,
        &Weightings {
            panels,
            x_label: x_label.to_string(),
        },
    )
}

struct Weightings<'a> {
    panels: &'a [WeightingPanel],
    x_label: String,
}

impl Paint for Weightings<'_> {
    fn paint<DB: DrawingBackend>(
        &self,
        root: &DrawingArea<DB, Shift>,
    ) -> std::result::Result<(), String> {
        root.fill(&WHITE).map_err(|e| e.to_string())?;
        let n = self.panels.len().max(1);
        let areas = root.split_evenly((1, n));
        // Standards spread over decades crowd at the low end on a linear axis.
        let xs = || {
            self.panels
                .iter()
                .flat_map(|p| p.points.iter().map(|q| q.0))
        };
        let lo = xs().fold(f64::INFINITY, f64::min);
        let hi = xs().fold(f64::NEG_INFINITY, f64::max);
        let logged = lo > 0.0 && hi / lo >= LOG_AXIS_FROM;
        let place = |x: f64| if logged { x.log10() } else { x };
        let x_desc = if logged {
            format!("{} (log scale)", self.x_label)
        } else {
            self.x_label.clone()
        };
        let x_text = |v: &f64| {
            if logged {
                crate::text::sig(10f64.powf(*v), 2)
            } else {
                crate::text::sig(*v, 3)
            }
        };
        let y_text = |v: &f64| crate::text::sig(*v, 2);
        for (area, panel) in areas.iter().zip(self.panels) {
            let (x0, x1) = range(panel.points.iter().map(|p| place(p.0)));
            let (y0, y1) = range(panel.points.iter().map(|p| p.1).chain([0.0]));
            let mut chart = ChartBuilder::on(area)
                .margin(10)
                .caption(&panel.label, (FONT, 15))
                .x_label_area_size(36)
                .y_label_area_size(54)
                .build_cartesian_2d(x0..x1, y0..y1)
                .map_err(|e| e.to_string())?;
            chart
                .configure_mesh()
                .light_line_style(WHITE)
                .x_desc(&x_desc)
                .x_labels(3)
                .y_labels(4)
                .x_label_formatter(&x_text)
                .y_label_formatter(&y_text)
                .label_style((FONT, 11))
                .draw()
                .map_err(|e| e.to_string())?;
            chart
                .draw_series(LineSeries::new(
                    [(x0, 0.0), (x1, 0.0)],
                    GUIDE.stroke_width(1),
                ))
                .map_err(|e| e.to_string())?;
            let dots: Vec<Dot> = panel
                .points
                .iter()
                .map(|&(x, y)| Dot {
                    x: place(x),
                    y,
                    excluded: false,
                })
                .collect();
            dots_series(&mut chart, &dots)?;
        }
        Ok(())
    }
}
