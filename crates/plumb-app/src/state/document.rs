//! The file on the workbench and the session it belongs to: the load in progress, the native
//! file dialog (on its own thread, so the window keeps drawing), the recent-files list, and the
//! marks as last saved.

use std::path::{Path, PathBuf};
use std::sync::Arc;

use super::dataset::Dataset;
use super::jobs::{Job, Waker};
use super::marks::Marks;
use super::pair::FitSpec;
use super::settings::Recent;
use crate::error::WorkbenchError;

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
    pub pair: Option<FitSpec>,
    /// Keep this model for comparison.
    pub kept: Option<FitSpec>,
    /// Start from these marks.
    pub marks: Option<Marks>,
    /// The session file the work belongs to.
    pub session: Option<PathBuf>,
    /// The load restores a recovery copy (its work stays marked unsaved).
    pub restoring: bool,
    /// What the bench reads beside the fit.
    pub reading: Option<super::reading::Reading>,
    /// The columns' roles (group, ID) to start from.
    pub roles: Option<plumb_report::ColumnRoles>,
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

/// What a file dialog was opened for.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum DialogPurpose {
    /// Open a data file or a session.
    Open,
    /// Save the session under a new name.
    SaveSessionAs,
    /// Write the colleague summary.
    ExportSummary,
    /// Save one view of the bench as a chart file.
    ExportView(super::export::ChartView),
}

/// File types the open dialog offers.
const DATA_EXTENSIONS: [&str; 10] = [
    "csv", "tsv", "txt", "parquet", "pq", "xlsx", "xlsm", "xls", "ods", "plumb",
];

/// The file, its session and the jobs that read or pick files.
pub struct Document {
    pub(crate) loaded: Option<Loaded>,
    pub(crate) loading: Option<Loading>,
    /// The session file the work belongs to.
    pub(crate) session_path: Option<PathBuf>,
    /// Marks as last saved to the session file (`None`: never saved).
    pub(crate) saved: Option<Marks>,
    pub(crate) recent: Recent,
    /// The settings folder (recent list, recovery copy); `None`: nowhere.
    pub(crate) config: Option<PathBuf>,
    /// Most memory a load may take (`None`: what the system reports available).
    pub(crate) memory_limit: Option<u64>,
    dialog: Option<Job<Option<(DialogPurpose, PathBuf)>>>,
}

impl Document {
    /// No file yet; the recent list read from `config`.
    pub fn new(config: Option<PathBuf>) -> Self {
        Self {
            loaded: None,
            loading: None,
            session_path: None,
            saved: None,
            recent: Recent::load(config.as_deref()),
            config,
            memory_limit: None,
            dialog: None,
        }
    }

    /// The recently opened files, newest first.
    pub fn recent(&self) -> &[PathBuf] {
        &self.recent.files
    }

    /// The load in progress.
    pub fn loading(&self) -> Option<&Loading> {
        self.loading.as_ref()
    }

    /// Whether `marks` differ from the last saved session.
    pub fn is_unsaved(&self, marks: &Marks) -> bool {
        match &self.saved {
            Some(saved) => saved.excluded != marks.excluded,
            None => !marks.excluded.is_empty(),
        }
    }

    /// Default reading options under the memory cap.
    pub fn load_options(&self) -> plumb_data::LoadOptions {
        plumb_data::LoadOptions {
            memory_limit: self.memory_limit,
            only: None,
            ..plumb_data::LoadOptions::default()
        }
    }

    /// Reads `path` on a background thread (replacing a load in progress).
    pub fn start_load(
        &mut self,
        path: &Path,
        options: plumb_data::LoadOptions,
        then: AfterLoad,
        waker: &Waker,
    ) {
        if let Some(old) = self.loading.take() {
            old.job.cancel();
        }
        let owned = path.to_path_buf();
        let progress = Arc::new(plumb_data::Progress::default());
        let shared = Arc::clone(&progress);
        let job = Job::spawn(
            move |_| {
                let dataset = Dataset::load_with_progress(&owned, &options, &shared)?;
                // The hash of the bytes the table was read from, not of a second read.
                let sha256 = dataset.table.sha256().to_string();
                Ok(Loaded { dataset, sha256 })
            },
            waker.hook(),
        );
        self.loading = Some(Loading {
            path: path.to_path_buf(),
            bytes: std::fs::metadata(path).ok().map(|m| m.len()),
            progress,
            job,
            then,
        });
    }

    /// A finished load, with what was to follow it.
    pub fn poll_load(&mut self) -> Option<(Result<Loaded, WorkbenchError>, Loading)> {
        let result = self.loading.as_mut()?.job.poll()?;
        self.loading.take().map(|l| (result, l))
    }

    /// Abandons the load in progress; the file it was reading.
    pub fn cancel_load(&mut self) -> Option<PathBuf> {
        let l = self.loading.take()?;
        l.job.cancel();
        Some(l.path)
    }

    /// Whether a file dialog is open.
    pub fn has_dialog(&self) -> bool {
        self.dialog.is_some()
    }

    /// Opens a native file dialog on its own thread (one at a time).
    pub fn pick_file(&mut self, purpose: DialogPurpose, waker: &Waker) {
        if self.dialog.is_some() {
            return;
        }
        let folder = self
            .loaded
            .as_ref()
            .and_then(|l| l.dataset.path().parent().map(Path::to_path_buf));
        let stem = self.loaded.as_ref().map_or_else(String::new, |l| {
            l.dataset.path().file_stem().map_or_else(
                || "plumbline".to_string(),
                |s| s.to_string_lossy().into_owned(),
            )
        });
        self.dialog = Some(Job::spawn(
            move |_| {
                let mut d = rfd::FileDialog::new();
                if let Some(f) = &folder {
                    d = d.set_directory(f);
                }
                dialog(d, purpose, &stem).map(|p| (purpose, p))
            },
            waker.hook(),
        ));
    }

    /// The file a finished dialog picked, and what for.
    pub fn poll_dialog(&mut self) -> Option<(DialogPurpose, PathBuf)> {
        let picked = self.dialog.as_mut()?.poll()?;
        self.dialog = None;
        picked
    }

    /// Puts `file` first in the recent list and writes the list.
    ///
    /// # Errors
    /// If the settings folder cannot be written.
    pub fn remember(&mut self, file: &Path) -> Result<(), String> {
        self.recent.remember(file, self.config.as_deref())
    }
}

fn dialog(d: rfd::FileDialog, purpose: DialogPurpose, stem: &str) -> Option<PathBuf> {
    match purpose {
        DialogPurpose::Open => d
            .add_filter("data or session", &DATA_EXTENSIONS)
            .set_title("Open a data file or session")
            .pick_file(),
        DialogPurpose::SaveSessionAs => d
            .add_filter("Plumbline session", &["plumb"])
            .set_file_name(format!("{stem}.plumb"))
            .set_title("Save the session")
            .save_file(),
        DialogPurpose::ExportSummary => d
            .add_filter("HTML summary", &["html"])
            .set_file_name(format!("{stem}-summary.html"))
            .set_title("Write the summary for a colleague")
            .save_file(),
        DialogPurpose::ExportView(view) => d
            .add_filter("PNG image", &["png"])
            .add_filter("SVG drawing", &["svg"])
            .set_file_name(format!("{stem}-{}.png", view.stem()))
            .set_title("Save this view (.png or .svg)")
            .save_file(),
    }
}
