//! Many subjects against one market: a dealer's inventory re-priced, a book of vehicles or a
//! storm's total losses. Subjects are read from a CSV with the market's own column names and
//! header spellings plus an `id` column; each segment is cleaned and fitted once and the
//! subjects are appraised on every core; a subject that cannot be appraised gives a row with its
//! reason and the others go on.

use std::collections::BTreeMap;

use serde::Serialize;

use crate::appraisal::{
    Appraisal, AppraisalRequest, FitSettings, MarketFit, appraise, find_segment, fit_market,
};
use crate::clean::Overrides;
use crate::condition::Condition;
use crate::import::headers::{Field, field_for, normalize_header};
use crate::market::{Market, Segment};
use crate::session::{Purpose, WorksheetOutcome, work_out};
use crate::subject::Subject;

/// One subject row of the file: its id, its line, and the subject or why it cannot be read.
#[derive(Debug, Clone, PartialEq)]
pub struct SubjectRow {
    /// The `id` column.
    pub id: String,
    /// The file line (the header is line 1).
    pub line: u64,
    /// The subject, or what was wrong with the row.
    pub subject: Result<Subject, String>,
    /// The `worksheet` column: a trade-in or claim worksheet file (RON) for this subject, as
    /// written (relative paths are from the subjects file's folder).
    pub worksheet: Option<String>,
}

/// Why a subjects file cannot be read at all.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum SubjectsError {
    /// A required column is missing from the header.
    #[error(
        "the subjects file has no {0} column (it needs id, model year, make, model and miles, with the market's header spellings)"
    )]
    MissingColumn(&'static str),
    /// The file is empty.
    #[error("the subjects file is empty")]
    Empty,
}

/// The subjects file's column naming each row's worksheet file.
pub const WORKSHEET_COLUMN: &str = "worksheet";

/// Splits one CSV record on `delimiter`, honouring double quotes ("" is a quote inside).
fn split_record(line: &str, delimiter: char) -> Vec<String> {
    let mut fields = Vec::new();
    let mut field = String::new();
    let mut quoted = false;
    let mut chars = line.chars().peekable();
    while let Some(c) = chars.next() {
        match c {
            '"' if quoted && chars.peek() == Some(&'"') => {
                field.push('"');
                chars.next();
            }
            '"' => quoted = !quoted,
            c if c == delimiter && !quoted => fields.push(std::mem::take(&mut field)),
            c => field.push(c),
        }
    }
    fields.push(field);
    fields.into_iter().map(|f| f.trim().to_owned()).collect()
}

/// Reads the subjects of a CSV `text`: the separator (comma, semicolon or tab) from the header,
/// the columns by the market's header spellings plus `id`; one row per record, each with its
/// subject or the reason it cannot be one (a record may not span lines).
///
/// # Errors
/// The file is empty or lacks a required column.
pub fn read_subjects(text: &str) -> Result<Vec<SubjectRow>, SubjectsError> {
    let mut lines = text.lines().enumerate();
    let (_, header) = lines.next().ok_or(SubjectsError::Empty)?;
    let delimiter = [',', ';', '\t']
        .into_iter()
        .max_by_key(|d| header.matches(*d).count())
        .unwrap_or(',');
    let columns: Vec<String> = split_record(header, delimiter)
        .iter()
        .map(|h| normalize_header(h))
        .collect();
    let find = |field: Field| columns.iter().position(|c| field_for(c) == Some(field));
    let id = columns
        .iter()
        .position(|c| c == "id")
        .ok_or(SubjectsError::MissingColumn("id"))?;
    let year = find(Field::ModelYear).ok_or(SubjectsError::MissingColumn("model year"))?;
    let make = find(Field::Make).ok_or(SubjectsError::MissingColumn("make"))?;
    let model = find(Field::Model).ok_or(SubjectsError::MissingColumn("model"))?;
    let (miles, km) = match (find(Field::Miles), find(Field::Kilometers)) {
        (Some(m), _) => (m, false),
        (None, Some(k)) => (k, true),
        (None, None) => return Err(SubjectsError::MissingColumn("miles")),
    };
    let (variant, condition, vin, options) = (
        find(Field::Variant),
        find(Field::Condition),
        find(Field::Vin),
        find(Field::Options),
    );
    let worksheet = columns.iter().position(|c| c == WORKSHEET_COLUMN);
    Ok(lines
        .filter(|(_, l)| !l.trim().is_empty())
        .map(|(i, l)| {
            let cells = split_record(l, delimiter);
            let cell = |c: Option<usize>| {
                c.and_then(|c| cells.get(c))
                    .map(String::as_str)
                    .filter(|s| !s.is_empty())
            };
            let line = i as u64 + 1;
            let subject = (|| {
                let number = |c: usize, what: &str| -> Result<f64, String> {
                    let text = cell(Some(c)).ok_or_else(|| format!("no {what}"))?;
                    text.replace(',', "")
                        .parse::<f64>()
                        .ok()
                        .filter(|v| v.is_finite())
                        .ok_or_else(|| format!("{what} \"{text}\" is not a number"))
                };
                let model_year = number(year, "model year")?;
                if model_year.fract() != 0.0 || !(1900.0..=2100.0).contains(&model_year) {
                    return Err(format!("model year {model_year} is not a year"));
                }
                let mut odometer = number(miles, if km { "kilometres" } else { "miles" })?;
                if km {
                    odometer /= crate::import::KM_PER_MILE;
                }
                if !(0.0..=crate::import::MAX_MILES).contains(&odometer) {
                    return Err(format!(
                        "{} miles is outside 0 to 1,000,000",
                        crate::format::thousands(odometer)
                    ));
                }
                let condition = match cell(condition) {
                    None => Condition::Used,
                    Some(c) => Condition::parse(c).ok_or_else(|| {
                        format!("condition \"{c}\" is not new, used or certified")
                    })?,
                };
                Ok(Subject {
                    model_year: model_year as i32,
                    make: cell(Some(make)).ok_or("no make")?.to_owned(),
                    model: cell(Some(model)).ok_or("no model")?.to_owned(),
                    variant: cell(variant).map(str::to_owned),
                    miles: odometer,
                    condition,
                    options: cell(options).map(str::to_owned),
                    vin: cell(vin).map(str::to_owned),
                })
            })();
            SubjectRow {
                id: cell(Some(id)).unwrap_or_default().to_owned(),
                line,
                subject,
                worksheet: cell(worksheet).map(str::to_owned),
            }
        })
        .collect())
}

/// One subject's result.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct BatchResult {
    /// The `id` column.
    pub id: String,
    /// The subjects file's line.
    pub line: u64,
    /// The subject as read ("2022 Quellmark Tessel Ambrel, 41,000 mi, used").
    pub subject: String,
    /// Indicated value.
    pub indicated_value: Option<f64>,
    /// Value band, low end.
    pub band_lower: Option<f64>,
    /// Value band, high end.
    pub band_upper: Option<f64>,
    /// The model's own estimate (median).
    pub model_estimate: Option<f64>,
    /// Comparables used.
    pub comparables: Option<usize>,
    /// The age form of the fit.
    pub age_form: Option<String>,
    /// The warnings' codes.
    pub warnings: Vec<&'static str>,
    /// What the value is for: "Market value", "Trade-in offer" or "Total-loss claim".
    pub purpose: &'static str,
    /// The worksheet's bottom line: the ACV offer of a trade-in, the settlement payment of a
    /// claim.
    pub bottom_line: Option<f64>,
    /// A claim's total-loss verdict under its profile's rule.
    pub total_loss: Option<bool>,
    /// Why the subject has no value (or its worksheet no bottom line).
    pub error: Option<String>,
}

/// A subject appraised: its row, and the fit and appraisal when it could be appraised.
pub struct Appraised<'a> {
    /// The row as written out.
    pub result: BatchResult,
    /// The subject.
    pub subject: Option<Subject>,
    /// The segment's fit.
    pub fit: Option<&'a MarketFit>,
    /// The request it was appraised with.
    pub request: Option<AppraisalRequest>,
    /// The appraisal.
    pub appraisal: Option<Appraisal>,
    /// What it was for.
    pub purpose: Option<Purpose>,
}

/// Cleans and fits, once each with `settings`, every segment the readable subjects of `rows`
/// name (a fit that fails gives its reason to each of its subjects).
#[must_use]
pub fn fit_segments(
    market: &Market,
    rows: &[SubjectRow],
    settings: &FitSettings,
    overrides: &Overrides,
) -> BTreeMap<Segment, Result<MarketFit, String>> {
    let mut segments: Vec<Segment> = rows
        .iter()
        .filter_map(|r| r.subject.as_ref().ok())
        .filter_map(|s| find_segment(market, &s.make, &s.model).ok())
        .collect();
    segments.sort_unstable();
    segments.dedup();
    // The segments side by side: each fit is independent of the others.
    std::thread::scope(|scope| {
        let handles: Vec<_> = segments
            .iter()
            .map(|&segment| {
                scope.spawn(move || {
                    fit_market(market, segment, settings, overrides).map_err(|e| e.to_string())
                })
            })
            .collect();
        segments
            .iter()
            .zip(handles)
            .map(|(&segment, h)| {
                let fit = h
                    .join()
                    .unwrap_or_else(|_| Err("the fit stopped unexpectedly".to_owned()));
                (segment, fit)
            })
            .collect()
    })
}

/// Each row's purpose: a value only, or its worksheet's (or why that could not be read).
pub type RowPurpose = Result<Purpose, String>;

/// Appraises every subject of `rows` against the segments' `fits` with `template`'s rules and
/// level, on every core, each for its purpose in `purposes` (by row; a missing entry is a value
/// only); `progress` is told how many are done.
pub fn appraise_all<'a>(
    market: &Market,
    rows: &[SubjectRow],
    fits: &'a BTreeMap<Segment, Result<MarketFit, String>>,
    template: &AppraisalRequest,
    purposes: &[RowPurpose],
    progress: &(dyn Fn(usize) + Sync),
) -> Vec<Appraised<'a>> {
    let done = std::sync::atomic::AtomicUsize::new(0);
    let value_only: RowPurpose = Ok(Purpose::Value);
    let jobs: Vec<(&SubjectRow, &RowPurpose)> = rows
        .iter()
        .enumerate()
        .map(|(i, row)| (row, purposes.get(i).unwrap_or(&value_only)))
        .collect();
    let one = |(row, purpose): &(&SubjectRow, &RowPurpose)| -> Appraised<'a> {
        let out = appraise_one(market, row, fits, template, purpose);
        progress(done.fetch_add(1, std::sync::atomic::Ordering::Relaxed) + 1);
        out
    };
    let threads = std::thread::available_parallelism().map_or(1, std::num::NonZero::get);
    if threads < 2 || jobs.len() < 2 {
        return jobs.iter().map(one).collect();
    }
    let per = jobs.len().div_ceil(threads);
    std::thread::scope(|s| {
        let handles: Vec<_> = jobs
            .chunks(per)
            .map(|chunk| s.spawn(|| chunk.iter().map(one).collect::<Vec<_>>()))
            .collect();
        handles
            .into_iter()
            .flat_map(|h| {
                h.join()
                    .unwrap_or_else(|panic| std::panic::resume_unwind(panic))
            })
            .collect()
    })
}

fn appraise_one<'a>(
    market: &Market,
    row: &SubjectRow,
    fits: &'a BTreeMap<Segment, Result<MarketFit, String>>,
    template: &AppraisalRequest,
    purpose: &RowPurpose,
) -> Appraised<'a> {
    let mut result = BatchResult {
        id: row.id.clone(),
        line: row.line,
        subject: row
            .subject
            .as_ref()
            .map(Subject::describe)
            .unwrap_or_default(),
        indicated_value: None,
        band_lower: None,
        band_upper: None,
        model_estimate: None,
        comparables: None,
        age_form: None,
        warnings: Vec::new(),
        purpose: purpose.as_ref().map_or("", Purpose::title),
        bottom_line: None,
        total_loss: None,
        error: None,
    };
    let failed = |mut result: BatchResult, why: String| {
        result.error = Some(why);
        Appraised {
            result,
            subject: None,
            fit: None,
            request: None,
            appraisal: None,
            purpose: None,
        }
    };
    if row.id.is_empty() {
        return failed(result, "no id".into());
    }
    let subject = match &row.subject {
        Ok(s) => s.clone(),
        Err(why) => return failed(result, why.clone()),
    };
    let purpose = match purpose {
        Ok(p) => p.clone(),
        Err(why) => return failed(result, why.clone()),
    };
    let fit = match find_segment(market, &subject.make, &subject.model)
        .map_err(|e| e.to_string())
        .and_then(|segment| {
            fits.get(&segment)
                .ok_or_else(|| "no fit".to_owned())?
                .as_ref()
                .map_err(Clone::clone)
        }) {
        Ok(fit) => fit,
        Err(why) => return failed(result, why),
    };
    let mut request = AppraisalRequest {
        subject: subject.clone(),
        ..template.clone()
    };
    if let Purpose::Claim { profile, .. } = &purpose {
        // A claim's comparables follow its profile's rules, as for one appraisal.
        request.rules = profile.comparable_rules(&template.rules);
    }
    match appraise(market, fit, &request) {
        Ok(a) => {
            result.indicated_value = Some(a.reconciliation.indicated_value);
            result.band_lower = Some(a.reconciliation.value_band.lower);
            result.band_upper = Some(a.reconciliation.value_band.upper);
            result.model_estimate = Some(a.model_estimate.median);
            result.comparables = Some(a.comparables.len());
            result.age_form = Some(fit.model.params().age_form.to_string());
            result.warnings = a.warnings.iter().map(|w| w.code.as_str()).collect();
            match work_out(&purpose, &a, &request) {
                Ok(outcome) => {
                    result.bottom_line = outcome.bottom_line().map(|(_, c)| c.dollars());
                    if let Some(WorksheetOutcome::Claim(c)) = &outcome.worksheet {
                        result.total_loss = Some(c.verdict.total_loss);
                    }
                }
                Err(e) => result.error = Some(format!("worksheet: {e}")),
            }
            Appraised {
                result,
                subject: Some(subject),
                fit: Some(fit),
                request: Some(request),
                appraisal: Some(a),
                purpose: Some(purpose),
            }
        }
        Err(e) => failed(result, e.to_string()),
    }
}

/// The CSV header of [`to_csv`].
pub const CSV_HEADER: &str = "id,line,subject,indicated_value,band_lower,band_upper,model_estimate,comparables,age_form,warnings,purpose,bottom_line,total_loss,error";

/// The results as CSV: one row per subject, money to the cent, warnings' codes separated by
/// ";", fields quoted where needed.
#[must_use]
pub fn to_csv(results: &[BatchResult]) -> String {
    let quote = |s: &str| {
        if s.contains([',', '"', '\n', ';']) {
            format!("\"{}\"", s.replace('"', "\"\""))
        } else {
            s.to_owned()
        }
    };
    let money = |v: Option<f64>| v.map(|v| format!("{v:.2}")).unwrap_or_default();
    let mut out = String::from(CSV_HEADER);
    out.push('\n');
    for r in results {
        let fields = [
            quote(&r.id),
            r.line.to_string(),
            quote(&r.subject),
            money(r.indicated_value),
            money(r.band_lower),
            money(r.band_upper),
            money(r.model_estimate),
            r.comparables.map(|c| c.to_string()).unwrap_or_default(),
            r.age_form.clone().unwrap_or_default(),
            quote(&r.warnings.join(";")),
            quote(r.purpose),
            money(r.bottom_line),
            r.total_loss
                .map(|t| if t { "yes" } else { "no" }.to_owned())
                .unwrap_or_default(),
            quote(r.error.as_deref().unwrap_or("")),
        ];
        out.push_str(&fields.join(","));
        out.push('\n');
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_record_splits_on_its_separator_and_keeps_quoted_ones() {
        assert_eq!(
            split_record(r#"a, "b, c" ,"say ""hi""""#, ','),
            ["a", "b, c", r#"say "hi""#]
        );
        assert_eq!(split_record("x;y", ';'), ["x", "y"]);
    }

    #[test]
    fn subjects_are_read_by_the_markets_header_spellings() {
        let rows = read_subjects(
            "ID;Year;Make;Model;Odometer (km);Condition\nA;2021;Q;T;16093.44;cpo\nB;2021;Q;T;;used\n",
        )
        .unwrap();
        let a = rows[0].subject.as_ref().unwrap();
        assert_eq!(rows[0].id, "A");
        assert!((a.miles - 10_000.0).abs() < 1e-9, "{}", a.miles);
        assert_eq!(a.condition, Condition::Certified);
        assert_eq!(rows[1].line, 3);
        assert_eq!(rows[1].subject, Err("no kilometres".to_owned()));
        assert_eq!(
            read_subjects("id,make,model,miles\n"),
            Err(SubjectsError::MissingColumn("model year"))
        );
        assert_eq!(read_subjects(""), Err(SubjectsError::Empty));
    }
}
