//! The command line's checks, in one test binary: the real `comptrail` binary as a user runs
//! it (exit codes, one-line errors, stable JSON keys, session files), and its argument parsing
//! fuzzed through the library.

// Tests may unwrap (a failure is the report) and compare amounts written to the cent exactly.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::float_cmp)]

mod commands;
mod common;
mod desk;
mod fuzz;
mod lake;
mod sessions;
