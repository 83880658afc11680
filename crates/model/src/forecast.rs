//! Forecasting the subject's value after a holding period with its expected added miles.

use serde::{Deserialize, Serialize};

use crate::appraisal::{AppraisalError, MarketFit, subject_terms};
use crate::hedonic::{Attributes, ValueEstimate, age_years};
use crate::market::Market;
use crate::subject::Subject;

/// The subject's value now and after the holding period.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Forecast {
    /// Months held.
    pub months: f64,
    /// Miles added over the period.
    pub added_miles: f64,
    /// Value now (model).
    pub now: ValueEstimate,
    /// Value at the end of the period (model), with its intervals.
    pub then: ValueEstimate,
    /// Change of the median, in currency.
    pub change: f64,
    /// Change of the median, percent.
    pub change_pct: f64,
    /// Whether the end age lies beyond the oldest age in the market (an extrapolation).
    pub extrapolated: bool,
    /// What the market cannot support about the forecast.
    #[serde(default)]
    pub warnings: Vec<crate::warnings::Warning>,
}

/// Longest holding period forecast, months.
pub const MAX_MONTHS: f64 = 120.0;

/// Forecasts `subject` `months` ahead, adding `added_miles` (the market's typical annual miles
/// pro rata when `None`), at `level`.
pub fn forecast(
    market: &Market,
    fit: &MarketFit,
    subject: &Subject,
    months: f64,
    added_miles: Option<f64>,
    level: f64,
) -> Result<Forecast, AppraisalError> {
    if !(level > 0.0 && level < 1.0) {
        return Err(AppraisalError::BadLevel(level));
    }
    if !(months.is_finite() && (0.0..=MAX_MONTHS).contains(&months)) {
        return Err(AppraisalError::BadInput {
            what: "holding period",
            value: months,
            allowed: "0 to 120 months",
        });
    }
    if let Some(miles) = added_miles {
        if !(miles.is_finite() && (0.0..=crate::import::MAX_MILES).contains(&miles)) {
            return Err(AppraisalError::BadInput {
                what: "miles added over the holding period",
                value: miles,
                allowed: "0 to 1,000,000 miles",
            });
        }
    }
    let terms = subject_terms(market, fit, subject)?;
    let age = age_years(terms.model_year, fit.model.as_of_year());
    let added_miles = added_miles.unwrap_or(fit.model.mileage().annual_miles * months / 12.0);
    let now_attributes = Attributes {
        age_years: age,
        miles: terms.miles,
        variant: terms.variant,
        condition: terms.condition,
    };
    let end_age = age + months / 12.0;
    let then_attributes = Attributes {
        age_years: end_age,
        miles: terms.miles + added_miles,
        ..now_attributes
    };
    let now = fit.model.estimate(&now_attributes, level);
    let then = fit.model.estimate(&then_attributes, level);
    let oldest = fit.model.design().age_levels.last().copied().unwrap_or(0);
    let warnings = crate::guards::forecast_warning(fit, end_age, then_attributes.miles)
        .into_iter()
        .collect();
    Ok(Forecast {
        warnings,
        months,
        added_miles,
        now,
        then,
        change: then.median - now.median,
        change_pct: 100.0 * (then.median / now.median - 1.0),
        extrapolated: end_age > f64::from(oldest),
    })
}
