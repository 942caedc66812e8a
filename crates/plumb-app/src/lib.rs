//! Plumbline's desktop workbench: the columns of a file, a map of how they move together, and
//! a bench for one pair where excluding or moving a point recomputes the fit live.
//!
//! The parts, each depending only on those before it:
//!
//! * [`state`]: everything the workbench knows (the file and its session, the marks and their
//!   history, the pair with its live fit and diagnostics, the map, the one-pass view); every
//!   number comes from `plumb-core` through `plumb-data`'s analysis route, as on the command line;
//! * [`action`]: the vocabulary of changes ([`Action`]);
//! * the panels (the screens and the bench), which draw from read-only state and return actions;
//! * [`Workbench`]: the frame loop, which applies the actions in one place after drawing.

pub mod action;
mod axes;
mod bench;
pub mod density;
mod error;
mod launch;
pub mod palette;
mod screens;
pub mod state;
mod workbench;

pub use action::{Action, Actions};
pub use axes::ticks_for;
pub use eframe::egui::ThemePreference;
pub use error::WorkbenchError;
pub use launch::{run, Launch};
pub use state::diagnostics::Overlays;
pub use state::pair::FitSpec;
pub use state::reading::{BenchMode, Reading};
pub use state::{Ask, DialogPurpose, Loaded, Screen, State, Status};
pub use workbench::Workbench;
