//! The subject vehicle: the one being appraised.

use serde::{Deserialize, Serialize};

use crate::condition::Condition;
use crate::market::Listing;

/// The vehicle being appraised.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Subject {
    /// Model year.
    pub model_year: i32,
    /// Make.
    pub make: String,
    /// Model.
    pub model: String,
    /// Variant (trim); `None` when the market has none.
    pub variant: Option<String>,
    /// Odometer in miles.
    pub miles: f64,
    /// Condition class.
    pub condition: Condition,
    /// Options, free text.
    #[serde(default)]
    pub options: Option<String>,
    /// VIN.
    #[serde(default)]
    pub vin: Option<String>,
}

/// Why a subject description could not be read.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum SubjectError {
    /// A required key is absent.
    #[error(
        "subject: '{0}' is missing (write e.g. \"year=2021,make=Quellmark,model=Tessel,variant=Ambrel,miles=48000,condition=used\")"
    )]
    Missing(&'static str),
    /// A value is unreadable.
    #[error("subject: {key}='{value}' is not valid: {why}")]
    BadValue {
        /// Key.
        key: String,
        /// Value.
        value: String,
        /// What was expected.
        why: &'static str,
    },
    /// A key is not known.
    #[error(
        "subject: unknown key '{0}' (known: year, make, model, variant, miles, condition, options, vin)"
    )]
    UnknownKey(String),
    /// A part lacks `=`.
    #[error("subject: '{0}' is not key=value")]
    NotKeyValue(String),
}

impl Subject {
    /// Reads `"year=2021,make=Quellmark,model=Tessel,variant=Ambrel,miles=48000,condition=used"`.
    /// Condition defaults to used; variant, options and VIN are optional.
    pub fn parse(spec: &str) -> Result<Self, SubjectError> {
        let (mut year, mut make, mut model, mut variant, mut miles) =
            (None, None, None, None, None);
        let mut condition = Condition::Used;
        let (mut options, mut vin) = (None, None);
        for part in spec.split(',').map(str::trim).filter(|p| !p.is_empty()) {
            let (key, value) = part
                .split_once('=')
                .ok_or_else(|| SubjectError::NotKeyValue(part.to_owned()))?;
            let (key, value) = (key.trim().to_ascii_lowercase(), value.trim());
            let bad = |why| SubjectError::BadValue {
                key: key.clone(),
                value: value.to_owned(),
                why,
            };
            match key.as_str() {
                "year" | "model_year" => {
                    year = Some(
                        crate::import::parse_year(value)
                            .filter(|y| (1900..=2200).contains(y))
                            .ok_or_else(|| bad("a model year such as 2021"))?
                            as i32,
                    );
                }
                "make" => make = Some(value.to_owned()),
                "model" => model = Some(value.to_owned()),
                "variant" | "trim" => variant = Some(value.to_owned()).filter(|v| !v.is_empty()),
                "miles" | "mileage" => {
                    miles = Some(
                        crate::import::parse_number(value)
                            .filter(|m| (0.0..=crate::import::MAX_MILES).contains(m))
                            .ok_or_else(|| bad("miles between 0 and 1,000,000"))?,
                    );
                }
                "condition" => {
                    condition =
                        Condition::parse(value).ok_or_else(|| bad("new, used or certified"))?;
                }
                "options" => options = Some(value.to_owned()),
                "vin" => vin = Some(value.to_ascii_uppercase()),
                _ => return Err(SubjectError::UnknownKey(key)),
            }
        }
        Ok(Self {
            model_year: year.ok_or(SubjectError::Missing("year"))?,
            make: make.ok_or(SubjectError::Missing("make"))?,
            model: model.ok_or(SubjectError::Missing("model"))?,
            variant,
            miles: miles.ok_or(SubjectError::Missing("miles"))?,
            condition,
            options,
            vin,
        })
    }

    /// A typical vehicle of `market`'s largest make and model, to start from when the subject
    /// is not in a market just opened: its commonest model year, its commonest variant, the
    /// median miles of that year's listings, sold used, no options. `None` for an empty market.
    #[must_use]
    pub fn typical_of(market: &crate::market::Market) -> Option<Self> {
        let (segment, _) = market.segments().into_iter().next()?;
        let rows = market.rows_of(segment);
        let mut years: std::collections::BTreeMap<i32, usize> = std::collections::BTreeMap::new();
        for &r in &rows {
            *years.entry(market.model_year[r]).or_default() += 1;
        }
        let model_year = years
            .iter()
            .max_by(|a, b| a.1.cmp(b.1).then(a.0.cmp(b.0)))
            .map(|(&y, _)| y)?;
        let miles: Vec<f64> = rows
            .iter()
            .filter(|&&r| market.model_year[r] == model_year)
            .map(|&r| market.miles[r])
            .collect();
        Some(Self {
            model_year,
            make: market.names.name(segment.make).to_owned(),
            model: market.names.name(segment.model).to_owned(),
            variant: market
                .most_common_variant(segment)
                .filter(|v| v != crate::vocabulary::NO_VARIANT),
            miles: crate::stats::median(&miles).unwrap_or(0.0).round(),
            condition: Condition::Used,
            options: None,
            vin: None,
        })
    }

    /// A subject with the attributes of a listing (picking a listing as the subject).
    #[must_use]
    pub fn from_listing(listing: &Listing) -> Self {
        Self {
            model_year: listing.model_year,
            make: listing.make.clone(),
            model: listing.model.clone(),
            variant: listing.variant.clone(),
            miles: listing.miles,
            condition: listing.condition,
            options: listing.options.clone(),
            vin: listing.vin.clone(),
        }
    }

    /// Whether `other` describes the same vehicle: the same numbers, and names that match by
    /// [`crate::vocabulary::name_key`] (one may be typed "QUELLMARK", the other spelled as the
    /// market spells it).
    #[must_use]
    pub fn same_vehicle(&self, other: &Subject) -> bool {
        use crate::vocabulary::name_key;
        let key = |v: &Option<String>| v.as_deref().map(name_key);
        self.model_year == other.model_year
            && self.miles.to_bits() == other.miles.to_bits()
            && self.condition == other.condition
            && name_key(&self.make) == name_key(&other.make)
            && name_key(&self.model) == name_key(&other.model)
            && key(&self.variant) == key(&other.variant)
            && self.vin == other.vin
            && self.options == other.options
    }

    /// One-line description, e.g. "2021 Quellmark Tessel Ambrel, 48,000 mi, used".
    #[must_use]
    pub fn describe(&self) -> String {
        format!(
            "{} {} {}{}, {} mi, {}",
            self.model_year,
            self.make,
            self.model,
            self.variant
                .as_deref()
                .map(|v| format!(" {v}"))
                .unwrap_or_default(),
            crate::format::thousands(self.miles),
            self.condition
        )
    }
}
