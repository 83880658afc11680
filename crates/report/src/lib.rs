//! comptrail's appraisal report: what the customer or claimant is handed.
//!
//! A report is built once from a saved session ([`Report::from_session`]) as a list of blocks
//! (headings, paragraphs, tables, charts), then written out as a self-contained HTML page
//! ([`html::render`]) or a PDF ([`pdf::render`]). Both come from the same blocks, so they
//! always say the same thing.

pub mod blocks;
mod content;
pub mod figure;
pub mod html;
mod palette;
pub mod pdf;
pub mod visual;

pub use blocks::{Block, Report};
pub use content::{Audience, Identity};
