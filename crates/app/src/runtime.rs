//! Runtime state: the loaded market, the current fit and appraisal, and what the background
//! jobs are doing. Never saved; rebuilt from the document.

use std::sync::Arc;

use model::appraisal::{Appraisal, AppraisalError, FitSettings, MarketFit};
use model::clean::Overrides;
use model::import::{ImportError, ImportReport};
use model::market::Market;

use crate::document::MarketSource;

/// What the current fit was made from; a different key means the fit is stale.
#[derive(Debug, Clone, PartialEq)]
pub struct FitKey {
    /// Market generation.
    pub market_generation: u64,
    /// Make.
    pub make: String,
    /// Model.
    pub model: String,
    /// Settings.
    pub settings: FitSettings,
    /// Overrides.
    pub overrides: Overrides,
}

/// A market import that failed: the message and, when rows were read, the report.
#[derive(Debug, Clone)]
pub struct ImportFailure {
    /// Which market.
    pub source: MarketSource,
    /// The error.
    pub error: Arc<ImportError>,
}

/// Everything computed or in flight.
#[derive(Default)]
pub struct Runtime {
    /// The market, once loaded.
    pub market: Option<Arc<Market>>,
    /// Where it came from.
    pub market_source: Option<MarketSource>,
    /// Its import report.
    pub import_report: Option<ImportReport>,
    /// Bumped on every successful load.
    pub market_generation: u64,
    /// Market requested and not yet loaded.
    pub loading: Option<MarketSource>,
    /// The document as it was before a market was opened, to restore if the import fails or is
    /// canceled.
    pub before_open: Option<crate::document::AppraisalDocument>,
    /// Last import failure, shown until dismissed.
    pub import_failure: Option<ImportFailure>,
    /// The last good fit.
    pub fit: Option<Arc<MarketFit>>,
    /// Bumped on every fit received: results computed from a fit (its study, the appraisal,
    /// the charts' caches) carry the generation they were made for, never an address, so a
    /// stale one can always be told from a fresh one.
    pub fit_generation: u64,
    /// What the last good fit was made from.
    pub fit_key: Option<FitKey>,
    /// A fit requested and not yet back.
    pub fitting: Option<FitKey>,
    /// Price gaps of the fitted segment, with the level they were flagged at.
    pub gaps: Option<Arc<crate::jobs::FlaggedGaps>>,
    /// The backtest and model ranking of the current fit, once computed.
    pub study: Option<Box<crate::jobs::MarketStudy>>,
    /// A fit the user canceled; not requested again until its inputs change.
    pub fit_canceled: Option<FitKey>,
    /// Why the last fit failed.
    pub fit_error: Option<AppraisalError>,
    /// The appraisal for the current subject.
    pub appraisal: Option<Appraisal>,
    /// Why the current subject could not be appraised.
    pub appraisal_error: Option<AppraisalError>,
}
