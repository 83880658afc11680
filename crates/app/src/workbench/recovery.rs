//! The recovery file: unsaved work written beside the preferences every few seconds so it
//! survives a crash, offered back at the next start, removed once the work is saved.

use std::path::PathBuf;

use chrono::{DateTime, Utc};
use model::session::write_atomically;
use serde::{Deserialize, Serialize};

use super::Workbench;
use super::case_file::now;
use crate::command::Command;
use crate::document::AppraisalDocument;
use crate::error::AppError;
use crate::notice::Notice;

/// Format version of the recovery file.
const RECOVERY_FORMAT_VERSION: u32 = 1;

/// Seconds between writes of the recovery file while there are unsaved changes.
pub const AUTOSAVE_SECONDS: f64 = 5.0;

/// Unsaved work, written beside the preferences so it survives a crash.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Recovery {
    /// Format version.
    pub format_version: u32,
    /// When it was written.
    pub written: DateTime<Utc>,
    /// The session file the work belongs to, if it had been saved.
    pub session_path: Option<PathBuf>,
    /// The unsaved document.
    pub document: AppraisalDocument,
}

impl Workbench {
    /// Writes unsaved work to `path` from now on, and offers back what a previous run left
    /// there.
    #[must_use]
    pub fn with_recovery_file(mut self, path: PathBuf) -> Self {
        if let Ok(text) = std::fs::read_to_string(&path) {
            match ron::from_str::<Recovery>(&text) {
                Ok(r) if r.format_version <= RECOVERY_FORMAT_VERSION => {
                    self.case.recovery_offer = Some(r);
                }
                _ => {
                    self.notice = Some(Notice::failed(format!(
                        "An unreadable recovery file was left at {}; it was not used.",
                        path.display()
                    )));
                }
            }
        }
        self.case.recovery_path = Some(path);
        self
    }

    /// Writes the recovery file this many seconds after a change instead of every
    /// [`AUTOSAVE_SECONDS`].
    pub fn set_autosave_seconds(&mut self, seconds: f64) {
        self.case.autosave_seconds = Some(seconds.max(0.0));
    }

    /// Takes back the unsaved work found at start.
    pub fn recover(&mut self) {
        if let Some(r) = self.case.recovery_offer.take() {
            self.case.path = r.session_path;
            self.apply(Command::ReplaceDocument(Box::new(r.document)));
        }
    }

    /// Discards the unsaved work found at start.
    pub fn discard_recovery(&mut self) {
        self.case.recovery_offer = None;
        self.remove_recovery_file();
    }

    /// Removes the recovery file; a failure other than its being gone is reported.
    pub(super) fn remove_recovery_file(&mut self) {
        let Some(path) = self.case.recovery_path.clone() else {
            return;
        };
        match std::fs::remove_file(&path) {
            Err(source) if source.kind() != std::io::ErrorKind::NotFound => {
                self.notice = Some(Notice::from(&AppError::Remove { path, source }));
            }
            _ => {}
        }
    }

    /// Writes the recovery file when there is unsaved work it does not hold yet; removes it
    /// once the work is saved. A failed write is reported and tried again after the interval.
    pub(super) fn autosave(&mut self) {
        let Some(path) = self.case.recovery_path.clone() else {
            return;
        };
        if self.case.recovery_offer.is_some() {
            return; // do not overwrite what is on offer
        }
        if !self.has_unsaved_changes() {
            if self.case.autosaved.take().is_some() {
                self.remove_recovery_file();
            }
            return;
        }
        if self.case.autosaved.as_ref() == Some(&self.document)
            || self.clock - self.case.last_autosave
                < self.case.autosave_seconds.unwrap_or(AUTOSAVE_SECONDS)
        {
            return;
        }
        self.case.last_autosave = self.clock;
        let recovery = Recovery {
            format_version: RECOVERY_FORMAT_VERSION,
            written: now(),
            session_path: self.case.path.clone(),
            document: self.document.clone(),
        };
        let written = ron::ser::to_string_pretty(&recovery, ron::ser::PrettyConfig::new())
            .map_err(|e| e.to_string())
            .and_then(|text| {
                if let Some(dir) = path.parent() {
                    std::fs::create_dir_all(dir).map_err(|e| e.to_string())?;
                }
                write_atomically(&path, text.as_bytes()).map_err(|e| e.to_string())
            });
        match written {
            Ok(()) => self.case.autosaved = Some(self.document.clone()),
            Err(why) => {
                self.notice = Some(Notice::from(&AppError::Recovery { path, why }));
            }
        }
    }
}
