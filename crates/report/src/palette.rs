//! The report's colours, RGB: the workbench's hues (teal comparables, plum fit, the subject's
//! magenta), so a printed chart reads like the screen.

/// Market listings, faint.
pub const MARKET: [u8; 3] = [0xb4, 0xbc, 0xc6];
/// Comparables.
pub const COMPARABLE: [u8; 3] = [0x1f, 0x8a, 0x80];
/// The subject and its band.
pub const SUBJECT: [u8; 3] = [0xd6, 0x1f, 0x5b];
/// The fitted line.
pub const FIT: [u8; 3] = [0x8e, 0x44, 0x8a];
/// Axes and text.
pub const INK: [u8; 3] = [0x28, 0x28, 0x30];
/// Grid lines.
pub const GRID: [u8; 3] = [0xe1, 0xe4, 0xe8];
/// Caution box border.
pub const CAUTION: [u8; 3] = [0xc0, 0x8b, 0x1a];
/// The box of warnings beside the value.
pub const WARNING: [u8; 3] = [0xb3, 0x26, 0x1e];
