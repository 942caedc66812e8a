//! The model behind the pair bench: the pair with its live fit, the overlays and colouring
//! asked for, the diagnostics job and its latest result, and the rows waiting for a reason.

use std::sync::Arc;

use plumb_core::regression::BoxCox;

use super::dataset::Dataset;
use super::diagnostics::{compute, Diagnostics, Input, Overlays, ResidualAxis};
use super::jobs::{Job, Waker};
use super::marks::Marks;
use super::pair::{FitSpec, Pair};
use super::reading::Reading;
use crate::error::WorkbenchError;

/// Rows just excluded that wait for their reason.
#[derive(Debug, Clone, PartialEq)]
pub struct Prompt {
    /// Data rows.
    pub rows: Vec<usize>,
}

/// A text column colouring the points: its name, levels and each pair entry's level.
#[derive(Debug, Clone, Default)]
pub struct Colouring {
    /// The column (`None`: no colouring).
    pub column: Option<String>,
    /// Its levels, in order.
    pub levels: Vec<String>,
    /// Level of each pair entry (`None` where the cell is missing).
    pub of_entry: Option<Arc<[Option<usize>]>>,
}

/// A model being fitted on the worker.
struct Opening {
    spec: FitSpec,
    /// A new model (`false`: the same model refitted at the Box–Cox λ of the rows in use).
    fresh: bool,
    job: Job<Result<Pair, WorkbenchError>>,
}

/// State of the bench.
#[derive(Default)]
pub struct BenchModel {
    pair: Option<Pair>,
    opening: Option<Opening>,
    /// A model kept for comparison with the one on the bench (survives opening another).
    kept: Option<FitSpec>,
    overlays: Overlays,
    residual_axis: ResidualAxis,
    reading: Reading,
    colouring: Colouring,
    diag: Option<Arc<Diagnostics>>,
    job: Option<Job<Diagnostics>>,
    stale: bool,
    /// Changes with the marks (keys the scatter's density image).
    marks_generation: u64,
    /// Changes with each new set of diagnostics (keys the other views' density images).
    diag_generation: u64,
    /// Counts pairs opened (keys the views' zoom memory).
    serial: u64,
    pub(crate) prompt: Option<Prompt>,
}

impl BenchModel {
    /// The pair on the bench.
    pub fn pair(&self) -> Option<&Pair> {
        self.pair.as_ref()
    }

    /// The latest diagnostics (possibly for an earlier state while a newer one computes).
    pub fn diagnostics(&self) -> Option<&Arc<Diagnostics>> {
        self.diag.as_ref()
    }

    /// The live numbers of the pair on the bench.
    pub fn summary(&self) -> Option<Result<plumb_core::regression::LiveSummary, String>> {
        self.pair.as_ref().map(|p| match p.weight_error() {
            Some(e) => Err(e.to_string()),
            None => p.summary().clone().map_err(|e| e.to_string()),
        })
    }

    /// The model kept for comparison.
    pub fn kept(&self) -> Option<&FitSpec> {
        self.kept.as_ref()
    }

    /// Keeps `spec` (or nothing) for comparison with the model on the bench.
    pub fn keep(&mut self, spec: Option<FitSpec>) {
        if spec != self.kept {
            self.kept = spec;
            self.touch();
        }
    }

    /// What the residuals are drawn against.
    pub fn residual_axis(&self) -> &ResidualAxis {
        &self.residual_axis
    }

    /// Draws the residuals against `axis` (recomputing the diagnostics when it changed).
    pub fn set_residual_axis(&mut self, axis: ResidualAxis) {
        if axis != self.residual_axis {
            self.residual_axis = axis;
            self.touch();
        }
    }

    /// What the bench reads beside the fit.
    pub fn reading(&self) -> &Reading {
        &self.reading
    }

    /// Changes what the bench reads beside the fit (recomputing the diagnostics when it
    /// changed).
    pub fn set_reading(&mut self, reading: Reading) {
        if reading != self.reading {
            self.reading = reading;
            self.touch();
        }
    }

    /// The overlays asked for.
    pub fn overlays(&self) -> Overlays {
        self.overlays
    }

    /// The colouring of the points.
    pub fn colouring(&self) -> &Colouring {
        &self.colouring
    }

    /// Whether a model is being fitted, or diagnostics are being computed or are out of date.
    pub fn is_busy(&self) -> bool {
        self.opening.is_some() || self.job.is_some() || self.stale
    }

    /// The reason prompt, if open.
    pub fn prompt(&self) -> Option<&Prompt> {
        self.prompt.as_ref()
    }

    /// Counts the pairs opened (a new pair starts its views afresh).
    pub fn serial(&self) -> u64 {
        self.serial
    }

    /// Changes whenever the marks applied to the pair do.
    pub fn marks_generation(&self) -> u64 {
        self.marks_generation
    }

    /// Changes with every new set of diagnostics.
    pub fn diag_generation(&self) -> u64 {
        self.diag_generation
    }

    /// Starts putting `spec` on the bench: its rows are selected and fitted on a worker (on a
    /// large file that takes a moment; the pair on the bench stays until the new one is ready).
    /// A failure arrives from [`BenchModel::poll`].
    pub fn open(&mut self, data: &Dataset, spec: FitSpec, waker: &Waker) {
        let table = Arc::clone(&data.table);
        let wanted = spec.clone();
        self.start_opening(spec, true, waker, move || Pair::new(&table, wanted));
    }

    /// The model being opened, or the one on the bench (what the model's controls show).
    pub fn spec(&self) -> Option<&FitSpec> {
        self.opening
            .as_ref()
            .filter(|o| o.fresh)
            .map(|o| &o.spec)
            .or(self.pair.as_ref().map(|p| &p.spec))
    }

    /// Whether a model is being fitted on the worker.
    pub fn is_opening(&self) -> bool {
        self.opening.is_some()
    }

    fn start_opening(
        &mut self,
        spec: FitSpec,
        fresh: bool,
        waker: &Waker,
        build: impl FnOnce() -> Result<Pair, WorkbenchError> + Send + 'static,
    ) {
        if let Some(old) = self.opening.take() {
            old.job.cancel();
        }
        self.opening = Some(Opening {
            spec,
            fresh,
            job: Job::spawn(move |_| build(), waker.hook()),
        });
    }

    /// Installs a pair the worker built: a new model starts its views afresh; a refit of the
    /// same model (λ followed) keeps them.
    fn install(&mut self, data: &Dataset, mut pair: Pair, marks: &Marks, fresh: bool) {
        pair.apply(marks);
        let old_pair = self.pair.replace(pair);
        if !fresh {
            drop_aside((old_pair, None));
            return;
        }
        self.serial += 1;
        drop_aside((old_pair, self.diag.take()));
        // The diagnostics of the pair that was on the bench must not arrive for this one.
        if let Some(job) = self.job.take() {
            job.cancel();
        }
        let column = self.colouring.column.take();
        self.colour_by(data, column);
        self.touch();
    }

    /// Colours the points by `column` (a text column with few levels) or by nothing.
    pub fn colour_by(&mut self, data: &Dataset, column: Option<String>) {
        self.colouring = match (&self.pair, column) {
            (Some(pair), Some(name)) => Colouring {
                levels: data
                    .groups
                    .iter()
                    .find(|(n, _)| *n == name)
                    .map(|(_, l)| l.clone())
                    .unwrap_or_default(),
                of_entry: data
                    .group_of_rows(&name)
                    .map(|g| pair.rows.iter().map(|&r| g[r - 1]).collect()),
                column: Some(name),
            },
            (None, column) => Colouring {
                column,
                ..Colouring::default()
            },
            (_, None) => Colouring::default(),
        };
        self.touch();
    }

    /// Sets the overlays (and recomputes the diagnostics when they changed).
    pub fn set_overlays(&mut self, overlays: Overlays) {
        if overlays != self.overlays {
            self.overlays = overlays;
            self.touch();
        }
    }

    /// Marks the diagnostics out of date.
    fn touch(&mut self) {
        self.stale = true;
        self.marks_generation += 1;
    }

    /// Applies changed marks to the live fit (immediately) and queues the diagnostics.
    pub fn apply(&mut self, marks: &Marks) {
        if let Some(p) = &mut self.pair {
            let changed = p.differs(marks);
            p.apply(marks);
            if changed {
                self.touch();
            }
        }
    }

    /// Moves the live fit to the Box–Cox λ the diagnostics estimated on the rows in use (it is
    /// held while the analyst excludes or drags, and follows once the diagnostics are in): a
    /// refit of the same model on the worker.
    fn follow_lambda(&mut self, data: &Dataset, b: Option<BoxCox>, waker: &Waker) {
        let Some(b) = b else { return };
        let Some(pair) = self.pair.as_ref().filter(|p| p.lags_lambda(&b)) else {
            return;
        };
        let (table, spec) = (Arc::clone(&data.table), pair.spec.clone());
        let wanted = spec.clone();
        self.start_opening(spec, false, waker, move || {
            Pair::at_lambda(&table, wanted, b)
        });
    }

    /// Installs a model the worker fitted, picks up finished diagnostics and starts a new
    /// computation when needed. Returns why a model could not be opened.
    pub fn poll(&mut self, data: &Dataset, marks: &Marks, waker: &Waker) -> Option<String> {
        let mut failure = None;
        if let Some(done) = self.opening.as_mut().and_then(|o| o.job.poll()) {
            let fresh = self.opening.take().is_some_and(|o| o.fresh);
            match done {
                Ok(pair) => self.install(data, pair, marks, fresh),
                Err(e) => failure = Some(e.to_string()),
            }
        }
        if let Some(d) = self.job.as_mut().and_then(Job::poll) {
            self.job = None;
            if self.pair.as_ref().is_some_and(|p| p.spec == d.spec) {
                if self.opening.is_none() {
                    self.follow_lambda(data, d.boxcox, waker);
                }
                // The diagnostics replaced are freed off the UI thread too.
                drop_aside((None, self.diag.replace(Arc::new(d))));
                self.diag_generation += 1;
            }
        }
        if self.stale && self.job.is_none() {
            if let Some(pair) = &self.pair {
                self.stale = false;
                let mut input = Input::of(
                    &data.table,
                    pair,
                    marks,
                    self.overlays,
                    self.colouring.of_entry.clone(),
                );
                input.kept = self.kept.clone();
                input.residual_axis = self.residual_axis.clone();
                input.reading = self.reading.clone();
                self.job = Some(Job::spawn(move |_| compute(&input), waker.hook()));
            }
        }
        failure
    }
}

/// Frees a replaced pair and its diagnostics on a short-lived thread: at a million rows their
/// vectors take tens of milliseconds to give back, which would otherwise stall a frame.
fn drop_aside(old: (Option<Pair>, Option<Arc<Diagnostics>>)) {
    if old.0.is_some() || old.1.is_some() {
        std::thread::spawn(move || drop(old));
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn diagnostics_of_the_pair_that_was_on_the_bench_never_arrive_for_the_next() {
        let dir = tempfile::tempdir().expect("dir");
        let path = dir.path().join("d.csv");
        let mut text = String::from("t,a,b\n");
        for i in 0..400 {
            let t = f64::from(i);
            text.push_str(&format!(
                "{t},{},{}\n",
                50.0 + (t * 0.7).sin(),
                3.0 + 0.2 * t
            ));
        }
        std::fs::write(&path, text).expect("write");
        let data = Dataset::load(&path, &Default::default()).expect("load");
        let marks = Marks::default();
        let waker = Waker::default();
        let mut bench = BenchModel::default();
        bench.open(&data, FitSpec::line("a", "t"), &waker);
        while bench.pair().is_none() {
            assert_eq!(
                bench.poll(&data, &marks, &waker),
                None,
                "the first pair opens"
            );
        }
        bench.poll(&data, &marks, &waker);
        let second = FitSpec::line("b", "a");
        bench.open(&data, second.clone(), &waker);
        let start = std::time::Instant::now();
        while bench.diagnostics().is_none() {
            assert!(start.elapsed().as_secs() < 60, "no diagnostics");
            bench.poll(&data, &marks, &waker);
            std::thread::sleep(std::time::Duration::from_millis(2));
        }
        let d = bench.diagnostics().expect("diagnostics");
        assert_eq!(
            d.spec, second,
            "the first diagnostics shown are the new pair's"
        );
    }
}
