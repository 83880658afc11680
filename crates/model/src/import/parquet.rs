//! Reading a Parquet market (a file, or a partitioned folder: see [`super::dataset`]).
//!
//! Only the partitions a make and model needs are opened when one is asked for, and only the
//! columns that map to a field are decoded. Each decoded column is turned into text and read by
//! the same row reader as a CSV file's, so a Parquet market gets the same checks, reasons and
//! dropped-value notes: a year column holding 20x4 as text, a price of -5, a date the calendar
//! does not have. Rows are numbered across the dataset's files in path order, and every rejected
//! row or dropped value is also named by its file and its row there.

use std::fmt::Write as _;
use std::path::Path;
use std::sync::atomic::{AtomicUsize, Ordering};

use bytes::Bytes;
use chrono::{Datelike, NaiveDate};
use parquet::basic::{ConvertedType, LogicalType, TimeUnit};
use parquet::column::reader::{ColumnReader, ColumnReaderImpl};
use parquet::data_type::DataType as ParquetType;
use parquet::file::reader::{FileReader, SerializedFileReader};
use parquet::schema::types::ColumnDescriptor;
use polars::prelude::{Column, DataFrame, IntoColumn, PlSmallStr, StringChunkedBuilder};

use super::dataset::{PartFile, files_for, part_files, partition_list};
use super::report::PartRead;
use super::rows::{RowIssues, read_frame_rows};
use super::{
    Field, HeaderMapping, ImportError, ImportOptions, ImportReport, field_for, map_names,
    missing_fields, normalize_header,
};
use crate::market::{Market, MarketSource};

fn is_field(field: Field) -> impl Fn(&str) -> bool {
    move |key: &str| field_for(&normalize_header(key)) == Some(field)
}

/// Imports the Parquet market at `root`; with makes and models in `wanted`, only their
/// partitions (all files when `wanted` is empty or the folders are not partitioned by make and
/// model).
pub fn import_parquet(
    root: &Path,
    options: &ImportOptions,
    wanted: &[(String, String)],
) -> Result<(Market, ImportReport), ImportError> {
    let name = super::file_label(root);
    let files = part_files(root).map_err(|source| ImportError::Io {
        file: name.clone(),
        source,
    })?;
    if files.is_empty() {
        return Err(ImportError::NoParquetFiles { folder: name });
    }
    let (is_make, is_model) = (is_field(Field::Make), is_field(Field::Model));
    let rows = footer_rows(&files)?;
    let chosen = files_for(&files, &is_make, &is_model, wanted);
    if chosen.is_empty() {
        return Err(ImportError::ModelNotInDataset {
            folder: name,
            models: wanted
                .iter()
                .map(|(make, model)| format!("{make} {model}"))
                .collect::<Vec<_>>()
                .join(", "),
            available: partition_list(&files, &rows, &is_make, &is_model),
        });
    }
    // The dataset row each file starts at (from 1), in path order.
    let mut first_row = Vec::with_capacity(files.len());
    let mut next = 1u64;
    for n in &rows {
        first_row.push(next);
        next += n;
    }
    let jobs: Vec<(usize, &PartFile)> = chosen.iter().map(|&i| (i, &files[i])).collect();
    let read = read_files(&jobs, &first_row, *options)?;
    let mut hashes: Vec<Option<u64>> = vec![None; files.len()];
    let mut market = Market::default();
    market.reserve(read.iter().map(|r| r.market.len()).sum());
    let mut issues = RowIssues::default();
    let mut report = ImportReport::default();
    for (part, &(i, file)) in read.into_iter().zip(&jobs) {
        hashes[i] = Some(part.hash);
        if report.column_map.is_empty() {
            report.column_map = part.column_map;
            report.ignored_columns = part.ignored;
            report.odometer_unit = part.odometer;
        }
        report.parts_read.push(PartRead {
            file: file.relative.clone(),
            first_row: first_row[i],
            rows: rows[i],
        });
        market.append(part.market);
        issues.append(part.issues);
    }
    report.merged_spellings = market.merge_spellings();
    report.file_name.clone_from(&name);
    report.parts_skipped = files.len() - jobs.len();
    finish_report(&mut report, issues, &market);
    if market.is_empty() {
        return Err(ImportError::NoUsableRows {
            file: name,
            report: Box::new(report),
        });
    }
    // Read for the models asked for only when the folders name makes or models at all.
    let pruned = files
        .iter()
        .any(|f| f.value_of(&is_make).is_some() || f.value_of(&is_model).is_some());
    market.source = MarketSource {
        file_name: name,
        rows_read: report.rows_read,
        content_hash: fingerprint(&files, &hashes),
        models_read: if pruned { wanted.to_vec() } else { Vec::new() },
    };
    Ok((market, report))
}

/// Adds what the rows gave to the report, each rejected row and dropped value with its file and
/// row.
fn finish_report(report: &mut ImportReport, issues: RowIssues, market: &Market) {
    report.delimiter = "Parquet".into();
    report.rows_read = issues.rows_read;
    report.condition_inferred = issues.condition_inferred;
    for (line, reason) in issues.rejected {
        report.reject(line, reason);
    }
    let places: Vec<Option<String>> = report
        .rejected
        .iter()
        .map(|r| report.place_of(r.line))
        .collect();
    for (r, place) in report.rejected.iter_mut().zip(places) {
        r.place = place;
    }
    let places: Vec<Option<String>> = issues
        .dropped
        .iter()
        .map(|d| report.place_of(d.line))
        .collect();
    report.dropped_values = issues.dropped;
    for (d, place) in report.dropped_values.iter_mut().zip(places) {
        d.place = place;
    }
    report.rows_used = market.len();
    report.options_found = crate::equipment::count(market, None);
}

/// One make and model of a partitioned Parquet market, with its listings (from the footers).
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct ModelPartition {
    /// Make, as its folder names it.
    pub make: String,
    /// Model, as its folder names it.
    pub model: String,
    /// Rows in its files.
    pub rows: u64,
}

/// The makes and models a Parquet market's folders name, largest first, with their rows; empty
/// when its files are not partitioned by make and model (a single file, other keys). Reads the
/// footers only. Spellings that name one model ("Kestrel", " kestrel ") are counted together,
/// under the first met.
pub fn parquet_models(root: &Path) -> Result<Vec<ModelPartition>, ImportError> {
    let files = part_files(root).map_err(|source| ImportError::Io {
        file: root.display().to_string(),
        source,
    })?;
    let (is_make, is_model) = (is_field(Field::Make), is_field(Field::Model));
    let rows = footer_rows(&files)?;
    let mut models: Vec<ModelPartition> = Vec::new();
    for (f, n) in files.iter().zip(rows) {
        let (Some(Some(make)), Some(Some(model))) = (f.value_of(&is_make), f.value_of(&is_model))
        else {
            return Ok(Vec::new());
        };
        let key = (
            crate::vocabulary::name_key(make),
            crate::vocabulary::name_key(model),
        );
        match models.iter_mut().find(|m| {
            (
                crate::vocabulary::name_key(&m.make),
                crate::vocabulary::name_key(&m.model),
            ) == key
        }) {
            Some(m) => m.rows += n,
            None => models.push(ModelPartition {
                make: make.to_owned(),
                model: model.to_owned(),
                rows: n,
            }),
        }
    }
    models.sort_by(|a, b| b.rows.cmp(&a.rows).then_with(|| a.make.cmp(&b.make)));
    Ok(models)
}

/// The fingerprint of a Parquet market as it was read: every file's path and size, and the
/// bytes of the files read. Another file added, removed or resized changes it; so does any byte
/// of a file read. Bytes of files not read (other models' partitions) are not looked at: a
/// session of one model is not made stale by another model's new listings of the same size.
pub fn parquet_fingerprint(
    root: &Path,
    models_read: &[(String, String)],
) -> Result<String, ImportError> {
    let name = root.display().to_string();
    let files = part_files(root).map_err(|source| ImportError::Io {
        file: name.clone(),
        source,
    })?;
    let (is_make, is_model) = (is_field(Field::Make), is_field(Field::Model));
    let mut hashes = vec![None; files.len()];
    for i in files_for(&files, &is_make, &is_model, models_read) {
        let f = &files[i];
        let bytes = std::fs::read(&f.path).map_err(|source| ImportError::Io {
            file: f.relative.clone(),
            source,
        })?;
        hashes[i] = Some(xxhash_rust::xxh3::xxh3_64(&bytes));
    }
    Ok(fingerprint(&files, &hashes))
}

fn fingerprint(files: &[PartFile], hashes: &[Option<u64>]) -> String {
    let mut listing = String::new();
    for (f, h) in files.iter().zip(hashes) {
        let size = std::fs::metadata(&f.path).map_or(0, |m| m.len());
        let _ = match h {
            Some(h) => writeln!(listing, "{}\t{size}\t{h:016x}", f.relative),
            None => writeln!(listing, "{}\t{size}\t-", f.relative),
        };
    }
    format!(
        "xxh3:{:016x}",
        xxhash_rust::xxh3::xxh3_64(listing.as_bytes())
    )
}

/// Rows in each file, from its footer.
fn footer_rows(files: &[PartFile]) -> Result<Vec<u64>, ImportError> {
    files
        .iter()
        .map(|f| {
            let file = std::fs::File::open(&f.path).map_err(|source| ImportError::Io {
                file: f.relative.clone(),
                source,
            })?;
            let reader = guarded(&f.relative, || {
                SerializedFileReader::new(file).map_err(|e| e.to_string())
            })?;
            Ok(u64::try_from(reader.metadata().file_metadata().num_rows()).unwrap_or(0))
        })
        .collect()
}

/// Runs the Parquet decoder, turning its errors, and any panic inside it on a damaged file,
/// into an error that names the file.
fn guarded<T>(file: &str, work: impl FnOnce() -> Result<T, String>) -> Result<T, ImportError> {
    let outcome = std::panic::catch_unwind(std::panic::AssertUnwindSafe(work))
        .unwrap_or_else(|_| Err("the file is damaged (the Parquet decoder gave up)".to_owned()));
    outcome.map_err(|message| ImportError::Parquet {
        file: file.to_owned(),
        message,
    })
}

/// What one file gave.
struct FilePart {
    market: Market,
    issues: RowIssues,
    hash: u64,
    column_map: std::collections::BTreeMap<String, String>,
    ignored: Vec<String>,
    odometer: String,
}

/// Reads the files on every core, each file whole on one; results in the order given.
fn read_files(
    jobs: &[(usize, &PartFile)],
    first_row: &[u64],
    options: ImportOptions,
) -> Result<Vec<FilePart>, ImportError> {
    let cores = std::thread::available_parallelism()
        .map_or(1, std::num::NonZero::get)
        .min(jobs.len())
        .max(1);
    let next = AtomicUsize::new(0);
    let work = || {
        let mut done = Vec::new();
        loop {
            let k = next.fetch_add(1, Ordering::Relaxed);
            let Some(&(i, file)) = jobs.get(k) else {
                return done;
            };
            done.push((k, read_file(file, first_row[i], options)));
        }
    };
    let mut results: Vec<(usize, Result<FilePart, ImportError>)> = if cores == 1 {
        work()
    } else {
        std::thread::scope(|scope| {
            let handles: Vec<_> = (0..cores).map(|_| scope.spawn(work)).collect();
            handles
                .into_iter()
                .flat_map(|h| h.join().unwrap_or_default())
                .collect()
        })
    };
    results.sort_by_key(|(k, _)| *k);
    if results.len() != jobs.len() {
        return Err(ImportError::Parquet {
            file: String::new(),
            message: "a reading thread failed".into(),
        });
    }
    results.into_iter().map(|(_, r)| r).collect()
}

/// A column of the frame handed to the row reader: decoded from the file, or a partition value
/// repeated on every row.
enum Source {
    Stored(usize),
    Partition(Option<String>),
}

fn read_file(
    file: &PartFile,
    first_row: u64,
    options: ImportOptions,
) -> Result<FilePart, ImportError> {
    let bytes = std::fs::read(&file.path).map_err(|source| ImportError::Io {
        file: file.relative.clone(),
        source,
    })?;
    let hash = xxhash_rust::xxh3::xxh3_64(&bytes);
    let reader = guarded(&file.relative, || {
        SerializedFileReader::new(Bytes::from(bytes)).map_err(|e| e.to_string())
    })?;
    let schema = reader.metadata().file_metadata().schema_descr_ptr();
    // Top-level plain columns by name, then the partition keys the file does not store.
    let mut names = Vec::new();
    let mut sources = Vec::new();
    for (i, column) in schema.columns().iter().enumerate() {
        if column.path().parts().len() == 1 && column.max_rep_level() == 0 {
            names.push(column.name().to_owned());
            sources.push(Source::Stored(i));
        }
    }
    for (key, value) in &file.partition {
        if !names
            .iter()
            .any(|n| normalize_header(n) == normalize_header(key))
        {
            names.push(key.clone());
            sources.push(Source::Partition(value.clone()));
        }
    }
    let mapping = map_names(&file.relative, names.clone(), options)?;
    let missing = missing_fields(&mapping);
    if !missing.is_empty() {
        return Err(ImportError::MissingParquetColumns {
            file: file.relative.clone(),
            missing: missing.join(", "),
            found: names
                .iter()
                .map(|h| format!("'{h}'"))
                .collect::<Vec<_>>()
                .join(", "),
        });
    }
    // Only the mapped columns are decoded: the frame holds them in the mapping's order.
    let mut projected: Vec<(Field, usize, String)> = mapping
        .columns
        .iter()
        .map(|(f, (i, h))| (*f, *i, h.clone()))
        .collect();
    projected.sort_by_key(|(_, i, _)| *i);
    let frame_mapping = HeaderMapping {
        columns: projected
            .iter()
            .enumerate()
            .map(|(k, (f, _, h))| (*f, (k, h.clone())))
            .collect(),
        ignored: mapping.ignored.clone(),
        odometer: mapping.odometer,
    };
    let mut market = Market::default();
    let mut issues = RowIssues::default();
    let mut row_in_file = 0u64;
    for g in 0..reader.num_row_groups() {
        let group_rows = usize::try_from(reader.metadata().row_group(g).num_rows()).unwrap_or(0);
        let df = guarded(&file.relative, || {
            let group = reader.get_row_group(g).map_err(|e| e.to_string())?;
            let sources: Vec<&Source> = projected.iter().map(|(_, i, _)| &sources[*i]).collect();
            group_frame(group.as_ref(), &schema, &sources, group_rows)
        })?;
        let start = first_row + row_in_file;
        let line_of = |row: usize| start + row as u64;
        read_frame_rows(
            &df,
            &frame_mapping,
            options,
            &line_of,
            &mut market,
            &mut issues,
        )
        .map_err(|message| ImportError::Parquet {
            file: file.relative.clone(),
            message,
        })?;
        row_in_file += group_rows as u64;
    }
    Ok(FilePart {
        market,
        issues,
        hash,
        column_map: mapping
            .columns
            .values()
            .zip(mapping.columns.keys())
            .map(|((_, h), f)| (h.clone(), f.canonical().to_owned()))
            .collect(),
        ignored: mapping.ignored,
        odometer: match mapping.odometer {
            super::OdometerUnit::Miles => "miles".into(),
            super::OdometerUnit::Kilometers => "kilometers".into(),
        },
    })
}

/// The text frame of one row group: a column per source, in order.
fn group_frame(
    group: &dyn parquet::file::reader::RowGroupReader,
    schema: &parquet::schema::types::SchemaDescriptor,
    sources: &[&Source],
    rows: usize,
) -> Result<DataFrame, String> {
    let mut columns: Vec<Column> = Vec::with_capacity(sources.len());
    for (k, source) in sources.iter().enumerate() {
        let name = PlSmallStr::from(format!("field_{k}"));
        let text = match source {
            Source::Stored(c) => {
                let descr = schema.column(*c);
                let reader = group.get_column_reader(*c).map_err(|e| e.to_string())?;
                column_text(reader, &descr, rows, name)
                    .map_err(|e| format!("column '{}': {e}", descr.name()))?
            }
            Source::Partition(value) => {
                let mut b = StringChunkedBuilder::new(name, rows);
                for _ in 0..rows {
                    b.append_option(value.as_deref());
                }
                b.finish().into_column()
            }
        };
        columns.push(text);
    }
    DataFrame::new(rows, columns).map_err(|e| e.to_string())
}

/// How a stored column's values read as text.
#[derive(Debug, Clone, Copy)]
enum Reading {
    Plain,
    /// Days since 1970-01-01.
    Date,
    /// A timestamp in units of this many per second; read as its UTC date.
    Timestamp(i64),
    /// A decimal with this scale.
    Decimal(i32),
}

fn reading_of(descr: &ColumnDescriptor) -> Reading {
    match descr.logical_type_ref() {
        Some(LogicalType::Date) => return Reading::Date,
        Some(LogicalType::Timestamp(t)) => {
            return Reading::Timestamp(match t.unit {
                TimeUnit::MILLIS => 1_000,
                TimeUnit::MICROS => 1_000_000,
                TimeUnit::NANOS => 1_000_000_000,
            });
        }
        Some(LogicalType::Decimal(d)) => return Reading::Decimal(d.scale),
        _ => {}
    }
    match descr.converted_type() {
        ConvertedType::DATE => Reading::Date,
        ConvertedType::TIMESTAMP_MILLIS => Reading::Timestamp(1_000),
        ConvertedType::TIMESTAMP_MICROS => Reading::Timestamp(1_000_000),
        ConvertedType::DECIMAL => Reading::Decimal(descr.type_scale()),
        _ => Reading::Plain,
    }
}

/// One stored column of a row group as text, nulls as empty cells.
fn column_text(
    reader: ColumnReader,
    descr: &ColumnDescriptor,
    rows: usize,
    name: PlSmallStr,
) -> Result<Column, String> {
    let reading = reading_of(descr);
    let max_def = descr.max_def_level();
    let unsigned =
        matches!(descr.logical_type_ref(), Some(LogicalType::Integer(t)) if !t.is_signed);
    let mut out = StringChunkedBuilder::new(name, rows);
    match (reader, reading) {
        (ColumnReader::Int32ColumnReader(r), Reading::Date) => {
            fill(r, rows, max_def, &mut out, |v, s| {
                date_text(i64::from(*v), s);
            });
        }
        (ColumnReader::Int32ColumnReader(r), Reading::Decimal(scale)) => {
            fill(r, rows, max_def, &mut out, |v, s| {
                decimal_text(i128::from(*v), scale, s);
            });
        }
        (ColumnReader::Int32ColumnReader(r), _) => {
            fill(r, rows, max_def, &mut out, |v, s| {
                let v = if unsigned {
                    i128::from(*v as u32)
                } else {
                    i128::from(*v)
                };
                let _ = write!(s, "{v}");
            });
        }
        (ColumnReader::Int64ColumnReader(r), Reading::Timestamp(per_second)) => {
            fill(r, rows, max_def, &mut out, |v, s| {
                date_text(v.div_euclid(per_second).div_euclid(86_400), s);
            });
        }
        (ColumnReader::Int64ColumnReader(r), Reading::Decimal(scale)) => {
            fill(r, rows, max_def, &mut out, |v, s| {
                decimal_text(i128::from(*v), scale, s);
            });
        }
        (ColumnReader::Int64ColumnReader(r), _) => {
            fill(r, rows, max_def, &mut out, |v, s| {
                let v = if unsigned {
                    i128::from(*v as u64)
                } else {
                    i128::from(*v)
                };
                let _ = write!(s, "{v}");
            });
        }
        (ColumnReader::Int96ColumnReader(r), _) => {
            // The legacy timestamp: nanoseconds of the day, then the Julian day.
            fill(r, rows, max_def, &mut out, |v, s| {
                if let [_, _, julian] = v.data() {
                    date_text(i64::from(*julian) - 2_440_588, s);
                }
            });
        }
        (ColumnReader::FloatColumnReader(r), _) => {
            fill(r, rows, max_def, &mut out, |v, s| {
                float_text(f64::from(*v), s);
            });
        }
        (ColumnReader::DoubleColumnReader(r), _) => {
            fill(r, rows, max_def, &mut out, |v, s| {
                float_text(*v, s);
            });
        }
        (ColumnReader::BoolColumnReader(r), _) => {
            fill(r, rows, max_def, &mut out, |v, s| {
                let _ = write!(s, "{v}");
            });
        }
        (ColumnReader::ByteArrayColumnReader(r), Reading::Decimal(scale)) => {
            fill(r, rows, max_def, &mut out, |v, s| {
                decimal_text(big_endian(v.data()), scale, s);
            });
        }
        (ColumnReader::ByteArrayColumnReader(r), _) => {
            fill(r, rows, max_def, &mut out, |v, s| {
                s.push_str(&String::from_utf8_lossy(v.data()));
            });
        }
        (ColumnReader::FixedLenByteArrayColumnReader(r), Reading::Decimal(scale)) => {
            fill(r, rows, max_def, &mut out, |v, s| {
                decimal_text(big_endian(v.data()), scale, s);
            });
        }
        (ColumnReader::FixedLenByteArrayColumnReader(r), _) => {
            fill(r, rows, max_def, &mut out, |v, s| {
                s.push_str(&String::from_utf8_lossy(v.data()));
            });
        }
    }
    let column = out.finish().into_column();
    if column.len() == rows {
        Ok(column)
    } else {
        Err(format!(
            "holds {} values where the row group has {rows} rows",
            column.len()
        ))
    }
}

/// Reads every value of a column chunk into `out` as text: `text` writes one value.
fn fill<T: ParquetType>(
    mut reader: ColumnReaderImpl<T>,
    rows: usize,
    max_def: i16,
    out: &mut StringChunkedBuilder,
    mut text: impl FnMut(&T::T, &mut String),
) {
    let mut values: Vec<T::T> = Vec::with_capacity(rows.min(1 << 20));
    let mut defs: Vec<i16> = Vec::new();
    let mut cell = String::new();
    let mut read = 0usize;
    while read < rows {
        values.clear();
        defs.clear();
        let want = (rows - read).min(1 << 16);
        let got = reader.read_records(want, (max_def > 0).then_some(&mut defs), None, &mut values);
        let Ok((records, _, _)) = got else {
            return;
        };
        if records == 0 {
            return;
        }
        let mut next = values.iter();
        for k in 0..records {
            let present = max_def == 0 || defs.get(k) == Some(&max_def);
            match present.then(|| next.next()).flatten() {
                Some(v) => {
                    cell.clear();
                    text(v, &mut cell);
                    out.append_value(cell.as_str());
                }
                None => out.append_null(),
            }
        }
        read += records;
    }
}

/// A float as text: whole numbers (prices, miles) as integers, which is several times quicker
/// than the shortest round-trip form and reads back to the same value.
fn float_text(v: f64, out: &mut String) {
    if v.fract() == 0.0 && v.abs() < 1e15 {
        let _ = write!(out, "{}", v as i64);
    } else {
        let _ = write!(out, "{v}");
    }
}

fn date_text(days_since_1970: i64, out: &mut String) {
    let date = i32::try_from(days_since_1970)
        .ok()
        .and_then(|d| d.checked_add(719_163))
        .and_then(NaiveDate::from_num_days_from_ce_opt);
    match date {
        Some(d) => {
            let _ = write!(out, "{:04}-{:02}-{:02}", d.year(), d.month(), d.day());
        }
        // Far outside the calendar: left as the day count, which the date reader refuses.
        None => {
            let _ = write!(out, "day {days_since_1970}");
        }
    }
}

/// A two's-complement big-endian integer of up to 16 bytes.
fn big_endian(bytes: &[u8]) -> i128 {
    let negative = bytes.first().is_some_and(|b| b & 0x80 != 0);
    let mut v: i128 = if negative { -1 } else { 0 };
    for &b in bytes.iter().take(16) {
        v = (v << 8) | i128::from(b);
    }
    v
}

fn decimal_text(unscaled: i128, scale: i32, out: &mut String) {
    if scale <= 0 {
        let _ = write!(out, "{unscaled}");
        for _ in 0..(-scale).min(38) {
            out.push('0');
        }
        return;
    }
    let scale = scale.min(38) as usize;
    let digits = unscaled.unsigned_abs().to_string();
    let digits = format!("{digits:0>width$}", width = scale + 1);
    let (whole, fraction) = digits.split_at(digits.len() - scale);
    if unscaled < 0 {
        out.push('-');
    }
    let _ = write!(out, "{whole}.{fraction}");
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn decimals_dates_and_big_endian_integers_read_as_their_text() {
        let text = |v: i128, scale: i32| {
            let mut s = String::new();
            decimal_text(v, scale, &mut s);
            s
        };
        assert_eq!(text(1_234_500, 2), "12345.00");
        assert_eq!(text(-5, 2), "-0.05");
        assert_eq!(text(7, 0), "7");
        assert_eq!(text(7, -2), "700");
        assert_eq!(big_endian(&[0xff, 0x85]), -123);
        assert_eq!(big_endian(&[0x01, 0x00]), 256);
        let date = |d: i64| {
            let mut s = String::new();
            date_text(d, &mut s);
            s
        };
        // 2026-12-03 is day 20,790 after 1970-01-01 (constructed by the definition of the
        // Parquet DATE type: days since the Unix epoch).
        assert_eq!(date(20_790), "2026-12-03");
        assert_eq!(date(0), "1970-01-01");
        assert_eq!(date(-1), "1969-12-31");
        assert_eq!(date(i64::MAX), format!("day {}", i64::MAX));
    }
}
