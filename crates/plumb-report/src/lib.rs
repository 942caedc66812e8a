//! Sessions and the colleague summary.
//!
//! * [`Session`]: the versioned, human-readable session file (atomic saves, hash check).
//! * [`report`]: the summary — one self-contained HTML file, each chart as SVG and PNG, a CSV
//!   of every statistic and a CSV of the exclusion log — built from the same analysis path as
//!   the command line and the workbench.

mod atomic;
pub mod charts;
mod effects;
mod error;
pub mod guard;
pub mod report;
mod session;
pub mod text;
pub mod wording;

pub use atomic::write_atomically;
pub use effects::{exclusion_effects, Effect, Headline};
pub use error::{ReportError, Result};
pub use session::{
    file_sha256, AgreementSpec, CalibrationSpec, ColumnRoles, DataSource, Exclusion, GroupSpec,
    LoadSpec, ModelSpec, Session, UnknownSpec, SCHEMA_VERSION,
};
