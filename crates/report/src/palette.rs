//! The page's own colors (text, grid, boxes). The charts' marks take theirs from
//! [`crate::visual`], shared with the workbench.

/// Axes and text.
pub const INK: [u8; 3] = [0x28, 0x28, 0x30];
/// Grid lines.
pub const GRID: [u8; 3] = [0xe1, 0xe4, 0xe8];
/// Caution box border.
pub const CAUTION: [u8; 3] = [0xc0, 0x8b, 0x1a];
/// The box of warnings beside the value.
pub const WARNING: [u8; 3] = [0xb3, 0x26, 0x1e];
