//! Opening, saving and exporting: what the state does when the analyst opens a file or a
//! session, saves, writes the colleague summary, or restores the recovery copy; and the
//! recovery copy written after every committed change.

use std::path::{Path, PathBuf};

use plumb_report::report::{build, write, ReportInput};
use plumb_report::Session;

use super::marks::History;
use super::pair::FitSpec;
use super::sessions::{
    clear_recovery, data_is_beside, kept_of, marks_of, reading_of, recovery_of, recovery_path,
    session_of, spec_of, write_recovery,
};
use super::{AfterLoad, Ask, BenchModel, DialogPurpose, Loaded, Loading, Screen, State};
use crate::error::WorkbenchError;

impl State {
    /// Opens a data file or a session (by extension) in the background; a delimited file too
    /// large to load becomes a question (read it in one pass?).
    pub(crate) fn open_path(&mut self, path: &Path) {
        if path.extension().is_some_and(|e| e == "plumb") {
            return self.open_session(path, false);
        }
        let options = self.doc.load_options();
        match plumb_data::fits_in_memory(path, &options) {
            Err(e @ plumb_data::DataError::TooLarge { .. }) => {
                if plumb_data::is_delimited_text(path) {
                    self.ask = Some(Ask::TooLarge {
                        path: path.to_path_buf(),
                        message: e.to_string(),
                    });
                } else {
                    self.fail(e.to_string());
                }
            }
            _ => self.start_load(path, options, AfterLoad::default()),
        }
    }

    /// Opens a session; a data path outside the session's folder needs `allow_outside` (the
    /// analyst is asked first).
    pub(crate) fn open_session(&mut self, path: &Path, allow_outside: bool) {
        let session = match Session::load(path) {
            Ok(s) => s,
            Err(e) => return self.fail(e.to_string()),
        };
        let data = session.data_path(path);
        if !data.exists() {
            return self.fail(format!(
                "{}: the session's data file {} does not exist; put the file back, or open the data file and redo the exclusions",
                path.display(),
                data.display()
            ));
        }
        if !allow_outside && !data_is_beside(path, &data) {
            self.ask = Some(Ask::OutsidePath {
                session: path.to_path_buf(),
                data,
            });
            return;
        }
        let then = AfterLoad {
            pair: spec_of(&session),
            kept: kept_of(&session),
            marks: Some(marks_of(&session)),
            session: Some(path.to_path_buf()),
            restoring: false,
            reading: Some(reading_of(&session)),
            roles: Some(session.roles()),
        };
        self.start_load(&data, session.data.load.to_options(), then);
    }

    /// Reads the open file again with another decimal mark or encoding; the model,
    /// exclusions, reasons and reading stay, and the work counts as unsaved (the session
    /// records how the file is read).
    pub(crate) fn read_as(
        &mut self,
        decimal: Option<plumb_data::DecimalMark>,
        encoding: Option<plumb_data::TextEncoding>,
    ) {
        let Some(loaded) = &self.doc.loaded else {
            return self.fail("open a data file first");
        };
        if loaded.dataset.sample.is_some() {
            // Its rows are a sample's: read again, the file would be loaded whole and the
            // exclusions would land on other rows.
            return self.fail(
                "a sample is read as the one-pass view read its file; to read the file another way, open it again from the columns screen",
            );
        }
        let path = loaded.dataset.path();
        let options = plumb_data::LoadOptions {
            decimal,
            encoding,
            ..loaded.dataset.options.clone()
        };
        let then = AfterLoad {
            pair: self.bench.spec().cloned(),
            kept: self.bench.kept().cloned(),
            marks: Some(self.marks().clone()),
            session: self.doc.session_path.clone(),
            restoring: true,
            reading: Some(self.bench.reading().clone()),
            roles: Some(self.column_roles()),
        };
        self.start_load(&path, options, then);
    }

    fn start_load(&mut self, path: &Path, options: plumb_data::LoadOptions, then: AfterLoad) {
        self.doc.start_load(path, options, then, &self.waker);
        self.say(format!("reading {}…", path.display()));
    }

    /// Abandons the load in progress.
    pub(crate) fn cancel_load(&mut self) {
        if let Some(path) = self.doc.cancel_load() {
            self.say(format!("stopped reading {}", path.display()));
        }
    }

    /// Takes a finished load: installs the file, or reports why it could not be read.
    pub(crate) fn finish_load(&mut self, result: Result<Loaded, WorkbenchError>, l: Loading) {
        match (result, l.then.session) {
            (Ok(loaded), session) => self.install(loaded, AfterLoad { session, ..l.then }),
            (Err(e), Some(s)) => self.fail(format!(
                "{}: the session's data file cannot be used: {e}",
                s.display()
            )),
            (Err(e), None) => self.fail(e.to_string()),
        }
    }

    pub(crate) fn install(&mut self, loaded: Loaded, then: AfterLoad) {
        let path = loaded.dataset.path();
        // The recent list keeps absolute paths, so it works from any working directory.
        let remembered = then.session.as_deref().unwrap_or(&path);
        let remembered = std::fs::canonicalize(remembered).unwrap_or(remembered.to_path_buf());
        match self.doc.remember(&remembered) {
            Err(e) => self.fail(format!("the recent-files list could not be saved: {e}")),
            Ok(()) => self.say(format!(
                "opened {} ({} rows, {} columns)",
                path.display(),
                plumb_report::text::count(loaded.dataset.table.n_rows()),
                plumb_report::text::count(loaded.dataset.summaries.len())
            )),
        }
        self.map = super::map::MapModel::default();
        self.bench = BenchModel::default();
        self.history = History::new(then.marks.clone().unwrap_or_default());
        self.doc.saved =
            (then.session.is_some() && !then.restoring).then(|| self.history.current().clone());
        self.doc.session_path = then.session;
        let first_pair = then.pair.or_else(|| {
            let n = &loaded.dataset.numeric;
            (n.len() >= 2).then(|| FitSpec::line(&n[1], &n[0]))
        });
        self.doc.loaded = Some(loaded);
        self.screen = Screen::Columns;
        if let Some(reading) = then.reading {
            self.bench.set_reading(reading);
        }
        if let Some(spec) = first_pair {
            self.open_pair(spec);
            if then.marks.is_some() {
                self.bench.keep(then.kept);
                self.screen = Screen::Bench;
            }
        }
        self.start_roles(then.roles);
    }

    /// Opens a native file dialog (a save or export needs a file open first).
    pub(crate) fn pick_file(&mut self, purpose: DialogPurpose) {
        if purpose != DialogPurpose::Open && self.doc.loaded.is_none() {
            return self.fail("open a data file first");
        }
        if !self.doc.has_dialog() {
            self.doc.pick_file(purpose, &self.waker);
            self.say(
                "waiting for the file dialog (if none appears, type a path in the File field)",
            );
        }
    }

    /// Saves to the session file the work belongs to, or asks where.
    pub(crate) fn save_session(&mut self) {
        if let Some(why) = self.why_no_session() {
            return self.fail(why);
        }
        match self.doc.session_path.clone() {
            Some(p) => self.save_session_to(&p),
            None => self.pick_file(DialogPurpose::SaveSessionAs),
        }
    }

    fn current_session(&self, at: &Path) -> Option<Session> {
        let loaded = self.doc.loaded.as_ref()?;
        let spec = self.bench.spec();
        let mut session = session_of(
            &loaded.dataset,
            &loaded.sha256,
            [spec, self.bench.kept()],
            self.marks(),
            self.bench.reading(),
            at,
        );
        session.set_roles(&self.column_roles());
        Some(session)
    }

    /// Saves the session (atomically) at `path`; the data file is never written.
    pub(crate) fn save_session_to(&mut self, path: &Path) {
        if let Some(why) = self.why_no_session() {
            return self.fail(why);
        }
        let path = with_extension(path, "plumb");
        if self
            .doc
            .loaded
            .as_ref()
            .is_some_and(|l| l.dataset.path() == path)
        {
            return self
                .fail("refusing to save the session over the data file; choose another name");
        }
        let Some(session) = self.current_session(&path) else {
            return self.fail("open a data file first");
        };
        match session.save(&path) {
            Ok(()) => {
                self.doc.session_path = Some(path.clone());
                self.doc.saved = Some(self.marks().clone());
                if let Some(c) = &self.doc.config {
                    clear_recovery(c);
                }
                self.say(format!("saved {}", path.display()));
            }
            Err(e) => self.fail(e.to_string()),
        }
    }

    /// Writes the summary (HTML, charts, CSVs) at `out`, and the session it reproduces from.
    pub(crate) fn export_summary_to(&mut self, out: &Path) {
        let out = with_extension(out, "html");
        match self.export(&out) {
            Ok(msg) => self.say(msg),
            Err(e) => self.fail(e.to_string()),
        }
    }

    fn export(&mut self, out: &Path) -> Result<String, WorkbenchError> {
        if let Some(why) = self.why_no_session() {
            return Err(WorkbenchError::Report(why));
        }
        let (Some(loaded), Some(pair)) = (&self.doc.loaded, self.bench.pair()) else {
            return Err(WorkbenchError::Report(
                "open a pair on the bench first".into(),
            ));
        };
        let session_file = match &self.doc.session_path {
            Some(p) if !self.has_unsaved_changes() => p.clone(),
            _ => with_extension(out, "plumb"),
        };
        let mut session = session_of(
            &loaded.dataset,
            &loaded.sha256,
            [Some(&pair.spec), self.bench.kept()],
            self.marks(),
            self.bench.reading(),
            &session_file,
        );
        session.set_roles(&self.column_roles());
        let report = build(&ReportInput {
            table: &loaded.dataset.table,
            sha256: loaded.sha256.clone(),
            request: pair.spec.on_file_rows(self.marks()),
            exclusions: session.exclusions.clone(),
            reproduce: reproduce_command(&session_file, out, &loaded.dataset.path()),
            comparison: self.bench.kept().map(FitSpec::model),
            calibration: self.bench.reading().report_calibration(),
            agreement: self
                .bench
                .reading()
                .report_agreement(&pair.spec, self.marks()),
            order: self.bench.reading().order.clone(),
        })
        .map_err(|e| WorkbenchError::Report(e.to_string()))?;
        let data_path = loaded.dataset.path();
        let mut inputs = vec![plumb_report::guard::Input {
            path: &data_path,
            what: "the data file",
        }];
        if let Some(s) = &self.doc.session_path {
            inputs.push(plumb_report::guard::Input {
                path: s,
                what: "the session",
            });
        }
        let files =
            write(&report, out, &inputs).map_err(|e| WorkbenchError::Report(e.to_string()))?;
        if Some(&session_file) != self.doc.session_path.as_ref() || self.has_unsaved_changes() {
            self.save_session_to(&session_file);
        }
        let hypothetical = if self.marks().is_hypothetical() {
            " (what-if moves are not part of the summary: it is built from the data file)"
        } else {
            ""
        };
        Ok(format!(
            "wrote {} and {} more files{hypothetical}",
            out.display(),
            files.len().saturating_sub(1)
        ))
    }

    /// Writes the recovery copy of the current work (after every committed change).
    pub(crate) fn write_recovery(&mut self) {
        let Some(config) = self.doc.config.clone() else {
            return;
        };
        if self.why_no_session().is_some() {
            // A sample's rows are not the file's: a recovery copy would misplace the marks.
            return;
        }
        let Some(session) = self.current_session(&recovery_path(&config)) else {
            return;
        };
        if let Err(e) = write_recovery(&config, session, self.doc.session_path.as_deref()) {
            self.fail(format!("the recovery copy could not be written: {e}"));
        }
    }

    /// Restores the work a previous run left in the recovery copy (it stays unsaved until
    /// it is saved again).
    pub(crate) fn restore(&mut self, session: &Session) {
        let Some(config) = self.doc.config.clone() else {
            return;
        };
        let data = session.data_path(&recovery_path(&config));
        let then = AfterLoad {
            pair: spec_of(session),
            kept: kept_of(session),
            marks: Some(marks_of(session)),
            session: recovery_of(session),
            restoring: true,
            reading: Some(reading_of(session)),
            roles: Some(session.roles()),
        };
        self.start_load(&data, session.data.load.to_options(), then);
    }

    /// Deletes the recovery copy (the analyst discarded it, or closed with nothing unsaved).
    pub(crate) fn discard_recovery(&mut self) {
        if let Some(c) = &self.doc.config {
            clear_recovery(c);
        }
    }

    /// Opens `path` in the one-pass view (read in pieces, never held) for the pair (y, x), or
    /// the first two numeric columns, and starts reading it.
    pub(crate) fn open_one_pass(&mut self, path: &Path, pair: Option<(String, String)>) {
        match super::one_pass::OnePass::open(path, pair) {
            Ok(mut s) => {
                s.start(&self.waker);
                self.say(format!(
                    "reading {} in one pass ({} on {})",
                    path.display(),
                    s.y,
                    s.x
                ));
                self.one_pass = Some(s);
                self.screen = Screen::OnePass;
            }
            Err(e) => self.fail(e),
        }
    }
}

/// The command that rebuilds the summary at `out` from `session_file`.
fn reproduce_command(session_file: &Path, out: &Path, data: &Path) -> String {
    format!(
        "plumb report {} -o {}{}",
        plumb_report::text::shell_word(&session_file.display().to_string()),
        plumb_report::text::shell_word(&out.display().to_string()),
        if data_is_beside(session_file, data) {
            ""
        } else {
            " --allow-outside-data"
        }
    )
}

fn with_extension(path: &Path, ext: &str) -> PathBuf {
    if path.extension().is_some_and(|e| e == ext) {
        path.to_path_buf()
    } else {
        let mut p = path.as_os_str().to_owned();
        p.push(".");
        p.push(ext);
        PathBuf::from(p)
    }
}
