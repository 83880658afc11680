//! The workbench's checks, in one test binary (one link of eframe and polars, not one per
//! file): the engine's state through the real `Workbench`, the whole UI through egui_kittest
//! by its accessible labels, the case-file workflows, and a few image snapshots. No display or
//! GPU needed.

// Tests unwrap (a failure is the report) and compare values exactly: undo must restore the
// identical number, a recomputation of the same inputs is deterministic, and money is compared
// to the cent.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::float_cmp)]

mod charts;
mod desk;
mod sessions;
mod snapshots;
mod support;
mod ui;
