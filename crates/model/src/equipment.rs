//! Equipment: the options a listing states, priced from the market (hedonic regression was made
//! for this: Griliches 1961 priced automobile equipment from market prices).
//!
//! A listing's `options` cell holds option names separated by [`SEPARATOR`] (a character no
//! option name contains); the subject's are typed the same way (`options=` in `--subject`).
//! Names are matched without regard to case or spacing ([`crate::vocabulary::name_key`]). Each
//! option stated on at least [`MIN_OPTION_LISTINGS`] of the fitted listings, and missing from
//! as many, gets an indicator `option=<name>` in the fit; rarer ones stay with the appraiser's
//! own lines.

use std::collections::BTreeMap;

use serde::{Deserialize, Serialize};

use crate::market::Market;
use crate::vocabulary::name_key;

/// Separates option names in a cell: "sunroof; tow package".
pub const SEPARATOR: char = ';';

/// Fewest fitted listings an option must be stated on, and missing from, to get its own term
/// (an indicator estimated from fewer listings than this moves with a handful of prices; our
/// choice, the same order as the ten listings per term the age form asks for).
pub const MIN_OPTION_LISTINGS: usize = 20;

/// The option names of a cell, trimmed, empty ones dropped.
#[must_use]
pub fn split(cell: &str) -> Vec<&str> {
    cell.split(SEPARATOR)
        .map(str::trim)
        .filter(|s| !s.is_empty())
        .collect()
}

/// The matching keys of a cell's options, each once.
#[must_use]
pub fn keys(cell: &str) -> Vec<String> {
    let mut out: Vec<String> = split(cell).into_iter().map(name_key).collect();
    out.sort_unstable();
    out.dedup();
    out
}

/// One option found in a market.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct OptionCount {
    /// The name shown (the commonest spelling; the first in the file on a tie).
    pub name: String,
    /// Listings stating it.
    pub listings: usize,
    /// Each spelling read as this option, with its count, when there were several.
    pub spellings: Vec<(String, usize)>,
}

/// The options stated on `rows` of `market` (every row when `None`), commonest first.
#[must_use]
pub fn count(market: &Market, rows: Option<&[usize]>) -> Vec<OptionCount> {
    // Per distinct cell first: a market has few distinct option lists.
    let mut cells: BTreeMap<crate::vocabulary::NameId, usize> = BTreeMap::new();
    let mut add = |r: usize| *cells.entry(market.options[r]).or_default() += 1;
    match rows {
        Some(rows) => rows.iter().for_each(|&r| add(r)),
        None => (0..market.len()).for_each(add),
    }
    // key → (listings, spellings in first-seen order with counts)
    let mut by_key: BTreeMap<String, (usize, Vec<(String, usize)>)> = BTreeMap::new();
    for (&cell, &n) in &cells {
        let text = market.names.name(cell);
        let mut seen_in_cell: Vec<String> = Vec::new();
        for spelling in split(text) {
            let key = name_key(spelling);
            if seen_in_cell.contains(&key) {
                continue;
            }
            seen_in_cell.push(key.clone());
            let entry = by_key.entry(key).or_default();
            entry.0 += n;
            match entry.1.iter_mut().find(|(s, _)| s == spelling) {
                Some(s) => s.1 += n,
                None => entry.1.push((spelling.to_owned(), n)),
            }
        }
    }
    let mut out: Vec<OptionCount> = by_key
        .into_values()
        .map(|(listings, spellings)| {
            let name = spellings
                .iter()
                .fold(None::<&(String, usize)>, |best, s| match best {
                    Some(b) if b.1 >= s.1 => Some(b),
                    _ => Some(s),
                })
                .map(|s| s.0.clone())
                .unwrap_or_default();
            OptionCount {
                name,
                listings,
                spellings: if spellings.len() > 1 {
                    spellings
                } else {
                    Vec::new()
                },
            }
        })
        .collect();
    out.sort_by(|a, b| {
        b.listings
            .cmp(&a.listings)
            .then_with(|| a.name.cmp(&b.name))
    });
    out
}

/// The options of `rows` that get their own term: stated on at least [`MIN_OPTION_LISTINGS`]
/// of them and missing from at least as many. (key, name shown), by name.
#[must_use]
pub fn fitted_options(market: &Market, rows: &[usize]) -> Vec<(String, String)> {
    let mut out: Vec<(String, String)> = count(market, Some(rows))
        .into_iter()
        .filter(|o| {
            o.listings >= MIN_OPTION_LISTINGS
                && rows.len().saturating_sub(o.listings) >= MIN_OPTION_LISTINGS
        })
        .map(|o| (name_key(&o.name), o.name))
        .collect();
    out.sort_by(|a, b| a.1.cmp(&b.1));
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_cell_is_split_on_the_separator_and_matched_without_case() {
        assert_eq!(
            split(" Sunroof ;tow package;; "),
            ["Sunroof", "tow package"]
        );
        assert_eq!(
            keys("Sunroof; SUNROOF ; Tow  Package"),
            ["sunroof", "tow package"]
        );
        assert!(keys("").is_empty());
    }
}
