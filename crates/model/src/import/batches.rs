//! Reading a file's records in batches: polars tokenizes a batch of records (every column as
//! text), the batch is read into market rows and its text frame dropped before the next. The
//! text of a whole large file is never held twice (once as bytes, once as a frame), which keeps
//! the peak memory near the file's size plus the market's columns.
//!
//! The batches are split between the machine's cores in contiguous runs; each core builds its
//! part of the market in file order and the parts are joined at the end.

use std::io::Cursor;
use std::sync::Arc;

use polars::prelude::{CsvReadOptions, DataFrame, DataType, PlSmallStr, Schema, SerReader};

use super::rows::{RowIssues, read_frame_rows};
use super::{HeaderMapping, ImportOptions, RecordStarts};
use crate::market::Market;

/// Records per batch: the frame of one batch holds about 300 bytes a record.
pub(super) const BATCH_RECORDS: usize = 1 << 15;

/// Below this many records one core reads the whole file in one batch (polars still spreads its
/// tokenizing over the cores).
const ONE_CORE_BELOW: usize = 50_000;

/// The tokenizer's settings for one file.
#[derive(Debug, Clone, Copy)]
pub(super) struct Tokenizer {
    pub delimiter: u8,
    /// Fields in the header: every batch is read with this many text columns.
    pub header_fields: usize,
}

/// How a file's records are split: into batches of at most `batch_records`, in contiguous runs
/// for `cores` threads.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) struct Plan {
    pub cores: usize,
    pub batch_records: usize,
}

impl Plan {
    /// The plan for a file of `records` on this machine.
    pub fn for_records(records: usize) -> Self {
        let cores = std::thread::available_parallelism().map_or(1, std::num::NonZero::get);
        Self {
            cores: if records < ONE_CORE_BELOW { 1 } else { cores },
            batch_records: BATCH_RECORDS,
        }
    }
}

/// Reads every record after the header into a market, with what was found besides the rows kept.
/// Errors are the tokenizer's messages.
pub(super) fn read_batches(
    bytes: &[u8],
    starts: &RecordStarts,
    tokenizer: &Tokenizer,
    mapping: &HeaderMapping,
    options: ImportOptions,
    plan: Plan,
) -> Result<(Market, RowIssues), String> {
    let records = starts.offsets.len();
    let cores = plan.cores.max(1);
    // Batches of at most `batch_records`, the same number for every core.
    let batches = records
        .div_ceil(plan.batch_records.max(1))
        .max(cores)
        .div_ceil(cores)
        * cores;
    let per_batch = records.div_ceil(batches).max(1);
    let batch = |b: usize| -> Option<Batch<'_>> {
        let first_record = b * per_batch;
        if first_record >= records {
            return None;
        }
        let end_record = (first_record + per_batch).min(records);
        let from = starts.offsets[first_record];
        let to = starts
            .offsets
            .get(end_record)
            .copied()
            .unwrap_or(bytes.len());
        Some(Batch {
            text: &bytes[from..to],
            first_record,
            records: end_record - first_record,
        })
    };
    let per_core = batches / cores;
    let run = |core: usize| -> Result<(Market, RowIssues), String> {
        let (mut market, mut issues) = (Market::default(), RowIssues::default());
        let mine: Vec<Batch<'_>> = (core * per_core..(core + 1) * per_core)
            .filter_map(batch)
            .collect();
        market.reserve(mine.iter().map(|b| b.records).sum());
        for b in mine {
            let df = tokenize(b.text, tokenizer, cores > 1)?;
            let line_of = |row: usize| {
                let record = b.first_record + row;
                starts
                    .lines
                    .get(record)
                    .copied()
                    .unwrap_or(record as u64 + 2)
            };
            read_frame_rows(&df, mapping, options, &line_of, &mut market, &mut issues)?;
        }
        Ok((market, issues))
    };
    let parts: Vec<Result<(Market, RowIssues), String>> = if cores == 1 {
        vec![run(0)]
    } else {
        std::thread::scope(|scope| {
            let handles: Vec<_> = (0..cores)
                .map(|core| scope.spawn(move || run(core)))
                .collect();
            handles
                .into_iter()
                .map(|h| {
                    h.join()
                        .unwrap_or_else(|_| Err("a reading thread failed".to_owned()))
                })
                .collect()
        })
    };
    join_parts(parts)
}

/// A run of whole records.
struct Batch<'b> {
    text: &'b [u8],
    first_record: usize,
    records: usize,
}

/// Joins the parts in file order: the first is moved, the others appended once room is made.
fn join_parts(
    parts: Vec<Result<(Market, RowIssues), String>>,
) -> Result<(Market, RowIssues), String> {
    let parts: Vec<(Market, RowIssues)> = parts.into_iter().collect::<Result<_, _>>()?;
    let total: usize = parts.iter().map(|(m, _)| m.len()).sum();
    let mut parts = parts.into_iter();
    let Some((mut market, mut issues)) = parts.next() else {
        return Ok((Market::default(), RowIssues::default()));
    };
    market.reserve(total - market.len());
    for (later_market, later_issues) in parts {
        market.append(later_market);
        issues.append(later_issues);
    }
    Ok((market, issues))
}

/// Tokenizes records (no header) into a frame of `header_fields` text columns. When several
/// cores each read their own batches, polars is asked for one thread's worth of chunks.
fn tokenize(text: &[u8], tokenizer: &Tokenizer, shared: bool) -> Result<DataFrame, String> {
    let schema: Schema = (1..=tokenizer.header_fields)
        .map(|i| (PlSmallStr::from(format!("field_{i}")), DataType::String))
        .collect();
    CsvReadOptions::default()
        .with_has_header(false)
        .with_schema(Some(Arc::new(schema)))
        .with_n_threads(shared.then_some(1))
        .map_parse_options(|o| {
            o.with_separator(tokenizer.delimiter)
                .with_quote_char(Some(b'"'))
        })
        .into_reader_with_file_handle(Cursor::new(text))
        .finish()
        .map_err(|e| e.to_string())
}
