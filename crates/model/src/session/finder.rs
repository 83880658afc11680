//! Finding a session again by the number, VIN or name everybody uses: every session file in a
//! folder as a card with its case details, filtered by what is typed.

use std::path::{Path, PathBuf};

use chrono::{DateTime, Utc};

use super::{Purpose, Session, read_session};

/// One session file as the finder lists it.
#[derive(Debug, Clone, PartialEq)]
pub struct SessionCard {
    /// The file.
    pub path: PathBuf,
    /// "Claim", "Trade-in" or "Value".
    pub purpose: &'static str,
    /// Claim or stock number (empty when none was given).
    pub number: String,
    /// Insured or customer (empty when none was given).
    pub person: String,
    /// The subject's VIN (empty when none was given).
    pub vin: String,
    /// "2021 Quellmark Brindle Durnow, 52,300 mi, used".
    pub vehicle: String,
    /// Who appraised it.
    pub appraiser: String,
    /// When it was last saved.
    pub saved: DateTime<Utc>,
    /// The bottom line as saved: "ACV offer $18,400.00", "Settlement payment $22,478.19" or
    /// "Indicated value $21,670".
    pub bottom_line: String,
}

impl SessionCard {
    /// The card of `session`, saved at `path`.
    #[must_use]
    pub fn of(session: &Session, path: &Path) -> Self {
        let purpose = &session.purpose;
        let subject = &session.request.subject;
        Self {
            path: path.to_owned(),
            purpose: match purpose {
                Purpose::Claim { .. } => "Claim",
                Purpose::TradeIn(_) => "Trade-in",
                Purpose::Value => "Value",
            },
            number: session.case.number(purpose).to_owned(),
            person: session.case.person(purpose).to_owned(),
            vin: subject.vin.clone().unwrap_or_default(),
            vehicle: subject.describe(),
            appraiser: session.authorship.appraiser.clone(),
            saved: session.authorship.saved,
            bottom_line: match session.result.bottom_line() {
                Some((label, amount)) => format!(
                    "{} {}",
                    crate::format::sentence_case(label),
                    crate::format::cents(amount)
                ),
                None => format!(
                    "Indicated value {}",
                    crate::format::money(session.result.indicated_value)
                ),
            },
        }
    }

    /// Whether every word of `query` appears (in any case) in the number, the VIN, the person,
    /// the vehicle, the appraiser or the file name. An empty query matches every card.
    #[must_use]
    pub fn matches(&self, query: &str) -> bool {
        let file = self
            .path
            .file_name()
            .map(|f| f.to_string_lossy().into_owned())
            .unwrap_or_default();
        let haystack = [
            self.number.as_str(),
            &self.vin,
            &self.person,
            &self.vehicle,
            &self.appraiser,
            &file,
        ]
        .join("\n")
        .to_lowercase();
        query
            .split_whitespace()
            .all(|word| haystack.contains(&word.to_lowercase()))
    }
}

/// The session files of a folder.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Shelf {
    /// The folder.
    pub folder: PathBuf,
    /// Each readable session, newest first.
    pub cards: Vec<SessionCard>,
    /// Each `.ron` file that is not a readable session, with why.
    pub unreadable: Vec<(PathBuf, String)>,
}

impl Shelf {
    /// The cards matching `query`, newest first.
    pub fn matching<'a>(&'a self, query: &'a str) -> impl Iterator<Item = &'a SessionCard> + 'a {
        self.cards.iter().filter(move |c| c.matches(query))
    }
}

/// Reads every `.ron` file directly in `folder` (not below it) as a session.
///
/// # Errors
/// The folder cannot be listed.
pub fn sessions_in(folder: &Path) -> std::io::Result<Shelf> {
    let mut shelf = Shelf {
        folder: folder.to_owned(),
        ..Shelf::default()
    };
    let mut paths: Vec<PathBuf> = std::fs::read_dir(folder)?
        .filter_map(Result::ok)
        .map(|e| e.path())
        .filter(|p| p.is_file() && p.extension().is_some_and(|e| e.eq_ignore_ascii_case("ron")))
        .collect();
    paths.sort();
    for path in paths {
        match read_session(&path) {
            Ok(session) => shelf.cards.push(SessionCard::of(&session, &path)),
            Err(e) => shelf.unreadable.push((path, e.to_string())),
        }
    }
    shelf.cards.sort_by_key(|c| std::cmp::Reverse(c.saved));
    Ok(shelf)
}
