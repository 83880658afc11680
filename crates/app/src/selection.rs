//! The listing under the pointer and the one clicked, shared by every pane.
//!
//! Hover is read from the previous frame: a pane drawn early in a frame (the comparables
//! table) cannot know what a pane drawn later (a chart) will find under the pointer, so every
//! pane reads [`Selection::hovered`], last frame's hover, and writes [`Selection::hover`] for
//! the next. Linking then works in every direction whatever the draw order (as rerun does).

/// Linked selection: panes read it and write it; every pane highlights the same listing.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq)]
pub struct Selection {
    /// Market row under the pointer in the previous frame: what every pane highlights.
    pub hovered: Option<usize>,
    /// Market row under the pointer this frame, written by the pane that finds it; it becomes
    /// [`Self::hovered`] at the start of the next frame.
    pub hovering: Option<usize>,
    /// Market row last clicked.
    pub selected: Option<usize>,
}

impl Selection {
    /// Whether `row` is hovered or selected.
    #[must_use]
    pub fn is_highlighted(&self, row: usize) -> bool {
        self.hovered == Some(row) || self.selected == Some(row)
    }

    /// Records that the pointer is over `row` this frame.
    pub fn hover(&mut self, row: usize) {
        self.hovering = Some(row);
    }

    /// Starts a frame: last frame's hover becomes the one every pane reads.
    pub fn next_frame(&mut self) {
        self.hovered = self.hovering.take();
    }
}
