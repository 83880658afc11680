//! comptrail's checks against the outside world and its end-to-end behaviour, in one binary.

mod nist;
mod properties;
mod appraising;
mod crosscheck;
mod import;
mod published;
mod recovery;
