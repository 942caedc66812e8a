//! Static charts of one fit: the pair with its fitted curve and bands, its residuals against
//! the same predictor, and how much each row pulls the fit (leverage against studentized
//! residual, Cook's distance by marker size and colour) — the workbench's picture on paper.
//! Each is drawn once by plotters into SVG and into a PNG (text in the bundled DejaVu Sans, so
//! no system font is looked up).

use std::sync::Once;

use plotters::coord::Shift;
use plotters::prelude::*;

use crate::{ReportError, Result};
use plumb_core::regression::Pull;

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

/// The bands along a fitted curve as the pair chart's rows:
/// `(x, fitted, mean_low, mean_high, predict_low, predict_high)`.
pub fn band_rows(bands: &[plumb_core::regression::BandPoint]) -> Vec<[f64; 6]> {
    bands
        .iter()
        .map(|b| {
            [
                b.x,
                b.fitted,
                b.mean_low,
                b.mean_high,
                b.predict_low,
                b.predict_high,
            ]
        })
        .collect()
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

/// Residuals against `x_label` (the predictor under the pair chart, or the fitted values),
/// with the zero line.
pub fn residual_chart(dots: &[Dot], x_label: &str, title: String) -> Result<Chart> {
    render("residuals", title, &Residuals(dots, x_label))
}

struct Residuals<'a>(&'a [Dot], &'a str);

impl Paint for Residuals<'_> {
    fn paint<DB: DrawingBackend>(
        &self,
        root: &DrawingArea<DB, Shift>,
    ) -> std::result::Result<(), String> {
        let dots = self.0;
        root.fill(&WHITE).map_err(|e| e.to_string())?;
        let (x0, x1) = range(dots.iter().map(|d| d.x));
        let (y0, y1) = range(dots.iter().map(|d| d.y).chain([0.0]));
        let mut chart = axes(root, x0..x1, y0..y1, self.1, "residual")?;
        chart
            .draw_series(LineSeries::new(
                [(x0, 0.0), (x1, 0.0)],
                GUIDE.stroke_width(1),
            ))
            .map_err(|e| e.to_string())?;
        dots_series(&mut chart, dots)
    }
}

/// Ranks at which the quantile chart's band is drawn.
const BAND_RANKS: usize = 120;

/// The residuals against a normal sample: each studentized residual in rank order against the
/// normal score of its rank (`points`, sorted), the diagonal, and the shaded pointwise 95 %
/// band of normal order statistics of that sample size.
pub fn quantile_chart(points: &[(f64, f64)], title: String) -> Result<Chart> {
    let band = plumb_core::distributions::normal_order_bands(
        points.len(),
        |i| points[i - 1].0,
        BAND_RANKS,
        0.05,
    );
    render("quantiles", title, &Quantiles(points, band))
}

struct Quantiles<'a>(&'a [(f64, f64)], Vec<[f64; 3]>);

impl Paint for Quantiles<'_> {
    fn paint<DB: DrawingBackend>(
        &self,
        root: &DrawingArea<DB, Shift>,
    ) -> std::result::Result<(), String> {
        let (points, band) = (self.0, &self.1);
        root.fill(&WHITE).map_err(|e| e.to_string())?;
        let (x0, x1) = range(points.iter().map(|p| p.0));
        let (y0, y1) = range(
            points
                .iter()
                .map(|p| p.1)
                .chain(band.iter().flat_map(|b| [b[1], b[2]])),
        );
        let mut chart = axes(
            root,
            x0..x1,
            y0..y1,
            "normal score of the rank",
            "studentized residual",
        )?;
        if band.len() > 1 {
            let outline: Vec<(f64, f64)> = band
                .iter()
                .map(|b| (b[0], b[2]))
                .chain(band.iter().rev().map(|b| (b[0], b[1])))
                .collect();
            chart
                .draw_series(std::iter::once(Polygon::new(
                    outline,
                    FIT.mix(0.16).filled(),
                )))
                .map_err(|e| e.to_string())?;
        }
        let (lo, hi) = (x0.max(y0), x1.min(y1));
        if hi > lo {
            chart
                .draw_series(LineSeries::new([(lo, lo), (hi, hi)], GUIDE.stroke_width(1)))
                .map_err(|e| e.to_string())?;
        }
        chart
            .draw_series(
                points
                    .iter()
                    .filter(|p| p.0.is_finite() && p.1.is_finite())
                    .map(|&p| Circle::new(p, 3, INK.filled())),
            )
            .map_err(|e| e.to_string())?;
        Ok(())
    }
}

/// A row of the influence chart: leverage, externally studentized residual, and its class.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PullDot {
    /// Leverage.
    pub leverage: f64,
    /// Externally studentized residual.
    pub studentized: f64,
    /// Its class by Cook's distance.
    pub pull: Pull,
}

/// Radius in pixels of each class's marker (ordinary, flagged, strong).
const PULL_PX: [i32; 3] = [3, 5, 7];
/// Colour of each class (ordinary, flagged, strong), as in the workbench's light theme.
const PULL_RGB: [RGBColor; 3] = [INK, RGBColor(0xB3, 0x6B, 0x00), RGBColor(0xB0, 0x24, 0x0C)];

/// How much each row pulls the fit: leverage across, studentized residual up, Cook's distance
/// told by each marker's size and colour (the classes of [`Pull`], `strong_from` the strong
/// class's threshold), with the key above the plot.
pub fn pull_chart(dots: &[PullDot], strong_from: f64, title: String) -> Result<Chart> {
    render("leverage", title, &PullPicture(dots, strong_from))
}

struct PullPicture<'a>(&'a [PullDot], f64);

impl Paint for PullPicture<'_> {
    fn paint<DB: DrawingBackend>(
        &self,
        root: &DrawingArea<DB, Shift>,
    ) -> std::result::Result<(), String> {
        let dots = self.0;
        root.fill(&WHITE).map_err(|e| e.to_string())?;
        let (key, plot) = root.split_vertically(30);
        pull_key(&key, self.1)?;
        let (_, x1) = range(dots.iter().map(|d| d.leverage));
        let (y0, y1) = range(dots.iter().map(|d| d.studentized).chain([-3.5, 3.5]));
        let mut chart = axes(
            &plot,
            0.0..x1.min(1.0),
            y0..y1,
            "leverage",
            "studentized residual (leave-one-out)",
        )?;
        for class in [Pull::Ordinary, Pull::Flagged, Pull::Strong] {
            let k = class as usize;
            chart
                .draw_series(
                    dots.iter()
                        .filter(|d| d.pull == class)
                        .filter(|d| d.leverage.is_finite() && d.studentized.is_finite())
                        .map(|d| {
                            Circle::new(
                                (d.leverage, d.studentized),
                                PULL_PX[k],
                                PULL_RGB[k].filled(),
                            )
                        }),
                )
                .map_err(|e| e.to_string())?;
        }
        Ok(())
    }
}

/// The key of the influence chart, in its own strip above the plot.
fn pull_key<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    strong_from: f64,
) -> std::result::Result<(), String> {
    let strong = if strong_from.is_finite() {
        format!(
            "strong pull: D ≥ {} (median of F)",
            crate::text::sig(strong_from, 3)
        )
    } else {
        "strong pull: D ≥ median of F".to_string()
    };
    let names = [
        "ordinary".to_string(),
        "flagged by Cook's rule".to_string(),
        strong,
    ];
    let mut x = 80;
    for (k, name) in names.iter().enumerate() {
        area.draw(&Circle::new((x, 16), PULL_PX[k], PULL_RGB[k].filled()))
            .map_err(|e| e.to_string())?;
        area.draw(&Text::new(
            name.clone(),
            (x + 12, 9),
            (FONT, 13).into_font().color(&INK),
        ))
        .map_err(|e| e.to_string())?;
        x += 24 + 7 * name.chars().count() as i32;
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_influence_chart_draws_each_class_in_its_size_with_the_key_outside_the_plot() {
        let dots = [
            PullDot {
                leverage: 0.05,
                studentized: 0.3,
                pull: Pull::Ordinary,
            },
            PullDot {
                leverage: 0.2,
                studentized: 2.8,
                pull: Pull::Flagged,
            },
            PullDot {
                leverage: 0.6,
                studentized: -3.9,
                pull: Pull::Strong,
            },
        ];
        let c = pull_chart(&dots, 0.743_49, "t".into()).expect("drawn");
        for (k, r) in PULL_PX.iter().enumerate() {
            let RGBColor(red, green, blue) = PULL_RGB[k];
            let fill = format!("#{red:02X}{green:02X}{blue:02X}");
            let circle = format!("r=\"{r}\"");
            assert!(
                c.svg
                    .lines()
                    .any(|l| l.contains("<circle") && l.contains(&circle) && l.contains(&fill)),
                "class {k}: a circle of radius {r} in {fill}"
            );
        }
        assert!(
            c.svg.contains("strong pull: D ≥ 0.743"),
            "the key names the threshold"
        );
        assert!(!c.svg.contains("stroke-dasharray"), "no dashed contours");
    }

    #[test]
    fn the_quantile_chart_shades_the_band_under_its_points() {
        let scores = plumb_core::regression::normal_scores(30);
        let points: Vec<(f64, f64)> = scores.iter().map(|&z| (z, z * 1.1)).collect();
        let c = quantile_chart(&points, "t".into()).expect("drawn");
        let circles = c.svg.matches("<circle").count();
        assert_eq!(circles, 30, "one marker per residual");
        assert!(c.svg.contains("<polygon"), "the band is drawn");
        assert!(
            c.svg.find("<polygon") < c.svg.find("<circle"),
            "under the points"
        );
    }
}
