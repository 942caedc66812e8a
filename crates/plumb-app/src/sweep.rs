//! The one-pass view: a delimited file too large to load (or opened this way on purpose) is
//! read in pieces on a worker thread and never held whole. Pass 1 gathers the co-moments of
//! the pair (the line, r, ranges); pass 2 bins the points into a density image over those
//! ranges (and, when the line explains nearly everything, sums the squared residuals). The view
//! shows the image, the line and its numbers; rows cannot be excluded here.

use std::ops::ControlFlow;
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicBool, AtomicU64, Ordering};
use std::sync::Arc;

use eframe::egui::{self, Color32, RichText, Vec2};
use egui_plot::{Line, Plot, PlotImage, PlotPoint, PlotPoints};
use plumb_core::moments::CoMoments;
use plumb_core::regression::{
    line_from_moments, residual_sum_of_squares, LineSummary, RESIDUAL_PASS_BELOW,
};
use plumb_data::{stream_columns, StreamOptions, StreamSummary};
use plumb_report::text::{num, p};

use crate::density::{Bounds, Density};
use crate::jobs::Job;
use crate::palette;

/// Cells across (and down) the density image.
pub const SWEEP_CELLS: usize = 512;

/// What the two passes found.
#[derive(Debug, Clone)]
pub struct SweepOutcome {
    /// The least-squares line of y on x with its inference.
    pub line: LineSummary,
    /// Rows read, used and dropped.
    pub summary: StreamSummary,
    /// Counts of points per cell over the ranges of x and y.
    pub density: Density,
}

/// The view's state.
pub struct Sweep {
    /// The file.
    pub path: PathBuf,
    /// Its size in bytes.
    pub bytes: u64,
    /// Numeric columns seen in the file's first part.
    pub numeric: Vec<String>,
    /// Response column.
    pub y: String,
    /// Predictor column.
    pub x: String,
    /// Bytes read by the running pass, and which pass (1 or 2).
    progress: Arc<(AtomicU64, AtomicU64)>,
    job: Option<Job<Result<SweepOutcome, String>>>,
    /// The last finished result.
    pub outcome: Option<SweepOutcome>,
    /// Why the last pass failed.
    pub error: Option<String>,
    texture: Option<(u64, egui::TextureHandle)>,
    generation: u64,
}

impl Sweep {
    /// Looks at the first part of `path` for its numeric columns; `pair` is (y, x).
    ///
    /// # Errors
    /// The loader's message for that part of the file.
    pub fn open(path: &Path, pair: Option<(String, String)>) -> Result<Self, String> {
        let options = StreamOptions::default();
        let head = plumb_data::head(path, &options).map_err(|e| e.to_string())?;
        let numeric: Vec<String> = head
            .columns()
            .iter()
            .map(|c| c.summary())
            .filter(|s| s.kind == "numeric")
            .map(|s| s.name)
            .collect();
        if numeric.len() < 2 {
            return Err(format!(
                "{}: fewer than two numeric columns in the first part of the file",
                path.display()
            ));
        }
        let (y, x) = pair.unwrap_or_else(|| (numeric[1].clone(), numeric[0].clone()));
        for c in [&y, &x] {
            if !numeric.contains(c) {
                return Err(format!(
                    "{}: no numeric column named '{c}' (numeric columns: {})",
                    path.display(),
                    numeric.join(", ")
                ));
            }
        }
        let bytes = std::fs::metadata(path).map(|m| m.len()).unwrap_or(0);
        Ok(Self {
            path: path.to_path_buf(),
            bytes,
            numeric,
            y,
            x,
            progress: Arc::new((AtomicU64::new(0), AtomicU64::new(1))),
            job: None,
            outcome: None,
            error: None,
            texture: None,
            generation: 0,
        })
    }

    /// Starts both passes for the chosen pair on a worker (replacing a running one).
    pub fn start(&mut self, ctx: Option<egui::Context>) {
        if let Some(j) = &self.job {
            j.cancel();
        }
        self.error = None;
        let (path, x, y) = (self.path.clone(), self.x.clone(), self.y.clone());
        let progress = Arc::clone(&self.progress);
        self.job = Some(Job::spawn(
            move |cancel| sweep(&path, &x, &y, &progress, cancel),
            move || {
                if let Some(c) = &ctx {
                    c.request_repaint();
                }
            },
        ));
    }

    /// Whether a pass is running.
    pub fn is_busy(&self) -> bool {
        self.job.is_some()
    }

    /// Stops the running pass (its result is dropped).
    pub fn cancel(&mut self) {
        if let Some(j) = self.job.take() {
            j.cancel();
        }
    }

    /// Picks up a finished pass; returns a line for the status bar when one finished.
    pub fn poll(&mut self) -> Option<String> {
        let result = self.job.as_mut().and_then(Job::poll)?;
        Some(self.take(result))
    }

    /// Waits for the running pass (tests and the screenshot mode).
    pub fn settle(&mut self, limit: std::time::Duration) -> Option<String> {
        let result = self.job.as_mut().and_then(|j| j.wait(limit))?;
        Some(self.take(result))
    }

    fn take(&mut self, result: Result<SweepOutcome, String>) -> String {
        let elapsed = self.job.take().map(|j| j.elapsed().as_secs_f64());
        match result {
            Ok(o) => {
                let line = format!(
                    "read {} in two passes: {} rows, {} used, in {:.1} s",
                    self.path.display(),
                    o.summary.rows,
                    o.line.n,
                    elapsed.unwrap_or(0.0)
                );
                self.outcome = Some(o);
                self.generation += 1;
                line
            }
            Err(e) => {
                self.error = Some(e.clone());
                e
            }
        }
    }

    /// The headline line for tests: `R² = …`.
    pub fn r_squared_line(&self) -> Option<String> {
        self.outcome
            .as_ref()
            .map(|o| format!("R² = {}", num(o.line.r_squared)))
    }
}

/// The two passes (stopping early when `cancel` is set).
fn sweep(
    path: &Path,
    x: &str,
    y: &str,
    progress: &(AtomicU64, AtomicU64),
    cancel: &AtomicBool,
) -> Result<SweepOutcome, String> {
    let options = StreamOptions::default();
    let names = [x, y];
    let step = |piece: &plumb_data::Piece| {
        progress.0.store(piece.bytes_read, Ordering::Relaxed);
        if cancel.load(Ordering::Relaxed) {
            ControlFlow::Break(())
        } else {
            ControlFlow::Continue(())
        }
    };
    progress.1.store(1, Ordering::Relaxed);
    let mut moments = CoMoments::new(2);
    let summary = stream_columns(path, &names, &options, |piece| {
        moments.add(&[&piece.columns[0], &piece.columns[1]]);
        step(piece)
    })
    .map_err(|e| e.to_string())?;
    if summary.stopped {
        return Err("stopped".into());
    }
    let failed = |e: plumb_core::CoreError| format!("{}: {e}", path.display());
    let first = line_from_moments(&moments, 0.95, None).map_err(failed)?;
    let bounds = Bounds {
        x_min: first.x_range.0,
        x_max: first.x_range.1,
        y_min: first.y_range.0,
        y_max: first.y_range.1,
    }
    .widened();
    let mut density = Density::empty(bounds, SWEEP_CELLS, SWEEP_CELLS);
    let need_rss = 1.0 - first.r_squared < RESIDUAL_PASS_BELOW;
    let (a, b) = (first.intercept.estimate, first.slope.estimate);
    let mut rss = 0.0;
    progress.1.store(2, Ordering::Relaxed);
    let second = stream_columns(path, &names, &options, |piece| {
        let (xs, ys) = (&piece.columns[0], &piece.columns[1]);
        density.add(xs.iter().copied().zip(ys.iter().copied()));
        if need_rss {
            rss += residual_sum_of_squares(xs, ys, a, b);
        }
        step(piece)
    })
    .map_err(|e| e.to_string())?;
    if second.stopped {
        return Err("stopped".into());
    }
    let mut line = if need_rss {
        line_from_moments(&moments, 0.95, Some(rss)).map_err(failed)?
    } else {
        first
    };
    line.slope.term = x.to_string();
    Ok(SweepOutcome {
        line,
        summary,
        density,
    })
}

/// Draws the view.
pub fn show(sweep: &mut Sweep, ui: &mut egui::Ui, ctx: Option<egui::Context>) {
    ui.heading(format!(
        "One-pass view — {}",
        sweep
            .path
            .file_name()
            .map_or_else(String::new, |n| n.to_string_lossy().into_owned())
    ));
    ui.label(format!(
        "{:.0} MB read in pieces and never held in memory: the line and the density of the points come from two passes over the file. Rows cannot be excluded or inspected here; open an extract on the pair bench for that.",
        sweep.bytes as f64 / 1e6
    ));
    let mut restart = false;
    ui.horizontal(|ui| {
        for (label, value) in [("y:", &mut sweep.y), ("x:", &mut sweep.x)] {
            let l = ui.label(label);
            egui::ComboBox::from_id_salt(label)
                .selected_text(value.as_str())
                .show_ui(ui, |ui| {
                    for c in &sweep.numeric {
                        restart |= ui.selectable_value(value, c.clone(), c).changed();
                    }
                })
                .response
                .labelled_by(l.id);
        }
        if sweep.is_busy() {
            let pass = sweep.progress.1.load(Ordering::Relaxed);
            let read = sweep.progress.0.load(Ordering::Relaxed);
            let share = if sweep.bytes > 0 {
                read as f32 / sweep.bytes as f32
            } else {
                0.0
            };
            ui.add(
                egui::ProgressBar::new(share)
                    .desired_width(220.0)
                    .text(format!("pass {pass} of 2: {:.0} MB", read as f64 / 1e6)),
            );
            if ui
                .button("Stop")
                .on_hover_text("Stop reading the file")
                .clicked()
            {
                sweep.cancel();
            }
        } else if ui
            .button("Read again")
            .on_hover_text("Run both passes again")
            .clicked()
        {
            restart = true;
        }
    });
    if restart {
        sweep.start(ctx);
    }
    if let Some(e) = &sweep.error {
        ui.colored_label(ui.visuals().error_fg_color, e);
    }
    let Some(outcome) = sweep.outcome.clone() else {
        if !sweep.is_busy() && sweep.error.is_none() {
            ui.label("Choose y and x; the passes start at once.");
        }
        return;
    };
    let avail = ui.available_size();
    ui.horizontal_top(|ui| {
        let plot_size = Vec2::new((avail.x * 0.62).max(300.0), avail.y.max(300.0));
        draw_plot(sweep, &outcome, ui, plot_size);
        ui.vertical(|ui| numbers(&outcome, &sweep.y, &sweep.x, ui));
    });
}

fn draw_plot(sweep: &mut Sweep, o: &SweepOutcome, ui: &mut egui::Ui, size: Vec2) {
    let visuals = ui.visuals().clone();
    let d = &o.density;
    if sweep
        .texture
        .as_ref()
        .is_none_or(|(g, _)| *g != sweep.generation)
    {
        let scale = f64::from(d.max.max(1)).ln_1p();
        let pixels: Vec<Color32> = d
            .counts
            .iter()
            .map(|&c| palette::density((f64::from(c).ln_1p() / scale) as f32, &visuals))
            .collect();
        let image = egui::ColorImage::new([d.width, d.height], pixels);
        let texture = ui
            .ctx()
            .load_texture("sweep-density", image, egui::TextureOptions::NEAREST);
        sweep.texture = Some((sweep.generation, texture));
    }
    let b = d.bounds;
    let line = &o.line;
    let ends = [b.x_min, b.x_max].map(|x| [x, line.intercept.estimate + line.slope.estimate * x]);
    Plot::new("sweep-plot")
        .width(size.x)
        .height(size.y)
        .x_axis_label(sweep.x.clone())
        .y_axis_label(sweep.y.clone())
        .show_x(false)
        .show_y(false)
        .allow_double_click_reset(true)
        .show(ui, |pu| {
            if let Some((_, t)) = &sweep.texture {
                pu.image(PlotImage::new(
                    "density",
                    t.id(),
                    PlotPoint::new((b.x_min + b.x_max) / 2.0, (b.y_min + b.y_max) / 2.0),
                    Vec2::new((b.x_max - b.x_min) as f32, (b.y_max - b.y_min) as f32),
                ));
            }
            pu.line(
                Line::new("least-squares line", PlotPoints::from(ends.to_vec()))
                    .color(palette::fit(&visuals))
                    .width(2.0),
            );
        });
}

fn numbers(o: &SweepOutcome, y: &str, x: &str, ui: &mut egui::Ui) {
    let l = &o.line;
    let s = &o.summary;
    ui.label(RichText::new(format!("R² = {}", num(l.r_squared))).heading());
    ui.label(format!("adjusted R² {}", num(l.adj_r_squared)));
    ui.label(format!("Pearson r {}", num(l.r)));
    ui.label(format!(
        "residual SE = {} on {} df",
        num(l.residual_std_error),
        l.anova.df_residual
    ));
    ui.separator();
    egui::Grid::new("sweep-model").striped(true).show(ui, |ui| {
        for h in ["term", "estimate", "std. error", "p", "95% interval"] {
            ui.label(RichText::new(h).strong());
        }
        ui.end_row();
        for c in [&l.intercept, &l.slope] {
            ui.label(&c.term);
            ui.label(num(c.estimate));
            ui.label(num(c.std_error));
            ui.label(p(c.p_value));
            ui.label(format!("[{}, {}]", num(c.ci_low), num(c.ci_high)));
            ui.end_row();
        }
    });
    ui.separator();
    ui.label(format!(
        "{} rows used of {} in the file; {} left out for gaps",
        l.n, s.rows, s.dropped_count
    ));
    if !s.dropped.is_empty() {
        let rows: Vec<String> = s
            .dropped
            .iter()
            .take(8)
            .map(|d| format!("{} ({} {})", d.row, d.column, d.reason.as_str()))
            .collect();
        ui.weak(format!("first left out: {}", rows.join(", ")));
    }
    ui.label(format!(
        "{x} from {} to {}; {y} from {} to {}",
        num(l.x_range.0),
        num(l.x_range.1),
        num(l.y_range.0),
        num(l.y_range.1)
    ));
    if l.residual_pass {
        ui.weak("the residuals were summed in the second pass (the line explains nearly all)");
    }
    ui.add_space(8.0);
    ui.weak("Association is not causation. Follow your laboratory's validation protocol and local regulations.");
}
