//! Importing a market CSV: map its columns, read every row, report every row that could not be
//! used (line and reason) and every optional value that was dropped. Nothing is dropped silently.
//!
//! polars does the tokenising (multi-threaded, quote-aware) with every column read as text;
//! values are then parsed here so that each failure can name its line, column and value.

mod headers;
mod report;
mod values;

use std::collections::HashMap;
use std::fmt::Write as _;
use std::io::Cursor;
use std::path::Path;

use chrono::{Datelike, NaiveDate};
use polars::prelude::{CsvReadOptions, DataFrame, SerReader, StringChunked};

use crate::condition::{Condition, TitleStatus};
use crate::market::{Market, MarketSource, content_hash};
use crate::vocabulary::{NO_NAME, NameId, Vocabulary};

pub use headers::{Field, field_for, normalise_header};
pub use report::{DroppedValue, ImportReport, RejectReason, RejectedRow};
pub use values::{parse_date, parse_number, parse_year};

/// Kilometres per statute mile.
pub const KM_PER_MILE: f64 = 1.609_344;
/// Highest odometer reading accepted, in miles.
pub const MAX_MILES: f64 = 1_000_000.0;
/// Highest asking price accepted.
pub const MAX_PRICE: f64 = 10_000_000.0;

/// The unit of an odometer column whose header does not say.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum OdometerUnit {
    /// Statute miles.
    #[default]
    Miles,
    /// Kilometres.
    Kilometres,
}

/// Settings for an import.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ImportOptions {
    /// Field separator; detected from the header when `None`.
    pub delimiter: Option<u8>,
    /// Unit of an odometer column named only "mileage" or "odometer".
    pub odometer_unit: OdometerUnit,
    /// Latest model year accepted (normally next calendar year).
    pub latest_model_year: i32,
}

impl Default for ImportOptions {
    fn default() -> Self {
        Self {
            delimiter: None,
            odometer_unit: OdometerUnit::Miles,
            latest_model_year: today().year() + 1,
        }
    }
}

/// Today's date from the system clock (UTC).
#[must_use]
pub fn today() -> NaiveDate {
    let secs = std::time::SystemTime::now()
        .duration_since(std::time::UNIX_EPOCH)
        .map_or(0, |d| d.as_secs());
    let days = (secs / 86_400) as i64;
    NaiveDate::from_ymd_opt(1970, 1, 1)
        .and_then(|epoch| epoch.checked_add_signed(chrono::TimeDelta::days(days)))
        .unwrap_or_default()
}

/// Why a file could not be imported at all.
#[derive(Debug, thiserror::Error)]
pub enum ImportError {
    /// The file could not be read (the operating system's reason follows in the error chain).
    #[error("{file}: cannot read the file")]
    Io {
        /// File name.
        file: String,
        /// The operating system's error.
        source: std::io::Error,
    },
    /// The file holds nothing but white space.
    #[error("{file}: the file is empty")]
    Empty {
        /// File name.
        file: String,
    },
    /// The file is not UTF-8 text.
    #[error(
        "{file}: line {line}, byte {column}: the file is not UTF-8 text (save it as UTF-8 CSV)"
    )]
    NotUtf8 {
        /// File name.
        file: String,
        /// Line of the first invalid byte.
        line: u64,
        /// Byte position in that line, from 1.
        column: usize,
    },
    /// Required columns are missing from the header.
    #[error("{file}: line 1: missing required column(s) {missing}; the header has {found}{hint}")]
    MissingColumns {
        /// File name.
        file: String,
        /// Canonical names of the missing fields, comma separated.
        missing: String,
        /// The headers found, comma separated.
        found: String,
        /// A hint, such as another delimiter that would work.
        hint: String,
    },
    /// Two headers map to the same field.
    #[error("{file}: line 1: columns '{first}' and '{second}' both mean {field}; keep one")]
    DuplicateColumn {
        /// File name.
        file: String,
        /// Canonical field name.
        field: &'static str,
        /// First header.
        first: String,
        /// Second header.
        second: String,
    },
    /// The CSV tokenizer failed (for example a line with more fields than the header).
    #[error("{file}: the CSV could not be read: {message}")]
    Malformed {
        /// File name.
        file: String,
        /// polars' message.
        message: String,
    },
    /// A record has more fields than the header.
    #[error(
        "{file}: line {line} has {fields} fields but the header has {header_fields}; check the separator and quoting on that line"
    )]
    RaggedLine {
        /// File name.
        file: String,
        /// Line where the record starts.
        line: u64,
        /// Fields found.
        fields: usize,
        /// Fields in the header.
        header_fields: usize,
    },
    /// Every row was rejected (or there were none).
    #[error("{file}: no usable rows: {} read, all rejected{}", report.rows_read, summary_of(report))]
    NoUsableRows {
        /// File name.
        file: String,
        /// What was found.
        report: Box<ImportReport>,
    },
}

fn summary_of(report: &ImportReport) -> String {
    let mut s = String::new();
    for (code, n) in &report.rejected_by_reason {
        let _ = write!(s, "; {n} {code}");
    }
    if let Some(first) = report.rejected.first() {
        let _ = write!(s, " (first: line {}: {})", first.line, first.reason);
    }
    s
}

/// Reads and imports a CSV file.
pub fn import_csv_file(
    path: &Path,
    options: &ImportOptions,
) -> Result<(Market, ImportReport), ImportError> {
    let file = path.file_name().map_or_else(
        || path.display().to_string(),
        |n| n.to_string_lossy().into_owned(),
    );
    let bytes = std::fs::read(path).map_err(|source| ImportError::Io {
        file: file.clone(),
        source,
    })?;
    import_csv_bytes(&file, bytes, options)
}

/// Imports CSV bytes; `file` names the source in messages and in the market's provenance.
pub fn import_csv_bytes(
    file: &str,
    bytes: Vec<u8>,
    options: &ImportOptions,
) -> Result<(Market, ImportReport), ImportError> {
    let file = file.to_owned();
    if bytes.iter().all(u8::is_ascii_whitespace) {
        return Err(ImportError::Empty { file });
    }
    if let Err(e) = std::str::from_utf8(&bytes) {
        let (line, column) = line_and_column(&bytes, e.valid_up_to());
        return Err(ImportError::NotUtf8 { file, line, column });
    }
    let header_line = first_line(&bytes);
    let delimiter = options
        .delimiter
        .unwrap_or_else(|| sniff_delimiter(header_line));
    let mapping = map_header(&file, header_line, delimiter, *options)?;
    let hash = content_hash(&bytes);
    let record_lines = record_start_lines(&bytes);

    let df = match read_frame(&bytes, delimiter) {
        Ok(df) => df,
        Err(message) => return Err(malformed(&file, &bytes, delimiter, &message)),
    };
    // The frame holds its own copy of the text; the file's bytes are not needed any more.
    drop(bytes);
    let mut report = ImportReport {
        file_name: file.clone(),
        delimiter: delimiter_name(delimiter),
        rows_read: df.height(),
        odometer_unit: match mapping.odometer {
            OdometerUnit::Miles => "miles".into(),
            OdometerUnit::Kilometres => "kilometres".into(),
        },
        column_map: mapping
            .columns
            .iter()
            .map(|(f, (_, h))| (h.clone(), f.canonical().to_owned()))
            .collect(),
        ignored_columns: mapping.ignored.clone(),
        ..ImportReport::default()
    };
    let line_of = |row: usize| record_lines.get(row).copied().unwrap_or(row as u64 + 2);
    let mut market =
        parse_rows(&df, &mapping, *options, &mut report, &line_of).map_err(|message| {
            ImportError::Malformed {
                file: file.clone(),
                message,
            }
        })?;
    report.rows_used = market.len();
    if market.is_empty() {
        return Err(ImportError::NoUsableRows {
            file,
            report: Box::new(report),
        });
    }
    market.source = MarketSource {
        file_name: file,
        rows_read: report.rows_read,
        content_hash: hash,
    };
    Ok((market, report))
}

fn delimiter_name(d: u8) -> String {
    match d {
        b',' => "comma".into(),
        b';' => "semicolon".into(),
        b'\t' => "tab".into(),
        b'|' => "pipe".into(),
        other => format!("'{}'", other as char),
    }
}

fn first_line(bytes: &[u8]) -> &str {
    let end = bytes
        .iter()
        .position(|&b| b == b'\n')
        .unwrap_or(bytes.len());
    std::str::from_utf8(&bytes[..end])
        .unwrap_or("")
        .trim_end_matches('\r')
}

fn line_and_column(bytes: &[u8], offset: usize) -> (u64, usize) {
    let before = &bytes[..offset];
    let line = memchr::memchr_iter(b'\n', before).count() as u64 + 1;
    let line_start = before
        .iter()
        .rposition(|&b| b == b'\n')
        .map_or(0, |p| p + 1);
    (line, offset - line_start + 1)
}

/// Picks the separator that splits the header into the most fields.
fn sniff_delimiter(header: &str) -> u8 {
    [b',', b';', b'\t', b'|']
        .into_iter()
        .max_by_key(|&d| (split_header(header, d).len(), d == b','))
        .unwrap_or(b',')
}

fn split_header(header: &str, delimiter: u8) -> Vec<String> {
    let mut out = Vec::new();
    let mut current = String::new();
    let mut quoted = false;
    for c in header.chars() {
        if c == '"' {
            quoted = !quoted;
        } else if !quoted && c as u32 == u32::from(delimiter) {
            out.push(std::mem::take(&mut current));
        } else {
            current.push(c);
        }
    }
    out.push(current);
    out
}

struct HeaderMapping {
    /// Field → (column index, header as written).
    columns: HashMap<Field, (usize, String)>,
    ignored: Vec<String>,
    odometer: OdometerUnit,
}

impl HeaderMapping {
    fn index(&self, field: Field) -> Option<usize> {
        self.columns.get(&field).map(|(i, _)| *i)
    }

    fn header(&self, field: Field) -> &str {
        self.columns.get(&field).map_or("", |(_, h)| h.as_str())
    }
}

const REQUIRED: [Field; 4] = [
    Field::ModelYear,
    Field::Make,
    Field::Model,
    Field::AskingPrice,
];

fn map_header(
    file: &str,
    header: &str,
    delimiter: u8,
    options: ImportOptions,
) -> Result<HeaderMapping, ImportError> {
    let mapping = try_map_header(file, header, delimiter, options)?;
    let missing = missing_fields(&mapping);
    if missing.is_empty() {
        return Ok(mapping);
    }
    let found: Vec<String> = split_header(header, delimiter);
    let hint = [b',', b';', b'\t', b'|']
        .into_iter()
        .filter(|&d| d != delimiter)
        .find(|&d| {
            try_map_header(file, header, d, options).is_ok_and(|m| missing_fields(&m).is_empty())
        })
        .map(|d| {
            format!(
                " (the file looks separated by {}, not {})",
                delimiter_name(d),
                delimiter_name(delimiter)
            )
        })
        .unwrap_or_default();
    Err(ImportError::MissingColumns {
        file: file.to_owned(),
        missing: missing.join(", "),
        found: found
            .iter()
            .map(|h| format!("'{h}'"))
            .collect::<Vec<_>>()
            .join(", "),
        hint,
    })
}

fn missing_fields(mapping: &HeaderMapping) -> Vec<&'static str> {
    let mut missing: Vec<&'static str> = REQUIRED
        .into_iter()
        .filter(|f| !mapping.columns.contains_key(f))
        .map(Field::canonical)
        .collect();
    if !mapping.columns.contains_key(&Field::Miles)
        && !mapping.columns.contains_key(&Field::Kilometres)
    {
        missing.push("miles (or kilometres)");
    }
    missing
}

fn try_map_header(
    file: &str,
    header: &str,
    delimiter: u8,
    options: ImportOptions,
) -> Result<HeaderMapping, ImportError> {
    let mut columns: HashMap<Field, (usize, String)> = HashMap::new();
    let mut ignored = Vec::new();
    let mut odometer = OdometerUnit::Miles;
    for (index, raw) in split_header(header, delimiter).into_iter().enumerate() {
        let normalised = normalise_header(&raw);
        let Some(mut field) = field_for(&normalised) else {
            if !raw.trim().is_empty() {
                ignored.push(raw);
            }
            continue;
        };
        // "mileage" and "odometer" do not say their unit; the option decides.
        if field == Field::Miles
            && matches!(normalised.as_str(), "mileage" | "odometer")
            && options.odometer_unit == OdometerUnit::Kilometres
        {
            field = Field::Kilometres;
        }
        if field == Field::Kilometres {
            odometer = OdometerUnit::Kilometres;
        }
        if let Some((_, first)) = columns.get(&field) {
            return Err(ImportError::DuplicateColumn {
                file: file.to_owned(),
                field: field.canonical(),
                first: first.clone(),
                second: raw,
            });
        }
        columns.insert(field, (index, raw));
    }
    if columns.contains_key(&Field::Miles) && columns.contains_key(&Field::Kilometres) {
        // Both given: miles wins, kilometres is ignored and said so.
        if let Some((_, h)) = columns.remove(&Field::Kilometres) {
            ignored.push(h);
        }
        odometer = OdometerUnit::Miles;
    }
    Ok(HeaderMapping {
        columns,
        ignored,
        odometer,
    })
}

fn read_frame(bytes: &[u8], delimiter: u8) -> Result<DataFrame, String> {
    CsvReadOptions::default()
        .with_has_header(true)
        .with_infer_schema_length(Some(0))
        .map_parse_options(|o| o.with_separator(delimiter).with_quote_char(Some(b'"')))
        .into_reader_with_file_handle(Cursor::new(bytes))
        .finish()
        .map_err(|e| e.to_string())
}

/// Turns a tokenizer failure into an error that names the line where it can: a record with more
/// fields than the header is found by scanning; otherwise the tokenizer's first line is kept
/// (its hints name options of the library, not of comptrail).
fn malformed(file: &str, bytes: &[u8], delimiter: u8, message: &str) -> ImportError {
    if let Some((line, fields, header_fields)) = first_ragged_record(bytes, delimiter) {
        return ImportError::RaggedLine {
            file: file.to_owned(),
            line,
            fields,
            header_fields,
        };
    }
    ImportError::Malformed {
        file: file.to_owned(),
        message: message.lines().next().unwrap_or("").trim().to_owned(),
    }
}

/// The first record with more fields than the header: (line, its fields, the header's fields).
fn first_ragged_record(bytes: &[u8], delimiter: u8) -> Option<(u64, usize, usize)> {
    let mut header_fields = None;
    let (mut line, mut record_line) = (1u64, 1u64);
    let (mut fields, mut quoted, mut content) = (1usize, false, false);
    for &b in bytes.iter().chain(std::iter::once(&b'\n')) {
        match b {
            b'"' => {
                quoted = !quoted;
                content = true;
            }
            b'\n' if !quoted => {
                if content {
                    match header_fields {
                        None => header_fields = Some(fields),
                        Some(h) if fields > h => return Some((record_line, fields, h)),
                        Some(_) => {}
                    }
                }
                line += 1;
                record_line = line;
                fields = 1;
                content = false;
            }
            b'\n' => line += 1,
            b'\r' => {}
            _ if b == delimiter && !quoted => {
                fields += 1;
                content = true;
            }
            _ => content = true,
        }
    }
    None
}

/// The file line on which each data record starts, honouring quoted fields that span lines
/// and skipping blank lines as the tokenizer does. Jumps between newlines and quotes with
/// `memchr`, so a 130 MB file takes tens of milliseconds.
fn record_start_lines(bytes: &[u8]) -> Vec<u64> {
    let mut starts = Vec::with_capacity(bytes.len() / 64);
    let mut line: u64 = 1;
    let mut quoted = false;
    let mut header_seen = false;
    let (mut record_byte, mut record_line) = (0usize, 1u64);
    let is_blank = |from: usize, to: usize| bytes[from..to].iter().all(|&b| b == b'\r');
    for pos in memchr::memchr2_iter(b'\n', b'"', bytes) {
        if bytes[pos] == b'"' {
            quoted = !quoted;
            continue;
        }
        if !quoted {
            if !is_blank(record_byte, pos) {
                if header_seen {
                    starts.push(record_line);
                }
                header_seen = true;
            }
            record_byte = pos + 1;
            record_line = line + 1;
        }
        line += 1;
    }
    if header_seen && !bytes[record_byte..].iter().all(u8::is_ascii_whitespace) {
        starts.push(record_line);
    }
    starts
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

/// The columns one parsing thread reads: zero-copy slices of the frame's text columns.
struct ChunkColumns {
    year: StringChunked,
    make: StringChunked,
    model: StringChunked,
    price: StringChunked,
    odometer: StringChunked,
    optional: [Option<StringChunked>; 14],
}

/// What one thread found besides the rows it kept.
#[derive(Default)]
struct ChunkIssues {
    rejected: Vec<(u64, RejectReason)>,
    dropped: Vec<DroppedValue>,
    condition_inferred: usize,
}

/// Optional fields in the order of [`OptionalRow`]: every field after the six that identify
/// and price a vehicle (the required ones and the kilometre alternative).
const OPTIONAL_FIELDS: &[Field] = Field::ALL.split_at(6).1;

/// Reads every row; rows with an unusable required value are rejected with their line. The rows
/// are split over the machine's cores and the parts joined in file order.
fn parse_rows(
    df: &DataFrame,
    mapping: &HeaderMapping,
    options: ImportOptions,
    report: &mut ImportReport,
    line_of: &(dyn Fn(usize) -> u64 + Sync),
) -> Result<Market, String> {
    let col = |f| text_column(df, mapping, f);
    let odometer_field = match mapping.odometer {
        OdometerUnit::Miles => Field::Miles,
        OdometerUnit::Kilometres => Field::Kilometres,
    };
    let required = (
        col(Field::ModelYear)?,
        col(Field::Make)?,
        col(Field::Model)?,
        col(Field::AskingPrice)?,
        col(odometer_field)?,
    );
    let (Some(year), Some(make), Some(model), Some(price), Some(odometer)) = required else {
        return Err("a required column vanished after mapping".into());
    };
    let mut optional: [Option<&StringChunked>; 14] = [None; 14];
    for (slot, &field) in optional.iter_mut().zip(OPTIONAL_FIELDS) {
        *slot = col(field)?;
    }
    let n = df.height();
    let threads = std::thread::available_parallelism().map_or(1, std::num::NonZero::get);
    let threads = if n < 50_000 { 1 } else { threads };
    let per = n.div_ceil(threads).max(1);
    let slice = |ca: &StringChunked, start: usize, len: usize| ca.slice(start as i64, len);
    let chunks: Vec<(usize, ChunkColumns)> = (0..n)
        .step_by(per)
        .map(|start| {
            let len = per.min(n - start);
            let columns = ChunkColumns {
                year: slice(year, start, len),
                make: slice(make, start, len),
                model: slice(model, start, len),
                price: slice(price, start, len),
                odometer: slice(odometer, start, len),
                optional: optional.map(|c| c.map(|c| slice(c, start, len))),
            };
            (start, columns)
        })
        .collect();
    let parts: Vec<(Market, ChunkIssues)> = if chunks.len() == 1 {
        chunks
            .iter()
            .map(|(start, c)| parse_chunk(c, *start, mapping, odometer_field, options, line_of))
            .collect()
    } else {
        std::thread::scope(|scope| {
            let handles: Vec<_> = chunks
                .iter()
                .map(|(start, c)| {
                    scope.spawn(move || {
                        parse_chunk(c, *start, mapping, odometer_field, options, line_of)
                    })
                })
                .collect();
            handles
                .into_iter()
                .map(|h| h.join().map_err(|_| "a parsing thread failed".to_owned()))
                .collect::<Result<_, _>>()
        })?
    };
    // The first part becomes the market (moved, not copied); the others are appended once
    // room for all of them is made.
    let total: usize = parts.iter().map(|(p, _)| p.len()).sum();
    let mut market = Market::default();
    for (part, issues) in parts {
        if market.is_empty() && market.names.is_empty() {
            market = part;
            market.reserve(total - market.len());
        } else {
            market.append(part);
        }
        for (line, reason) in issues.rejected {
            report.reject(line, reason);
        }
        report.dropped_values.extend(issues.dropped);
        report.condition_inferred += issues.condition_inferred;
    }
    Ok(market)
}

fn parse_chunk(
    c: &ChunkColumns,
    first_row: usize,
    mapping: &HeaderMapping,
    odometer_field: Field,
    options: ImportOptions,
    line_of: &(dyn Fn(usize) -> u64 + Sync),
) -> (Market, ChunkIssues) {
    let km = mapping.odometer == OdometerUnit::Kilometres;
    let mut market = Market::default();
    market.reserve(c.year.len());
    let mut names = Vocabulary::default();
    let mut cache = InternCache::default();
    let mut issues = ChunkIssues::default();
    let mut years = c.year.iter();
    let mut makes = c.make.iter();
    let mut models = c.model.iter();
    let mut prices = c.price.iter();
    let mut odometers = c.odometer.iter();
    let mut rest = OptionalIterators::new(&c.optional);
    for i in 0..c.year.len() {
        let line = line_of(first_row + i);
        let values = (
            years.next().flatten(),
            makes.next().flatten(),
            models.next().flatten(),
            prices.next().flatten(),
            odometers.next().flatten(),
        );
        let extra = rest.next_row();
        let (model_year, make_text, model_text, asking_price, miles) =
            match read_required(values, mapping, odometer_field, km, options) {
                Ok(v) => v,
                Err(reason) => {
                    issues.rejected.push((line, reason));
                    continue;
                }
            };
        market.line.push(line);
        market.model_year.push(model_year);
        market.make.push(cache.make.get(&mut names, make_text));
        market.model.push(cache.model.get(&mut names, model_text));
        market.asking_price.push(asking_price);
        market.miles.push(miles);
        push_optional(
            &mut market,
            &mut names,
            &mut cache,
            extra,
            mapping,
            line,
            miles,
            &mut issues,
        );
    }
    market.names = names;
    (market, issues)
}

type RequiredValues<'a> = (i32, &'a str, &'a str, f64, f64);

/// The five required texts of a row: year, make, model, price, odometer.
type RequiredTexts<'a> = (
    Option<&'a str>,
    Option<&'a str>,
    Option<&'a str>,
    Option<&'a str>,
    Option<&'a str>,
);

fn read_required<'a>(
    (year, make, model, price, odometer): RequiredTexts<'a>,
    mapping: &HeaderMapping,
    odometer_field: Field,
    km: bool,
    options: ImportOptions,
) -> Result<RequiredValues<'a>, RejectReason> {
    let need = |v: Option<&'a str>, f: Field| {
        v.map(str::trim)
            .filter(|s| !s.is_empty())
            .ok_or_else(|| RejectReason::MissingValue {
                column: mapping.header(f).to_owned(),
            })
    };
    let not_number = |f: Field, v: &str| RejectReason::NotANumber {
        column: mapping.header(f).to_owned(),
        value: v.to_owned(),
    };
    let year_text = need(year, Field::ModelYear)?;
    let make = need(make, Field::Make)?;
    let model = need(model, Field::Model)?;
    let price_text = need(price, Field::AskingPrice)?;
    let odo_text = need(odometer, odometer_field)?;
    let model_year =
        parse_year(year_text).ok_or_else(|| not_number(Field::ModelYear, year_text))?;
    if !(1900..=i64::from(options.latest_model_year)).contains(&model_year) {
        return Err(RejectReason::ModelYearOutOfRange {
            value: model_year,
            latest_allowed: options.latest_model_year,
        });
    }
    let asking_price =
        parse_number(price_text).ok_or_else(|| not_number(Field::AskingPrice, price_text))?;
    if !(1.0..=MAX_PRICE).contains(&asking_price) {
        return Err(RejectReason::PriceOutOfRange {
            value: asking_price,
        });
    }
    let reading = parse_number(odo_text).ok_or_else(|| not_number(odometer_field, odo_text))?;
    let miles = if km { reading / KM_PER_MILE } else { reading };
    if !(0.0..=MAX_MILES).contains(&miles) {
        return Err(RejectReason::MileageOutOfRange { value: miles });
    }
    Ok((model_year as i32, make, model, asking_price, miles))
}

/// Remembers the last string interned per column: listing feeds are usually sorted, so most
/// lookups hit.
#[derive(Default)]
struct InternCache {
    make: LastName,
    model: LastName,
    variant: LastName,
    seller: LastName,
    location: LastName,
    options: LastName,
}

#[derive(Default)]
struct LastName {
    text: String,
    id: NameId,
}

impl LastName {
    fn get(&mut self, names: &mut Vocabulary, text: &str) -> NameId {
        if self.text != text || self.text.is_empty() {
            self.id = names.intern(text);
            text.clone_into(&mut self.text);
        }
        self.id
    }

    fn get_optional(&mut self, names: &mut Vocabulary, text: Option<&str>) -> NameId {
        match text.map(str::trim).filter(|t| !t.is_empty()) {
            Some(t) => self.get(names, t),
            None => NO_NAME,
        }
    }
}

type TextIter<'a> = Box<dyn Iterator<Item = Option<&'a str>> + 'a>;

/// One iterator per optional column, in [`OptionalRow`] order; absent columns yield `None`.
struct OptionalIterators<'a> {
    iters: Vec<Option<TextIter<'a>>>,
}

/// The optional values of one row, in the order of [`OPTIONAL_FIELDS`].
type OptionalRow<'a> = [Option<&'a str>; 14];

impl<'a> OptionalIterators<'a> {
    fn new(columns: &'a [Option<StringChunked>; 14]) -> Self {
        Self {
            iters: columns
                .iter()
                .map(|c| c.as_ref().map(|c| Box::new(c.iter()) as TextIter<'a>))
                .collect(),
        }
    }

    fn next_row(&mut self) -> OptionalRow<'a> {
        let mut row: OptionalRow<'a> = [None; 14];
        for (slot, it) in row.iter_mut().zip(self.iters.iter_mut()) {
            if let Some(it) = it {
                *slot = it.next().flatten().map(str::trim).filter(|s| !s.is_empty());
            }
        }
        row
    }
}

#[allow(clippy::too_many_arguments)]
fn push_optional(
    market: &mut Market,
    names: &mut Vocabulary,
    cache: &mut InternCache,
    [
        variant,
        condition,
        listed_on,
        sold_on,
        sale_price,
        vin,
        seller,
        location,
        latitude,
        longitude,
        distance_mi,
        distance_km,
        title,
        options,
    ]: OptionalRow<'_>,
    mapping: &HeaderMapping,
    line: u64,
    miles: f64,
    issues: &mut ChunkIssues,
) {
    let mut inferred = false;
    let mut drop = |field: Field, value: &str, note: &str| {
        issues.dropped.push(DroppedValue {
            line,
            column: mapping.header(field).to_owned(),
            value: value.to_owned(),
            note: note.to_owned(),
        });
    };
    market
        .variant
        .push(cache.variant.get_optional(names, variant));
    let parsed_condition = condition.and_then(|c| {
        let parsed = Condition::parse(c);
        if parsed.is_none() {
            drop(
                Field::Condition,
                c,
                "unknown condition class; inferred from mileage",
            );
        }
        parsed
    });
    market.condition.push(parsed_condition.unwrap_or_else(|| {
        inferred = true;
        if miles < 1_000.0 {
            Condition::New
        } else {
            Condition::Used
        }
    }));
    let mut date = |field: Field, text: Option<&str>| {
        text.and_then(|t| {
            let d = parse_date(t);
            if d.is_none() {
                drop(field, t, "not a date (use YYYY-MM-DD); left empty");
            }
            d
        })
    };
    market.listed_on.push(date(Field::ListedOn, listed_on));
    market.sold_on.push(date(Field::SoldOn, sold_on));
    let mut number = |field: Field, text: Option<&str>| {
        text.and_then(|t| {
            let v = parse_number(t);
            if v.is_none() {
                drop(field, t, "not a number; left empty");
            }
            v
        })
    };
    market
        .sale_price
        .push(number(Field::SalePrice, sale_price).filter(|p| *p > 0.0));
    let lat = number(Field::Latitude, latitude);
    let lon = number(Field::Longitude, longitude);
    let distance = number(Field::DistanceMiles, distance_mi)
        .or_else(|| number(Field::DistanceKilometres, distance_km).map(|km| km / KM_PER_MILE));
    market
        .vin
        .push(vin.map(|v| v.to_ascii_uppercase().into_boxed_str()));
    market.seller.push(cache.seller.get_optional(names, seller));
    market
        .location
        .push(cache.location.get_optional(names, location));
    market.coordinates.push(match (lat, lon) {
        (Some(la), Some(lo)) if (-90.0..=90.0).contains(&la) && (-180.0..=180.0).contains(&lo) => {
            Some((la as f32, lo as f32))
        }
        _ => None,
    });
    market
        .distance_miles
        .push(distance.filter(|d| *d >= 0.0).map(|d| d as f32));
    market.title.push(title.and_then(TitleStatus::parse));
    market
        .options
        .push(cache.options.get_optional(names, options));
    issues.condition_inferred += usize::from(inferred);
}
