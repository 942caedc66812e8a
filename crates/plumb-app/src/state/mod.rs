//! Everything the workbench knows, apart from how it is drawn: the file and its session, the
//! analyst's marks with their history, the pair on the bench with its live fit and
//! diagnostics, the co-movement map, the one-pass view, the status line and the open question.
//!
//! Panels read this state and return actions; only the workbench's `apply` changes it
//! (besides [`State::poll`], which picks up the results of background jobs).

mod bench;
pub mod case_figures;
pub mod cloud;
pub mod column_facts;
pub mod dataset;
pub mod diagnostics;
mod document;
mod edits;
pub mod export;
mod files;
pub mod jobs;
pub mod lab_views;
pub mod map;
pub mod marks;
pub mod one_pass;
pub mod pair;
pub mod reading;
pub mod roles;
pub mod sample_draw;
pub mod sessions;
pub mod settings;
pub mod views;

use std::path::PathBuf;

use plumb_report::Session;

pub use bench::{BenchModel, Prompt};
pub use document::{AfterLoad, DialogPurpose, Document, Loaded, Loading};

use jobs::Waker;
use map::MapModel;
use marks::{History, Marks};
use one_pass::OnePass;

/// The screens.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Screen {
    /// Open a file; the column summary.
    Columns,
    /// The co-movement map of every numeric pair.
    Map,
    /// One pair: scatter, residuals, leverage, quantiles, numbers and the exclusion ledger.
    Bench,
    /// A file too large to load, read in passes: the line and a density image.
    OnePass,
}

/// A message on the status line.
#[derive(Debug, Clone, PartialEq)]
pub struct Status {
    /// The text.
    pub text: String,
    /// Whether it reports a failure.
    pub error: bool,
}

/// A question the analyst must answer before the workbench goes on.
#[derive(Debug, Clone)]
pub enum Ask {
    /// A previous run left unsaved work.
    Recover(Box<Session>),
    /// A data file would not fit in memory; it can be read in one pass instead.
    TooLarge {
        /// The file.
        path: PathBuf,
        /// The loader's message, with the sizes.
        message: String,
    },
    /// A session names a data file outside its own folder.
    OutsidePath {
        /// The session file.
        session: PathBuf,
        /// The data file it names.
        data: PathBuf,
    },
}

/// The workbench's state.
pub struct State {
    pub(crate) screen: Screen,
    pub(crate) doc: Document,
    pub(crate) history: History,
    pub(crate) bench: BenchModel,
    pub(crate) map: MapModel,
    pub(crate) one_pass: Option<OnePass>,
    /// The ID column (the other roles live where they act: the colouring, the check order).
    pub(crate) roles: roles::Roles,
    pub(crate) status: Option<Status>,
    pub(crate) ask: Option<Ask>,
    /// Wakes the frame loop when a background job finishes.
    pub(crate) waker: Waker,
}

impl State {
    /// Nothing open, settings kept in `config` (`None`: nowhere); a recovery copy left there
    /// by an earlier run becomes the first question.
    pub fn new(config: Option<PathBuf>) -> Self {
        let ask = config
            .as_deref()
            .and_then(sessions::read_recovery)
            .and_then(Result::ok)
            .filter(|s| !s.exclusions.is_empty())
            .map(|s| Ask::Recover(Box::new(s)));
        Self {
            screen: Screen::Columns,
            doc: Document::new(config),
            history: History::default(),
            bench: BenchModel::default(),
            map: MapModel::default(),
            one_pass: None,
            roles: roles::Roles::default(),
            status: None,
            ask,
            waker: Waker::default(),
        }
    }

    /// The screen shown.
    pub fn screen(&self) -> Screen {
        self.screen
    }

    /// The file on the workbench.
    pub fn loaded(&self) -> Option<&Loaded> {
        self.doc.loaded.as_ref()
    }

    /// Whether a file is being read.
    pub fn is_loading(&self) -> bool {
        self.doc.loading.is_some()
    }

    /// The analyst's marks.
    pub fn marks(&self) -> &Marks {
        self.history.current()
    }

    /// The status line.
    pub fn status(&self) -> Option<&Status> {
        self.status.as_ref()
    }

    /// The pending question, if any.
    pub fn ask(&self) -> Option<&Ask> {
        self.ask.as_ref()
    }

    /// The bench (pair, live fit, diagnostics, the reason prompt).
    pub fn bench(&self) -> &BenchModel {
        &self.bench
    }

    /// The co-movement map.
    pub fn map(&self) -> &MapModel {
        &self.map
    }

    /// The one-pass view, if a file is open in it.
    pub fn one_pass(&self) -> Option<&OnePass> {
        self.one_pass.as_ref()
    }

    /// Whether there is a change to undo.
    pub fn can_undo(&self) -> bool {
        self.history.can_undo()
    }

    /// Whether there is an undone change to redo.
    pub fn can_redo(&self) -> bool {
        self.history.can_redo()
    }

    /// Whether the marks differ from the last saved session.
    pub fn has_unsaved_changes(&self) -> bool {
        self.doc.is_unsaved(self.marks())
    }

    /// Whether background work (loading, a file dialog, diagnostics, the map, the one-pass
    /// view) is still running.
    pub fn is_busy(&self) -> bool {
        self.doc.loading.is_some()
            || self.bench.is_busy()
            || self.map.is_busy()
            || self.one_pass.as_ref().is_some_and(OnePass::is_busy)
    }

    /// The window title: file name and an unsaved-changes mark.
    pub fn window_title(&self) -> String {
        let mut t = String::from("Plumbline");
        if let Some(l) = &self.doc.loaded {
            t.push_str(" — ");
            t.push_str(&l.dataset.file_name());
            if self.has_unsaved_changes() {
                t.push_str(" • unsaved");
            }
        }
        t
    }

    pub(crate) fn say(&mut self, text: impl Into<String>) {
        self.status = Some(Status {
            text: text.into(),
            error: false,
        });
    }

    pub(crate) fn fail(&mut self, text: impl Into<String>) {
        self.status = Some(Status {
            text: text.into(),
            error: true,
        });
    }

    /// Picks up what background jobs finished (a load, the one-pass passes, diagnostics, the
    /// map) and starts the jobs the current state needs; returns the file a finished file
    /// dialog picked, and what for (the workbench turns it into an action). The frame loop
    /// calls this every frame; programs without a window call it themselves.
    pub fn poll(&mut self) -> Option<(DialogPurpose, PathBuf)> {
        if let Some((result, loading)) = self.doc.poll_load() {
            self.finish_load(result, loading);
        }
        if let Some(line) = self.one_pass.as_mut().and_then(OnePass::poll) {
            self.say(line);
        }
        if let Some((done, pair)) = self.one_pass.as_mut().and_then(OnePass::poll_sample) {
            self.take_sample(done, pair);
        }
        let marks = self.history.current().clone();
        if let Some(loaded) = &self.doc.loaded {
            let failure = self.bench.poll(&loaded.dataset, &marks, &self.waker);
            self.map.poll(&loaded.dataset, &self.waker);
            if let Some(e) = failure {
                self.fail(e);
            }
        }
        self.doc.poll_dialog()
    }
}
