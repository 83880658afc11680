//! Importing a market CSV: map its columns, read every row, report every row that could not be
//! used (line and reason) and every optional value that was dropped. Nothing is dropped silently.
//!
//! polars does the tokenizing (quote-aware) with every column read as text, in batches of
//! records spread over the cores; values are then parsed here so that each failure can name its
//! line, column and value.

mod batches;
pub mod dataset;
pub mod headers;
mod parquet;
mod report;
mod rows;
mod values;

use std::collections::HashMap;
use std::fmt::Write as _;
use std::path::Path;

use chrono::{Datelike, NaiveDate};

use crate::market::{Market, MarketSource, content_hash};

use batches::{Plan, Tokenizer, read_batches};
pub use headers::{Field, field_for, normalize_header};
pub use parquet::{ModelPartition, import_parquet, parquet_fingerprint, parquet_models};
pub use report::{
    DroppedValue, ImportReport, PartRead, RejectReason, RejectedRow, reason_in_words,
};
pub use values::{parse_date, parse_number, parse_year};

/// Kilometers per statute mile.
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
    /// Kilometers.
    Kilometers,
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
    /// A Parquet file lacks required columns (neither stored nor given by its folders).
    #[error(
        "{file}: missing required column(s) {missing}; the file's columns are {found} (make and model may also come from make=…/model=… folders)"
    )]
    MissingParquetColumns {
        /// The file, from the dataset's root.
        file: String,
        /// Canonical names of the missing fields, comma separated.
        missing: String,
        /// The columns found, comma separated.
        found: String,
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
    /// A folder named as a market holds no Parquet files.
    #[error("{folder}: no .parquet files in the folder or its sub-folders")]
    NoParquetFiles {
        /// The folder.
        folder: String,
    },
    /// A Parquet file could not be decoded.
    #[error("{file}: cannot be read as Parquet: {message}")]
    Parquet {
        /// The file, from the dataset's root.
        file: String,
        /// What the decoder said.
        message: String,
    },
    /// No partition of a dataset holds the make and model asked for.
    #[error("{folder}: no partition holds {models}; the dataset holds {available}")]
    ModelNotInDataset {
        /// The dataset's folder.
        folder: String,
        /// The makes and models asked for.
        models: String,
        /// The makes and models its folders name, with their rows.
        available: String,
    },
    /// Every row was rejected (or there were none).
    #[error("{file}: no usable rows: {}", summary_of(report))]
    NoUsableRows {
        /// File name.
        file: String,
        /// What was found.
        report: Box<ImportReport>,
    },
}

fn summary_of(report: &ImportReport) -> String {
    if report.rows_read == 0 {
        return "the file has a header line but no data rows after it".to_owned();
    }
    let mut s = format!("{} read, all rejected", report.rows_read);
    for (code, n) in &report.rejected_by_reason {
        let _ = write!(s, "; {n} {code}");
    }
    if let Some(first) = report.rejected.first() {
        let _ = write!(s, " (first: line {}: {})", first.line, first.reason);
    }
    s
}

/// Imports a market: a CSV file, or a Parquet file or folder (see [`dataset`]). With makes and
/// models in `wanted`, a partitioned Parquet market is read only for them; a CSV file is read
/// whole.
pub fn import_market(
    path: &Path,
    options: &ImportOptions,
    wanted: &[(String, String)],
) -> Result<(Market, ImportReport), ImportError> {
    if dataset::is_parquet_market(path) {
        parquet::import_parquet(path, options, wanted)
    } else {
        import_csv_file(path, options)
    }
}

/// A market's name in messages and its provenance: the file's (or folder's) name, or the whole
/// path when it has none.
#[must_use]
pub fn file_label(path: &Path) -> String {
    path.file_name().map_or_else(
        || path.display().to_string(),
        |n| n.to_string_lossy().into_owned(),
    )
}

/// Reads and imports a CSV file.
pub fn import_csv_file(
    path: &Path,
    options: &ImportOptions,
) -> Result<(Market, ImportReport), ImportError> {
    let file = file_label(path);
    let bytes = read_whole_file(path).map_err(|source| ImportError::Io {
        file: file.clone(),
        source,
    })?;
    import_csv_bytes(&file, bytes, options)
}

/// Reads a file into memory. A large file is read in one piece per core, each into its own part
/// of the buffer: copying 130 MB out of the page cache is otherwise a tenth of a second on one
/// core. A file that changes size while it is read is read again in one piece.
fn read_whole_file(path: &Path) -> std::io::Result<Vec<u8>> {
    #[cfg(unix)]
    {
        use std::os::unix::fs::FileExt;
        const PARALLEL_FROM: u64 = 16 << 20;
        let file = std::fs::File::open(path)?;
        let len = file.metadata()?.len();
        let cores = std::thread::available_parallelism().map_or(1, std::num::NonZero::get);
        if len >= PARALLEL_FROM && cores > 1 {
            let mut bytes = vec![0u8; usize::try_from(len).map_err(std::io::Error::other)?];
            let per = bytes.len().div_ceil(cores);
            let read = std::thread::scope(|scope| {
                let handles: Vec<_> = bytes
                    .chunks_mut(per)
                    .enumerate()
                    .map(|(i, part)| {
                        let file = &file;
                        scope.spawn(move || file.read_exact_at(part, (i * per) as u64))
                    })
                    .collect();
                handles
                    .into_iter()
                    .all(|h| h.join().is_ok_and(|r| r.is_ok()))
            });
            let mut probe = [0u8; 1];
            if read && file.read_at(&mut probe, len)? == 0 {
                return Ok(bytes);
            }
        }
    }
    std::fs::read(path)
}

/// Imports CSV bytes; `file` names the source in messages and in the market's provenance.
pub fn import_csv_bytes(
    file: &str,
    bytes: Vec<u8>,
    options: &ImportOptions,
) -> Result<(Market, ImportReport), ImportError> {
    import_planned(file, bytes, *options, None)
}

/// [`import_csv_bytes`] with the split of the records chosen by the caller (tests check that
/// every split gives the same market and report); `None` chooses for this machine.
fn import_planned(
    file: &str,
    bytes: Vec<u8>,
    options: ImportOptions,
    plan: Option<Plan>,
) -> Result<(Market, ImportReport), ImportError> {
    let file = file.to_owned();
    // The file's fingerprint is computed on another core while its text is checked and its
    // records found.
    let (hash, checked) = std::thread::scope(|scope| {
        let hash = scope.spawn(|| content_hash(&bytes));
        let checked = check_text(&file, &bytes, options);
        let hash = hash
            .join()
            .unwrap_or_else(|panic| std::panic::resume_unwind(panic));
        (hash, checked)
    });
    let (mapping, tokenizer, starts) = checked?;
    let plan = plan.unwrap_or_else(|| Plan::for_records(starts.offsets.len()));
    let (mut market, issues) =
        match read_batches(&bytes, &starts, &tokenizer, &mapping, options, plan) {
            Ok(read) => read,
            Err(message) => return Err(malformed(&file, &bytes, tokenizer.delimiter, &message)),
        };
    drop(bytes);
    let merged_spellings = market.merge_spellings();
    let mut report = ImportReport {
        merged_spellings,
        file_name: file.clone(),
        delimiter: delimiter_name(tokenizer.delimiter),
        rows_read: issues.rows_read,
        odometer_unit: match mapping.odometer {
            OdometerUnit::Miles => "miles".into(),
            OdometerUnit::Kilometers => "kilometers".into(),
        },
        column_map: mapping
            .columns
            .iter()
            .map(|(f, (_, h))| (h.clone(), f.canonical().to_owned()))
            .collect(),
        ignored_columns: mapping.ignored.clone(),
        condition_inferred: issues.condition_inferred,
        blank_lines: issues.blank_lines,
        dropped_values: issues.dropped,
        ..ImportReport::default()
    };
    for (line, reason) in issues.rejected {
        report.reject(line, reason);
    }
    report.rows_used = market.len();
    report.options_found = crate::equipment::count(&market, None);
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
        models_read: Vec::new(),
    };
    Ok((market, report))
}

/// Checks that the bytes are non-empty UTF-8 text with a usable header; returns the header's
/// mapping, the tokenizer's settings and where each record starts.
fn check_text(
    file: &str,
    bytes: &[u8],
    options: ImportOptions,
) -> Result<(HeaderMapping, Tokenizer, RecordStarts), ImportError> {
    let file = file.to_owned();
    if bytes.iter().all(u8::is_ascii_whitespace) {
        return Err(ImportError::Empty { file });
    }
    if let Err(e) = std::str::from_utf8(bytes) {
        let (line, column) = line_and_column(bytes, e.valid_up_to());
        return Err(ImportError::NotUtf8 { file, line, column });
    }
    let header_line = first_line(bytes);
    let delimiter = options
        .delimiter
        .unwrap_or_else(|| sniff_delimiter(header_line));
    let mapping = map_header(&file, header_line, delimiter, options)?;
    let tokenizer = Tokenizer {
        delimiter,
        header_fields: split_header(header_line, delimiter).len(),
    };
    Ok((mapping, tokenizer, record_starts(bytes)))
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
        && !mapping.columns.contains_key(&Field::Kilometers)
    {
        missing.push("miles (or kilometers)");
    }
    missing
}

fn try_map_header(
    file: &str,
    header: &str,
    delimiter: u8,
    options: ImportOptions,
) -> Result<HeaderMapping, ImportError> {
    map_names(file, split_header(header, delimiter), options)
}

/// Maps column names (a CSV header's fields, a Parquet file's columns) to fields.
fn map_names(
    file: &str,
    names: Vec<String>,
    options: ImportOptions,
) -> Result<HeaderMapping, ImportError> {
    let mut columns: HashMap<Field, (usize, String)> = HashMap::new();
    let mut ignored = Vec::new();
    let mut odometer = OdometerUnit::Miles;
    for (index, raw) in names.into_iter().enumerate() {
        let normalized = normalize_header(&raw);
        let Some(mut field) = field_for(&normalized) else {
            if !raw.trim().is_empty() {
                ignored.push(raw);
            }
            continue;
        };
        // "mileage" and "odometer" do not say their unit; the option decides.
        if field == Field::Miles
            && matches!(normalized.as_str(), "mileage" | "odometer")
            && options.odometer_unit == OdometerUnit::Kilometers
        {
            field = Field::Kilometers;
        }
        if field == Field::Kilometers {
            odometer = OdometerUnit::Kilometers;
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
    if columns.contains_key(&Field::Miles) && columns.contains_key(&Field::Kilometers) {
        // Both given: miles wins, kilometers is ignored and said so.
        if let Some((_, h)) = columns.remove(&Field::Kilometers) {
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

/// Where each data record starts: its file line and its byte offset. Honours quoted fields that
/// span lines as the tokenizer does. Jumps between newlines and quotes with `memchr`, so a
/// 130 MB file takes tens of milliseconds.
///
/// The tokenizer returns a row of empty fields for a blank line (nothing but spaces, tabs or a
/// carriage return); such lines are kept here, with [`BLANK_LINE`] for their line, so that rows
/// and records stay aligned, and are then passed over without a report.
#[derive(Debug, Default, PartialEq)]
struct RecordStarts {
    lines: Vec<u64>,
    offsets: Vec<usize>,
}

/// The line recorded for a blank line (file lines count from 1).
const BLANK_LINE: u64 = 0;

fn record_starts(bytes: &[u8]) -> RecordStarts {
    let mut starts = RecordStarts {
        lines: Vec::with_capacity(bytes.len() / 64),
        offsets: Vec::with_capacity(bytes.len() / 64),
    };
    let mut line: u64 = 1;
    let mut quoted = false;
    let mut header_seen = false;
    let (mut record_byte, mut record_line) = (0usize, 1u64);
    let is_blank = |from: usize, to: usize| {
        bytes[from..to]
            .iter()
            .all(|&b| matches!(b, b' ' | b'\t' | b'\r'))
    };
    for pos in memchr::memchr2_iter(b'\n', b'"', bytes) {
        if bytes[pos] == b'"' {
            quoted = !quoted;
            continue;
        }
        if !quoted {
            let blank = is_blank(record_byte, pos);
            if header_seen {
                starts
                    .lines
                    .push(if blank { BLANK_LINE } else { record_line });
                starts.offsets.push(record_byte);
            }
            header_seen |= !blank;
            record_byte = pos + 1;
            record_line = line + 1;
        }
        line += 1;
    }
    if header_seen && record_byte < bytes.len() {
        let blank = is_blank(record_byte, bytes.len());
        starts
            .lines
            .push(if blank { BLANK_LINE } else { record_line });
        starts.offsets.push(record_byte);
    }
    starts
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A demo market spoiled the ways real feeds are: unreadable and missing required values,
    /// unknown conditions, bad dates and numbers, padded names, quoted fields with the
    /// separator and with line breaks, blank lines, short rows and Windows line ends.
    fn spoiled_market(rows: usize) -> Vec<u8> {
        let text = String::from_utf8(crate::demo::demo_csv_bytes(rows, 11)).unwrap_or_default();
        let mut lines = text.lines();
        let mut out = format!("{}\r\n", lines.next().unwrap_or_default());
        let mut state: u64 = 0x2545_f491_4f6c_dd1d;
        for line in lines {
            state = state
                .wrapping_mul(6_364_136_223_846_793_005)
                .wrapping_add(1);
            let pick = (state >> 33) % 200;
            let mut fields: Vec<String> = line.split(',').map(str::to_owned).collect();
            match pick {
                0 => fields[0] = "20x4".into(),
                1 => fields[1].clear(),
                2 => fields[4] = format!("\"${},000\"", &fields[4][..2]),
                3 => fields[4] = "call".into(),
                4 => fields[5] = "-5".into(),
                5 => fields[6] = "wrecked".into(),
                6 => fields[7] = "13/45/2026".into(),
                7 => fields[9] = "n/a".into(),
                8 => fields[13] = "far".into(),
                9 => fields[0] = "2031".into(),
                10 => fields[2] = format!("  {} ", fields[2]),
                11 => fields[11] = "\"Seller, with a comma\"".into(),
                12 => fields[15] = "\"two\nlines\"".into(),
                13 => fields[6].clear(),
                14 => out.push_str("\r\n"),
                17 => out.push_str(" \n\n"),
                15 => fields.truncate(8),
                16 => fields[5] = format!("{} mi", fields[5]),
                _ => {}
            }
            out.push_str(&fields.join(","));
            out.push_str("\r\n");
        }
        out.into_bytes()
    }

    #[test]
    fn every_split_of_the_records_gives_the_same_market_and_report() {
        let bytes = spoiled_market(9_000);
        let options = ImportOptions {
            latest_model_year: 2027,
            ..ImportOptions::default()
        };
        let import = |cores, batch_records| {
            let plan = Plan {
                cores,
                batch_records,
            };
            import_planned("spoiled.csv", bytes.clone(), options, Some(plan))
                .unwrap_or_else(|e| panic!("{e}"))
        };
        let (whole, whole_report) = import(1, usize::MAX);
        assert!(whole_report.rejected.len() > 100, "the file is spoiled");
        assert!(whole_report.dropped_values.len() > 100);
        assert!(whole_report.rows_used > 8_000);
        let lines = whole_report.rejected.iter().map(|r| r.line);
        assert!(lines.clone().zip(lines.skip(1)).all(|(a, b)| a < b));
        // Every reported line holds the value reported.
        let text = String::from_utf8_lossy(&bytes);
        let file_lines: Vec<&str> = text.split('\n').collect();
        let on_line = |line: u64, value: &str| file_lines[line as usize - 1].contains(value);
        for r in &whole_report.rejected {
            if let RejectReason::NotANumber { value, .. } = &r.reason {
                assert!(on_line(r.line, value), "line {}: {value}", r.line);
            }
        }
        for d in &whole_report.dropped_values {
            assert!(on_line(d.line, &d.value), "line {}: {}", d.line, d.value);
        }
        for (row, &line) in whole.line.iter().enumerate() {
            let listing = whole.listing(row);
            let start = format!("{},{},", listing.model_year, listing.make);
            assert!(
                file_lines[line as usize - 1].starts_with(&start),
                "line {line}: {start}"
            );
        }
        for (cores, batch) in [(2, 1_000), (3, 777), (1, 50), (4, usize::MAX)] {
            let (market, report) = import(cores, batch);
            assert_eq!(report, whole_report, "{cores} cores, batches of {batch}");
            assert_eq!(market.len(), whole.len());
            assert_eq!(market.source, whole.source);
            for row in 0..whole.len() {
                assert_eq!(market.listing(row), whole.listing(row), "row {row}");
            }
        }
    }

    #[test]
    fn a_header_without_rows_says_so() {
        for text in [
            "year,make,model,price,miles\n",
            "year,make,model,price,miles\n\n \n",
        ] {
            let err = import_planned("empty.csv", text.into(), ImportOptions::default(), None)
                .err()
                .map(|e| e.to_string());
            assert_eq!(
                err.as_deref(),
                Some(
                    "empty.csv: no usable rows: the file has a header line but no data rows after it"
                )
            );
        }
    }

    #[test]
    fn a_large_file_read_on_every_core_is_the_file() {
        // Above the size at which the parts are read in parallel; an odd length so the parts
        // differ in size.
        let bytes: Vec<u8> = (0..(17u32 << 20) + 7)
            .map(|i| (i.wrapping_mul(2_654_435_761) >> 13) as u8)
            .collect();
        let path = std::env::temp_dir().join(format!("comptrail-read-{}.bin", std::process::id()));
        std::fs::write(&path, &bytes).unwrap_or_else(|e| panic!("{e}"));
        let read = read_whole_file(&path);
        std::fs::remove_file(&path).ok();
        assert!(read.is_ok_and(|r| r == bytes));
    }

    #[test]
    fn rows_are_reported_on_their_own_lines() {
        let bytes = b"year,make,model,price,miles,notes\n\
            \n\
            2020,Ardent,Vale,21000,30000,\"first\nsecond\"\n\
            \n\
            \x20\t\r\n\
            20x0,Ardent,Vale,21000,30000,\n\
            2021,Ardent,,22000,20000,\n\
            \n  "
            .to_vec();
        let one_record_a_batch = |cores| Plan {
            cores,
            batch_records: 1,
        };
        for plan in [
            None,
            Some(one_record_a_batch(1)),
            Some(one_record_a_batch(2)),
        ] {
            let (market, report) =
                import_planned("lines.csv", bytes.clone(), ImportOptions::default(), plan)
                    .unwrap_or_else(|e| panic!("{e}"));
            assert_eq!(market.line, vec![3], "{plan:?}");
            let rejected: Vec<(u64, &str)> = report
                .rejected
                .iter()
                .map(|r| (r.line, r.reason.code()))
                .collect();
            assert_eq!(rejected, vec![(7, "not_a_number"), (8, "missing_value")]);
            assert_eq!(report.rows_read, 3, "blank lines are not rows");
            assert_eq!(report.blank_lines, 5, "and are counted as passed over");
        }
    }
}
