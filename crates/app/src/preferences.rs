//! The user's preferences, kept in eframe storage between runs. The appraisal never lives here.

use std::path::PathBuf;

use serde::{Deserialize, Serialize};

/// Storage key.
pub const KEY: &str = "comptrail.preferences";

/// Most recent files remembered.
pub const RECENT_LIMIT: usize = 8;

/// Preferences.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Preferences {
    /// Dark theme when true.
    pub dark: bool,
    /// Recently opened market files, newest first.
    pub recent_files: Vec<PathBuf>,
    /// Show the comparables pane.
    pub show_comparables: bool,
}

impl Default for Preferences {
    fn default() -> Self {
        Self {
            dark: false,
            recent_files: Vec::new(),
            show_comparables: true,
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
}
