//! The JSON documents the commands print with `--json`. Their keys are documented in the
//! README and kept stable.

use std::collections::BTreeMap;

use model::appraisal::{Appraisal, MarketFit};
use model::backtest::Backtest;
use model::depreciation::{DeclineRank, DepreciationTable};
use model::forecast::Forecast;
use model::gaps::PriceGap;
use model::hedonic::{AnnualDepreciation, Term};
use model::import::{DroppedValue, ImportReport, RejectedRow};
use serde::Serialize;

/// Rejections and dropped values listed in full up to this many; the counts are always whole.
const LISTED: usize = 50;

/// What `convert` wrote.
#[derive(Debug, Serialize)]
pub struct ConversionDocument {
    pub out: String,
    pub rows_written: usize,
    pub partitions: usize,
    pub files: Vec<model::convert::WrittenFile>,
    pub import: ImportSummary,
}

/// The import summary.
#[derive(Debug, Serialize)]
pub struct ImportSummary {
    pub file: String,
    /// For a Parquet market: the files read and the files passed over (other models).
    pub parquet_files_read: usize,
    pub parquet_files_skipped: usize,
    pub delimiter: String,
    pub odometer_unit: String,
    pub rows_read: usize,
    pub rows_used: usize,
    pub rows_rejected: usize,
    pub rejected_by_reason: BTreeMap<String, usize>,
    pub rejected: Vec<RejectedRow>,
    pub dropped_values_count: usize,
    pub dropped_values: Vec<DroppedValue>,
    pub column_map: BTreeMap<String, String>,
    pub ignored_columns: Vec<String>,
    pub condition_inferred: usize,
    pub blank_lines: usize,
    /// Makes, models and variants written in several spellings and read as one.
    pub merged_spellings: Vec<model::market::MergedSpelling>,
    /// The options stated in the file, commonest first.
    pub options_found: Vec<model::equipment::OptionCount>,
}

impl ImportSummary {
    pub fn from_report(r: &ImportReport) -> Self {
        Self {
            file: r.file_name.clone(),
            parquet_files_read: r.parts_read.len(),
            parquet_files_skipped: r.parts_skipped,
            delimiter: r.delimiter.clone(),
            odometer_unit: r.odometer_unit.clone(),
            rows_read: r.rows_read,
            rows_used: r.rows_used,
            rows_rejected: r.rejected.len(),
            rejected_by_reason: r.rejected_by_reason.clone(),
            rejected: r.rejected.iter().take(LISTED).cloned().collect(),
            dropped_values_count: r.dropped_values.len(),
            dropped_values: r.dropped_values.iter().take(LISTED).cloned().collect(),
            column_map: r.column_map.clone(),
            ignored_columns: r.ignored_columns.clone(),
            condition_inferred: r.condition_inferred,
            blank_lines: r.blank_lines,
            merged_spellings: r.merged_spellings.clone(),
            options_found: r.options_found.clone(),
        }
    }
}

/// Cleaning summary of the fitted segment.
#[derive(Debug, Serialize)]
pub struct CleaningSummary {
    pub listings: usize,
    pub used: usize,
    pub excluded_by_rule: BTreeMap<String, usize>,
    pub outlier_check_skipped: Option<String>,
}

/// The fitted model.
#[derive(Debug, Serialize)]
pub struct FitSummary {
    pub segment: String,
    pub as_of: String,
    pub age_form: model::hedonic::AgeForm,
    /// Why that age form: the data's choice under `auto`, else "as asked".
    pub age_form_reason: String,
    pub robust: bool,
    pub n: usize,
    pub terms: Vec<Term>,
    pub residual_sd: f64,
    pub r_squared: f64,
    pub smearing_factor: f64,
    pub annual_depreciation: AnnualDepreciation,
    pub typical_annual_miles: f64,
    pub cleaning: CleaningSummary,
    /// Whether the market-conditions term is in the fit, and why not.
    pub market_time: model::hedonic::MarketTimeTerm,
    /// The fitted drift, when the term is in the fit.
    pub market_drift: Option<MarketDriftDoc>,
    /// The market's monthly index, when the term is in the fit and every month has enough
    /// listings.
    pub market_index: Option<model::hedonic::market_time::MonthlyIndex>,
    /// Why there is no monthly index although the term is in the fit.
    pub market_index_missing: Option<String>,
    /// The term in words.
    pub market_conditions: String,
    /// Whether each variant has its own age slope in the fit.
    pub variant_slopes: bool,
    /// The F test of the variant slopes against one premium at every age, when made.
    pub premium_fade_test: Option<model::hedonic::PremiumFadeTest>,
    /// Why the test could not be made, when it was tried.
    pub premium_fade_test_missing: Option<String>,
    /// Each variant's premium over the base, in words.
    pub premiums: Vec<String>,
}

/// The fitted market drift.
#[derive(Debug, Serialize)]
pub struct MarketDriftDoc {
    /// Coefficient on ln price per month before the appraisal date.
    pub per_month_before: f64,
    pub std_error: f64,
    pub p_value: f64,
    /// The market's change per month going forward, in percent.
    pub monthly_change_pct: f64,
}

impl FitSummary {
    pub fn new(market: &model::market::Market, fit: &MarketFit) -> Self {
        let m = &fit.model;
        Self {
            segment: market.segment_name(fit.segment),
            as_of: fit.as_of.to_string(),
            age_form: m.params().age_form,
            age_form_reason: fit.age_form_choice.as_ref().map_or_else(
                || format!("{} age: as asked", m.params().age_form),
                |c| c.reason.clone(),
            ),
            robust: m.params().robust,
            n: m.rows(),
            terms: m.terms(),
            residual_sd: m.residual_sd(),
            r_squared: m.r_squared(),
            smearing_factor: m.smearing(),
            annual_depreciation: m.annual_depreciation(5),
            typical_annual_miles: m.mileage().annual_miles,
            cleaning: CleaningSummary {
                listings: fit.cleaning.rows.len(),
                used: fit.included_rows.len(),
                excluded_by_rule: fit.cleaning.counts(),
                outlier_check_skipped: fit.cleaning.outlier_check_skipped.clone(),
            },
            market_time: m.market_time().clone(),
            market_drift: m.market_drift().map(|d| MarketDriftDoc {
                per_month_before: d.per_month_before,
                std_error: d.std_error,
                p_value: d.p_value,
                monthly_change_pct: d.monthly_change_pct(),
            }),
            market_index: fit.market_index.clone().and_then(Result::ok),
            market_index_missing: fit
                .market_index
                .as_ref()
                .and_then(|r| r.as_ref().err())
                .map(ToString::to_string),
            variant_slopes: m.design().variant_slopes,
            premium_fade_test: fit.premium_fade.clone().and_then(Result::ok),
            premium_fade_test_missing: fit.premium_fade.clone().and_then(Result::err),
            premiums: model::hedonic::premium_fade::summary(
                m,
                market,
                fit.premium_fade.as_ref(),
                model::depreciation::PREMIUM_MAX_AGE,
            ),
            market_conditions: model::hedonic::market_time::summary(
                m.market_time(),
                m.market_drift()
                    .map(|d| (d.per_month_before, d.is_distinguishable())),
            ),
        }
    }
}

/// `fit --json`.
#[derive(Debug, Serialize)]
pub struct FitDocument {
    /// What the market cannot support, before anything else.
    pub warnings: Vec<model::warnings::Warning>,
    pub import: ImportSummary,
    pub fit: FitSummary,
}

/// `appraise --json`.
#[derive(Debug, Serialize)]
pub struct AppraisalDocument {
    /// The case's numbers and names, as given.
    pub case: model::case::CaseDetails,
    /// The case's filled-in fields for the purpose, in words (the JSON has `case`).
    #[serde(skip)]
    pub case_line: String,
    pub import: ImportSummary,
    pub fit: FitSummary,
    #[serde(flatten)]
    pub appraisal: Appraisal,
    pub indicated_value: f64,
    pub value_band: model::ols::Interval,
    /// The market's own backtest in words (markets of up to 2,000 listings of the model).
    pub market_accuracy: Option<String>,
    /// The trade-in offer or claim settlement, when one was asked for.
    pub worksheet: Option<model::session::WorksheetOutcome>,
    /// The worksheet as the rows every front end prints (the JSON has `worksheet`).
    #[serde(skip)]
    pub worksheet_rows: Vec<model::worksheet::rows::Row>,
    /// Days' supply of the segment, with a trade-in when the file has sale dates.
    pub segment_supply: Option<model::supply::SegmentSupply>,
    pub forecast: Option<Forecast>,
    pub cautions: Vec<&'static str>,
}

/// `depreciation --json`.
#[derive(Debug, Serialize)]
pub struct DepreciationDocument {
    /// What the market cannot support, before anything else.
    pub warnings: Vec<model::warnings::Warning>,
    pub import: ImportSummary,
    pub fit: FitSummary,
    #[serde(flatten)]
    pub table: DepreciationTable,
    pub ranking: Vec<DeclineRank>,
}

/// `gaps --json`.
#[derive(Debug, Serialize)]
pub struct GapsDocument {
    /// What the market cannot support, before anything else.
    pub warnings: Vec<model::warnings::Warning>,
    pub import: ImportSummary,
    pub fit: FitSummary,
    pub level: f64,
    pub gaps: Vec<PriceGap>,
}

/// `backtest --json`.
#[derive(Debug, Serialize)]
pub struct BacktestDocument {
    /// What the market cannot support, before anything else.
    pub warnings: Vec<model::warnings::Warning>,
    pub import: ImportSummary,
    pub fit: FitSummary,
    #[serde(flatten)]
    pub backtest: Backtest,
}
