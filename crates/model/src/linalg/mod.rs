//! Linear algebra the valuation engine needs and nothing more: a streaming QR least squares.

mod qr;

pub use qr::{QrAccumulator, QrFactor, RankError};
