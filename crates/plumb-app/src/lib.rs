//! Plumbline's desktop workbench: the columns of a file, a map of how they move together, and
//! a bench for one pair where excluding or moving a point recomputes the fit live.
//!
//! The app holds state and draws it; every number comes from `plumb-core` (through
//! `plumb-data`'s shared analysis path where the command line uses it too).

mod app;
pub mod bench;
mod chrome;
pub mod cloud;
mod columns;
pub mod dataset;
pub mod density;
pub mod derived;
mod error;
mod files;
pub mod jobs;
mod launch;
mod ledger;
pub mod marks;
pub mod numbers;
pub mod overview;
pub mod pair;
pub mod palette;
mod plots;
pub mod sessions;
pub mod settings;
pub mod sweep;

pub use app::{Ask, Loaded, Screen, Status, Workbench};
pub use eframe::egui::ThemePreference;
pub use error::WorkbenchError;
pub use launch::{run, Launch};
