//! Warnings are results: what the market cannot support, said as loudly as the number.
//!
//! Every fit and every appraisal returns its warnings. Each has a stable snake_case code (for
//! `--json` and for tests), a message for the appraiser (what is wrong, what it does to the
//! number, what to do), and the figures behind it. The command line prints them before the
//! value, the workbench beside it, the report in a box on its first page, and sessions keep
//! them.

use std::collections::BTreeMap;

use serde::{Deserialize, Serialize};

/// What a warning is about. The snake_case name is the stable code.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum WarningCode {
    /// The robust fit stopped at its iteration limit before its coefficients settled.
    RobustFitNotConverged,
    /// The robust residual scale is rounding noise: most listings sit exactly on the fit.
    RobustScaleCollapsed,
    /// Cleaning could not check for outliers and implausibly cheap listings.
    OutliersNotChecked,
    /// A comparable included by hand has a variant or condition the fit cannot price.
    ComparableNotAdjustable,
    /// The subject's model year lies outside the years in the fit.
    SubjectYearOutsideMarket,
    /// The subject's mileage lies outside the mileages in the fit.
    SubjectMileageOutsideMarket,
    /// The fitted value rises with age somewhere inside the data.
    AgeCurveNotFalling,
    /// The fitted value rises with mileage.
    MileageNotFalling,
    /// Too few listings for the terms of the fit.
    FewListings,
    /// No listing or sale dates: the appraisal date was given or taken from the clock.
    NoListingDates,
    /// Fewer comparables than asked for (or than a profile requires).
    FewComparables,
    /// Comparables needing large gross adjustments.
    LargeAdjustments,
    /// The model's estimate lies outside the band the comparables give.
    ModelAndComparablesDisagree,
    /// A forecast beyond the ages or mileages of the market.
    ForecastBeyondMarket,
    /// Held-out listings miss their estimates by more than the band.
    BacktestErrorExceedsBand,
    /// The subject's VIN fails its check digit or disagrees with its model year.
    SubjectVinNotValid,
    /// A comparable's VIN fails its check digit or disagrees with its model year.
    ComparableVinNotValid,
    /// The market-conditions term cannot be told from no drift at all.
    MarketTrendUncertain,
    /// Equipment lines of options whose fitted effect cannot be told from none add up to a
    /// noticeable part of a comparable's price.
    EquipmentUncertain,
}

impl WarningCode {
    /// Every code, in the order the README lists them.
    pub const ALL: [WarningCode; 19] = [
        Self::SubjectYearOutsideMarket,
        Self::SubjectMileageOutsideMarket,
        Self::AgeCurveNotFalling,
        Self::MileageNotFalling,
        Self::FewListings,
        Self::NoListingDates,
        Self::FewComparables,
        Self::LargeAdjustments,
        Self::ModelAndComparablesDisagree,
        Self::RobustFitNotConverged,
        Self::RobustScaleCollapsed,
        Self::OutliersNotChecked,
        Self::ComparableNotAdjustable,
        Self::SubjectVinNotValid,
        Self::ComparableVinNotValid,
        Self::MarketTrendUncertain,
        Self::EquipmentUncertain,
        Self::ForecastBeyondMarket,
        Self::BacktestErrorExceedsBand,
    ];

    /// The stable code, as in JSON.
    #[must_use]
    pub fn as_str(self) -> &'static str {
        match self {
            Self::RobustFitNotConverged => "robust_fit_not_converged",
            Self::RobustScaleCollapsed => "robust_scale_collapsed",
            Self::OutliersNotChecked => "outliers_not_checked",
            Self::ComparableNotAdjustable => "comparable_not_adjustable",
            Self::SubjectYearOutsideMarket => "subject_year_outside_market",
            Self::SubjectMileageOutsideMarket => "subject_mileage_outside_market",
            Self::AgeCurveNotFalling => "age_curve_not_falling",
            Self::MileageNotFalling => "mileage_not_falling",
            Self::FewListings => "few_listings",
            Self::NoListingDates => "no_listing_dates",
            Self::FewComparables => "few_comparables",
            Self::LargeAdjustments => "large_adjustments",
            Self::ModelAndComparablesDisagree => "model_and_comparables_disagree",
            Self::ForecastBeyondMarket => "forecast_beyond_market",
            Self::BacktestErrorExceedsBand => "backtest_error_exceeds_band",
            Self::SubjectVinNotValid => "subject_vin_not_valid",
            Self::ComparableVinNotValid => "comparable_vin_not_valid",
            Self::MarketTrendUncertain => "market_trend_uncertain",
            Self::EquipmentUncertain => "equipment_uncertain",
        }
    }
}

impl std::fmt::Display for WarningCode {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.as_str())
    }
}

/// One warning with the figures behind it.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Warning {
    /// Stable code.
    pub code: WarningCode,
    /// What is wrong, what it does to the number, what to do.
    pub message: String,
    /// The figures behind it, by name (e.g. `iterations`, `limit`).
    #[serde(default)]
    pub figures: BTreeMap<String, f64>,
}

impl Warning {
    /// A warning with its message and no figures.
    #[must_use]
    pub fn new(code: WarningCode, message: impl Into<String>) -> Self {
        Self {
            code,
            message: message.into(),
            figures: BTreeMap::new(),
        }
    }

    /// Adds a figure behind the warning.
    #[must_use]
    pub fn with(mut self, name: &str, value: f64) -> Self {
        self.figures.insert(name.to_owned(), value);
        self
    }
}

/// Whether `warnings` holds one with `code`.
#[must_use]
pub fn has(warnings: &[Warning], code: WarningCode) -> bool {
    warnings.iter().any(|w| w.code == code)
}
