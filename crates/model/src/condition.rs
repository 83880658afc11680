//! Condition class and title status of a listed vehicle.

use serde::{Deserialize, Serialize};

/// The condition class a listing is sold under.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Condition {
    /// Never titled to a retail buyer, sold with the full new-vehicle warranty.
    New,
    /// Previously owned, sold as is or with a dealer warranty.
    Used,
    /// Previously owned, inspected and sold under a maker-backed certification programme.
    Certified,
}

impl Condition {
    /// All classes, in display order.
    pub const ALL: [Condition; 3] = [Condition::New, Condition::Used, Condition::Certified];

    /// Reads the common spellings found in listing feeds; `None` when unrecognized.
    #[must_use]
    pub fn parse(text: &str) -> Option<Self> {
        let t = text.trim();
        // Exact lower-case spellings first: no allocation on the common path.
        match t {
            "used" => return Some(Self::Used),
            "new" => return Some(Self::New),
            "certified" => return Some(Self::Certified),
            _ => {}
        }
        match t.to_ascii_lowercase().as_str() {
            "new" | "n" => Some(Self::New),
            "used" | "u" | "pre-owned" | "preowned" | "pre owned" => Some(Self::Used),
            "certified" | "cpo" | "c" | "certified pre-owned" | "certified preowned" => {
                Some(Self::Certified)
            }
            _ => None,
        }
    }

    /// Lower-case name as written in files and on screen.
    #[must_use]
    pub fn as_str(self) -> &'static str {
        match self {
            Self::New => "new",
            Self::Used => "used",
            Self::Certified => "certified",
        }
    }
}

impl Condition {
    /// The sale class in the trade's words, for "sold as …": new, used, certified pre-owned.
    #[must_use]
    pub fn sold_as(self) -> &'static str {
        match self {
            Self::New => "new",
            Self::Used => "used",
            Self::Certified => "certified pre-owned",
        }
    }
}

impl std::fmt::Display for Condition {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.as_str())
    }
}

/// The title brand recorded on a listing, when the feed states one.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum TitleStatus {
    /// No brand on the title.
    Clean,
    /// Declared a total loss.
    Salvage,
    /// Salvage vehicle repaired and re-inspected.
    Rebuilt,
    /// Flood damage brand.
    Flood,
    /// Bought back by the maker under a lemon law.
    Lemon,
    /// Any other brand the feed names.
    Other,
}

impl TitleStatus {
    /// Reads a title column value; empty text means unknown and returns `None`.
    #[must_use]
    pub fn parse(text: &str) -> Option<Self> {
        let t = text.trim();
        if t.is_empty() {
            return None;
        }
        if t == "clean" {
            return Some(Self::Clean);
        }
        let t = t.to_ascii_lowercase();
        Some(match t.as_str() {
            "clean" | "clear" | "none" => Self::Clean,
            "salvage" => Self::Salvage,
            "rebuilt" | "reconstructed" | "rebuildable" => Self::Rebuilt,
            "flood" | "water" => Self::Flood,
            "lemon" | "buyback" | "manufacturer buyback" => Self::Lemon,
            _ => Self::Other,
        })
    }

    /// Whether the title carries a brand that depresses value.
    #[must_use]
    pub fn is_branded(self) -> bool {
        !matches!(self, Self::Clean)
    }

    /// Lower-case name.
    #[must_use]
    pub fn as_str(self) -> &'static str {
        match self {
            Self::Clean => "clean",
            Self::Salvage => "salvage",
            Self::Rebuilt => "rebuilt",
            Self::Flood => "flood",
            Self::Lemon => "lemon",
            Self::Other => "other brand",
        }
    }
}
