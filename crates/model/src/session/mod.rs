//! The session file: one appraisal with its evidence, saved as human-readable RON.
//!
//! A session holds what is needed to defend and reproduce the value without the market file:
//! every comparable with every field, each adjustment line with its basis, the fitted rates the
//! grid used, the model's estimate for the subject, the settings, the worksheet inputs and the
//! result. Reopening recomputes the grid, the reconciliation and the worksheet from that
//! evidence ([`reproduce`]) and compares them with the stored result.

mod file;
pub mod finder;
mod legacy;
mod market_file;
mod outcome;
mod replay;

pub use file::{
    SESSION_FORMAT_VERSION, SessionError, format_version_of, parse_session, read_session,
    session_to_ron, write_atomically, write_session,
};
pub use market_file::{MarketFile, find_market_file};
pub use outcome::{
    Outcome, Purpose, SENSITIVITY_DAYS, WorksheetOutcome, itemized_deductions, trade_in_inputs,
    work_out, worksheet_rows,
};
pub use replay::{
    Difference, REPRODUCTION_RULE, ReplayError, Reproduction, reproduce, reproduces_to_the_cent,
};

use chrono::{DateTime, Utc};
use serde::{Deserialize, Serialize};

use crate::appraisal::{Appraisal, AppraisalRequest, FitSettings, MarketFit};
pub use crate::case::CaseDetails;
use crate::clean::Overrides;
use crate::hedonic::AnnualDepreciation;
use crate::market::{Listing, Market, MarketSource};
use crate::rates::FittedRates;
use crate::worksheet::WorksheetError;

/// Trailing window of the days'-supply figure, days.
pub const SUPPLY_WINDOW_DAYS: u32 = 30;

/// The market an appraisal was made on.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct MarketRecord {
    /// File name, row count and content hash of the market file.
    pub source: MarketSource,
    /// Where the file was when the session was saved (it may have moved since).
    pub location: MarketLocation,
    /// The segment appraised ("Quellmark Tessel").
    pub segment: String,
    /// Listings of the segment in the file.
    pub segment_rows: usize,
}

/// Where the market file was when the session was saved.
#[derive(Debug, Clone, Default, PartialEq, Eq, Serialize, Deserialize)]
pub struct MarketLocation {
    /// Its absolute path.
    pub absolute: Option<String>,
    /// Its path from the session file's folder, so a case folder can be moved whole (written
    /// on saving; format 2 on).
    pub from_session: Option<String>,
}

impl MarketLocation {
    /// Where to look for the market file of a session stored at `session_path`: the path
    /// from the session's folder first, then the absolute path.
    #[must_use]
    pub fn candidates(&self, session_path: &std::path::Path) -> Vec<std::path::PathBuf> {
        let dir = session_path.parent().unwrap_or(std::path::Path::new("."));
        self.from_session
            .iter()
            .map(|r| dir.join(r))
            .chain(self.absolute.iter().map(std::path::PathBuf::from))
            .collect()
    }
}

/// The fit the grid came from.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct FitRecord {
    /// Fit and cleaning settings.
    pub settings: FitSettings,
    /// Manual overrides of the cleaning rules, by file line.
    pub overrides: Overrides,
    /// Listings the fit used.
    pub rows_used: usize,
    /// R² of the fit.
    pub r_squared: f64,
    /// Residual SD of ln price.
    pub residual_sd: f64,
    /// Fitted annual depreciation over five years.
    pub annual_depreciation: AnnualDepreciation,
    /// The rates the grid used.
    pub rates: FittedRates,
    /// The age form the data chose and why, when the settings asked for `auto` (format 3 on).
    #[serde(default)]
    pub age_form_choice: Option<crate::hedonic::AgeFormChoice>,
    /// Whether the market-conditions term was in the fit, and why not (format 5 on).
    #[serde(default)]
    pub market_time: Option<crate::hedonic::MarketTimeTerm>,
    /// What the fit said about each variant's premium by age, in words (format 5 on).
    #[serde(default)]
    pub premiums: Vec<String>,
}

/// Who made the appraisal and when.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Authorship {
    /// The appraiser's name.
    pub appraiser: String,
    /// First saved.
    pub created: DateTime<Utc>,
    /// Last saved.
    pub saved: DateTime<Utc>,
    /// Free notes.
    pub notes: String,
}

/// One appraisal with its evidence.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Session {
    /// Format version; see [`SESSION_FORMAT_VERSION`].
    pub format_version: u32,
    /// Who and when.
    pub authorship: Authorship,
    /// The case it belongs to: claim or stock number, names, date of loss (format 4 on).
    pub case: CaseDetails,
    /// The market.
    pub market: MarketRecord,
    /// The fit.
    pub fit: FitRecord,
    /// Subject, comparable rules and choices, the appraiser's adjustment lines, the level.
    pub request: AppraisalRequest,
    /// The appraisal: model estimate, comparables with every field and line, reconciliation.
    pub appraisal: Appraisal,
    /// What the value is for, with the worksheet's inputs.
    pub purpose: Purpose,
    /// The result as saved.
    pub result: Outcome,
    /// Days' supply of the segment on the appraisal date, when the market file has sale dates
    /// (a fact of the market at the time, kept as evidence).
    #[serde(default)]
    pub segment_supply: Option<crate::supply::SegmentSupply>,
    /// Optionally, every listing of the segment (so the fit itself can be redone).
    #[serde(default)]
    pub segment_listings: Option<Vec<Listing>>,
}

/// Everything [`Session::capture`] records.
#[derive(Debug, Clone, Copy)]
pub struct Capture<'a> {
    /// The market.
    pub market: &'a Market,
    /// Its file, if it came from one (recorded by its absolute path).
    pub market_path: Option<&'a std::path::Path>,
    /// The fit.
    pub fit: &'a MarketFit,
    /// Settings the fit used.
    pub settings: &'a FitSettings,
    /// Overrides the fit used.
    pub overrides: &'a Overrides,
    /// The request.
    pub request: &'a AppraisalRequest,
    /// The appraisal made from it.
    pub appraisal: &'a Appraisal,
    /// The purpose and worksheet inputs.
    pub purpose: &'a Purpose,
    /// Keep every listing of the segment in the file.
    pub keep_segment: bool,
    /// The case it belongs to.
    pub case: &'a CaseDetails,
}

impl Session {
    /// Records an appraisal as a session; the result is worked out from the same evidence a
    /// reopened session uses, so saving and reopening agree by construction.
    pub fn capture(c: &Capture<'_>, authorship: Authorship) -> Result<Self, WorksheetError> {
        let rates = FittedRates::of(c.market, c.fit, c.appraisal);
        let result = work_out(c.purpose, c.appraisal, c.request)?;
        let segment_rows = c.fit.cleaning.rows.len();
        Ok(Self {
            format_version: SESSION_FORMAT_VERSION,
            authorship,
            case: c.case.clone(),
            market: MarketRecord {
                source: c.market.source.clone(),
                location: MarketLocation {
                    absolute: c.market_path.map(|p| {
                        // A path that cannot be resolved (the file is gone already) is kept
                        // as given; reopening reports it missing.
                        std::fs::canonicalize(p)
                            .unwrap_or_else(|_| p.to_owned())
                            .display()
                            .to_string()
                    }),
                    from_session: None,
                },
                segment: c.market.segment_name(c.fit.segment),
                segment_rows,
            },
            fit: FitRecord {
                settings: *c.settings,
                overrides: c.overrides.clone(),
                rows_used: c.fit.model.rows(),
                r_squared: c.fit.model.r_squared(),
                residual_sd: c.fit.model.residual_sd(),
                annual_depreciation: c.fit.model.annual_depreciation(5),
                rates,
                age_form_choice: c.fit.age_form_choice.clone(),
                market_time: Some(c.fit.model.market_time().clone()),
                premiums: crate::hedonic::premium_fade::summary(
                    &c.fit.model,
                    c.market,
                    c.fit.premium_fade.as_ref(),
                    crate::depreciation::PREMIUM_MAX_AGE,
                ),
            },
            request: c.request.clone(),
            appraisal: c.appraisal.clone(),
            purpose: c.purpose.clone(),
            result,
            segment_supply: crate::supply::segment_supply(
                c.market,
                &c.fit.cleaning.rows,
                c.fit.as_of,
                SUPPLY_WINDOW_DAYS,
                c.settings.cleaning.stale_after_days,
            ),
            segment_listings: c.keep_segment.then(|| {
                c.fit
                    .cleaning
                    .rows
                    .iter()
                    .map(|&r| c.market.listing(r))
                    .collect()
            }),
        })
    }
}
