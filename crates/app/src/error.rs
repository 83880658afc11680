//! What can go wrong in the workbench, said with what was wrong and where.

use std::path::PathBuf;

use model::session::SessionError;
use model::worksheet::{ProfileError, WorksheetError};

/// A workbench operation that could not be done.
#[derive(Debug, thiserror::Error)]
pub enum AppError {
    /// Nothing appraised yet.
    #[error("There is no finished appraisal to save yet.")]
    NoAppraisal,
    /// The market is still loading or fitting.
    #[error("Wait for the market to finish loading and fitting, then save.")]
    Busy,
    /// The appraisal on screen is of an earlier state of the document.
    #[error("The appraisal is being brought up to date; save again in a moment.")]
    Stale,
    /// The worksheet's inputs cannot be worked.
    #[error("The worksheet cannot be saved: {0}")]
    Worksheet(#[from] WorksheetError),
    /// A session file could not be read or written.
    #[error(transparent)]
    Session(#[from] SessionError),
    /// A session reads but its evidence cannot be recomputed.
    #[error("{path}: the saved evidence cannot be recomputed: {source}")]
    Replay {
        /// The session file.
        path: PathBuf,
        /// Why.
        source: model::session::ReplayError,
    },
    /// A file could not be read.
    #[error("cannot read {path}: {source}")]
    Read {
        /// The file.
        path: PathBuf,
        /// The system's reason.
        source: std::io::Error,
    },
    /// A file could not be removed.
    #[error("cannot remove {path}: {source}")]
    Remove {
        /// The file.
        path: PathBuf,
        /// The system's reason.
        source: std::io::Error,
    },
    /// A profiles file does not read.
    #[error(transparent)]
    Profiles(#[from] ProfileError),
    /// A profiles file holds no profile.
    #[error("{0} holds no profiles")]
    NoProfiles(PathBuf),
    /// The recovery file could not be written.
    #[error("unsaved work could not be written to the recovery file {path}: {why}")]
    Recovery {
        /// The recovery file.
        path: PathBuf,
        /// Why.
        why: String,
    },
}
