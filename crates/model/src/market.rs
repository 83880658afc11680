//! The imported market: one column per attribute, one row per listing.
//!
//! Columns rather than row structs keep a million listings compact and make the fit a straight
//! scan. [`Market::listing`] gives an owned row for display and for the saved evidence.

use chrono::NaiveDate;
use serde::{Deserialize, Serialize};

use crate::condition::{Condition, TitleStatus};
use crate::texts::TextColumn;
use crate::vocabulary::{NO_NAME, NameId, Vocabulary};

/// Where a market came from, kept with every appraisal so the evidence can be traced.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize, Default)]
pub struct MarketSource {
    /// File name (or "demo market" for generated data).
    pub file_name: String,
    /// Data rows in the file, header excluded.
    pub rows_read: usize,
    /// XXH3-64 hash of the file's bytes (see [`content_hash`]); for a Parquet market, of the
    /// dataset as read (see [`crate::import::parquet_fingerprint`]).
    pub content_hash: String,
    /// For a partitioned Parquet market read for some makes and models only: those (only their
    /// partitions were read, and the fingerprint covers those files' bytes).
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub models_read: Vec<(String, String)>,
}

/// A make and model pair: the unit a depreciation fit is made for.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct Segment {
    /// Interned make.
    pub make: NameId,
    /// Interned model.
    pub model: NameId,
}

/// All listings of a market, column by column.
#[derive(Debug, Clone, Default)]
pub struct Market {
    /// Provenance.
    pub source: MarketSource,
    /// Interned makes, models, variants, sellers, locations and options.
    pub names: Vocabulary,
    /// Line of the listing in its file (1 is the header).
    pub line: Vec<u64>,
    /// Model year.
    pub model_year: Vec<i32>,
    /// Make.
    pub make: Vec<NameId>,
    /// Model.
    pub model: Vec<NameId>,
    /// Variant (trim); [`NO_NAME`] when not stated.
    pub variant: Vec<NameId>,
    /// Asking price in the file's currency.
    pub asking_price: Vec<f64>,
    /// Odometer in miles (kilometers are converted on import).
    pub miles: Vec<f64>,
    /// Condition class.
    pub condition: Vec<Condition>,
    /// Date first listed.
    pub listed_on: Vec<Option<NaiveDate>>,
    /// Date sold, when the feed records sales.
    pub sold_on: Vec<Option<NaiveDate>>,
    /// Sale price, when the feed records sales.
    pub sale_price: Vec<Option<f64>>,
    /// Vehicle identification number.
    pub vin: TextColumn,
    /// Seller or source; [`NO_NAME`] when not stated.
    pub seller: Vec<NameId>,
    /// Postal code or place name; [`NO_NAME`] when not stated.
    pub location: Vec<NameId>,
    /// Latitude and longitude in degrees.
    pub coordinates: Vec<Option<(f32, f32)>>,
    /// Distance from the appraiser's market center in miles, when the feed gives it.
    pub distance_miles: Vec<Option<f32>>,
    /// Title brand, when stated.
    pub title: Vec<Option<TitleStatus>>,
    /// Free-text options; [`NO_NAME`] when not stated.
    pub options: Vec<NameId>,
}

/// One listing as owned values, for tables, reports and saved sessions.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Listing {
    /// Row index in the market.
    pub row: usize,
    /// Line in the source file.
    pub line: u64,
    /// Model year.
    pub model_year: i32,
    /// Make.
    pub make: String,
    /// Model.
    pub model: String,
    /// Variant (trim).
    pub variant: Option<String>,
    /// Asking price.
    pub asking_price: f64,
    /// Odometer in miles.
    pub miles: f64,
    /// Condition class.
    pub condition: Condition,
    /// Date first listed.
    pub listed_on: Option<NaiveDate>,
    /// Date sold.
    pub sold_on: Option<NaiveDate>,
    /// Sale price.
    pub sale_price: Option<f64>,
    /// VIN.
    pub vin: Option<String>,
    /// Seller or source.
    pub seller: Option<String>,
    /// Location.
    pub location: Option<String>,
    /// Latitude and longitude.
    pub coordinates: Option<(f32, f32)>,
    /// Distance in miles, when given by the feed.
    pub distance_miles: Option<f32>,
    /// Title brand.
    pub title: Option<TitleStatus>,
    /// Options text.
    pub options: Option<String>,
}

impl Listing {
    /// A used listing of `make` `model` with only what every listing has: the file line, model
    /// year, miles and asking price; the optional columns empty (fill them with struct update
    /// syntax). Its row is its line less the header, as an import numbers it.
    #[must_use]
    pub fn asking(
        line: u64,
        (make, model): (&str, &str),
        model_year: i32,
        miles: f64,
        asking_price: f64,
    ) -> Self {
        Self {
            row: usize::try_from(line.saturating_sub(2)).unwrap_or(usize::MAX),
            line,
            model_year,
            make: make.to_owned(),
            model: model.to_owned(),
            variant: None,
            asking_price,
            miles,
            condition: Condition::Used,
            listed_on: None,
            sold_on: None,
            sale_price: None,
            vin: None,
            seller: None,
            location: None,
            coordinates: None,
            distance_miles: None,
            title: None,
            options: None,
        }
    }

    /// Where the evidence came from: "Seller 075, Marrow Bend, VIN QUT…, listed 2026-11-20"
    /// (source, identifier, location and date, as a valuation report must give them).
    #[must_use]
    pub fn source(&self) -> String {
        format!(
            "{}, {}, VIN {}, listed {}",
            self.seller.as_deref().unwrap_or("unknown seller"),
            self.location.as_deref().unwrap_or("unknown place"),
            self.vin.as_deref().unwrap_or("none"),
            self.listed_on
                .map_or_else(|| "on an unknown date".to_owned(), |d| d.to_string())
        )
    }

    /// One line for tooltips and tables: "line 812: 2021 Tessel Ambrel, 41,000 mi, used, $30,400".
    #[must_use]
    pub fn describe(&self) -> String {
        format!(
            "line {}: {} {} {}, {} mi, {}, {}",
            self.line,
            self.model_year,
            self.model,
            crate::vocabulary::variant_text(self.variant.as_deref()),
            crate::format::thousands(self.miles),
            self.condition,
            crate::format::money(self.asking_price)
        )
    }
}

impl Market {
    /// Number of listings.
    #[must_use]
    pub fn len(&self) -> usize {
        self.asking_price.len()
    }

    /// Whether the market holds no listing.
    #[must_use]
    pub fn is_empty(&self) -> bool {
        self.asking_price.is_empty()
    }

    /// The segment of row `row`.
    #[must_use]
    pub fn segment_of(&self, row: usize) -> Segment {
        Segment {
            make: self.make[row],
            model: self.model[row],
        }
    }

    /// "Make Model" text of a segment.
    #[must_use]
    pub fn segment_name(&self, segment: Segment) -> String {
        format!(
            "{} {}",
            self.names.name(segment.make),
            self.names.name(segment.model)
        )
    }

    /// Finds a segment by make and model names (ASCII case ignored).
    #[must_use]
    pub fn find_segment(&self, make: &str, model: &str) -> Option<Segment> {
        let make = self.names.id_ignore_case(make)?;
        let model = self.names.id_ignore_case(model)?;
        let segment = Segment { make, model };
        (0..self.len())
            .any(|i| self.segment_of(i) == segment)
            .then_some(segment)
    }

    /// Every segment with its listing count, largest first.
    #[must_use]
    pub fn segments(&self) -> Vec<(Segment, usize)> {
        let mut counts: foldhash::HashMap<Segment, usize> = foldhash::HashMap::default();
        for i in 0..self.len() {
            *counts.entry(self.segment_of(i)).or_default() += 1;
        }
        let mut list: Vec<(Segment, usize)> = counts.into_iter().collect();
        list.sort_by(|a, b| {
            b.1.cmp(&a.1)
                .then_with(|| self.segment_name(a.0).cmp(&self.segment_name(b.0)))
        });
        list
    }

    /// Rows belonging to `segment`, in file order.
    #[must_use]
    pub fn rows_of(&self, segment: Segment) -> Vec<usize> {
        (0..self.len())
            .filter(|&i| self.make[i] == segment.make && self.model[i] == segment.model)
            .collect()
    }

    /// The variant most listings of `segment` carry (ties go to the name first in order);
    /// `None` when most state none. A subject switched to this segment takes it, so it stays a
    /// vehicle the market can price.
    #[must_use]
    pub fn most_common_variant(&self, segment: Segment) -> Option<String> {
        let mut counts: std::collections::BTreeMap<&str, (usize, NameId)> =
            std::collections::BTreeMap::new();
        for r in self.rows_of(segment) {
            let id = self.variant[r];
            counts
                .entry(self.names.variant_name(id))
                .or_insert((0, id))
                .0 += 1;
        }
        let (_, (_, id)) = counts.into_iter().rev().max_by_key(|(_, (n, _))| *n)?;
        self.optional_name(id)
    }

    /// Text of an optional interned column value.
    #[must_use]
    pub fn optional_name(&self, id: NameId) -> Option<String> {
        (id != NO_NAME).then(|| self.names.name(id).to_owned())
    }

    /// Variant text of a row, [`crate::vocabulary::NO_VARIANT`] when the feed did not state one.
    #[must_use]
    pub fn variant_name(&self, row: usize) -> &str {
        self.names.variant_name(self.variant[row])
    }

    /// The latest listing or sale date in the market; the natural "as of" date for it.
    #[must_use]
    pub fn latest_date(&self) -> Option<NaiveDate> {
        self.listed_on
            .iter()
            .chain(self.sold_on.iter())
            .flatten()
            .max()
            .copied()
    }

    /// An owned copy of row `row`.
    #[must_use]
    pub fn listing(&self, row: usize) -> Listing {
        Listing {
            row,
            line: self.line[row],
            model_year: self.model_year[row],
            make: self.names.name(self.make[row]).to_owned(),
            model: self.names.name(self.model[row]).to_owned(),
            variant: self.optional_name(self.variant[row]),
            asking_price: self.asking_price[row],
            miles: self.miles[row],
            condition: self.condition[row],
            listed_on: self.listed_on[row],
            sold_on: self.sold_on[row],
            sale_price: self.sale_price[row],
            vin: self.vin.get(row).map(str::to_owned),
            seller: self.optional_name(self.seller[row]),
            location: self.optional_name(self.location[row]),
            coordinates: self.coordinates[row],
            distance_miles: self.distance_miles[row],
            title: self.title[row],
            options: self.optional_name(self.options[row]),
        }
    }

    /// Makes room for `additional` more rows in every column (so a market being built does not
    /// copy itself as it grows).
    pub fn reserve(&mut self, additional: usize) {
        self.line.reserve(additional);
        self.model_year.reserve(additional);
        self.make.reserve(additional);
        self.model.reserve(additional);
        self.variant.reserve(additional);
        self.asking_price.reserve(additional);
        self.miles.reserve(additional);
        self.condition.reserve(additional);
        self.listed_on.reserve(additional);
        self.sold_on.reserve(additional);
        self.sale_price.reserve(additional);
        self.vin.reserve(additional, 17);
        self.seller.reserve(additional);
        self.location.reserve(additional);
        self.coordinates.reserve(additional);
        self.distance_miles.reserve(additional);
        self.title.reserve(additional);
        self.options.reserve(additional);
    }

    /// Appends another market's rows, re-interning its names into this market's vocabulary.
    pub fn append(&mut self, other: Market) {
        let ids: Vec<NameId> = (0..other.names.len() as NameId)
            .map(|id| self.names.intern(other.names.name(id)))
            .collect();
        let map = |id: NameId| {
            if id == NO_NAME {
                NO_NAME
            } else {
                ids[id as usize]
            }
        };
        self.line.extend(other.line);
        self.model_year.extend(other.model_year);
        self.make.extend(other.make.into_iter().map(map));
        self.model.extend(other.model.into_iter().map(map));
        self.variant.extend(other.variant.into_iter().map(map));
        self.asking_price.extend(other.asking_price);
        self.miles.extend(other.miles);
        self.condition.extend(other.condition);
        self.listed_on.extend(other.listed_on);
        self.sold_on.extend(other.sold_on);
        self.sale_price.extend(other.sale_price);
        self.vin.append(&other.vin);
        self.seller.extend(other.seller.into_iter().map(map));
        self.location.extend(other.location.into_iter().map(map));
        self.coordinates.extend(other.coordinates);
        self.distance_miles.extend(other.distance_miles);
        self.title.extend(other.title);
        self.options.extend(other.options.into_iter().map(map));
    }

    /// Merges the spellings of one make, model or variant that differ only in case or spaces
    /// ("QUELLMARK", "Quellmark", "tessel ", "Tessel"): each column's ids are replaced by its
    /// commonest spelling's (the first in the file on a tie), so the market holds one name,
    /// one model. Returns what was merged, for the import report.
    pub fn merge_spellings(&mut self) -> Vec<MergedSpelling> {
        let mut merged = Vec::new();
        for field in ["make", "model", "variant"] {
            let column = match field {
                "make" => &self.make,
                "model" => &self.model,
                _ => &self.variant,
            };
            let mut counts = vec![0usize; self.names.len()];
            for &id in column {
                if id != NO_NAME {
                    counts[id as usize] += 1;
                }
            }
            let mut by_key: std::collections::BTreeMap<String, Vec<NameId>> =
                std::collections::BTreeMap::new();
            for (id, &n) in counts.iter().enumerate() {
                if n > 0 {
                    by_key
                        .entry(crate::vocabulary::name_key(self.names.name(id as NameId)))
                        .or_default()
                        .push(id as NameId);
                }
            }
            let mut remap: Vec<NameId> = (0..self.names.len() as NameId).collect();
            for ids in by_key.into_values().filter(|ids| ids.len() > 1) {
                // Ids ascend in order of first appearance: max_by_key keeps the last maximum,
                // so walk them in reverse to keep the first.
                let shown = ids
                    .iter()
                    .rev()
                    .copied()
                    .max_by_key(|&id| counts[id as usize])
                    .unwrap_or(ids[0]);
                for &id in &ids {
                    remap[id as usize] = shown;
                    if id != shown {
                        self.names.alias(id, shown);
                    }
                }
                merged.push(MergedSpelling {
                    field: field.to_owned(),
                    shown: self.names.name(shown).to_owned(),
                    spellings: ids
                        .iter()
                        .map(|&id| (self.names.name(id).to_owned(), counts[id as usize]))
                        .collect(),
                });
            }
            let column = match field {
                "make" => &mut self.make,
                "model" => &mut self.model,
                _ => &mut self.variant,
            };
            for id in column.iter_mut().filter(|id| **id != NO_NAME) {
                *id = remap[*id as usize];
            }
        }
        merged
    }

    /// Appends an owned listing (used to rebuild a market from saved evidence and in tests).
    pub fn push(&mut self, listing: &Listing) {
        let intern = |names: &mut Vocabulary, v: &Option<String>| {
            v.as_deref().map_or(NO_NAME, |s| names.intern(s))
        };
        self.line.push(listing.line);
        self.model_year.push(listing.model_year);
        let make = self.names.intern(&listing.make);
        self.make.push(make);
        let model = self.names.intern(&listing.model);
        self.model.push(model);
        let variant = intern(&mut self.names, &listing.variant);
        self.variant.push(variant);
        self.asking_price.push(listing.asking_price);
        self.miles.push(listing.miles);
        self.condition.push(listing.condition);
        self.listed_on.push(listing.listed_on);
        self.sold_on.push(listing.sold_on);
        self.sale_price.push(listing.sale_price);
        self.vin.push(listing.vin.as_deref());
        let seller = intern(&mut self.names, &listing.seller);
        self.seller.push(seller);
        let location = intern(&mut self.names, &listing.location);
        self.location.push(location);
        self.coordinates.push(listing.coordinates);
        self.distance_miles.push(listing.distance_miles);
        self.title.push(listing.title);
        let options = intern(&mut self.names, &listing.options);
        self.options.push(options);
    }
}

/// Spellings of one name merged on import.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct MergedSpelling {
    /// The column: `make`, `model` or `variant`.
    pub field: String,
    /// The name shown for all of them (the commonest spelling).
    pub shown: String,
    /// Each spelling as written, with how many rows used it.
    pub spellings: Vec<(String, usize)>,
}

/// XXH3 64-bit hash of bytes, as 16 hex digits prefixed "xxh3:": a content fingerprint for
/// the saved evidence, to tell whether a market file changed (not a security hash).
#[must_use]
pub fn content_hash(bytes: &[u8]) -> String {
    format!("xxh3:{:016x}", xxhash_rust::xxh3::xxh3_64(bytes))
}
