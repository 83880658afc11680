//! The import report: every row that could not be used, every value that was dropped, counts.

use std::collections::BTreeMap;

use serde::{Deserialize, Serialize};

/// Why a row could not be used at all.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(tag = "reason", rename_all = "snake_case")]
pub enum RejectReason {
    /// A required value is empty.
    MissingValue {
        /// Column header as written in the file.
        column: String,
    },
    /// A value that must be a number is not one.
    NotANumber {
        /// Column header.
        column: String,
        /// The text found.
        value: String,
    },
    /// Price is zero, negative or absurdly large.
    PriceOutOfRange {
        /// The price found.
        value: f64,
    },
    /// Model year before 1900 or after next year.
    ModelYearOutOfRange {
        /// The year found.
        value: i64,
        /// The latest year accepted.
        latest_allowed: i32,
    },
    /// Odometer negative or above 1,000,000 miles.
    MileageOutOfRange {
        /// The mileage found, in miles.
        value: f64,
    },
}

impl RejectReason {
    /// Short stable code used to count reasons.
    #[must_use]
    pub fn code(&self) -> &'static str {
        match self {
            RejectReason::MissingValue { .. } => "missing_value",
            RejectReason::NotANumber { .. } => "not_a_number",
            RejectReason::PriceOutOfRange { .. } => "price_out_of_range",
            RejectReason::ModelYearOutOfRange { .. } => "model_year_out_of_range",
            RejectReason::MileageOutOfRange { .. } => "mileage_out_of_range",
        }
    }
}

/// A rejection's code (as counted in `rejected_by_reason`) in words for people; the code
/// itself when it is not one of ours.
#[must_use]
pub fn reason_in_words(code: &str) -> &str {
    match code {
        "missing_value" => "a required value is empty",
        "not_a_number" => "a number column holds something else",
        "price_out_of_range" => "asking price out of range",
        "model_year_out_of_range" => "model year out of range",
        "mileage_out_of_range" => "mileage out of range",
        other => other,
    }
}

impl std::fmt::Display for RejectReason {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            RejectReason::MissingValue { column } => write!(f, "column '{column}' is empty"),
            RejectReason::NotANumber { column, value } => {
                write!(f, "column '{column}': '{value}' is not a number")
            }
            RejectReason::PriceOutOfRange { value } => {
                write!(f, "asking price {value} is not between 1 and 10,000,000")
            }
            RejectReason::ModelYearOutOfRange {
                value,
                latest_allowed,
            } => write!(f, "model year {value} is outside 1900..={latest_allowed}"),
            RejectReason::MileageOutOfRange { value } => {
                write!(f, "mileage {value:.0} mi is outside 0..=1,000,000")
            }
        }
    }
}

/// A rejected row.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct RejectedRow {
    /// Line in the file (1 is the header); for a Parquet market, the row across the dataset's
    /// files in path order (from 1).
    pub line: u64,
    /// For a Parquet market: the file and its row ("make=A/model=B/part-0.parquet, row 5").
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub place: Option<String>,
    /// Why it was rejected.
    #[serde(flatten)]
    pub reason: RejectReason,
}

impl RejectedRow {
    /// Where the row is, for people: its file and row for a Parquet market, else its line.
    #[must_use]
    pub fn where_found(&self) -> String {
        place_in_words(self.line, self.place.as_deref())
    }
}

fn place_in_words(line: u64, place: Option<&str>) -> String {
    place.map_or_else(|| format!("line {line}"), str::to_owned)
}

/// An optional value that was unreadable and dropped while its row was kept.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct DroppedValue {
    /// Line in the file (for a Parquet market, the row across the dataset, as for rejections).
    pub line: u64,
    /// For a Parquet market: the file and its row.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub place: Option<String>,
    /// Column header.
    pub column: String,
    /// The text found.
    pub value: String,
    /// What was done instead.
    pub note: String,
}

/// Summary of one import.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
pub struct ImportReport {
    /// File name.
    pub file_name: String,
    /// Field separator used.
    pub delimiter: String,
    /// Data rows read.
    pub rows_read: usize,
    /// Rows imported.
    pub rows_used: usize,
    /// Rows rejected, each with line and reason.
    pub rejected: Vec<RejectedRow>,
    /// Rejections counted by reason code.
    pub rejected_by_reason: BTreeMap<String, usize>,
    /// Optional values dropped (row kept).
    pub dropped_values: Vec<DroppedValue>,
    /// How each recognized column was mapped: file header to field.
    pub column_map: BTreeMap<String, String>,
    /// Headers that matched no field and were ignored.
    pub ignored_columns: Vec<String>,
    /// Odometer unit of the file ("miles" or "kilometers").
    pub odometer_unit: String,
    /// Rows without a condition class, treated as used (≥ 1,000 mi) or new (< 1,000 mi).
    pub condition_inferred: usize,
    /// Blank lines between records, passed over (not rows, not rejections).
    #[serde(default)]
    pub blank_lines: usize,
    /// Makes, models and variants written in several spellings (case, spaces) and read as one.
    #[serde(default)]
    pub merged_spellings: Vec<crate::market::MergedSpelling>,
    /// The options stated in the file, commonest first, with the spellings read as one.
    #[serde(default)]
    pub options_found: Vec<crate::equipment::OptionCount>,
    /// For a Parquet market: the files read, in path order, with the dataset row each starts
    /// at; empty for a CSV file.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub parts_read: Vec<PartRead>,
    /// For a Parquet market: the dataset's files not read because they hold other models.
    #[serde(default)]
    pub parts_skipped: usize,
}

/// One Parquet file read into a market.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct PartRead {
    /// Path from the dataset's root.
    pub file: String,
    /// The dataset row (from 1) of its first row.
    pub first_row: u64,
    /// Its rows.
    pub rows: u64,
}

impl DroppedValue {
    /// Where the value is, for people: its file and row for a Parquet market, else its line.
    #[must_use]
    pub fn where_found(&self) -> String {
        place_in_words(self.line, self.place.as_deref())
    }
}

impl ImportReport {
    /// True when the market was read from Parquet.
    #[must_use]
    pub fn is_parquet(&self) -> bool {
        !self.parts_read.is_empty()
    }

    /// The file and row of dataset row `line` of a Parquet market.
    #[must_use]
    pub fn place_of(&self, line: u64) -> Option<String> {
        let i = self.parts_read.partition_point(|p| p.first_row <= line);
        let part = self.parts_read.get(i.checked_sub(1)?)?;
        (line < part.first_row + part.rows)
            .then(|| format!("{}, row {}", part.file, line - part.first_row + 1))
    }
}

impl ImportReport {
    /// Records a rejection.
    pub fn reject(&mut self, line: u64, reason: RejectReason) {
        *self
            .rejected_by_reason
            .entry(reason.code().to_owned())
            .or_default() += 1;
        self.rejected.push(RejectedRow {
            line,
            place: None,
            reason,
        });
    }
}
