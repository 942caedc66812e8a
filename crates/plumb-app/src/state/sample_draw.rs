//! A seeded random sample of the one-pass view's file, drawn on a worker in one pass and
//! opened on the pair bench as an ordinary table labelled as a sample.

use std::ops::ControlFlow;
use std::path::Path;
use std::sync::atomic::{AtomicBool, AtomicU64, Ordering};
use std::sync::Arc;

use plumb_data::{sample_rows, RowSample, StreamOptions};

use super::dataset::Dataset;
use super::jobs::{Job, Waker};
use super::pair::FitSpec;
use super::{AfterLoad, Loaded, Screen, State};

/// Rows drawn (all of them when the file has fewer).
pub const SAMPLE_ROWS: usize = 50_000;

/// The generator's seed: fixed, so the same file gives the same sample on every machine.
pub const SAMPLE_SEED: u64 = 1;

/// What a finished draw gives: the sample (`None`: stopped) or why it failed.
pub type Drawn = Result<Option<RowSample>, String>;

/// A sample being drawn.
pub struct SampleDraw {
    /// Response and predictor to open it with.
    pub pair: (String, String),
    /// Bytes read so far.
    read: Arc<AtomicU64>,
    job: Job<Drawn>,
}

impl SampleDraw {
    /// Starts drawing [`SAMPLE_ROWS`] rows of `path` with [`SAMPLE_SEED`].
    pub fn start(path: &Path, pair: (String, String), waker: &Waker) -> Self {
        let read = Arc::new(AtomicU64::new(0));
        let (path, shared) = (path.to_path_buf(), Arc::clone(&read));
        let job = Job::spawn(
            move |cancel: &AtomicBool| {
                sample_rows(
                    &path,
                    SAMPLE_ROWS,
                    SAMPLE_SEED,
                    &StreamOptions::default(),
                    |bytes| {
                        shared.store(bytes, Ordering::Relaxed);
                        if cancel.load(Ordering::Relaxed) {
                            ControlFlow::Break(())
                        } else {
                            ControlFlow::Continue(())
                        }
                    },
                )
                .map_err(|e| e.to_string())
            },
            waker.hook(),
        );
        Self { pair, read, job }
    }

    /// Bytes of the file read so far.
    pub fn bytes_read(&self) -> u64 {
        self.read.load(Ordering::Relaxed)
    }

    /// Stops drawing.
    pub fn cancel(&self) {
        self.job.cancel();
    }

    /// The finished draw (`Ok(None)`: stopped).
    pub fn poll(&mut self) -> Option<Drawn> {
        self.job.poll()
    }
}

impl State {
    /// Starts drawing a sample of the one-pass view's file for its pair.
    pub(crate) fn draw_sample(&mut self) {
        let Some(view) = &mut self.one_pass else {
            return self.fail("open a large file in the one-pass view first");
        };
        view.sample_with(&self.waker);
        let line = format!(
            "drawing a random sample of {} rows of {} (seed {SAMPLE_SEED})…",
            plumb_report::text::count(SAMPLE_ROWS),
            view.path.display()
        );
        self.say(line);
    }

    /// Opens a finished sample on the bench with the one-pass view's pair.
    pub(crate) fn take_sample(&mut self, done: Drawn, pair: (String, String)) {
        let sample = match done {
            Ok(Some(s)) => s,
            Ok(None) => return self.say("stopped drawing the sample"),
            Err(e) => return self.fail(e),
        };
        let dataset = Dataset::from_sample(sample, plumb_data::LoadOptions::default());
        let name = dataset.file_name();
        let loaded = Loaded {
            sha256: dataset.table.sha256().to_string(),
            dataset,
        };
        let (y, x) = pair;
        self.install(
            loaded,
            AfterLoad {
                pair: Some(FitSpec::line(&y, &x)),
                ..AfterLoad::default()
            },
        );
        self.screen = Screen::Bench;
        self.say(format!("opened {name} on the pair bench"));
    }

    /// Why the session and the summary cannot be written now (`None`: they can, or there is
    /// simply no file yet).
    pub fn why_no_session(&self) -> Option<String> {
        match self.loaded() {
            Some(l) if l.dataset.sample.is_some() => Some(format!(
                "The bench holds a random sample of {} (seed {}), not the file: a session or a summary would not reproduce it from the file. Open the whole file, or a smaller file of the rows you need, to save the work.",
                l.dataset.path().display(),
                l.dataset.sample.as_ref().map_or(0, |s| s.seed)
            )),
            None if self.one_pass.is_some() => Some(
                "The one-pass view holds no rows to save: its numbers are recomputed from the file by reading it again. To exclude rows and write a summary, draw a sample onto the pair bench (a sample's work cannot be saved either) or open a smaller file."
                    .into(),
            ),
            _ => None,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_sample_opens_on_the_bench_labelled_and_cannot_be_saved() {
        let dir = tempfile::tempdir().expect("dir");
        let path = dir.path().join("log.csv");
        let mut text = String::from("tag,t,a\n");
        for i in 0..(SAMPLE_ROWS + 5_000) {
            text.push_str(&format!("s{i},{i},{}\n", (i % 97) as f64 * 0.5));
        }
        std::fs::write(&path, &text).expect("write");
        let before = std::fs::read(&path).expect("read");
        let mut state = State::new(None);
        state.open_one_pass(&path, Some(("a".into(), "t".into())));
        state.draw_sample();
        let start = std::time::Instant::now();
        while state.loaded().is_none() {
            assert!(start.elapsed().as_secs() < 120, "no sample");
            state.poll();
            std::thread::sleep(std::time::Duration::from_millis(5));
        }
        let d = &state.loaded().expect("loaded").dataset;
        assert_eq!(d.table.n_rows(), SAMPLE_ROWS);
        assert!(
            d.file_name()
                .contains("random sample of 50,000 of 55,000 rows, seed 1"),
            "{}",
            d.file_name()
        );
        assert!(state.window_title().contains("random sample"));
        assert_eq!(state.screen(), Screen::Bench);
        assert!(state.why_no_session().is_some());
        // The rows are named by their ID cell (the suggested `tag`), which is the file's row.
        let first = state.row_name(1).expect("named");
        let file_row = d.sample.as_ref().expect("sample").file_rows[0];
        assert_eq!(first, format!("s{}", file_row - 1));
        assert_eq!(
            std::fs::read(&path).expect("read"),
            before,
            "the file is never written"
        );
    }
}
