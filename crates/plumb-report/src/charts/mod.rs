//! Static charts of one fit: the pair with its fitted curve and bands, residuals against
//! fitted values, and leverage against studentized residuals with Cook's-distance contours.
//! Each is drawn once by plotters into SVG and into a PNG (text in the bundled DejaVu Sans, so
//! no system font is looked up).

use std::sync::Once;

use plotters::coord::Shift;
use plotters::prelude::*;

use crate::{ReportError, Result};
use plumb_core::regression::cooks_contour;

mod lab;

pub use lab::{differences_chart, weightings_chart, DifferencesChart, WeightingPanel};

/// Chart size in pixels (SVG user units).
pub const SIZE: (u32, u32) = (720, 460);

const INK: RGBColor = RGBColor(38, 50, 56);
const FIT: RGBColor = RGBColor(21, 101, 192);
const OUT: RGBColor = RGBColor(216, 67, 21);
const GUIDE: RGBColor = RGBColor(120, 144, 156);
const FONT: &str = "sans-serif";
const KEPT: RGBColor = RGBColor(46, 107, 31);

/// Colour-blind-safe categorical colours for groups (Okabe & Ito's eight-colour set, without
/// black), shared by the workbench and the summary.
pub const GROUP_RGB: [(u8, u8, u8); 7] = [
    (0xE6, 0x9F, 0x00),
    (0x56, 0xB4, 0xE9),
    (0x00, 0x9E, 0x73),
    (0xF0, 0xE4, 0x42),
    (0x00, 0x72, 0xB2),
    (0xD5, 0x5E, 0x00),
    (0xCC, 0x79, 0xA7),
];

/// The colour of group level `k`.
pub fn group_rgb(k: usize) -> (u8, u8, u8) {
    GROUP_RGB[k % GROUP_RGB.len()]
}

/// One drawn chart.
#[derive(Debug, Clone, PartialEq)]
pub struct Chart {
    /// Short file-name stem, e.g. `pair`.
    pub name: &'static str,
    /// Title shown above it.
    pub title: String,
    /// SVG document.
    pub svg: String,
    /// PNG bytes.
    pub png: Vec<u8>,
}

/// A point of a scatter, with its row number and whether it is excluded.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Dot {
    /// Horizontal value.
    pub x: f64,
    /// Vertical value.
    pub y: f64,
    /// Excluded by the analyst (drawn hollow, in the exclusion colour).
    pub excluded: bool,
}

/// What the pair chart shows.
#[derive(Debug, Clone, PartialEq)]
pub struct PairChart<'a> {
    /// Axis labels.
    pub x_label: &'a str,
    /// Axis labels.
    pub y_label: &'a str,
    /// Points.
    pub dots: Vec<Dot>,
    /// `(x, fitted, mean_low, mean_high, predict_low, predict_high)` along the curve.
    pub curve: Vec<[f64; 6]>,
    /// Further curves without bands: one per level of a grouping factor, and the model kept
    /// for comparison.
    pub lines: Vec<ChartLine>,
}

/// A labelled curve of the pair chart.
#[derive(Debug, Clone, PartialEq)]
pub struct ChartLine {
    /// Legend text.
    pub label: String,
    /// Points along it.
    pub points: Vec<(f64, f64)>,
    /// How it is drawn.
    pub kind: LineKind,
}

/// How a [`ChartLine`] is drawn.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LineKind {
    /// A group level's curve, solid in the level's colour.
    Level(usize),
    /// The model kept for comparison, dashed.
    Kept,
    /// A reference line (the line of identity), thin and dashed in the guides' grey.
    Guide,
    /// A second line of the same kind as the first (another method's line), dashed in the
    /// level's colour so that it shows where it runs on top of a solid one.
    Dashed(usize),
}

fn register_font() {
    static ONCE: Once = Once::new();
    ONCE.call_once(|| {
        // The bundled font is valid; a failure would only cost text in PNGs.
        let _ = plotters::style::register_font(FONT, FontStyle::Normal, dejavu::sans::regular());
    });
}

/// Something that draws itself on any plotters backend.
trait Paint {
    fn paint<DB: DrawingBackend>(
        &self,
        root: &DrawingArea<DB, Shift>,
    ) -> std::result::Result<(), String>;
}

/// Draws `painter` into an SVG and a PNG.
fn render(name: &'static str, title: String, painter: &impl Paint) -> Result<Chart> {
    register_font();
    let fail = |detail: String| ReportError::Chart {
        chart: name.to_string(),
        detail,
    };
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, SIZE).into_drawing_area();
        painter.paint(&root).map_err(fail)?;
        root.present().map_err(|e| fail(e.to_string()))?;
    }
    let mut rgb = vec![0u8; (SIZE.0 * SIZE.1 * 3) as usize];
    {
        let root = BitMapBackend::with_buffer(&mut rgb, SIZE).into_drawing_area();
        painter.paint(&root).map_err(fail)?;
        root.present().map_err(|e| fail(e.to_string()))?;
    }
    let image = image::RgbImage::from_raw(SIZE.0, SIZE.1, rgb)
        .ok_or_else(|| fail("pixel buffer of the wrong size".into()))?;
    let mut png = Vec::new();
    image
        .write_to(&mut std::io::Cursor::new(&mut png), image::ImageFormat::Png)
        .map_err(|e| fail(e.to_string()))?;
    Ok(Chart {
        name,
        title,
        svg,
        png,
    })
}

fn range(values: impl Iterator<Item = f64>) -> (f64, f64) {
    let (lo, hi) = values
        .filter(|v| v.is_finite())
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), v| {
            (a.min(v), b.max(v))
        });
    if !lo.is_finite() {
        return (0.0, 1.0);
    }
    let pad = if hi > lo {
        0.06 * (hi - lo)
    } else {
        0.5_f64.max(lo.abs() * 0.1)
    };
    (lo - pad, hi + pad)
}

type Plane =
    Cartesian2d<plotters::coord::types::RangedCoordf64, plotters::coord::types::RangedCoordf64>;

/// The shared frame of every chart: margins, label areas, axis captions, no minor grid.
fn axes<'a, DB: DrawingBackend>(
    root: &'a DrawingArea<DB, Shift>,
    x: std::ops::Range<f64>,
    y: std::ops::Range<f64>,
    x_desc: &str,
    y_desc: &str,
) -> std::result::Result<ChartContext<'a, DB, Plane>, String> {
    let mut chart = ChartBuilder::on(root)
        .margin(14)
        .x_label_area_size(42)
        .y_label_area_size(64)
        .build_cartesian_2d(x, y)
        .map_err(|e| e.to_string())?;
    chart
        .configure_mesh()
        .light_line_style(WHITE)
        .x_desc(x_desc)
        .y_desc(y_desc)
        .label_style((FONT, 13))
        .draw()
        .map_err(|e| e.to_string())?;
    Ok(chart)
}

fn dots_series<DB: DrawingBackend>(
    chart: &mut ChartContext<
        '_,
        DB,
        Cartesian2d<plotters::coord::types::RangedCoordf64, plotters::coord::types::RangedCoordf64>,
    >,
    dots: &[Dot],
) -> std::result::Result<(), String> {
    chart
        .draw_series(
            dots.iter()
                .filter(|d| !d.excluded)
                .map(|d| Circle::new((d.x, d.y), 3, INK.filled())),
        )
        .map_err(|e| e.to_string())?;
    chart
        .draw_series(
            dots.iter()
                .filter(|d| d.excluded)
                .map(|d| Circle::new((d.x, d.y), 5, OUT.stroke_width(2))),
        )
        .map_err(|e| e.to_string())?;
    Ok(())
}

/// The pair with its fitted curve, mean band (shaded) and prediction band (dashed).
pub fn pair_chart(data: &PairChart<'_>, title: String) -> Result<Chart> {
    render("pair", title, data)
}

/// A pair chart under another file name (`STEM-NAME.svg`), for a second pair on the page.
pub fn pair_chart_named(name: &'static str, data: &PairChart<'_>, title: String) -> Result<Chart> {
    render(name, title, data)
}

impl Paint for PairChart<'_> {
    fn paint<DB: DrawingBackend>(
        &self,
        root: &DrawingArea<DB, Shift>,
    ) -> std::result::Result<(), String> {
        let data = self;
        root.fill(&WHITE).map_err(|e| e.to_string())?;
        let (x0, x1) = range(
            data.dots
                .iter()
                .map(|d| d.x)
                .chain(data.curve.iter().map(|c| c[0]))
                .chain(data.lines.iter().flat_map(|l| l.points.iter().map(|p| p.0))),
        );
        let (y0, y1) = range(
            data.dots
                .iter()
                .map(|d| d.y)
                .chain(data.curve.iter().flat_map(|c| [c[4], c[5]]))
                .chain(data.lines.iter().flat_map(|l| l.points.iter().map(|p| p.1))),
        );
        let mut chart = axes(root, x0..x1, y0..y1, data.x_label, data.y_label)?;
        if !data.curve.is_empty() {
            let band: Vec<(f64, f64)> = data
                .curve
                .iter()
                .map(|c| (c[0], c[3]))
                .chain(data.curve.iter().rev().map(|c| (c[0], c[2])))
                .collect();
            chart
                .draw_series(std::iter::once(Polygon::new(band, FIT.mix(0.18))))
                .map_err(|e| e.to_string())?;
            for k in [4, 5] {
                chart
                    .draw_series(DashedLineSeries::new(
                        data.curve.iter().map(|c| (c[0], c[k])),
                        6,
                        4,
                        GUIDE.stroke_width(1),
                    ))
                    .map_err(|e| e.to_string())?;
            }
            chart
                .draw_series(LineSeries::new(
                    data.curve.iter().map(|c| (c[0], c[1])),
                    FIT.stroke_width(2),
                ))
                .map_err(|e| e.to_string())?;
        }
        lines_series(&mut chart, &data.lines)?;
        dots_series(&mut chart, &data.dots)?;
        if !data.lines.is_empty() {
            chart
                .configure_series_labels()
                .background_style(WHITE.mix(0.85))
                .border_style(GUIDE)
                .label_font((FONT, 12))
                .position(SeriesLabelPosition::UpperRight)
                .draw()
                .map_err(|e| e.to_string())?;
        }
        Ok(())
    }
}

fn lines_series<DB: DrawingBackend>(
    chart: &mut ChartContext<'_, DB, Plane>,
    lines: &[ChartLine],
) -> std::result::Result<(), String> {
    for line in lines {
        let (colour, dashed) = match line.kind {
            LineKind::Level(k) => {
                let (r, g, b) = group_rgb(k);
                (RGBColor(r, g, b), false)
            }
            LineKind::Kept => (KEPT, true),
            LineKind::Guide => (GUIDE, true),
            LineKind::Dashed(k) => {
                let (r, g, b) = group_rgb(k);
                (RGBColor(r, g, b), true)
            }
        };
        let style = colour.stroke_width(2);
        let legend = move |(x, y): (i32, i32)| PathElement::new(vec![(x, y), (x + 18, y)], style);
        let points = line.points.iter().copied();
        let drawn = if dashed {
            chart.draw_series(DashedLineSeries::new(points, 8, 5, style))
        } else {
            chart.draw_series(LineSeries::new(points, style))
        };
        drawn
            .map_err(|e| e.to_string())?
            .label(line.label.clone())
            .legend(legend);
    }
    Ok(())
}

/// Residuals against fitted values, with the zero line.
pub fn residual_chart(dots: &[Dot], title: String) -> Result<Chart> {
    render("residuals", title, &Residuals(dots))
}

struct Residuals<'a>(&'a [Dot]);

impl Paint for Residuals<'_> {
    fn paint<DB: DrawingBackend>(
        &self,
        root: &DrawingArea<DB, Shift>,
    ) -> std::result::Result<(), String> {
        let dots = self.0;
        root.fill(&WHITE).map_err(|e| e.to_string())?;
        let (x0, x1) = range(dots.iter().map(|d| d.x));
        let (y0, y1) = range(dots.iter().map(|d| d.y).chain([0.0]));
        let mut chart = axes(root, x0..x1, y0..y1, "fitted value", "residual")?;
        chart
            .draw_series(LineSeries::new(
                [(x0, 0.0), (x1, 0.0)],
                GUIDE.stroke_width(1),
            ))
            .map_err(|e| e.to_string())?;
        dots_series(&mut chart, dots)
    }
}

/// Leverage against externally studentized residuals, with the curves where Cook's distance
/// equals 0.5 and 1 for a model of `p` terms and `df` residual degrees of freedom, on that
/// kind of residual ([`cooks_contour`]).
pub fn leverage_chart(dots: &[Dot], p: usize, df: usize, title: String) -> Result<Chart> {
    render("leverage", title, &Leverage(dots, p, df))
}

/// One branch (`sign` ±1) of the curve of Cook's distance `d` over leverages in `(0, h_max]`.
pub fn cook_contour_points(d: f64, p: usize, df: usize, h_max: f64, sign: f64) -> Vec<(f64, f64)> {
    (1..=60)
        .filter_map(|k| {
            let h = h_max * f64::from(k) / 60.0;
            cooks_contour(d, p, df, h).map(|t| (h, sign * t))
        })
        .collect()
}

struct Leverage<'a>(&'a [Dot], usize, usize);

impl Paint for Leverage<'_> {
    fn paint<DB: DrawingBackend>(
        &self,
        root: &DrawingArea<DB, Shift>,
    ) -> std::result::Result<(), String> {
        let (dots, p, df) = (self.0, self.1, self.2);
        root.fill(&WHITE).map_err(|e| e.to_string())?;
        let (_, x1) = range(dots.iter().map(|d| d.x));
        let x1 = x1.min(0.999);
        let (y0, y1) = range(dots.iter().map(|d| d.y).chain([-3.5, 3.5]));
        let mut chart = axes(
            root,
            0.0..x1,
            y0..y1,
            "leverage",
            "studentized residual (external)",
        )?;
        for d in [0.5, 1.0] {
            for sign in [-1.0, 1.0] {
                let pts: Vec<(f64, f64)> = cook_contour_points(d, p, df, x1, sign)
                    .into_iter()
                    .filter(|(_, r)| *r >= y0 && *r <= y1)
                    .collect();
                chart
                    .draw_series(DashedLineSeries::new(pts, 4, 4, GUIDE.stroke_width(1)))
                    .map_err(|e| e.to_string())?;
            }
        }
        dots_series(&mut chart, dots)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use plumb_core::regression::{fit, influence, Design, FitOptions};

    #[test]
    fn a_case_with_cooks_distance_one_lies_on_the_drawn_curve() {
        // Nine rows on a line and a tenth far out in x and off the line; its y is tuned (by
        // bisection on y) until its Cook's distance is 1. The summary's curve for D = 1 at that
        // case's leverage must pass through the residual the chart plots for it.
        let x: Vec<f64> = (1..=9).map(f64::from).chain([30.0]).collect();
        let base: Vec<f64> = x
            .iter()
            .enumerate()
            .map(|(i, v)| {
                2.0 + 0.5 * v + [0.3, -0.2, 0.1, -0.4, 0.25, -0.1, 0.35, -0.3, 0.05, 0.0][i]
            })
            .collect();
        let d = Design::linear(&[("x", &x)], true);
        let case_at = |y_last: f64| {
            let mut y = base.clone();
            y[9] = y_last;
            let f = fit(&d, &y, None, &FitOptions::default()).expect("fits");
            influence(&d, None, &f, &FitOptions::default()).expect("influence")[9].clone()
        };
        let (mut lo, mut hi) = (17.0, 40.0);
        for _ in 0..200 {
            let mid = 0.5 * (lo + hi);
            if case_at(mid).cooks_distance < 1.0 {
                lo = mid;
            } else {
                hi = mid;
            }
        }
        let c = case_at(0.5 * (lo + hi));
        assert!(
            (c.cooks_distance - 1.0).abs() < 1e-9,
            "{}",
            c.cooks_distance
        );
        // The curve's points at leverages h_k = h_max·k/60: choose h_max so that one of them
        // is the case's own leverage.
        let curve = cook_contour_points(1.0, 2, 8, c.leverage * 60.0 / 45.0, 1.0);
        let (h, t) = curve
            .iter()
            .copied()
            .min_by(|a, b| {
                (a.0 - c.leverage)
                    .abs()
                    .total_cmp(&(b.0 - c.leverage).abs())
            })
            .expect("points");
        assert!((h - c.leverage).abs() < 1e-12);
        assert!(
            (t - c.studentized_external).abs() < 1e-6 * t,
            "{t} vs {}",
            c.studentized_external
        );
    }
}
