//! The workbench window: state, the frame loop, shortcuts and the title bar.

use std::path::{Path, PathBuf};
use std::sync::Arc;

use eframe::egui::{self, Key, KeyboardShortcut, Modifiers};
use plumb_report::Session;

use crate::bench::Bench;
use crate::dataset::Dataset;
use crate::jobs::Job;
use crate::marks::{History, Marks};
use crate::overview::Overview;
use crate::pair::PairSpec;
use crate::settings::{config_dir, Recent};
use crate::WorkbenchError;

/// The three screens.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Screen {
    /// Open a file; the column summary.
    Columns,
    /// The co-movement map of every numeric pair.
    Overview,
    /// One pair: scatter, residuals, leverage, quantiles, numbers and the exclusion ledger.
    Bench,
    /// A file too large to load, read in passes: the line and a density image.
    Sweep,
}

/// A loaded file with its fingerprint.
#[derive(Debug, Clone)]
pub struct Loaded {
    /// The file.
    pub dataset: Dataset,
    /// SHA-256 of the file as read (recorded in sessions).
    pub sha256: String,
}

/// What to do once a load finishes.
#[derive(Debug, Clone, Default)]
pub struct AfterLoad {
    /// Open this pair on the bench.
    pub pair: Option<PairSpec>,
    /// Start from these marks.
    pub marks: Option<Marks>,
    /// The session file the work belongs to.
    pub session: Option<PathBuf>,
}

/// A load in progress.
pub struct Loading {
    /// The file being read.
    pub path: PathBuf,
    /// Its size in bytes, if known.
    pub bytes: Option<u64>,
    /// How far the reader has got.
    pub progress: Arc<plumb_data::Progress>,
    /// The reader.
    pub job: Job<Result<Loaded, WorkbenchError>>,
    /// What follows.
    pub then: AfterLoad,
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

/// The desktop workbench.
pub struct Workbench {
    pub(crate) screen: Screen,
    pub(crate) loaded: Option<Loaded>,
    pub(crate) loading: Option<Loading>,
    pub(crate) status: Option<Status>,
    pub(crate) path_field: String,
    pub(crate) recent: Recent,
    pub(crate) config: Option<PathBuf>,
    pub(crate) history: History,
    pub(crate) overview: Overview,
    pub(crate) bench: Bench,
    pub(crate) session_path: Option<PathBuf>,
    /// Marks as last saved to the session file (`None`: never saved).
    pub(crate) saved: Option<Marks>,
    pub(crate) ask: Option<Ask>,
    pub(crate) title: String,
    pub(crate) dialog: Option<Job<Option<(crate::files::DialogPurpose, PathBuf)>>>,
    /// The window's context, for waking the frame loop from background jobs.
    pub(crate) ctx: Option<egui::Context>,
    /// The load in progress restores a recovery copy (its work stays marked unsaved).
    pub(crate) restoring: bool,
    /// The one-pass view of a file too large to load.
    pub(crate) sweep: Option<crate::sweep::Sweep>,
    /// Most memory a load may take (`None`: what the system reports available).
    pub(crate) memory_limit: Option<u64>,
}

impl Default for Workbench {
    fn default() -> Self {
        Self::new(config_dir())
    }
}

impl Workbench {
    /// A workbench with no file open, keeping its settings in `config` (`None`: nowhere).
    pub fn new(config: Option<PathBuf>) -> Self {
        let recent = Recent::load(config.as_deref());
        let ask = config
            .as_deref()
            .and_then(crate::sessions::read_recovery)
            .and_then(Result::ok)
            .filter(|s| !s.exclusions.is_empty())
            .map(|s| Ask::Recover(Box::new(s)));
        Self {
            screen: Screen::Columns,
            loaded: None,
            loading: None,
            status: None,
            path_field: String::new(),
            recent,
            config,
            history: History::default(),
            overview: Overview::default(),
            bench: Bench::default(),
            session_path: None,
            saved: None,
            ask,
            title: String::new(),
            dialog: None,
            ctx: None,
            restoring: false,
            sweep: None,
            memory_limit: None,
        }
    }

    /// Gives the workbench the window's context before the first frame (so background jobs
    /// started from the command line can wake the window).
    pub fn set_context(&mut self, ctx: egui::Context) {
        self.ctx = Some(ctx);
    }

    /// The screen shown.
    pub fn screen(&self) -> Screen {
        self.screen
    }

    /// Switches screen.
    pub fn set_screen(&mut self, screen: Screen) {
        self.screen = screen;
    }

    /// The file on the workbench.
    pub fn loaded(&self) -> Option<&Loaded> {
        self.loaded.as_ref()
    }

    /// Whether a file is being read.
    pub fn is_loading(&self) -> bool {
        self.loading.is_some()
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

    /// The bench (pair, diagnostics, pointer mode).
    pub fn bench(&self) -> &Bench {
        &self.bench
    }

    /// Whether the marks differ from the last saved session.
    pub fn has_unsaved_changes(&self) -> bool {
        match &self.saved {
            Some(saved) => saved.excluded != self.marks().excluded,
            None => !self.marks().excluded.is_empty(),
        }
    }

    /// Whether background work (loading, diagnostics, the map) is still running.
    pub fn is_busy(&self) -> bool {
        self.loading.is_some()
            || self.bench.is_busy()
            || self.overview.is_busy()
            || self
                .sweep
                .as_ref()
                .is_some_and(crate::sweep::Sweep::is_busy)
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

    /// Replaces the marks, as one undo step (`commit`) or as a preview during a drag.
    pub(crate) fn set_marks(&mut self, next: Marks, commit: bool) {
        if commit {
            self.history.commit(next);
        } else {
            self.history.preview(next);
        }
        self.after_marks_changed(commit);
    }

    pub(crate) fn after_marks_changed(&mut self, persist: bool) {
        let marks = self.history.current().clone();
        self.bench.apply(&marks);
        if persist {
            self.write_recovery();
        }
    }

    /// Whether there is a change to undo.
    pub fn can_undo(&self) -> bool {
        self.history.can_undo()
    }

    /// Undoes the last change; false if there was none.
    pub fn undo(&mut self) -> bool {
        let done = self.history.undo();
        if done {
            self.after_marks_changed(true);
        }
        done
    }

    /// Redoes the last undone change; false if there was none.
    pub fn redo(&mut self) -> bool {
        let done = self.history.redo();
        if done {
            self.after_marks_changed(true);
        }
        done
    }

    /// Draws one frame of the whole workbench into `ui` (the window's root).
    pub fn show(&mut self, ui: &mut egui::Ui) {
        let ctx = ui.ctx().clone();
        if self.ctx.is_none() {
            self.ctx = Some(ctx.clone());
        }
        self.poll(&ctx);
        if self.is_busy() || self.dialog.is_some() {
            // Jobs wake the loop when they finish; this also covers jobs started before the
            // window existed.
            ctx.request_repaint_after(std::time::Duration::from_millis(100));
        }
        self.take_dropped_files(&ctx);
        self.shortcuts(&ctx);
        crate::chrome::top_bar(self, ui);
        crate::chrome::status_bar(self, ui);
        egui::CentralPanel::default().show(ui, |ui| match self.screen {
            Screen::Columns => crate::columns::show(self, ui),
            Screen::Overview => crate::overview::show(self, ui),
            Screen::Bench => crate::bench::show(self, ui),
            Screen::Sweep => match &mut self.sweep {
                Some(s) => crate::sweep::show(s, ui, self.ctx.clone()),
                None => {
                    ui.label("No file is open in the one-pass view.");
                }
            },
        });
        crate::ledger::reason_prompt(self, &ctx);
        crate::chrome::questions(self, &ctx);
        self.update_title(&ctx);
    }

    /// Picks up a finished load or file dialog (the frame loop calls this every frame; it is
    /// public for programs that drive the workbench without a window).
    pub fn poll_background(&mut self) {
        let finished = self.loading.as_mut().and_then(|l| l.job.poll());
        if let Some(result) = finished {
            let loading = self.loading.take();
            match (result, loading) {
                (Ok(loaded), Some(l)) => self.install(loaded, l.then),
                (
                    Err(e),
                    Some(Loading {
                        then:
                            AfterLoad {
                                session: Some(s), ..
                            },
                        ..
                    }),
                ) => {
                    self.fail(format!(
                        "{}: the session's data file cannot be used: {e}",
                        s.display()
                    ));
                }
                (Err(e), _) => self.fail(e.to_string()),
                (Ok(_), None) => {}
            }
        }
        if let Some(picked) = self.dialog.as_mut().and_then(Job::poll) {
            self.dialog = None;
            if let Some((purpose, path)) = picked {
                self.dialog_done(purpose, &path);
            }
        }
    }

    fn poll(&mut self, ctx: &egui::Context) {
        self.poll_background();
        if let Some(line) = self.sweep.as_mut().and_then(crate::sweep::Sweep::poll) {
            self.say(line);
        }
        let marks = self.history.current().clone();
        if let Some(loaded) = &self.loaded {
            self.bench.poll(&loaded.dataset, &marks, ctx);
            self.overview.poll(&loaded.dataset, ctx);
        }
    }

    fn install(&mut self, loaded: Loaded, then: AfterLoad) {
        let path = loaded.dataset.path();
        // The recent list keeps absolute paths, so it works from any working directory.
        let absolute = std::fs::canonicalize(&path).unwrap_or_else(|_| path.clone());
        let remembered = match &then.session {
            Some(s) => std::fs::canonicalize(s).unwrap_or_else(|_| s.clone()),
            None => absolute,
        };
        if let Err(e) = self.recent.remember(&remembered, self.config.as_deref()) {
            self.fail(format!("the recent-files list could not be saved: {e}"));
        } else {
            self.say(format!(
                "opened {} ({} rows, {} columns)",
                path.display(),
                loaded.dataset.table.n_rows(),
                loaded.dataset.summaries.len()
            ));
        }
        self.overview = Overview::default();
        self.bench = Bench::default();
        self.history = History::new(then.marks.clone().unwrap_or_default());
        let restored = std::mem::take(&mut self.restoring);
        self.saved = (then.session.is_some() && !restored).then(|| self.history.current().clone());
        self.session_path = then.session;
        let first_pair = then.pair.or_else(|| {
            let n = &loaded.dataset.numeric;
            (n.len() >= 2).then(|| PairSpec::line(&n[1], &n[0]))
        });
        self.loaded = Some(loaded);
        self.screen = Screen::Columns;
        if let Some(spec) = first_pair {
            let opened = self.open_pair(spec);
            if opened && then.marks.is_some() {
                self.screen = Screen::Bench;
            }
        }
    }

    /// Sets the scatter's overlays and the column colouring its points.
    pub fn set_overlays(&mut self, overlays: crate::derived::Overlays, colour_by: Option<String>) {
        self.bench.overlays = overlays;
        self.bench.group_by = colour_by;
        if let Some(l) = &self.loaded {
            self.bench.regroup(&l.dataset);
        }
        self.bench.touch();
    }

    /// Puts pair `spec` on the bench (keeping the marks). False, with a message, if the
    /// columns cannot be fitted.
    pub fn open_pair(&mut self, spec: PairSpec) -> bool {
        let Some(loaded) = &self.loaded else {
            return false;
        };
        let marks = self.history.current().clone();
        match self.bench.open(&loaded.dataset, spec, &marks) {
            Ok(()) => true,
            Err(e) => {
                self.fail(e.to_string());
                false
            }
        }
    }

    fn take_dropped_files(&mut self, ctx: &egui::Context) {
        let dropped: Vec<PathBuf> = ctx.input(|i| {
            i.raw
                .dropped_files
                .iter()
                .map(|f| f.path().to_path_buf())
                .filter(|p| !p.as_os_str().is_empty())
                .collect()
        });
        if let Some(path) = dropped.into_iter().next() {
            self.open_path(&path);
        }
    }

    fn shortcuts(&mut self, ctx: &egui::Context) {
        let command = |key| KeyboardShortcut::new(Modifiers::COMMAND, key);
        let shifted = |key| KeyboardShortcut::new(Modifiers::COMMAND | Modifiers::SHIFT, key);
        // Text fields keep their own undo; the workbench's applies when none has focus.
        let typing = ctx.memory(|m| m.focused().is_some());
        let pressed = |s: KeyboardShortcut| ctx.input_mut(|i| i.consume_shortcut(&s));
        if pressed(command(Key::O)) {
            self.pick_file(crate::files::DialogPurpose::Open);
        }
        if pressed(shifted(Key::S)) {
            self.pick_file(crate::files::DialogPurpose::SaveSessionAs);
        } else if pressed(command(Key::S)) {
            self.save_session_interactive();
        }
        if pressed(command(Key::E)) {
            self.pick_file(crate::files::DialogPurpose::ExportSummary);
        }
        if !typing {
            if pressed(shifted(Key::Z)) || pressed(command(Key::Y)) {
                self.redo();
            } else if pressed(command(Key::Z)) {
                self.undo();
            }
        }
    }

    /// The window title: file name and an unsaved-changes mark.
    pub fn window_title(&self) -> String {
        let mut t = String::from("Plumbline");
        if let Some(l) = &self.loaded {
            t.push_str(" — ");
            t.push_str(&l.dataset.file_name());
            if self.has_unsaved_changes() {
                t.push_str(" • unsaved");
            }
        }
        t
    }

    fn update_title(&mut self, ctx: &egui::Context) {
        let t = self.window_title();
        if t != self.title {
            ctx.send_viewport_cmd(egui::ViewportCommand::Title(t.clone()));
            self.title = t;
        }
    }

    /// Opens `path` in the one-pass view (read in pieces, never held) for the pair (y, x), or
    /// the first two numeric columns, and starts reading it.
    pub fn open_one_pass(&mut self, path: &Path, pair: Option<(String, String)>) {
        match crate::sweep::Sweep::open(path, pair) {
            Ok(mut s) => {
                s.start(self.ctx.clone());
                self.say(format!(
                    "reading {} in one pass ({} on {})",
                    path.display(),
                    s.y,
                    s.x
                ));
                self.sweep = Some(s);
                self.screen = Screen::Sweep;
            }
            Err(e) => self.fail(e),
        }
    }

    /// Caps the memory a load may take (bytes); a data file that would need more is offered
    /// the one-pass view instead. `None`: what the system reports available.
    pub fn set_memory_limit(&mut self, limit: Option<u64>) {
        self.memory_limit = limit;
    }

    /// The one-pass view, if a file is open in it.
    pub fn sweep(&self) -> Option<&crate::sweep::Sweep> {
        self.sweep.as_ref()
    }

    /// Waits for the one-pass view's reading to finish (tests and programs without a window).
    pub fn settle_sweep(&mut self, limit: std::time::Duration) {
        if let Some(line) = self.sweep.as_mut().and_then(|s| s.settle(limit)) {
            self.say(line);
        }
    }

    /// Opens a data file or a session (by extension) in the background.
    pub fn open_path(&mut self, path: &Path) {
        crate::files::open_path(self, path);
    }
}

impl eframe::App for Workbench {
    fn ui(&mut self, ui: &mut egui::Ui, _frame: &mut eframe::Frame) {
        self.show(ui);
    }

    fn on_exit(&mut self, _gl: Option<&eframe::glow::Context>) {
        if !self.has_unsaved_changes() {
            if let Some(c) = &self.config {
                crate::sessions::clear_recovery(c);
            }
        }
    }
}
