//! The workbench's vocabulary: everything a panel, a shortcut or a finished file dialog can
//! ask the workbench to do. Panels draw from read-only state and return [`Actions`]; the
//! workbench applies them in one place, once per frame, after drawing. Tests drive the
//! workbench with the same actions, without pixels.

use std::path::PathBuf;

use crate::state::diagnostics::{Overlays, ResidualAxis};
use crate::state::export::ChartView;
use crate::state::map::MapKey;
use crate::state::pair::FitSpec;
use crate::state::reading::Reading;
use crate::state::roles::Role;
use crate::state::{DialogPurpose, Screen, Status};

/// One change the analyst asks for.
#[derive(Debug, Clone, PartialEq)]
#[must_use = "an action changes nothing until the workbench applies it"]
pub enum Action {
    /// Open a data file or a `.plumb` session (by extension).
    Open(PathBuf),
    /// Read a delimited file in the one-pass view, for the pair (y, x) or the first two
    /// numeric columns.
    OpenOnePass {
        /// The file.
        path: PathBuf,
        /// Response and predictor.
        pair: Option<(String, String)>,
    },
    /// Stop reading the file being loaded.
    CancelLoad,
    /// Read the open file again with this decimal mark and text encoding (`None`: as the
    /// file suggests), keeping the model, the exclusions and their reasons.
    ReadAs {
        /// Decimal mark.
        decimal: Option<plumb_data::DecimalMark>,
        /// Text encoding.
        encoding: Option<plumb_data::TextEncoding>,
    },
    /// Open the system's file dialog.
    PickFile(DialogPurpose),
    /// Save the session to its file (or ask where, the first time).
    SaveSession,
    /// Save the session at this path.
    SaveSessionTo(PathBuf),
    /// Write the colleague summary (and the session it reproduces from) at this path.
    ExportSummaryTo(PathBuf),
    /// Save one view of the bench at this path (SVG by a `.svg` name, else PNG).
    ExportViewTo(ChartView, PathBuf),
    /// Answer the open question: yes or no.
    Answer(bool),
    /// Show a screen.
    Show(Screen),
    /// Put this model of a pair on the bench (keeping the marks).
    OpenPair(FitSpec),
    /// Keep the model on the bench for comparison with the ones that follow (`false`: stop
    /// comparing).
    KeepForComparison(bool),
    /// Draw the residuals against fitted values, a column, or the row order.
    ResidualsAgainst(ResidualAxis),
    /// What the bench reads beside the fit: the mode, the calibration's unknowns and σ, the
    /// method comparison's settings, the order of the sequence checks.
    SetReading(Reading),
    /// Read the calibration's unknowns from a second file (a small one: it is read at once).
    ReadUnknowns {
        /// The file.
        path: PathBuf,
        /// Its readings' column.
        reading: String,
        /// Its samples' column (`None`: each row is a sample).
        sample: Option<String>,
    },
    /// Overlays on the scatter.
    SetOverlays(Overlays),
    /// Colour the points by a text column (a line per group), or by nothing.
    ColourBy(Option<String>),
    /// Give a column a role (group, row order, ID) or take its role away.
    SetRole {
        /// The column.
        column: String,
        /// Its new role.
        role: Role,
    },
    /// Leave data rows out. With a reason it is recorded at once; without one the default
    /// text is recorded and the reason prompt opens.
    Exclude {
        /// 1-based data rows.
        rows: Vec<usize>,
        /// Why.
        reason: Option<String>,
    },
    /// Put data rows back.
    PutBack(Vec<usize>),
    /// The reason for the rows of the open prompt (blank: the default text).
    RecordReason(String),
    /// Rewrite the reason of one exclusion.
    EditReason {
        /// 1-based data row.
        row: usize,
        /// The new reason.
        reason: String,
    },
    /// Show a row at a hypothetical position while a drag goes on.
    MoveTo {
        /// 1-based data row.
        row: usize,
        /// Predictor value.
        x: f64,
        /// Response value.
        y: f64,
    },
    /// The drag is over: the whole drag becomes one undo step.
    EndMove,
    /// Put moved rows back where the file has them (`None`: every moved row).
    ResetMoves(Option<usize>),
    /// Take back the last change.
    Undo,
    /// Do again what was undone.
    Redo,
    /// Settings of the co-movement map.
    MapSettings(MapKey),
    /// Read the one-pass view's file again for this pair (y, x).
    OnePassPair {
        /// Response.
        y: String,
        /// Predictor.
        x: String,
    },
    /// Stop the one-pass view's reading (or its sample being drawn).
    OnePassStop,
    /// Draw a seeded random sample of the one-pass view's file and open it on the pair bench
    /// with the view's pair.
    OnePassSample,
    /// Put a message on the status line.
    Tell(Status),
}

impl Action {
    /// What a file picked in a dialog opened for `purpose` asks for.
    pub fn picked(purpose: DialogPurpose, path: PathBuf) -> Self {
        match purpose {
            DialogPurpose::Open => Self::Open(path),
            DialogPurpose::SaveSessionAs => Self::SaveSessionTo(path),
            DialogPurpose::ExportSummary => Self::ExportSummaryTo(path),
            DialogPurpose::ExportView(view) => Self::ExportViewTo(view, path),
        }
    }

    /// A failure to report on the status line.
    pub fn fail(text: impl Into<String>) -> Self {
        Self::Tell(Status {
            text: text.into(),
            error: true,
        })
    }
}

/// The actions one panel asked for in one frame, in order.
#[derive(Debug, Default, Clone, PartialEq)]
#[must_use = "actions change nothing until the workbench applies them"]
pub struct Actions(Vec<Action>);

impl Actions {
    /// No actions.
    pub fn none() -> Self {
        Self::default()
    }

    /// Adds one.
    pub fn push(&mut self, action: Action) {
        self.0.push(action);
    }

    /// Adds one when there is one.
    pub fn push_some(&mut self, action: Option<Action>) {
        self.0.extend(action);
    }

    /// Adds another panel's.
    pub fn extend(&mut self, other: Actions) {
        self.0.extend(other.0);
    }

    /// Whether there are none.
    pub fn is_empty(&self) -> bool {
        self.0.is_empty()
    }

    /// The actions, in order.
    pub fn into_vec(self) -> Vec<Action> {
        self.0
    }
}

impl From<Action> for Actions {
    fn from(a: Action) -> Self {
        Self(vec![a])
    }
}

impl From<Option<Action>> for Actions {
    fn from(a: Option<Action>) -> Self {
        Self(a.into_iter().collect())
    }
}
