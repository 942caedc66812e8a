//! The model behind the one-pass view: a delimited file too large to load (or opened this way
//! on purpose) is read in pieces on a worker thread and never held whole. Pass 1 gathers the
//! co-moments of the pair (the line, r, ranges); pass 2 bins the points into a density image
//! over those ranges (and, when the line explains nearly everything, sums the squared
//! residuals). Rows cannot be excluded here.

use std::ops::ControlFlow;
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicBool, AtomicU64, Ordering};
use std::sync::Arc;

use plumb_core::moments::CoMoments;
use plumb_core::regression::{
    line_from_moments, residual_sum_of_squares, LineSummary, RESIDUAL_PASS_BELOW,
};
use plumb_data::{stream_columns, StreamOptions, StreamSummary};
use plumb_report::text::num;

use super::jobs::{Job, Waker};
use super::sample_draw::{Drawn, SampleDraw};
use crate::density::{Bounds, Density};

/// Cells across (and down) the density image.
pub const PASS_CELLS: usize = 512;

/// What the two passes found.
#[derive(Debug, Clone)]
pub struct PassOutcome {
    /// The least-squares line of y on x with its inference.
    pub line: LineSummary,
    /// Rows read, used and dropped.
    pub summary: StreamSummary,
    /// Counts of points per cell over the ranges of x and y.
    pub density: Density,
}

/// The view's state.
pub struct OnePass {
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
    job: Option<Job<Result<PassOutcome, String>>>,
    /// The last finished result.
    pub outcome: Option<PassOutcome>,
    /// Why the last pass failed.
    pub error: Option<String>,
    /// Counts finished results (keys the view's density image).
    pub generation: u64,
    /// A sample of the file being drawn for the pair bench.
    sample: Option<SampleDraw>,
}

impl OnePass {
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
            generation: 0,
            sample: None,
        })
    }

    /// Starts both passes for the chosen pair on a worker (replacing a running one).
    pub fn start(&mut self, waker: &Waker) {
        if let Some(j) = &self.job {
            j.cancel();
        }
        self.error = None;
        let (path, x, y) = (self.path.clone(), self.x.clone(), self.y.clone());
        let progress = Arc::clone(&self.progress);
        self.job = Some(Job::spawn(
            move |cancel| two_passes(&path, &x, &y, &progress, cancel),
            waker.hook(),
        ));
    }

    /// Whether a pass is running or a sample is being drawn.
    pub fn is_busy(&self) -> bool {
        self.job.is_some() || self.sample.is_some()
    }

    /// Starts drawing a sample of the file for the bench, with the view's pair (replacing a
    /// draw in progress).
    pub fn sample_with(&mut self, waker: &Waker) {
        if let Some(old) = self.sample.take() {
            old.cancel();
        }
        let pair = (self.y.clone(), self.x.clone());
        self.sample = Some(SampleDraw::start(&self.path, pair, waker));
    }

    /// The sample being drawn.
    pub fn sampling(&self) -> Option<&SampleDraw> {
        self.sample.as_ref()
    }

    /// A finished sample draw, with the pair to open it with.
    pub fn poll_sample(&mut self) -> Option<(Drawn, (String, String))> {
        let done = self.sample.as_mut()?.poll()?;
        self.sample.take().map(|s| (done, s.pair))
    }

    /// Bytes read by the running pass, and which pass it is (1 or 2).
    pub fn progress(&self) -> (u64, u64) {
        (
            self.progress.0.load(Ordering::Relaxed),
            self.progress.1.load(Ordering::Relaxed),
        )
    }

    /// Chooses another pair (the passes start again with [`OnePass::start`]).
    pub fn choose(&mut self, y: String, x: String) {
        self.y = y;
        self.x = x;
    }

    /// Stops the running pass (its result is dropped) and a sample being drawn.
    pub fn cancel(&mut self) {
        if let Some(j) = self.job.take() {
            j.cancel();
        }
        if let Some(s) = self.sample.take() {
            s.cancel();
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

    fn take(&mut self, result: Result<PassOutcome, String>) -> String {
        let elapsed = self.job.take().map(|j| j.elapsed().as_secs_f64());
        match result {
            Ok(o) => {
                let line = format!(
                    "read {} in two passes: {} rows, {} used, in {} s",
                    self.path.display(),
                    plumb_report::text::count(o.summary.rows),
                    plumb_report::text::count(o.line.n as usize),
                    plumb_report::text::fixed(elapsed.unwrap_or(0.0), 1)
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
fn two_passes(
    path: &Path,
    x: &str,
    y: &str,
    progress: &(AtomicU64, AtomicU64),
    cancel: &AtomicBool,
) -> Result<PassOutcome, String> {
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
    let mut density = Density::empty(bounds, PASS_CELLS, PASS_CELLS);
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
    Ok(PassOutcome {
        line,
        summary,
        density,
    })
}
