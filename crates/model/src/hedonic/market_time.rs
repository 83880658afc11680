//! Market conditions: how the market's price level moved over the months the listings span.
//!
//! The time-dummy hedonic method (Griliches 1961; Eurostat, *Handbook on Residential Property
//! Prices Indices*, 2013, ch. 5): with the vehicle's attributes held fixed by the other terms, a
//! term in the listing's date measures the change in the market's level. The appraisal fit takes
//! it in a linear form, `months_before_as_of` (months from the listing date back from the
//! appraisal date), so each comparable can be brought to the appraisal date by one fitted rate:
//! the grid's *market conditions* line. A second fit with one indicator per calendar month
//! (`month=YYYY-MM`) gives the market's monthly index for the depreciation view, when every month
//! has enough listings to stand on its own.
//!
//! The term enters only when it can be measured: every fitted listing has a listing date, and
//! the dates span at least [`MIN_SPAN_DAYS`] over at least [`MIN_MONTHS`] calendar months. A
//! shorter span measures a drift of a fraction of a percent with a standard error as large as
//! the drift itself, and an undated listing would have to be given a date it does not have.

use chrono::{Datelike, NaiveDate};
use serde::{Deserialize, Serialize};

use super::{Design, HedonicModel};
use crate::linalg::QrAccumulator;
use crate::market::Market;
use crate::ols::OlsFit;
use crate::stats;

/// Shortest span of listing dates, in days, for which the market-conditions term enters the fit
/// (about one quarter: a listing's price drifts by a few tenths of a percent a month, which a
/// few weeks cannot tell from noise).
pub const MIN_SPAN_DAYS: i64 = 90;

/// Fewest distinct calendar months with listings for the term to enter (three points for a
/// straight line, so its slope is not set by two months alone).
pub const MIN_MONTHS: usize = 3;

/// Fewest listings for a period of the monthly index to have its own level: a month with fewer
/// is pooled with the months after it (the thin old tail of a pull becomes one period) until the
/// period has this many.
pub const MIN_LISTINGS_PER_MONTH: usize = 10;

/// The mean length of a Gregorian month in days (365.2425 / 12).
pub const DAYS_PER_MONTH: f64 = 30.436_875;

/// Name of the linear market-time term.
pub const TERM_NAME: &str = "months_before_as_of";

/// Months from `date` back to `as_of` (negative for a date after it).
#[must_use]
pub fn months_before(as_of: NaiveDate, date: NaiveDate) -> f64 {
    (as_of - date).num_days() as f64 / DAYS_PER_MONTH
}

/// Months before `as_of` of each of `rows`' listing dates (0 for an undated one).
#[must_use]
pub fn months_of(market: &Market, rows: &[usize], as_of: NaiveDate) -> Vec<f64> {
    rows.iter()
        .map(|&r| market.listed_on[r].map_or(0.0, |d| months_before(as_of, d)))
        .collect()
}

/// Whether the fit has the market-conditions term, and why not when it does not.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case", tag = "status")]
pub enum MarketTimeTerm {
    /// In the fit.
    InFit {
        /// Earliest listing date fitted.
        first: NaiveDate,
        /// Latest listing date fitted.
        last: NaiveDate,
        /// Calendar months with listings.
        months: usize,
    },
    /// Not in the fit.
    NotInFit {
        /// Why, in words.
        reason: String,
    },
}

impl MarketTimeTerm {
    /// Decides whether the listings on `rows` can carry the term (`enabled`: the appraiser's
    /// setting).
    #[must_use]
    pub fn decide(market: &Market, rows: &[usize], enabled: bool) -> Self {
        let not = |reason: String| Self::NotInFit { reason };
        if !enabled {
            return not("switched off in the fit settings".into());
        }
        let undated = rows
            .iter()
            .filter(|&&r| market.listed_on[r].is_none())
            .count();
        if undated > 0 {
            return not(format!(
                "{undated} of the {} fitted listings have no listing date",
                rows.len()
            ));
        }
        let dates = rows.iter().filter_map(|&r| market.listed_on[r]);
        let (Some(first), Some(last)) = (dates.clone().min(), dates.clone().max()) else {
            return not("no listings".into());
        };
        let mut months: Vec<(i32, u32)> = dates.map(|d| (d.year(), d.month())).collect();
        months.sort_unstable();
        months.dedup();
        let span = (last - first).num_days();
        if span < MIN_SPAN_DAYS || months.len() < MIN_MONTHS {
            return not(format!(
                "the listing dates span {span} days over {} calendar month{} (the term needs at least {MIN_SPAN_DAYS} days over {MIN_MONTHS} months)",
                months.len(),
                if months.len() == 1 { "" } else { "s" }
            ));
        }
        Self::InFit {
            first,
            last,
            months: months.len(),
        }
    }

    /// Whether the term is in the fit.
    #[must_use]
    pub fn in_fit(&self) -> bool {
        matches!(self, Self::InFit { .. })
    }

    /// In words, for the fit's summary.
    #[must_use]
    pub fn describe(&self) -> String {
        match self {
            Self::InFit {
                first,
                last,
                months,
            } => {
                format!("in the fit: listings from {first} to {last} over {months} calendar months")
            }
            Self::NotInFit { reason } => format!("not in the fit: {reason}"),
        }
    }
}

/// The market-conditions term in words, for every front end: whether it is in the fit and, when
/// it is, the fitted monthly change (`per_month_before`) and whether it is distinguishable from
/// no drift.
#[must_use]
pub fn summary(term: &MarketTimeTerm, drift: Option<(f64, bool)>) -> String {
    match (term, drift) {
        (MarketTimeTerm::InFit { first, last, .. }, Some((b, distinguishable))) => {
            let pct = monthly_change_pct(b);
            format!(
                "the market {} {:.2} % a month over listings dated {first} to {last} (fitted{}); each comparable is brought to the appraisal date",
                if pct < 0.0 { "fell" } else { "rose" },
                pct.abs(),
                if distinguishable {
                    ""
                } else {
                    ", not distinguishable from no drift"
                }
            )
        }
        (t, _) => t.describe(),
    }
}

/// The fitted market drift, as the grid and the reports read it.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct MarketDrift {
    /// Coefficient on ln price per month before the appraisal date (positive: older listings
    /// asked more, the market has fallen since).
    pub per_month_before: f64,
    /// Its standard error.
    pub std_error: f64,
    /// Two-sided p-value of the coefficient against zero.
    pub p_value: f64,
}

impl MarketDrift {
    /// The market's change per month going forward, in percent (−0.4: it fell 0.4 % a month).
    #[must_use]
    pub fn monthly_change_pct(&self) -> f64 {
        monthly_change_pct(self.per_month_before)
    }

    /// Whether the drift is distinguishable from none at the 5 % level.
    #[must_use]
    pub fn is_distinguishable(&self) -> bool {
        self.p_value < 0.05
    }
}

/// The market's change per month going forward, in percent, from the coefficient per month
/// before the appraisal date.
#[must_use]
pub fn monthly_change_pct(per_month_before: f64) -> f64 {
    100.0 * ((-per_month_before).exp() - 1.0)
}

/// One period (a calendar month, or consecutive thin months pooled) of the market's monthly
/// index.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct MonthLevel {
    /// The calendar month, "YYYY-MM", or the months pooled, "YYYY-MM to YYYY-MM".
    pub month: String,
    /// Listings dated in it.
    pub listings: usize,
    /// The market's level, the latest month = 100, attributes held fixed.
    pub index: f64,
    /// Lower end of its band.
    pub lower: f64,
    /// Upper end of its band.
    pub upper: f64,
}

/// The market's level month by month (the time-dummy index), latest month = 100.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct MonthlyIndex {
    /// Band level (e.g. 0.8).
    pub level: f64,
    /// Each month, oldest first; the latest is the base (index 100, no band).
    pub months: Vec<MonthLevel>,
}

/// Why no monthly index could be made.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum IndexError {
    /// The fit has no market-conditions term.
    #[error("the fit has no market-conditions term")]
    NoTimeTerm,
    /// Too few listings for two periods.
    #[error(
        "{listings} dated listings make fewer than two periods of {MIN_LISTINGS_PER_MONTH} listings"
    )]
    TooFewPeriods {
        /// The listings.
        listings: usize,
    },
    /// The month indicators cannot be told apart from the other terms.
    #[error("the months cannot be told apart from the other terms ({0})")]
    Fit(String),
}

/// A calendar month: (year, month).
type Month = (i32, u32);

/// Consecutive months pooled: (first month, last month, listings).
type Period = (Month, Month, usize);

fn month_key(d: NaiveDate) -> Month {
    (d.year(), d.month())
}

/// Most listings the monthly index is fitted on: a larger market is indexed on an evenly spaced
/// sample of this many (the same bound as the age form's choice), so the index costs a bounded
/// fit at a million listings.
pub const INDEX_SAMPLE: usize = super::CHOICE_SAMPLE;

/// The monthly index of the listings `rows` the model was fitted on (an evenly spaced sample of
/// at most [`INDEX_SAMPLE`]), at band `level`: the same attributes as the model, with one
/// indicator per calendar month in place of the linear term (least squares; the latest month
/// is the base).
pub fn monthly_index(
    model: &HedonicModel,
    market: &Market,
    rows: &[usize],
    level: f64,
) -> Result<MonthlyIndex, IndexError> {
    let step = rows.len().div_ceil(INDEX_SAMPLE).max(1);
    let sample: Vec<usize> = rows.iter().copied().step_by(step).collect();
    let rows = &sample[..];
    let design: &Design = model.design();
    let option_columns = super::option_columns_of(market, rows, design);
    let Some(time_column) = design.time_column() else {
        return Err(IndexError::NoTimeTerm);
    };
    let mut counts: std::collections::BTreeMap<(i32, u32), usize> =
        std::collections::BTreeMap::new();
    for &r in rows {
        let d = market.listed_on[r].ok_or(IndexError::NoTimeTerm)?;
        *counts.entry(month_key(d)).or_default() += 1;
    }
    let name = |(y, m): (i32, u32)| format!("{y:04}-{m:02}");
    let periods = pool_thin_months(&counts);
    if periods.len() < 2 {
        return Err(IndexError::TooFewPeriods {
            listings: rows.len(),
        });
    }
    let period_of = |key: (i32, u32)| periods.iter().position(|p| key <= p.1);
    // The base is the latest period; the others each get an indicator after the attribute
    // columns (the linear term's column is dropped).
    let others = periods.len() - 1;
    let width = time_column + others;
    let as_of_year = model.as_of_year();
    let mut acc = QrAccumulator::new(width);
    let mut row = vec![0.0; design.width()];
    let mut x = vec![0.0; width];
    let mut ln_prices = Vec::with_capacity(rows.len());
    for &r in rows {
        design.fill_row(
            super::age_years(market.model_year[r], as_of_year),
            market.miles[r],
            market.variant[r],
            market.condition[r],
            &mut row,
        );
        for &c in option_columns.get(&market.options[r]).into_iter().flatten() {
            row[c] = 1.0;
        }
        x.fill(0.0);
        x[..time_column].copy_from_slice(&row[..time_column]);
        let key = month_key(market.listed_on[r].ok_or(IndexError::NoTimeTerm)?);
        if let Some(pos) = period_of(key).filter(|&p| p < others) {
            x[time_column + pos] = 1.0;
        }
        let y = market.asking_price[r].ln();
        ln_prices.push(y);
        acc.push_row(&x, y);
    }
    let fit = OlsFit::from_factor(acc.finish(), true, ln_prices.into_iter())
        .map_err(|e| IndexError::Fit(e.to_string()))?;
    let t = stats::t_two_sided(level, fit.df_residual() as f64);
    let levels = periods
        .iter()
        .enumerate()
        .map(|(i, &(first, last, listings))| {
            let (b, se) = if i < others {
                (
                    fit.coefficients()[time_column + i],
                    fit.std_errors()[time_column + i],
                )
            } else {
                (0.0, 0.0)
            };
            MonthLevel {
                month: if first == last {
                    name(first)
                } else {
                    format!("{} to {}", name(first), name(last))
                },
                listings,
                index: 100.0 * b.exp(),
                lower: 100.0 * (b - t * se).exp(),
                upper: 100.0 * (b + t * se).exp(),
            }
        })
        .collect();
    Ok(MonthlyIndex {
        level,
        months: levels,
    })
}

/// The months with listings grouped into periods of at least [`MIN_LISTINGS_PER_MONTH`]
/// listings, oldest first: (first month, last month, listings). Thin months join the months
/// after them; a thin last period joins the one before.
fn pool_thin_months(counts: &std::collections::BTreeMap<Month, usize>) -> Vec<Period> {
    let mut periods: Vec<Period> = Vec::new();
    let mut open: Option<((i32, u32), usize)> = None;
    for (&month, &n) in counts {
        let (first, total) = open.map_or((month, n), |(f, t)| (f, t + n));
        if total >= MIN_LISTINGS_PER_MONTH {
            periods.push((first, month, total));
            open = None;
        } else {
            open = Some((first, total));
        }
    }
    if let Some((_, rest)) = open {
        let last_month = counts.keys().next_back().copied();
        if let (Some(p), Some(m)) = (periods.last_mut(), last_month) {
            p.1 = m;
            p.2 += rest;
        }
    }
    periods
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn thin_months_are_pooled_with_the_months_after_them() {
        let counts: std::collections::BTreeMap<(i32, u32), usize> = [
            ((2025, 10), 3),
            ((2025, 12), 4),
            ((2026, 1), 5),
            ((2026, 2), 40),
            ((2026, 3), 12),
            ((2026, 4), 2),
        ]
        .into_iter()
        .collect();
        assert_eq!(
            pool_thin_months(&counts),
            vec![
                ((2025, 10), (2026, 1), 12),
                ((2026, 2), (2026, 2), 40),
                ((2026, 3), (2026, 4), 14),
            ]
        );
    }

    #[test]
    fn a_month_is_a_twelfth_of_the_gregorian_year() {
        let d = NaiveDate::from_ymd_opt(2026, 11, 30).unwrap();
        let year_before = NaiveDate::from_ymd_opt(2025, 11, 30).unwrap();
        // 365 days is 11.99 months of 30.436875 days (constructed by the definition).
        assert!((months_before(d, year_before) - 365.0 / DAYS_PER_MONTH).abs() < 1e-12);
        assert!(months_before(year_before, d) < 0.0);
        assert!((monthly_change_pct(0.0)).abs() < 1e-12);
        // A coefficient of ln(1.01) per month before: the market was 1 % higher a month
        // earlier, so it falls by 1/1.01 − 1 ≈ −0.990 % a month going forward.
        assert!((monthly_change_pct(1.01f64.ln()) - 100.0 * (1.0 / 1.01 - 1.0)).abs() < 1e-12);
    }
}
