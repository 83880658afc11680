//! comptrail's valuation engine.
//!
//! Everything an appraisal computes lives here and runs without a window: import and clean a
//! market, fit how price falls with age, mileage, variant and condition, choose and adjust
//! comparables for a subject vehicle, reconcile them into a value with a band, and test how well
//! the market supports that value. The command line and the desktop workbench call these same
//! functions.

pub mod adjustment;
pub mod appraisal;
pub mod backtest;
pub mod batch;
pub mod case;
pub mod cautions;
pub mod clean;
pub mod comparables;
pub mod condition;
pub mod convert;
pub mod demo;
pub mod depreciation;
pub mod equipment;
pub mod forecast;
pub mod format;
pub mod gaps;
pub mod glossary;
pub mod gower;
pub mod guards;
pub mod hedonic;
pub mod import;
pub mod linalg;
pub mod market;
pub mod money;
pub mod ols;
pub mod rates;
pub mod reconcile;
pub mod session;
pub mod stats;
pub mod subject;
pub mod supply;
pub mod texts;
pub mod vin;
pub mod vocabulary;
pub mod warnings;
pub mod worksheet;
