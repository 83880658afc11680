//! Maps a file's header spellings to the fields comptrail understands.

use serde::{Deserialize, Serialize};

/// A field of a market file.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Field {
    /// Model year (required).
    ModelYear,
    /// Make (required).
    Make,
    /// Model (required).
    Model,
    /// Asking price (required).
    AskingPrice,
    /// Odometer in miles (required, or [`Field::Kilometers`]).
    Miles,
    /// Odometer in kilometers (converted to miles).
    Kilometers,
    /// Variant (trim).
    Variant,
    /// Condition class.
    Condition,
    /// Listing date.
    ListedOn,
    /// Sale date.
    SoldOn,
    /// Sale price.
    SalePrice,
    /// VIN.
    Vin,
    /// Seller or source.
    Seller,
    /// Postal code or place.
    Location,
    /// Latitude.
    Latitude,
    /// Longitude.
    Longitude,
    /// Distance in miles.
    DistanceMiles,
    /// Distance in kilometers.
    DistanceKilometres,
    /// Title status.
    Title,
    /// Options text.
    Options,
}

impl Field {
    /// The canonical header name, as written by the demo generator and shown in reports.
    #[must_use]
    pub fn canonical(self) -> &'static str {
        self.spellings()[0]
    }

    /// Accepted header spellings after normalization (lower case, separators as `_`).
    #[must_use]
    pub fn spellings(self) -> &'static [&'static str] {
        match self {
            Field::ModelYear => &[
                "model_year",
                "year",
                "modelyear",
                "my",
                "yr",
                "vehicle_year",
            ],
            Field::Make => &["make", "manufacturer", "maker", "brand", "marque"],
            Field::Model => &["model", "model_name", "vehicle_model"],
            Field::AskingPrice => &[
                "asking_price",
                "price",
                "list_price",
                "listing_price",
                "asking",
                "price_usd",
                "retail_price",
            ],
            Field::Miles => &[
                "miles",
                "mileage",
                "odometer",
                "odometer_miles",
                "mileage_mi",
                "mi",
            ],
            Field::Kilometers => &[
                "kilometers",
                // Headers are read as written, in either spelling.
                "kilometres",
                "km",
                "odometer_km",
                "mileage_km",
                "kms",
            ],
            Field::Variant => &[
                "variant",
                "trim",
                "trim_level",
                "series",
                "grade",
                "edition",
            ],
            Field::Condition => &[
                "condition",
                "condition_class",
                "stock_type",
                "new_used",
                "listing_type",
                "inventory_type",
            ],
            Field::ListedOn => &[
                "listed_on",
                "listing_date",
                "list_date",
                "date_listed",
                "first_seen",
                "listed",
            ],
            Field::SoldOn => &["sold_on", "sale_date", "date_sold", "sold_date"],
            Field::SalePrice => &[
                "sale_price",
                "sold_price",
                "selling_price",
                "transaction_price",
            ],
            Field::Vin => &["vin", "vehicle_id", "vin_number"],
            Field::Seller => &["seller", "dealer", "source", "seller_name", "dealer_name"],
            Field::Location => &[
                "location",
                "postal_code",
                "zip",
                "zip_code",
                "postcode",
                "city",
            ],
            Field::Latitude => &["latitude", "lat"],
            Field::Longitude => &["longitude", "lon", "lng", "long"],
            Field::DistanceMiles => &["distance_mi", "distance", "distance_miles", "miles_away"],
            Field::DistanceKilometres => &[
                "distance_km",
                "distance_kilometers",
                "distance_kilometres",
                "km_away",
            ],
            Field::Title => &["title", "title_status", "title_brand", "brand_status"],
            Field::Options => &["options", "features", "equipment", "packages"],
        }
    }

    /// Every field, required ones first.
    pub const ALL: [Field; 20] = [
        Field::ModelYear,
        Field::Make,
        Field::Model,
        Field::AskingPrice,
        Field::Miles,
        Field::Kilometers,
        Field::Variant,
        Field::Condition,
        Field::ListedOn,
        Field::SoldOn,
        Field::SalePrice,
        Field::Vin,
        Field::Seller,
        Field::Location,
        Field::Latitude,
        Field::Longitude,
        Field::DistanceMiles,
        Field::DistanceKilometres,
        Field::Title,
        Field::Options,
    ];
}

/// Lower-cases a header and folds spaces, dashes, dots and brackets into single underscores,
/// so "Asking Price ($)" and "asking-price" both read as `asking_price`.
#[must_use]
pub fn normalize_header(header: &str) -> String {
    let trimmed = header.trim_start_matches('\u{feff}').trim().to_lowercase();
    let mut out = String::with_capacity(trimmed.len());
    for c in trimmed.chars() {
        if c.is_alphanumeric() {
            out.push(c);
        } else if !out.ends_with('_') {
            out.push('_');
        }
    }
    out.trim_matches('_').to_owned()
}

/// Finds the field a normalized header names, if any. "price_usd" and similar unit suffixes
/// are listed spellings, not guessed.
#[must_use]
pub fn field_for(normalized: &str) -> Option<Field> {
    Field::ALL
        .into_iter()
        .find(|f| f.spellings().contains(&normalized))
}
