//! What the workbench tells the user about what it just did: a saved file, a failed open, a
//! recovery file it could not write. Shown in the banner under the toolbar until replaced.

use crate::error::AppError;

/// How a notice is shown.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum NoticeKind {
    /// Something done.
    Done,
    /// Something that failed, in the error color.
    Failed,
}

/// A message for the banner.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Notice {
    /// How it is shown.
    pub kind: NoticeKind,
    /// What it says.
    pub text: String,
}

impl Notice {
    /// Something done.
    #[must_use]
    pub fn done(text: impl Into<String>) -> Self {
        Self {
            kind: NoticeKind::Done,
            text: text.into(),
        }
    }

    /// Something that failed.
    #[must_use]
    pub fn failed(text: impl Into<String>) -> Self {
        Self {
            kind: NoticeKind::Failed,
            text: text.into(),
        }
    }

    /// Whether it reports a failure.
    #[must_use]
    pub fn is_failure(&self) -> bool {
        self.kind == NoticeKind::Failed
    }
}

impl From<&AppError> for Notice {
    fn from(e: &AppError) -> Self {
        Self::failed(e.to_string())
    }
}
