//! Opening, saving and exporting: background loads, native dialogs (on their own thread, so
//! the window keeps drawing), session files, the colleague summary and the recovery copy.

use std::path::{Path, PathBuf};

use plumb_report::report::{build, write, ReportInput};
use plumb_report::{file_sha256, Session};

use crate::app::{AfterLoad, Ask, Loaded, Loading, Workbench};
use crate::dataset::Dataset;
use crate::jobs::Job;
use crate::sessions::{
    clear_recovery, data_is_beside, marks_of, session_of, spec_of, write_recovery,
};
use crate::WorkbenchError;

/// What a file dialog was opened for.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum DialogPurpose {
    /// Open a data file or a session.
    Open,
    /// Save the session under a new name.
    SaveSessionAs,
    /// Write the colleague summary.
    ExportSummary,
}

/// File types the open dialog offers.
const DATA_EXTENSIONS: [&str; 10] = [
    "csv", "tsv", "txt", "parquet", "pq", "xlsx", "xlsm", "xls", "ods", "plumb",
];

/// Starts reading `path`: a `.plumb` session (its data file is opened, and its exclusions and
/// model restored) or a data file.
pub fn open_path(wb: &mut Workbench, path: &Path) {
    if path.extension().is_some_and(|e| e == "plumb") {
        open_session(wb, path, false);
    } else if let Err(e @ plumb_data::DataError::TooLarge { .. }) =
        plumb_data::fits_in_memory(path, &load_options(wb))
    {
        if plumb_data::is_delimited_text(path) {
            wb.ask = Some(Ask::TooLarge {
                path: path.to_path_buf(),
                message: e.to_string(),
            });
        } else {
            wb.fail(e.to_string());
        }
    } else {
        let options = load_options(wb);
        start_load(wb, path, options, AfterLoad::default());
    }
}

/// Default reading options under the workbench's memory cap.
fn load_options(wb: &Workbench) -> plumb_data::LoadOptions {
    plumb_data::LoadOptions {
        memory_limit: wb.memory_limit,
        ..plumb_data::LoadOptions::default()
    }
}

/// Opens a session; a data path outside the session's folder needs `allow_outside` (the
/// analyst is asked first).
pub fn open_session(wb: &mut Workbench, path: &Path, allow_outside: bool) {
    let session = match Session::load(path) {
        Ok(s) => s,
        Err(e) => return wb.fail(e.to_string()),
    };
    let data = session.data_path(path);
    if !data.exists() {
        return wb.fail(format!(
            "{}: the session's data file {} does not exist; put the file back, or open the data file and redo the exclusions",
            path.display(),
            data.display()
        ));
    }
    if !allow_outside && !data_is_beside(path, &data) {
        wb.ask = Some(Ask::OutsidePath {
            session: path.to_path_buf(),
            data,
        });
        return;
    }
    let then = AfterLoad {
        pair: spec_of(&session),
        marks: Some(marks_of(&session)),
        session: Some(path.to_path_buf()),
    };
    start_load(wb, &data, session.data.load.to_options(), then);
}

/// Reads `path` on a background thread; the result is installed by the frame loop.
pub fn start_load(
    wb: &mut Workbench,
    path: &Path,
    options: plumb_data::LoadOptions,
    then: AfterLoad,
) {
    if let Some(old) = wb.loading.take() {
        old.job.cancel();
    }
    let owned = path.to_path_buf();
    let notify = wb.repaint_hook();
    let progress = std::sync::Arc::new(plumb_data::Progress::default());
    let shared = std::sync::Arc::clone(&progress);
    let job = Job::spawn(
        move |_| {
            let dataset = Dataset::load_with_progress(&owned, &options, &shared)?;
            let sha256 = file_sha256(&owned).map_err(|e| WorkbenchError::Load(e.to_string()))?;
            Ok(Loaded { dataset, sha256 })
        },
        notify,
    );
    wb.loading = Some(Loading {
        path: path.to_path_buf(),
        bytes: std::fs::metadata(path).ok().map(|m| m.len()),
        progress,
        job,
        then,
    });
    wb.say(format!("reading {}…", path.display()));
}

impl Workbench {
    /// A closure that wakes the frame loop (set by the window; a no-op in tests).
    pub(crate) fn repaint_hook(&self) -> impl Fn() + Send + 'static {
        let ctx = self.ctx.clone();
        move || {
            if let Some(c) = &ctx {
                c.request_repaint();
            }
        }
    }

    /// Abandons the load in progress.
    pub fn cancel_load(&mut self) {
        if let Some(l) = self.loading.take() {
            l.job.cancel();
            self.say(format!("stopped reading {}", l.path.display()));
        }
    }

    /// Opens a native file dialog on its own thread.
    pub(crate) fn pick_file(&mut self, purpose: DialogPurpose) {
        if self.dialog.is_some() {
            return;
        }
        if purpose != DialogPurpose::Open && self.loaded.is_none() {
            return self.fail("open a data file first");
        }
        let folder = self
            .loaded
            .as_ref()
            .and_then(|l| l.dataset.path().parent().map(Path::to_path_buf));
        let stem = self.loaded.as_ref().map(|l| {
            l.dataset.path().file_stem().map_or_else(
                || "plumbline".to_string(),
                |s| s.to_string_lossy().into_owned(),
            )
        });
        let notify = self.repaint_hook();
        self.dialog = Some(Job::spawn(
            move |_| {
                let mut d = rfd::FileDialog::new();
                if let Some(f) = &folder {
                    d = d.set_directory(f);
                }
                let picked = match purpose {
                    DialogPurpose::Open => d
                        .add_filter("data or session", &DATA_EXTENSIONS)
                        .set_title("Open a data file or session")
                        .pick_file(),
                    DialogPurpose::SaveSessionAs => d
                        .add_filter("Plumbline session", &["plumb"])
                        .set_file_name(format!("{}.plumb", stem.unwrap_or_default()))
                        .set_title("Save the session")
                        .save_file(),
                    DialogPurpose::ExportSummary => d
                        .add_filter("HTML summary", &["html"])
                        .set_file_name(format!("{}-summary.html", stem.unwrap_or_default()))
                        .set_title("Write the summary for a colleague")
                        .save_file(),
                };
                picked.map(|p| (purpose, p))
            },
            notify,
        ));
        self.say("waiting for the file dialog (if none appears, type a path in the File field)");
    }

    pub(crate) fn dialog_done(&mut self, purpose: DialogPurpose, path: &Path) {
        match purpose {
            DialogPurpose::Open => self.open_path(path),
            DialogPurpose::SaveSessionAs => self.save_session_to(path),
            DialogPurpose::ExportSummary => self.export_summary_to(path),
        }
    }

    /// Saves to the session file the work belongs to, or asks where.
    pub(crate) fn save_session_interactive(&mut self) {
        match self.session_path.clone() {
            Some(p) => self.save_session_to(&p),
            None => self.pick_file(DialogPurpose::SaveSessionAs),
        }
    }

    fn current_session(&self, at: &Path) -> Option<Session> {
        let loaded = self.loaded.as_ref()?;
        let spec = self.bench.pair().map(|p| &p.spec);
        Some(session_of(
            &loaded.dataset,
            &loaded.sha256,
            spec,
            self.marks(),
            at,
        ))
    }

    /// Saves the session (atomically) at `path`; the data file is never written.
    pub fn save_session_to(&mut self, path: &Path) {
        let path = with_extension(path, "plumb");
        if self
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
                self.session_path = Some(path.clone());
                self.saved = Some(self.marks().clone());
                if let Some(c) = &self.config {
                    clear_recovery(c);
                }
                self.say(format!("saved {}", path.display()));
            }
            Err(e) => self.fail(e.to_string()),
        }
    }

    /// Writes the summary (HTML, charts, CSVs) at `out`, and the session it reproduces from.
    pub fn export_summary_to(&mut self, out: &Path) {
        let out = with_extension(out, "html");
        match self.export(&out) {
            Ok(msg) => self.say(msg),
            Err(e) => self.fail(e.to_string()),
        }
    }

    fn export(&mut self, out: &Path) -> Result<String, WorkbenchError> {
        let (Some(loaded), Some(pair)) = (&self.loaded, self.bench.pair()) else {
            return Err(WorkbenchError::Report(
                "open a pair on the bench first".into(),
            ));
        };
        let session_file = match &self.session_path {
            Some(p) if !self.has_unsaved_changes() => p.clone(),
            _ => with_extension(out, "plumb"),
        };
        let session = session_of(
            &loaded.dataset,
            &loaded.sha256,
            Some(&pair.spec),
            self.marks(),
            &session_file,
        );
        let report = build(&ReportInput {
            table: &loaded.dataset.table,
            sha256: loaded.sha256.clone(),
            request: pair
                .spec
                .request(session.exclusions.iter().map(|e| e.row).collect()),
            exclusions: session.exclusions.clone(),
            reproduce: format!(
                "plumb report {} -o {}{}",
                plumb_report::text::shell_word(&session_file.display().to_string()),
                plumb_report::text::shell_word(&out.display().to_string()),
                if data_is_beside(&session_file, &loaded.dataset.path()) {
                    ""
                } else {
                    " --allow-outside-data"
                }
            ),
        })
        .map_err(|e| WorkbenchError::Report(e.to_string()))?;
        let files = write(&report, out).map_err(|e| WorkbenchError::Report(e.to_string()))?;
        if Some(&session_file) != self.session_path.as_ref() || self.has_unsaved_changes() {
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

    /// Writes the recovery copy of the current work (called after every change).
    pub(crate) fn write_recovery(&mut self) {
        let Some(config) = self.config.clone() else {
            return;
        };
        let recovery = crate::sessions::recovery_path(&config);
        let Some(session) = self.current_session(&recovery) else {
            return;
        };
        if let Err(e) = write_recovery(&config, session, self.session_path.as_deref()) {
            self.fail(format!("the recovery copy could not be written: {e}"));
        }
    }

    /// Restores the work a previous run left in the recovery copy.
    pub fn restore(&mut self, session: &Session) {
        let Some(config) = self.config.clone() else {
            return;
        };
        let recovery = crate::sessions::recovery_path(&config);
        let data = session.data_path(&recovery);
        let then = AfterLoad {
            pair: spec_of(session),
            marks: Some(marks_of(session)),
            session: crate::sessions::recovery_of(session),
        };
        start_load(self, &data, session.data.load.to_options(), then);
        // Until it is saved again the restored work counts as unsaved.
        self.restoring = true;
    }
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
