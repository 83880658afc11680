//! comptrail's checks against the outside world and its end-to-end behaviour, in one binary.

mod nist;
mod import;
mod published;
mod recovery;
