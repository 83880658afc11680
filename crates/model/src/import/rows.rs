//! Turning one batch of tokenized text (a polars frame with every column as text) into market
//! rows. The required values are read row by row, so that a rejected row gets the first reason
//! in the column order; the optional values are then read one column at a time for the rows
//! kept, which keeps each pass over memory short and simple.

use polars::prelude::{DataFrame, StringChunked};

use super::headers::Field;
use super::report::{DroppedValue, RejectReason};
use super::values::{parse_date, parse_number, parse_year, tidy};
use super::{
    BLANK_LINE, HeaderMapping, ImportOptions, KM_PER_MILE, MAX_MILES, MAX_PRICE, OdometerUnit,
};
use crate::condition::{Condition, TitleStatus};
use crate::market::Market;
use crate::vocabulary::{NO_NAME, NameId, Vocabulary};

/// What reading rows found besides the rows kept.
#[derive(Default)]
pub(super) struct RowIssues {
    /// Rows read, blank lines not counted.
    pub rows_read: usize,
    /// Rejected rows: (line, reason), in file order.
    pub rejected: Vec<(u64, RejectReason)>,
    /// Optional values dropped, in file order (by line, then column).
    pub dropped: Vec<DroppedValue>,
    /// Rows whose condition class was inferred from the odometer.
    pub condition_inferred: usize,
    /// Blank lines passed over (not rows of the market, not rejections).
    pub blank_lines: usize,
}

impl RowIssues {
    /// Adds what a later part of the file found.
    pub fn append(&mut self, later: RowIssues) {
        self.rows_read += later.rows_read;
        self.rejected.extend(later.rejected);
        self.dropped.extend(later.dropped);
        self.condition_inferred += later.condition_inferred;
        self.blank_lines += later.blank_lines;
    }
}

/// The frame's text columns for each field the header maps.
struct Columns<'a> {
    year: &'a StringChunked,
    make: &'a StringChunked,
    model: &'a StringChunked,
    price: &'a StringChunked,
    odometer: &'a StringChunked,
    odometer_field: Field,
    optional: [Option<&'a StringChunked>; OPTIONAL_FIELDS.len()],
}

/// Optional fields: every field after the six that identify and price a vehicle (the required
/// ones and the kilometre alternative).
const OPTIONAL_FIELDS: &[Field] = Field::ALL.split_at(6).1;

impl<'a> Columns<'a> {
    fn of(df: &'a DataFrame, mapping: &HeaderMapping) -> Result<Self, String> {
        let col = |field| text_column(df, mapping, field);
        let need = |field| {
            col(field)?
                .ok_or_else(|| format!("column {} vanished after mapping", field.canonical()))
        };
        let odometer_field = match mapping.odometer {
            OdometerUnit::Miles => Field::Miles,
            OdometerUnit::Kilometers => Field::Kilometers,
        };
        let mut optional = [None; OPTIONAL_FIELDS.len()];
        for (slot, field) in optional.iter_mut().zip(OPTIONAL_FIELDS.iter().copied()) {
            *slot = col(field)?;
        }
        Ok(Self {
            year: need(Field::ModelYear)?,
            make: need(Field::Make)?,
            model: need(Field::Model)?,
            price: need(Field::AskingPrice)?,
            odometer: need(odometer_field)?,
            odometer_field,
            optional,
        })
    }

    fn get(&self, field: Field) -> Option<&'a StringChunked> {
        let i = OPTIONAL_FIELDS.iter().position(|&f| f == field)?;
        self.optional[i]
    }
}

fn text_column<'a>(
    df: &'a DataFrame,
    mapping: &HeaderMapping,
    field: Field,
) -> Result<Option<&'a StringChunked>, String> {
    let Some(index) = mapping.index(field) else {
        return Ok(None);
    };
    let column = df.columns().get(index).ok_or_else(|| {
        format!(
            "column {} of the header is missing from the data",
            index + 1
        )
    })?;
    column.str().map(Some).map_err(|e| e.to_string())
}

/// Every cell of a text column in row order, trimmed. The tokenizer stores a missing field as
/// an empty text marked null; the mark is not read, the empty text is (an empty field and a
/// missing one mean the same here, and the tests of missing values and short rows hold it).
fn cells(ca: &StringChunked) -> impl Iterator<Item = &str> + '_ {
    ca.downcast_iter()
        .flat_map(|array| array.values_iter().map(tidy))
}

/// The cells of the rows kept, with their row in the market being built.
fn kept_cells<'c>(
    ca: &'c StringChunked,
    kept: &'c [bool],
    first_market_row: usize,
) -> impl Iterator<Item = (usize, &'c str)> + 'c {
    cells(ca)
        .zip(kept)
        .filter(|(_, keep)| **keep)
        .enumerate()
        .map(move |(k, (text, _))| (first_market_row + k, text))
}

/// Reads the rows of one frame into `market` (appending), interning names into the market's
/// own vocabulary. `line_of` gives the file line of each of the frame's rows, or
/// [`BLANK_LINE`] for a blank line, which is passed over.
pub(super) fn read_frame_rows(
    df: &DataFrame,
    mapping: &HeaderMapping,
    options: ImportOptions,
    line_of: &dyn Fn(usize) -> u64,
    market: &mut Market,
    issues: &mut RowIssues,
) -> Result<(), String> {
    let columns = Columns::of(df, mapping)?;
    let first = market.len();
    let kept = read_required(&columns, mapping, options, line_of, market, issues);
    let mut reader = OptionalReader {
        columns: &columns,
        mapping,
        kept: &kept,
        first,
        dropped: Vec::new(),
    };
    reader.read(market, &mut issues.condition_inferred);
    let mut dropped = reader.dropped;
    // Each column reported its own drops; the report lists them by line, then column.
    dropped.sort_by_key(|d| d.line);
    issues.dropped.extend(dropped);
    Ok(())
}

/// Reads year, make, model, price and odometer of every row; pushes the rows that have all five
/// and returns which rows were kept.
fn read_required(
    columns: &Columns<'_>,
    mapping: &HeaderMapping,
    options: ImportOptions,
    line_of: &dyn Fn(usize) -> u64,
    market: &mut Market,
    issues: &mut RowIssues,
) -> Vec<bool> {
    let km = columns.odometer_field == Field::Kilometers;
    let mut kept = Vec::with_capacity(columns.year.len());
    let mut cache = (LastName::default(), LastName::default());
    let rows = cells(columns.year)
        .zip(cells(columns.make))
        .zip(cells(columns.model))
        .zip(cells(columns.price))
        .zip(cells(columns.odometer));
    for (i, ((((year, make), model), price), odometer)) in rows.enumerate() {
        let line = line_of(i);
        if line == BLANK_LINE {
            issues.blank_lines += 1;
            kept.push(false);
            continue;
        }
        issues.rows_read += 1;
        let texts = [year, make, model, price, odometer];
        match required_values(texts, mapping, columns.odometer_field, km, options) {
            Ok((model_year, asking_price, miles)) => {
                market.line.push(line);
                market.model_year.push(model_year);
                market.make.push(cache.0.get(&mut market.names, make));
                market.model.push(cache.1.get(&mut market.names, model));
                market.asking_price.push(asking_price);
                market.miles.push(miles);
                kept.push(true);
            }
            Err(reason) => {
                issues.rejected.push((line, reason));
                kept.push(false);
            }
        }
    }
    kept
}

/// Year, price and miles of a row from its five required texts (year, make, model, price,
/// odometer), or the first reason it cannot be used.
fn required_values(
    [year, make, model, price, odometer]: [&str; 5],
    mapping: &HeaderMapping,
    odometer_field: Field,
    km: bool,
    options: ImportOptions,
) -> Result<(i32, f64, f64), RejectReason> {
    let missing = |f: Field| RejectReason::MissingValue {
        column: mapping.header(f).to_owned(),
    };
    for (text, field) in [
        (year, Field::ModelYear),
        (make, Field::Make),
        (model, Field::Model),
        (price, Field::AskingPrice),
        (odometer, odometer_field),
    ] {
        if text.is_empty() {
            return Err(missing(field));
        }
    }
    let not_number = |f: Field, v: &str| RejectReason::NotANumber {
        column: mapping.header(f).to_owned(),
        value: v.to_owned(),
    };
    let model_year = parse_year(year).ok_or_else(|| not_number(Field::ModelYear, year))?;
    if !(1900..=i64::from(options.latest_model_year)).contains(&model_year) {
        return Err(RejectReason::ModelYearOutOfRange {
            value: model_year,
            latest_allowed: options.latest_model_year,
        });
    }
    let asking_price = parse_number(price).ok_or_else(|| not_number(Field::AskingPrice, price))?;
    if !(1.0..=MAX_PRICE).contains(&asking_price) {
        return Err(RejectReason::PriceOutOfRange {
            value: asking_price,
        });
    }
    let reading = parse_number(odometer).ok_or_else(|| not_number(odometer_field, odometer))?;
    let miles = if km { reading / KM_PER_MILE } else { reading };
    if !(0.0..=MAX_MILES).contains(&miles) {
        return Err(RejectReason::MileageOutOfRange { value: miles });
    }
    Ok((model_year as i32, asking_price, miles))
}

/// Remembers the last string interned for a column: listing feeds are often sorted, so many
/// lookups hit.
#[derive(Default)]
struct LastName {
    text: String,
    id: NameId,
}

impl LastName {
    fn get(&mut self, names: &mut Vocabulary, text: &str) -> NameId {
        if text.is_empty() {
            return NO_NAME;
        }
        if self.text != text || self.text.is_empty() {
            self.id = names.intern(text);
            text.clone_into(&mut self.text);
        }
        self.id
    }
}

/// Reads the optional columns, one at a time, for the rows kept.
struct OptionalReader<'r, 'a> {
    columns: &'r Columns<'a>,
    mapping: &'r HeaderMapping,
    kept: &'r [bool],
    /// The market's row of the batch's first kept row.
    first: usize,
    dropped: Vec<DroppedValue>,
}

impl OptionalReader<'_, '_> {
    fn read(&mut self, market: &mut Market, condition_inferred: &mut usize) {
        let rows = market.len() - self.first;
        let names = |reader: &Self, market: &mut Market, field: Field| -> Vec<NameId> {
            let mut cache = LastName::default();
            match reader.columns.get(field) {
                Some(ca) => kept_cells(ca, reader.kept, 0)
                    .map(|(_, t)| cache.get(&mut market.names, t))
                    .collect(),
                None => vec![NO_NAME; rows],
            }
        };
        let variant = names(self, market, Field::Variant);
        market.variant.extend(variant);
        self.read_conditions(market, condition_inferred);
        let listed = self.dates(market, Field::ListedOn);
        market.listed_on.extend(listed);
        let sold = self.dates(market, Field::SoldOn);
        market.sold_on.extend(sold);
        let sale = self.numbers(market, Field::SalePrice);
        market
            .sale_price
            .extend(sale.into_iter().map(|p| p.filter(|p| *p > 0.0)));
        match self.columns.get(Field::Vin) {
            Some(ca) => {
                for (_, text) in kept_cells(ca, self.kept, 0) {
                    market.vin.push_uppercase(text);
                }
            }
            None => market.vin.push_none(rows),
        }
        let seller = names(self, market, Field::Seller);
        market.seller.extend(seller);
        let location = names(self, market, Field::Location);
        market.location.extend(location);
        let latitude = self.numbers(market, Field::Latitude);
        let longitude = self.numbers(market, Field::Longitude);
        market
            .coordinates
            .extend(latitude.into_iter().zip(longitude).map(|pair| match pair {
                (Some(la), Some(lo))
                    if (-90.0..=90.0).contains(&la) && (-180.0..=180.0).contains(&lo) =>
                {
                    Some((la as f32, lo as f32))
                }
                _ => None,
            }));
        self.read_distances(market);
        match self.columns.get(Field::Title) {
            Some(ca) => market.title.extend(
                kept_cells(ca, self.kept, 0)
                    .map(|(_, t)| (!t.is_empty()).then(|| TitleStatus::parse(t)).flatten()),
            ),
            None => market.title.resize(market.len(), None),
        }
        let options = names(self, market, Field::Options);
        market.options.extend(options);
    }

    fn drop(&mut self, market: &Market, row: usize, field: Field, value: &str, note: &str) {
        self.dropped.push(DroppedValue {
            line: market.line[row],
            place: None,
            column: self.mapping.header(field).to_owned(),
            value: value.to_owned(),
            note: note.to_owned(),
        });
    }

    fn read_conditions(&mut self, market: &mut Market, inferred: &mut usize) {
        let from_miles = |miles: f64| {
            if miles < 1_000.0 {
                Condition::New
            } else {
                Condition::Used
            }
        };
        let Some(ca) = self.columns.get(Field::Condition) else {
            *inferred += market.len() - self.first;
            let classes: Vec<Condition> = market.miles[self.first..]
                .iter()
                .map(|&m| from_miles(m))
                .collect();
            market.condition.extend(classes);
            return;
        };
        for (row, text) in kept_cells(ca, self.kept, self.first) {
            let parsed = (!text.is_empty()).then(|| Condition::parse(text)).flatten();
            if parsed.is_none() && !text.is_empty() {
                self.drop(
                    market,
                    row,
                    Field::Condition,
                    text,
                    "unknown condition class; inferred from mileage",
                );
            }
            *inferred += usize::from(parsed.is_none());
            let class = parsed.unwrap_or_else(|| from_miles(market.miles[row]));
            market.condition.push(class);
        }
    }

    fn dates(&mut self, market: &Market, field: Field) -> Vec<Option<chrono::NaiveDate>> {
        let Some(ca) = self.columns.get(field) else {
            return vec![None; market.len() - self.first];
        };
        kept_cells(ca, self.kept, self.first)
            .map(|(row, text)| {
                if text.is_empty() {
                    return None;
                }
                let date = parse_date(text);
                if date.is_none() {
                    self.drop(
                        market,
                        row,
                        field,
                        text,
                        "not a date (use YYYY-MM-DD); left empty",
                    );
                }
                date
            })
            .collect()
    }

    fn numbers(&mut self, market: &Market, field: Field) -> Vec<Option<f64>> {
        let Some(ca) = self.columns.get(field) else {
            return vec![None; market.len() - self.first];
        };
        kept_cells(ca, self.kept, self.first)
            .map(|(row, text)| self.number(market, row, field, text))
            .collect()
    }

    fn number(&mut self, market: &Market, row: usize, field: Field, text: &str) -> Option<f64> {
        if text.is_empty() {
            return None;
        }
        let value = parse_number(text);
        if value.is_none() {
            self.drop(market, row, field, text, "not a number; left empty");
        }
        value
    }

    /// Distance in miles, else in kilometers (read only where miles gave none).
    fn read_distances(&mut self, market: &mut Market) {
        let mut distance = self.numbers(market, Field::DistanceMiles);
        if let Some(ca) = self.columns.get(Field::DistanceKilometres) {
            for (row, text) in kept_cells(ca, self.kept, self.first) {
                let slot = row - self.first;
                if distance[slot].is_none() {
                    distance[slot] = self
                        .number(market, row, Field::DistanceKilometres, text)
                        .map(|km| km / KM_PER_MILE);
                }
            }
        }
        market.distance_miles.extend(
            distance
                .into_iter()
                .map(|d| d.filter(|d| *d >= 0.0).map(|d| d as f32)),
        );
    }
}
