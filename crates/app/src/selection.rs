//! The listing under the pointer and the one clicked, shared by every pane in a frame.

/// Linked selection: panes read it and write it; every pane highlights the same listing.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq)]
pub struct Selection {
    /// Market row under the pointer this frame.
    pub hovered: Option<usize>,
    /// Market row last clicked.
    pub selected: Option<usize>,
}

impl Selection {
    /// Whether `row` is hovered or selected.
    #[must_use]
    pub fn is_highlighted(&self, row: usize) -> bool {
        self.hovered == Some(row) || self.selected == Some(row)
    }
}
