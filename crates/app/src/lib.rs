//! comptrail's desktop workbench: linked panes over the valuation engine.
//!
//! Three kinds of state are kept apart: the appraisal [`document::AppraisalDocument`] (what a
//! session file will hold), the user's [`preferences::Preferences`] (eframe storage), and
//! [`runtime::Runtime`] (the loaded market, the fit, background jobs: never saved). Panes draw
//! from the document and runtime and return [`command::Command`]s; [`command::apply`] is the
//! one place the document changes, so undo and linking hang off it.

pub mod command;
pub mod document;
pub mod error;
pub mod jobs;
pub mod notice;
pub mod palette;
pub mod panes;
pub mod preferences;
pub mod runtime;
pub mod selection;
pub mod workbench;

pub use workbench::Workbench;
