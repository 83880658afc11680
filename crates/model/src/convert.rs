//! Converting a market CSV into Parquet partitioned by make and model, the `make=…/model=…/`
//! folder layout analytical engines read and write, so that an appraisal reads only its model.
//!
//! The CSV is read in blocks of whole records (a few tens of megabytes each); each block is
//! imported with the same checks as a whole file, its rows shifted to their file lines, and
//! written as one file per make and model it holds (`part-00000.parquet`, `part-00001.parquet`
//! … by block). Memory stays near one block's worth whatever the file's size. The import report
//! is the whole file's: the same rows rejected, on the same lines, as importing it at once.
//!
//! What is written is the imported market: names as the file spelled them (the reader merges
//! spellings again), miles in miles, dates as dates, conditions and title brands in their own
//! words. Rejected rows are not written; the report names them.

use std::collections::{BTreeMap, HashMap};
use std::io::Read;
use std::path::{Path, PathBuf};
use std::sync::Arc;

use chrono::Datelike;

use parquet::basic::Compression;
use parquet::column::writer::ColumnWriter;
use parquet::data_type::ByteArray;
use parquet::file::properties::WriterProperties;
use parquet::file::writer::SerializedFileWriter;
use parquet::schema::parser::parse_message_type;

use crate::import::dataset::escape;
use crate::import::{Field, ImportError, ImportOptions, ImportReport, import_csv_bytes};
use crate::market::Market;
use crate::vocabulary::name_key;

/// CSV bytes read per block.
pub const BLOCK_BYTES: usize = 48 << 20;

/// Why a conversion stopped.
#[derive(Debug, thiserror::Error)]
pub enum ConvertError {
    /// The CSV could not be imported (the first block's or the whole file's problem).
    #[error(transparent)]
    Import(#[from] ImportError),
    /// A file could not be written.
    #[error("{path}: cannot write: {message}")]
    Write {
        /// The file or folder.
        path: String,
        /// Why.
        message: String,
    },
    /// The output folder already holds a dataset.
    #[error(
        "{path}: the folder already holds Parquet files; choose an empty or new folder (nothing was written)"
    )]
    NotEmpty {
        /// The folder.
        path: String,
    },
}

/// One file written.
#[derive(Debug, Clone, PartialEq, Eq, serde::Serialize)]
pub struct WrittenFile {
    /// Path from the output folder.
    pub file: String,
    /// Rows in it.
    pub rows: usize,
}

/// What a conversion did.
#[derive(Debug, Clone, serde::Serialize)]
pub struct Conversion {
    /// The CSV's import report (rows read, rejected with their lines, values dropped).
    pub report: ImportReport,
    /// The files written, in path order.
    pub files: Vec<WrittenFile>,
    /// Rows written (the rows the import used).
    pub rows_written: usize,
    /// Makes and models (partitions) written.
    pub partitions: usize,
}

/// Converts the CSV at `csv` into a partitioned Parquet dataset in `out` (created; it must not
/// already hold Parquet files).
pub fn convert_csv(
    csv: &Path,
    out: &Path,
    options: &ImportOptions,
    block_bytes: usize,
) -> Result<Conversion, ConvertError> {
    let file_name = crate::import::file_label(csv);
    let io = |source| ImportError::Io {
        file: file_name.clone(),
        source,
    };
    if crate::import::dataset::part_files(out).is_ok_and(|f| !f.is_empty()) && out.is_dir() {
        return Err(ConvertError::NotEmpty {
            path: out.display().to_string(),
        });
    }
    let mut input = std::fs::File::open(csv).map_err(io)?;
    let mut writer = PartitionWriter::new(out);
    let mut whole = ImportReport::default();
    let mut header: Option<Vec<u8>> = None;
    let mut carry: Vec<u8> = Vec::new();
    // File line of the first line of the next block.
    let mut next_line: u64 = 2;
    let mut block = 0usize;
    let mut at_end = false;
    while !at_end {
        let mut chunk = std::mem::take(&mut carry);
        let start = chunk.len();
        chunk.resize(start + block_bytes.max(1), 0);
        let got = read_full(&mut input, &mut chunk[start..]).map_err(io)?;
        chunk.truncate(start + got);
        at_end = got == 0 || got < block_bytes.max(1);
        if header.is_none() {
            let Some(end) = memchr::memchr(b'\n', &chunk) else {
                if at_end {
                    // A file of one line: let the importer say what it is.
                    return Err(import_csv_bytes(&file_name, chunk, options)
                        .err()
                        .map_or_else(
                            || ConvertError::Write {
                                path: file_name.clone(),
                                message: "the file has no rows".into(),
                            },
                            ConvertError::Import,
                        ));
                }
                carry = chunk;
                continue;
            };
            header = Some(chunk[..=end].to_vec());
            chunk.drain(..=end);
        }
        let cut = if at_end {
            chunk.len()
        } else {
            let Some(end) = last_record_end(&chunk) else {
                carry = chunk;
                continue;
            };
            end + 1
        };
        carry = chunk.split_off(cut);
        let lines_in_block = memchr::memchr_iter(b'\n', &chunk).count() as u64;
        let blank = chunk.iter().all(u8::is_ascii_whitespace);
        if blank && !whole.file_name.is_empty() {
            whole.blank_lines += blank_lines_in(&chunk);
        }
        if !blank || whole.file_name.is_empty() {
            let mut bytes = header.clone().unwrap_or_default();
            bytes.extend_from_slice(&chunk);
            let shift = next_line - 2;
            match import_csv_bytes(&file_name, bytes, options) {
                Ok((mut market, report)) => {
                    for line in &mut market.line {
                        *line += shift;
                    }
                    add_report(&mut whole, report, shift);
                    writer.write_block(&market, block)?;
                }
                Err(ImportError::NoUsableRows { report, .. }) if report.rows_read > 0 => {
                    add_report(&mut whole, *report, shift);
                }
                Err(ImportError::NoUsableRows { .. }) if block > 0 => {}
                Err(e) => return Err(shift_error(e, shift).into()),
            }
        }
        next_line += lines_in_block;
        block += 1;
    }
    whole.rows_used = writer.rows;
    whole.file_name.clone_from(&file_name);
    if writer.rows == 0 {
        return Err(ImportError::NoUsableRows {
            file: file_name,
            report: Box::new(whole),
        }
        .into());
    }
    let mut files = writer.files;
    files.sort_by(|a, b| a.file.cmp(&b.file));
    Ok(Conversion {
        report: whole,
        partitions: writer.folders.len(),
        rows_written: writer.rows,
        files,
    })
}

/// Rows of the demo market generated and written per block by [`demo_lake`].
pub const DEMO_BLOCK_ROWS: usize = 1_000_000;

/// Generates `rows` invented listings straight into the partitioned layout in `out`, block by
/// block on every core (block `b` is the demo market of its size drawn with seed `seed` + `b`),
/// so a market far larger than memory can be made. Memory stays near one block per core.
pub fn demo_lake(rows: usize, seed: u64, out: &Path) -> Result<Conversion, ConvertError> {
    if crate::import::dataset::part_files(out).is_ok_and(|f| !f.is_empty()) && out.is_dir() {
        return Err(ConvertError::NotEmpty {
            path: out.display().to_string(),
        });
    }
    let blocks = rows.div_ceil(DEMO_BLOCK_ROWS);
    let cores = std::thread::available_parallelism()
        .map_or(1, std::num::NonZero::get)
        .min(blocks)
        .max(1);
    let options = ImportOptions {
        latest_model_year: crate::demo::demo_as_of().year() + 1,
        ..ImportOptions::default()
    };
    let work = |core: usize| -> Result<(PartitionWriter, ImportReport), ConvertError> {
        let mut writer = PartitionWriter::new(out);
        let mut report = ImportReport::default();
        for block in (core..blocks).step_by(cores) {
            let n = DEMO_BLOCK_ROWS.min(rows - block * DEMO_BLOCK_ROWS);
            let bytes = crate::demo::demo_csv_bytes(n, seed.wrapping_add(block as u64));
            let (market, block_report) = import_csv_bytes("demo", bytes, &options)?;
            add_report(&mut report, block_report, 0);
            writer.write_block(&market, block)?;
        }
        Ok((writer, report))
    };
    let parts: Vec<Result<(PartitionWriter, ImportReport), ConvertError>> =
        std::thread::scope(|scope| {
            let handles: Vec<_> = (0..cores).map(|c| scope.spawn(move || work(c))).collect();
            handles
                .into_iter()
                .map(|h| {
                    h.join().unwrap_or_else(|_| {
                        Err(ConvertError::Write {
                            path: out.display().to_string(),
                            message: "a writing thread failed".into(),
                        })
                    })
                })
                .collect()
        });
    let mut files = Vec::new();
    let mut rows_written = 0;
    let mut folders = std::collections::BTreeSet::new();
    let mut report = ImportReport::default();
    for part in parts {
        let (writer, part_report) = part?;
        rows_written += writer.rows;
        folders.extend(writer.folders.into_values());
        files.extend(writer.files);
        add_report(&mut report, part_report, 0);
    }
    report.rows_used = rows_written;
    report.file_name = crate::demo::demo_name(rows);
    files.sort_by(|a, b| a.file.cmp(&b.file));
    Ok(Conversion {
        report,
        files,
        rows_written,
        partitions: folders.len(),
    })
}

/// The lines of a block of nothing but blank lines, counted as the whole file's import counts
/// them (each line, the last one even without its line break).
fn blank_lines_in(chunk: &[u8]) -> usize {
    let lines = chunk.split(|&b| b == b'\n').count();
    if chunk.last() == Some(&b'\n') {
        lines - 1
    } else {
        lines
    }
}

/// Reads until `buf` is full or the file ends; returns the bytes read.
fn read_full(input: &mut impl Read, buf: &mut [u8]) -> std::io::Result<usize> {
    let mut got = 0;
    while got < buf.len() {
        match input.read(&mut buf[got..])? {
            0 => break,
            n => got += n,
        }
    }
    Ok(got)
}

/// The position of the last line break that ends a record (outside quotes), reading from the
/// start of a record.
fn last_record_end(bytes: &[u8]) -> Option<usize> {
    let mut quoted = false;
    let mut last = None;
    for pos in memchr::memchr2_iter(b'\n', b'"', bytes) {
        if bytes[pos] == b'"' {
            quoted = !quoted;
        } else if !quoted {
            last = Some(pos);
        }
    }
    last
}

/// Adds a block's report (its lines shifted by `shift`) to the whole file's.
fn add_report(whole: &mut ImportReport, block: ImportReport, shift: u64) {
    if whole.file_name.is_empty() {
        whole.file_name.clone_from(&block.file_name);
        whole.delimiter.clone_from(&block.delimiter);
        whole.odometer_unit.clone_from(&block.odometer_unit);
        whole.column_map = block.column_map.clone();
        whole.ignored_columns.clone_from(&block.ignored_columns);
    }
    whole.rows_read += block.rows_read;
    whole.condition_inferred += block.condition_inferred;
    whole.blank_lines += block.blank_lines;
    for r in block.rejected {
        whole.reject(r.line + shift, r.reason);
    }
    whole
        .dropped_values
        .extend(block.dropped_values.into_iter().map(|mut d| {
            d.line += shift;
            d
        }));
    for m in block.merged_spellings {
        match whole
            .merged_spellings
            .iter_mut()
            .find(|w| w.field == m.field && name_key(&w.shown) == name_key(&m.shown))
        {
            Some(w) => {
                for (spelling, n) in m.spellings {
                    match w.spellings.iter_mut().find(|(s, _)| *s == spelling) {
                        Some((_, count)) => *count += n,
                        None => w.spellings.push((spelling, n)),
                    }
                }
            }
            None => whole.merged_spellings.push(m),
        }
    }
    for o in block.options_found {
        match whole
            .options_found
            .iter_mut()
            .find(|w| name_key(&w.name) == name_key(&o.name))
        {
            Some(w) => w.listings += o.listings,
            None => whole.options_found.push(o),
        }
    }
    whole
        .options_found
        .sort_by_key(|o| std::cmp::Reverse(o.listings));
}

/// A block's error with its lines made the file's.
fn shift_error(e: ImportError, shift: u64) -> ImportError {
    match e {
        ImportError::RaggedLine {
            file,
            line,
            fields,
            header_fields,
        } => ImportError::RaggedLine {
            file,
            line: line + shift,
            fields,
            header_fields,
        },
        ImportError::NotUtf8 { file, line, column } => ImportError::NotUtf8 {
            file,
            line: if line > 1 { line + shift } else { line },
            column,
        },
        other => other,
    }
}

/// The columns written, in order (make and model are the folders).
const SCHEMA: &str = "message market {
    required int32 model_year;
    optional binary variant (STRING);
    required double asking_price;
    required double miles;
    required binary condition (STRING);
    optional int32 listed_on (DATE);
    optional int32 sold_on (DATE);
    optional double sale_price;
    optional binary vin (STRING);
    optional binary seller (STRING);
    optional binary location (STRING);
    optional double latitude;
    optional double longitude;
    optional double distance_mi;
    optional binary title (STRING);
    optional binary options (STRING);
}";

/// Writes blocks of a market into the partition folders.
struct PartitionWriter {
    root: PathBuf,
    /// Folder of each make and model, by their name keys: the first spelling met names it.
    folders: HashMap<(String, String), String>,
    files: Vec<WrittenFile>,
    rows: usize,
}

impl PartitionWriter {
    fn new(root: &Path) -> Self {
        Self {
            root: root.to_owned(),
            folders: HashMap::new(),
            files: Vec::new(),
            rows: 0,
        }
    }

    fn write_block(&mut self, market: &Market, block: usize) -> Result<(), ConvertError> {
        let mut by_segment: BTreeMap<(u32, u32), Vec<usize>> = BTreeMap::new();
        for row in 0..market.len() {
            by_segment
                .entry((market.make[row], market.model[row]))
                .or_default()
                .push(row);
        }
        for ((make, model), rows) in by_segment {
            let (make, model) = (market.names.name(make), market.names.name(model));
            let folder = self
                .folders
                .entry((name_key(make), name_key(model)))
                .or_insert_with(|| format!("make={}/model={}", escape(make), escape(model)))
                .clone();
            let relative = format!("{folder}/part-{block:05}.parquet");
            write_rows(&self.root.join(&relative), market, &rows).map_err(|message| {
                ConvertError::Write {
                    path: self.root.join(&relative).display().to_string(),
                    message,
                }
            })?;
            self.rows += rows.len();
            self.files.push(WrittenFile {
                file: relative,
                rows: rows.len(),
            });
        }
        Ok(())
    }
}

/// Writes `rows` of `market` (one make and model) to one Parquet file.
pub fn write_rows(path: &Path, market: &Market, rows: &[usize]) -> Result<(), String> {
    if let Some(dir) = path.parent() {
        std::fs::create_dir_all(dir).map_err(|e| e.to_string())?;
    }
    let schema = Arc::new(parse_message_type(SCHEMA).map_err(|e| e.to_string())?);
    let props = Arc::new(
        WriterProperties::builder()
            .set_compression(Compression::SNAPPY)
            .set_created_by("comptrail".into())
            .build(),
    );
    let file = std::fs::File::create(path).map_err(|e| e.to_string())?;
    let mut writer = SerializedFileWriter::new(file, schema, props).map_err(|e| e.to_string())?;
    let mut group = writer.next_row_group().map_err(|e| e.to_string())?;
    let mut index = 0usize;
    while let Some(mut column) = group.next_column().map_err(|e| e.to_string())? {
        write_column(column.untyped(), index, market, rows).map_err(|e| e.to_string())?;
        column.close().map_err(|e| e.to_string())?;
        index += 1;
    }
    group.close().map_err(|e| e.to_string())?;
    writer.close().map_err(|e| e.to_string())?;
    Ok(())
}

/// Values of an optional column: the present values and a definition level per row.
fn optional<T>(rows: &[usize], value: impl Fn(usize) -> Option<T>) -> (Vec<T>, Vec<i16>) {
    let mut values = Vec::with_capacity(rows.len());
    let mut defs = Vec::with_capacity(rows.len());
    for &r in rows {
        match value(r) {
            Some(v) => {
                values.push(v);
                defs.push(1);
            }
            None => defs.push(0),
        }
    }
    (values, defs)
}

fn text(s: &str) -> ByteArray {
    ByteArray::from(s.as_bytes().to_vec())
}

fn days(date: chrono::NaiveDate) -> i32 {
    (date - chrono::NaiveDate::from_ymd_opt(1970, 1, 1).unwrap_or_default()).num_days() as i32
}

fn write_column(
    column: &mut ColumnWriter<'_>,
    index: usize,
    market: &Market,
    rows: &[usize],
) -> parquet::errors::Result<()> {
    let name = |id: u32| (id != crate::vocabulary::NO_NAME).then(|| text(market.names.name(id)));
    match (index, column) {
        (0, ColumnWriter::Int32ColumnWriter(w)) => {
            let v: Vec<i32> = rows.iter().map(|&r| market.model_year[r]).collect();
            w.write_batch(&v, None, None)?;
        }
        (1, ColumnWriter::ByteArrayColumnWriter(w)) => {
            let (v, d) = optional(rows, |r| name(market.variant[r]));
            w.write_batch(&v, Some(&d), None)?;
        }
        (2, ColumnWriter::DoubleColumnWriter(w)) => {
            let v: Vec<f64> = rows.iter().map(|&r| market.asking_price[r]).collect();
            w.write_batch(&v, None, None)?;
        }
        (3, ColumnWriter::DoubleColumnWriter(w)) => {
            let v: Vec<f64> = rows.iter().map(|&r| market.miles[r]).collect();
            w.write_batch(&v, None, None)?;
        }
        (4, ColumnWriter::ByteArrayColumnWriter(w)) => {
            let v: Vec<ByteArray> = rows
                .iter()
                .map(|&r| text(market.condition[r].as_str()))
                .collect();
            w.write_batch(&v, None, None)?;
        }
        (5, ColumnWriter::Int32ColumnWriter(w)) => {
            let (v, d) = optional(rows, |r| market.listed_on[r].map(days));
            w.write_batch(&v, Some(&d), None)?;
        }
        (6, ColumnWriter::Int32ColumnWriter(w)) => {
            let (v, d) = optional(rows, |r| market.sold_on[r].map(days));
            w.write_batch(&v, Some(&d), None)?;
        }
        (7, ColumnWriter::DoubleColumnWriter(w)) => {
            let (v, d) = optional(rows, |r| market.sale_price[r]);
            w.write_batch(&v, Some(&d), None)?;
        }
        (8, ColumnWriter::ByteArrayColumnWriter(w)) => {
            let (v, d) = optional(rows, |r| market.vin.get(r).map(text));
            w.write_batch(&v, Some(&d), None)?;
        }
        (9, ColumnWriter::ByteArrayColumnWriter(w)) => {
            let (v, d) = optional(rows, |r| name(market.seller[r]));
            w.write_batch(&v, Some(&d), None)?;
        }
        (10, ColumnWriter::ByteArrayColumnWriter(w)) => {
            let (v, d) = optional(rows, |r| name(market.location[r]));
            w.write_batch(&v, Some(&d), None)?;
        }
        (11, ColumnWriter::DoubleColumnWriter(w)) => {
            let (v, d) = optional(rows, |r| market.coordinates[r].map(|c| f64::from(c.0)));
            w.write_batch(&v, Some(&d), None)?;
        }
        (12, ColumnWriter::DoubleColumnWriter(w)) => {
            let (v, d) = optional(rows, |r| market.coordinates[r].map(|c| f64::from(c.1)));
            w.write_batch(&v, Some(&d), None)?;
        }
        (13, ColumnWriter::DoubleColumnWriter(w)) => {
            let (v, d) = optional(rows, |r| market.distance_miles[r].map(f64::from));
            w.write_batch(&v, Some(&d), None)?;
        }
        (14, ColumnWriter::ByteArrayColumnWriter(w)) => {
            let (v, d) = optional(rows, |r| market.title[r].map(|t| text(t.as_str())));
            w.write_batch(&v, Some(&d), None)?;
        }
        (15, ColumnWriter::ByteArrayColumnWriter(w)) => {
            let (v, d) = optional(rows, |r| name(market.options[r]));
            w.write_batch(&v, Some(&d), None)?;
        }
        (i, _) => {
            return Err(parquet::errors::ParquetError::General(format!(
                "column {i} of the schema has no writer"
            )));
        }
    }
    Ok(())
}

/// The field each written column maps to (tests check the reader maps them back).
pub const WRITTEN_FIELDS: [Field; 16] = [
    Field::ModelYear,
    Field::Variant,
    Field::AskingPrice,
    Field::Miles,
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
    Field::Title,
    Field::Options,
];

#[cfg(test)]
mod tests {
    use super::*;
    use crate::import::{import_csv_bytes, import_parquet, parquet_fingerprint};
    use crate::market::Listing;

    fn scratch(name: &str) -> PathBuf {
        let dir = std::env::temp_dir().join(format!("comptrail-{name}-{}", std::process::id()));
        let _ = std::fs::remove_dir_all(&dir);
        dir
    }

    /// A demo file with some rows spoiled (bad year, negative price, a bad date, a quoted field
    /// holding a line break and a comma, names in other spellings).
    fn spoiled_csv(rows: usize) -> Vec<u8> {
        let text = String::from_utf8(crate::demo::demo_csv_bytes(rows, 5)).unwrap_or_default();
        let mut out = String::new();
        for (i, line) in text.lines().enumerate() {
            if i == rows / 2 {
                // More blank lines than one block holds: a block of nothing else.
                out.push_str(&"  \n".repeat(30_000));
            }
            let mut fields: Vec<String> = line.split(',').map(str::to_owned).collect();
            if i > 0 {
                match i % 97 {
                    3 => fields[0] = "20x4".into(),
                    5 => fields[4] = "-5".into(),
                    7 => fields[7] = "2026-02-30".into(),
                    11 => fields[11] = "\"Seller, with\na break\"".into(),
                    13 => fields[1] = fields[1].to_uppercase(),
                    17 => fields[2] = format!(" {} ", fields[2].to_lowercase()),
                    _ => {}
                }
            }
            out.push_str(&fields.join(","));
            out.push('\n');
        }
        out.into_bytes()
    }

    fn without_place(l: &Listing) -> Listing {
        Listing {
            row: 0,
            line: 0,
            ..l.clone()
        }
    }

    #[test]
    fn a_csv_converted_in_blocks_reads_back_as_the_same_market_and_report() {
        let bytes = spoiled_csv(4_000);
        let options = ImportOptions {
            latest_model_year: 2027,
            ..ImportOptions::default()
        };
        let (csv_market, csv_report) =
            import_csv_bytes("m.csv", bytes.clone(), &options).unwrap_or_else(|e| panic!("{e}"));
        let dir = scratch("convert");
        let csv = dir.join("m.csv");
        std::fs::create_dir_all(&dir).unwrap_or_else(|e| panic!("{e}"));
        std::fs::write(&csv, &bytes).unwrap_or_else(|e| panic!("{e}"));
        let out = dir.join("lake");
        // Blocks of 40 kB: the file is cut into a dozen, some cuts inside the quoted field.
        let done = convert_csv(&csv, &out, &options, 40_000).unwrap_or_else(|e| panic!("{e}"));
        assert!(done.files.len() > 20, "{} files", done.files.len());
        assert_eq!(done.partitions, csv_market.segments().len());
        assert_eq!(done.rows_written, csv_market.len());
        // The whole file's report: the same rows rejected on the same lines, the same drops.
        assert!(csv_report.rejected.len() > 50);
        assert_eq!(done.report.rejected, csv_report.rejected);
        assert_eq!(
            done.report.rejected_by_reason,
            csv_report.rejected_by_reason
        );
        assert_eq!(done.report.dropped_values, csv_report.dropped_values);
        assert_eq!(done.report.rows_read, csv_report.rows_read);
        assert!(csv_report.blank_lines >= 30_000);
        assert_eq!(done.report.blank_lines, csv_report.blank_lines);
        // Converting again into the same folder is refused rather than mixing two datasets.
        assert!(matches!(
            convert_csv(&csv, &out, &options, 40_000),
            Err(ConvertError::NotEmpty { .. })
        ));

        let (lake, report) = import_parquet(&out, &options, &[]).unwrap_or_else(|e| panic!("{e}"));
        assert_eq!(lake.len(), csv_market.len());
        assert!(report.rejected.is_empty());
        assert_eq!(report.parts_read.len(), done.files.len());
        // Segment by segment, in file order, the same listings.
        for (segment, _) in csv_market.segments() {
            let make = csv_market.names.name(segment.make);
            let model = csv_market.names.name(segment.model);
            let theirs = lake
                .find_segment(make, model)
                .unwrap_or_else(|| panic!("{make} {model}"));
            let a: Vec<Listing> = (0..csv_market.len())
                .filter(|&r| {
                    csv_market.make[r] == segment.make && csv_market.model[r] == segment.model
                })
                .map(|r| without_place(&csv_market.listing(r)))
                .collect();
            let b: Vec<Listing> = (0..lake.len())
                .filter(|&r| lake.make[r] == theirs.make && lake.model[r] == theirs.model)
                .map(|r| without_place(&lake.listing(r)))
                .collect();
            assert_eq!(a.len(), b.len(), "{make} {model}");
            for (x, y) in a.iter().zip(&b) {
                assert_eq!(x, y);
            }
        }

        // One model: only its folder is opened, and the fingerprint can be found again.
        let (one, one_report) =
            import_parquet(&out, &options, &[("QUELLMARK".into(), "tessel".into())])
                .unwrap_or_else(|e| panic!("{e}"));
        assert_eq!(one.segments().len(), 1);
        assert!(one_report.parts_skipped > 0);
        assert!(
            one_report
                .parts_read
                .iter()
                .all(|p| p.file.starts_with("make=Quellmark/model=Tessel/"))
        );
        assert_eq!(one.source.models_read.len(), 1);
        assert_eq!(
            parquet_fingerprint(&out, &one.source.models_read)
                .ok()
                .as_deref(),
            Some(one.source.content_hash.as_str())
        );
        // Rows are numbered across the dataset in path order, whichever files were read.
        let first = &one_report.parts_read[0];
        let whole_first = report
            .parts_read
            .iter()
            .find(|p| p.file == first.file)
            .map(|p| p.first_row);
        assert_eq!(Some(first.first_row), whole_first);
        assert_eq!(one.line[0], first.first_row);
        let missing = import_parquet(&out, &options, &[("Quellmark".into(), "Nope".into())]);
        let message = missing.err().map(|e| e.to_string()).unwrap_or_default();
        assert!(
            message.contains("no partition holds Quellmark Nope; the dataset holds"),
            "{message}"
        );
        std::fs::remove_dir_all(&dir).ok();
    }

    /// A Parquet file written by hand with the types feeds use and values a CSV could hold: the
    /// same row checks apply, and each problem is named by file and row.
    #[test]
    fn a_parquet_file_gets_the_csv_row_checks_named_by_file_and_row() {
        use parquet::data_type::{ByteArrayType, DoubleType, Int64Type};
        let dir = scratch("typed");
        let path = dir.join("make=Ardent").join("feed.parquet");
        std::fs::create_dir_all(path.parent().unwrap_or(&dir)).unwrap_or_else(|e| panic!("{e}"));
        let schema = Arc::new(
            parse_message_type(
                "message feed {
                    optional binary Year (STRING);
                    optional binary Model (STRING);
                    optional double Price;
                    optional int64 Odometer;
                    optional int64 first_seen (TIMESTAMP(MILLIS,true));
                    optional binary colour (STRING);
                }",
            )
            .unwrap_or_else(|e| panic!("{e}")),
        );
        let file = std::fs::File::create(&path).unwrap_or_else(|e| panic!("{e}"));
        let mut w = SerializedFileWriter::new(file, schema, Arc::new(WriterProperties::default()))
            .unwrap_or_else(|e| panic!("{e}"));
        let mut g = w.next_row_group().unwrap_or_else(|e| panic!("{e}"));
        let years = ["2021", "20x4", "2022", "2020"].map(text);
        let all = [1i16; 4];
        let mut k = 0;
        while let Some(mut c) = g.next_column().unwrap_or_else(|e| panic!("{e}")) {
            let r = match k {
                0 => c
                    .typed::<ByteArrayType>()
                    .write_batch(&years, Some(&all), None),
                1 => c.typed::<ByteArrayType>().write_batch(
                    &["Vale", "Vale", "Vale"].map(text),
                    Some(&[1, 1, 0, 1]),
                    None,
                ),
                2 => c.typed::<DoubleType>().write_batch(
                    &[21_000.0, 20_000.0, 19_000.0, -5.0],
                    Some(&all),
                    None,
                ),
                3 => c.typed::<Int64Type>().write_batch(
                    &[30_000, 31_000, 32_000, 33_000],
                    Some(&all),
                    None,
                ),
                // 2026-03-01T10:00Z and an instant far outside any calendar.
                4 => c.typed::<Int64Type>().write_batch(
                    &[1_772_359_200_000, i64::MAX],
                    Some(&[1, 0, 0, 1]),
                    None,
                ),
                _ => c
                    .typed::<ByteArrayType>()
                    .write_batch(&[], Some(&[0; 4]), None),
            };
            r.unwrap_or_else(|e| panic!("{e}"));
            c.close().unwrap_or_else(|e| panic!("{e}"));
            k += 1;
        }
        g.close().unwrap_or_else(|e| panic!("{e}"));
        w.close().unwrap_or_else(|e| panic!("{e}"));

        let options = ImportOptions {
            latest_model_year: 2027,
            ..ImportOptions::default()
        };
        let (market, report) =
            import_parquet(&dir, &options, &[]).unwrap_or_else(|e| panic!("{e}"));
        std::fs::remove_dir_all(&dir).ok();
        assert_eq!(market.len(), 1);
        assert_eq!(
            market.names.name(market.make[0]),
            "Ardent",
            "from the folder"
        );
        assert_eq!(
            market.listed_on[0],
            chrono::NaiveDate::from_ymd_opt(2026, 3, 1)
        );
        assert_eq!(report.ignored_columns, ["colour"]);
        let rejected: Vec<(String, &str)> = report
            .rejected
            .iter()
            .map(|r| (r.where_found(), r.reason.code()))
            .collect();
        assert_eq!(
            rejected,
            [
                ("make=Ardent/feed.parquet, row 2".to_owned(), "not_a_number"),
                (
                    "make=Ardent/feed.parquet, row 3".to_owned(),
                    "missing_value"
                ),
                (
                    "make=Ardent/feed.parquet, row 4".to_owned(),
                    "price_out_of_range"
                ),
            ]
        );
    }

    /// Damaged files (bytes flipped anywhere, the file cut short) end in an error naming the
    /// file or in rows read with their checks, never in a panic that escapes.
    #[test]
    fn a_damaged_parquet_file_is_an_error_not_a_crash() {
        use rand::{Rng, SeedableRng};
        let dir = scratch("fuzz");
        let csv = dir.join("m.csv");
        std::fs::create_dir_all(&dir).unwrap_or_else(|e| panic!("{e}"));
        std::fs::write(&csv, crate::demo::demo_csv_bytes(300, 9)).unwrap_or_else(|e| panic!("{e}"));
        let lake = dir.join("lake");
        let options = ImportOptions::default();
        convert_csv(&csv, &lake, &options, BLOCK_BYTES).unwrap_or_else(|e| panic!("{e}"));
        let file = lake.join("make=Quellmark/model=Tessel/part-00000.parquet");
        let good = std::fs::read(&file).unwrap_or_else(|e| panic!("{e}"));
        let mut rng = rand_chacha::ChaCha8Rng::seed_from_u64(11);
        let (mut errors, mut read) = (0, 0);
        for case in 0..400 {
            let mut bytes = good.clone();
            if case % 10 == 0 {
                bytes.truncate(rng.random_range(0..bytes.len()));
            } else {
                for _ in 0..rng.random_range(1..8) {
                    let at = rng.random_range(0..bytes.len());
                    bytes[at] = rng.random();
                }
            }
            std::fs::write(&file, &bytes).unwrap_or_else(|e| panic!("{e}"));
            let outcome = std::panic::catch_unwind(|| import_parquet(&lake, &options, &[]));
            assert!(
                outcome.is_ok(),
                "case {case}: a damaged file panicked through the reader"
            );
            match outcome {
                Ok(Ok(_)) => read += 1,
                Ok(Err(e)) => {
                    errors += 1;
                    assert!(!e.to_string().is_empty());
                }
                Err(_) => {}
            }
        }
        std::fs::remove_dir_all(&dir).ok();
        assert!(errors > 100, "{errors} errors, {read} read");
    }

    #[test]
    fn every_column_written_reads_back_as_its_field() {
        let schema = parse_message_type(SCHEMA).unwrap_or_else(|e| panic!("{e}"));
        let names: Vec<&str> = schema.get_fields().iter().map(|f| f.name()).collect();
        let read: Vec<Option<Field>> = names
            .iter()
            .map(|n| crate::import::field_for(&crate::import::normalize_header(n)))
            .collect();
        let written: Vec<Option<Field>> = WRITTEN_FIELDS.iter().copied().map(Some).collect();
        assert_eq!(read, written, "{names:?}");
    }

    #[test]
    fn a_damaged_or_empty_dataset_says_which_file() {
        let dir = scratch("damaged");
        std::fs::create_dir_all(dir.join("make=A")).unwrap_or_else(|e| panic!("{e}"));
        let options = ImportOptions::default();
        let empty = import_parquet(&dir, &options, &[])
            .err()
            .map(|e| e.to_string());
        assert!(empty.is_some_and(|m| m.contains("no .parquet files")));
        std::fs::write(dir.join("make=A/part-0.parquet"), b"PAR1 not really")
            .unwrap_or_else(|e| panic!("{e}"));
        let damaged = import_parquet(&dir, &options, &[])
            .err()
            .map(|e| e.to_string());
        std::fs::remove_dir_all(&dir).ok();
        assert!(
            damaged
                .as_deref()
                .is_some_and(|m| m.starts_with("make=A/part-0.parquet: cannot be read as Parquet")),
            "{damaged:?}"
        );
    }
}
