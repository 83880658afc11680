//! The user's preferences, kept in eframe storage between runs. The appraisal never lives here.

use std::path::PathBuf;

use serde::{Deserialize, Serialize};

/// Storage key.
pub const KEY: &str = "comptrail.preferences";

/// Most recent files remembered.
pub const RECENT_LIMIT: usize = 8;

/// Preferences.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(default)]
pub struct Preferences {
    /// Dark theme when true.
    pub dark: bool,
    /// Recently opened market files, newest first.
    pub recent_files: Vec<PathBuf>,
    /// Show the comparables pane.
    pub show_comparables: bool,
    /// Recently saved or opened session files, newest first.
    pub recent_sessions: Vec<PathBuf>,
    /// Keep every listing of the model in saved sessions (larger files; reports show the whole
    /// market).
    pub keep_segment: bool,
    /// The user's own jurisdiction profile file; the shipped profiles when `None`.
    pub profiles_file: Option<PathBuf>,
}

impl Default for Preferences {
    fn default() -> Self {
        Self {
            dark: false,
            recent_files: Vec::new(),
            show_comparables: true,
            recent_sessions: Vec::new(),
            keep_segment: false,
            profiles_file: None,
        }
    }
}

impl Preferences {
    /// Puts `path` first in the recent files.
    pub fn remember(&mut self, path: PathBuf) {
        self.recent_files.retain(|p| p != &path);
        self.recent_files.insert(0, path);
        self.recent_files.truncate(RECENT_LIMIT);
    }

    /// Puts `path` first in the recent sessions.
    pub fn remember_session(&mut self, path: PathBuf) {
        self.recent_sessions.retain(|p| p != &path);
        self.recent_sessions.insert(0, path);
        self.recent_sessions.truncate(RECENT_LIMIT);
    }
}
