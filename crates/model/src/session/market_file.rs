//! Finding a session's market file again and telling whether it is still the same file.

use std::path::{Path, PathBuf};

use super::Session;
use crate::market::content_hash;

/// A session's market file as it is now.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum MarketFile {
    /// The same bytes as when the session was saved, here.
    Unchanged(PathBuf),
    /// Other bytes here, with their hash.
    Changed {
        /// Where it was found.
        path: PathBuf,
        /// XXH3 hash of its bytes now.
        content_hash: String,
    },
    /// Not found; where it was looked for first, if anywhere.
    Missing {
        /// The first place looked.
        looked_at: Option<PathBuf>,
    },
}

/// Looks for the market file of `session` (saved at `session_path`): at `given` when the user
/// names it, else beside the session as saved, else at its absolute path; and compares its
/// bytes with the saved hash.
#[must_use]
pub fn find_market_file(
    session: &Session,
    session_path: &Path,
    given: Option<&Path>,
) -> MarketFile {
    let candidates = match given {
        Some(p) => vec![p.to_owned()],
        None => session.market.location.candidates(session_path),
    };
    for candidate in &candidates {
        if let Some(hash) = fingerprint(candidate, session) {
            // Shown to people: "/cases/market.csv", not "/cases/claims/../market.csv".
            let candidate = &std::fs::canonicalize(candidate).unwrap_or_else(|_| candidate.clone());
            return if hash == session.market.source.content_hash {
                MarketFile::Unchanged(candidate.clone())
            } else {
                MarketFile::Changed {
                    path: candidate.clone(),
                    content_hash: hash,
                }
            };
        }
    }
    MarketFile::Missing {
        looked_at: candidates.into_iter().next(),
    }
}

/// The fingerprint of the market at `path` as the session's market was read: a CSV file's bytes,
/// or a Parquet dataset's files (only the models the session's market was read for).
fn fingerprint(path: &Path, session: &Session) -> Option<String> {
    if crate::import::dataset::is_parquet_market(path) && path.exists() {
        crate::import::parquet_fingerprint(path, &session.market.source.models_read).ok()
    } else {
        std::fs::read(path).ok().map(|bytes| content_hash(&bytes))
    }
}
