//! Errors of sessions and reports.

use std::path::PathBuf;

use thiserror::Error;

/// Why a session could not be read or a report written.
#[derive(Debug, Error)]
pub enum ReportError {
    /// The operating system refused a read or write.
    #[error("{}: {action} failed ({source}); check the path and permissions", path.display())]
    Io {
        /// File.
        path: PathBuf,
        /// What was being done.
        action: &'static str,
        /// Underlying error.
        source: std::io::Error,
    },
    /// The session file is not valid JSON of our schema (truncated, hand-edited, not a session).
    #[error("{}: not a readable Plumbline session ({detail}); open the data file instead, or restore the session from a backup", path.display())]
    BadSession {
        /// File.
        path: PathBuf,
        /// Parser message, with line and column.
        detail: String,
    },
    /// A session written by a newer Plumbline.
    #[error("{}: session schema version {found} is newer than this Plumbline understands (up to {supported}); update Plumbline to open it", path.display())]
    FutureSession {
        /// File.
        path: PathBuf,
        /// Version in the file.
        found: u32,
        /// Newest version this build reads.
        supported: u32,
    },
    /// The session names no model, or a model that cannot be run.
    #[error("{0}")]
    Request(String),
    /// Loading the data or fitting failed.
    #[error(transparent)]
    Analysis(#[from] plumb_data::analysis::AnalysisError),
    /// Loading the data failed.
    #[error(transparent)]
    Data(#[from] plumb_data::DataError),
    /// A write that would destroy an input or write somewhere it should not.
    #[error("{}: refusing to write: {why}", path.display())]
    Unsafe {
        /// The output.
        path: PathBuf,
        /// What it would overwrite, and what to do.
        why: String,
    },
    /// A chart could not be drawn.
    #[error("drawing chart '{chart}' failed: {detail}")]
    Chart {
        /// Which chart.
        chart: String,
        /// What plotters said.
        detail: String,
    },
}

/// Result alias for this crate.
pub type Result<T> = std::result::Result<T, ReportError>;
