//! comptrail's checks against the outside world and its end-to-end behavior, in one binary.

// Tests may unwrap (a failure is the report) and compare floats exactly where the value is
// exact by construction (parsed integers, prices written to the cent).
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::float_cmp)]

mod appraising;
mod crosscheck;
mod equipment;
mod fuzz;
mod guards;
mod import;
mod market_time;
mod nist;
mod premium_fade;
mod profiles;
mod properties;
mod published;
mod recovery;
mod reports;
mod sessions;
mod vin;
mod worksheets;
