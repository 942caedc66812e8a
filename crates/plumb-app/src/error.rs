//! Why the workbench could not do something, worded for the status line.

use thiserror::Error;

/// A failure the workbench reports to the analyst (never a panic).
#[derive(Debug, Error)]
pub enum WorkbenchError {
    /// The file could not be read; the message names it and the row or column at fault.
    #[error("{0}")]
    Load(String),
    /// The columns or rows chosen cannot support the model.
    #[error("{0}")]
    Model(String),
    /// A session could not be read or written.
    #[error("{0}")]
    Session(String),
    /// The summary could not be written.
    #[error("{0}")]
    Report(String),
    /// The window system failed.
    #[error("the window could not be opened: {0}")]
    Window(String),
}
