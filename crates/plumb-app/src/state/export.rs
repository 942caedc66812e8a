//! One view of the bench saved as a chart file (SVG or PNG, by the name's extension), drawn by
//! the summary's chart code from what the view shows: the same picture on paper.

use std::path::{Path, PathBuf};

use plumb_report::charts::{
    pair_chart, pull_chart, quantile_chart, residual_chart, Chart, Dot, PairChart, PullDot,
};

use super::diagnostics::Diagnostics;
use super::pair::PairRows;
use super::State;
use crate::error::WorkbenchError;
use crate::state::marks::Marks;

/// A view of the bench that can be saved on its own.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ChartView {
    /// The scatter with its fit and bands.
    Scatter,
    /// The residual strip.
    Residuals,
    /// How much each row pulls the fit.
    Influence,
    /// The residuals against a normal sample.
    Quantiles,
}

impl ChartView {
    /// Short name, used in file names.
    pub fn stem(self) -> &'static str {
        match self {
            Self::Scatter => "scatter",
            Self::Residuals => "residuals",
            Self::Influence => "influence",
            Self::Quantiles => "quantiles",
        }
    }
}

impl State {
    /// Saves `view` at `out` (`.svg`, else PNG with `.png` added when missing) and says where.
    pub(crate) fn export_view_to(&mut self, view: ChartView, out: &Path) {
        match self.export_view(view, out) {
            Ok(path) => self.say(format!(
                "saved the {} view to {}",
                view.stem(),
                path.display()
            )),
            Err(e) => self.fail(e.to_string()),
        }
    }

    fn export_view(&self, view: ChartView, out: &Path) -> Result<PathBuf, WorkbenchError> {
        let no = |why: &str| WorkbenchError::Report(why.to_string());
        let pair = self
            .bench
            .pair()
            .ok_or_else(|| no("open a pair on the bench first"))?;
        let d = self
            .bench
            .diagnostics()
            .ok_or_else(|| no("the view is still being computed; try again in a moment"))?;
        let chart = chart_of(view, pair, self.marks(), d).map_err(|e| no(&e.to_string()))?;
        let svg = out
            .extension()
            .is_some_and(|e| e.eq_ignore_ascii_case("svg"));
        let path = if svg
            || out
                .extension()
                .is_some_and(|e| e.eq_ignore_ascii_case("png"))
        {
            out.to_path_buf()
        } else {
            out.with_extension("png")
        };
        let bytes = if svg {
            chart.svg.into_bytes()
        } else {
            chart.png
        };
        plumb_report::write_atomically(&path, &bytes)
            .map_err(|e| no(&format!("{}: {e}", path.display())))?;
        Ok(path)
    }
}

/// The chart of `view` from the pair, the marks and the diagnostics on screen.
///
/// # Errors
/// The chart could not be drawn.
pub fn chart_of(
    view: ChartView,
    pair: &PairRows,
    marks: &Marks,
    d: &Diagnostics,
) -> plumb_report::Result<Chart> {
    let spec = &pair.spec;
    let title = |what: &str| format!("{what} — {} against {}", spec.y, spec.x0());
    match view {
        ChartView::Scatter => {
            let dots = (0..pair.rows.len())
                .map(|i| {
                    let (x, y) = pair.point(i, marks);
                    Dot {
                        x,
                        y,
                        excluded: pair.is_excluded(i, marks),
                    }
                })
                .collect();
            let curve = d
                .extras
                .as_ref()
                .map(|e| plumb_report::charts::band_rows(e.bands()))
                .unwrap_or_default();
            let data = PairChart {
                x_label: spec.x0(),
                y_label: &spec.y,
                dots,
                curve,
                lines: Vec::new(),
            };
            pair_chart(&data, title("the rows and the fit"))
        }
        ChartView::Residuals => {
            let v = &d.views;
            let dots: Vec<Dot> = v
                .residual
                .points
                .iter()
                .map(|&(x, y)| Dot {
                    x,
                    y,
                    excluded: false,
                })
                .chain(v.excluded_residuals.points.iter().map(|&(x, y)| Dot {
                    x,
                    y,
                    excluded: true,
                }))
                .collect();
            let x_label = v.residual_axis.label();
            residual_chart(
                &dots,
                &x_label,
                title(&format!("residuals against {x_label}")),
            )
        }
        ChartView::Influence => {
            let v = &d.views;
            let dots: Vec<PullDot> = v
                .leverage
                .points
                .iter()
                .zip(&v.pull.class)
                .map(|(&(h, t), &pull)| PullDot {
                    leverage: h,
                    studentized: t,
                    pull,
                })
                .collect();
            pull_chart(
                &dots,
                v.pull.strong_from,
                title("how much each row pulls the fit"),
            )
        }
        ChartView::Quantiles => quantile_chart(
            &d.views.quantile.points,
            title("residuals against a normal sample"),
        ),
    }
}
