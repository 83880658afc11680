//! What the market cannot support: the warnings of a fit, an appraisal, a forecast and a
//! backtest, each worded for the appraiser (what is wrong, what it does to the number, what to
//! do) with the figures behind it.

use crate::appraisal::{AdjustedComparable, AsOfSource, MarketFit, RefusedComparable};
use crate::backtest::Backtest;
use crate::format::{money, thousands};
use crate::hedonic::{LISTINGS_PER_TERM, MILES_UNIT, age_years};
use crate::ols::Interval;
use crate::reconcile::Reconciliation;
use crate::warnings::{Warning, WarningCode};

/// Largest segment (listings of the model) the command line backtests on every appraisal to
/// say how accurate the market is: a five-fold backtest of 2,000 listings takes well under a
/// second. The workbench backtests every market, in the background.
pub const QUICK_BACKTEST_LISTINGS: usize = 2_000;

/// Gross adjustment, as a share of a comparable's price, above which it is "large": 25 %, a
/// rule of thumb of sales-comparison practice (common practice, no source).
pub const LARGE_GROSS_ADJUSTMENT_PCT: f64 = 25.0;

/// Uncertain equipment lines adding up to at least this percent of a comparable's price are
/// warned of (smaller ones only carry their caveat in the basis; our threshold, common
/// practice, no source).
pub const UNCERTAIN_EQUIPMENT_PCT: f64 = 1.0;

/// What the fitted market cannot vouch for, whatever the subject.
#[must_use]
pub fn fit_warnings(fit: &MarketFit) -> Vec<Warning> {
    let model = &fit.model;
    let mut out = model.warnings();
    if let Some(why) = &fit.cleaning.outlier_check_skipped {
        out.push(Warning::new(
            WarningCode::OutliersNotChecked,
            format!(
                "Listings were not checked for outliers or for prices implausibly far below the market ({why}). A damaged or mispriced listing may be in the fit; look over the cheapest listings by hand."
            ),
        ));
    }
    let (n, p) = (model.rows(), model.design().width());
    if n < LISTINGS_PER_TERM * p {
        out.push(
            Warning::new(
                WarningCode::FewListings,
                format!(
                    "Only {n} listings for the {p} terms of the fit, fewer than {LISTINGS_PER_TERM} per term (a rule of thumb for regression; common practice, no source): the fitted rates are uncertain and the band is wide. A wider pull (more model years, a larger area) would steady them."
                ),
            )
            .with("listings", n as f64)
            .with("terms", p as f64),
        );
    }
    let rising = model.rising_steps();
    if let Some(&(from, to, pct)) = rising.first() {
        let as_of_year = model.as_of_year();
        out.push(
            Warning::new(
                WarningCode::AgeCurveNotFalling,
                format!(
                    "The fitted value rises with age between model years {} and {} ({pct:+.1} %{}): the market as fitted says the older vehicle is worth more, so model-year adjustments there point the wrong way. Use a simpler age form or add listings of those years.",
                    as_of_year - to,
                    as_of_year - from,
                    if rising.len() > 1 {
                        format!(", and at {} more steps", rising.len() - 1)
                    } else {
                        String::new()
                    }
                ),
            )
            .with("from_age", f64::from(from))
            .with("to_age", f64::from(to))
            .with("rise_pct", pct),
        );
    }
    let slope = model.miles_slope();
    if slope > 0.0 {
        out.push(
            Warning::new(
                WarningCode::MileageNotFalling,
                format!(
                    "The fitted value rises with mileage ({:+.2} % per 10,000 mi): the listings do not show the usual loss with miles, so mileage adjustments point the wrong way. Check the odometer column and its unit.",
                    100.0 * (slope * MILES_UNIT).exp_m1()
                ),
            )
            .with("pct_per_10k_miles", 100.0 * (slope * MILES_UNIT).exp_m1()),
        );
    }
    if !fit.segment_dated {
        out.push(no_dates_warning(fit));
    }
    out
}

fn no_dates_warning(fit: &MarketFit) -> Warning {
    let date = fit.as_of;
    let message = match fit.as_of_source {
        AsOfSource::Given => format!(
            "The listings have no listing or sale dates, so every one is aged to the appraisal date you gave ({date}). If they were pulled on another date, their ages and their typical miles per year are off by the difference."
        ),
        AsOfSource::Today => format!(
            "The listings have no listing or sale dates and no appraisal date was given, so ages are counted to today's date ({date}) from the computer's clock: a market pulled earlier reads as older than it was, and its typical miles per year as too low. Give the date the listings were pulled as the appraisal date (--as-of)."
        ),
        AsOfSource::LatestInMarket => format!(
            "The listings of this model have no listing or sale dates; the appraisal date {date} is the latest date of other listings in the file. Give the date this model's listings were pulled as the appraisal date (--as-of)."
        ),
    };
    Warning::new(WarningCode::NoListingDates, message)
}

/// Everything one appraisal's warnings are read from.
#[derive(Debug, Clone, Copy)]
pub struct AppraisalFacts<'a> {
    /// The fitted market.
    pub fit: &'a MarketFit,
    /// The subject's model year.
    pub model_year: i32,
    /// The subject's miles.
    pub miles: f64,
    /// The subject's VIN, when given.
    pub subject_vin: Option<&'a str>,
    /// How many comparables were asked for.
    pub comparables_asked: usize,
    /// The comparables used.
    pub comparables: &'a [AdjustedComparable],
    /// Comparables included by hand and refused.
    pub refused: &'a [RefusedComparable],
    /// The model's median for the subject.
    pub model_median: f64,
    /// The reconciliation.
    pub reconciliation: &'a Reconciliation,
}

/// The fit's warnings and those of this appraisal.
#[must_use]
pub fn appraisal_warnings(f: &AppraisalFacts<'_>) -> Vec<Warning> {
    let mut out = fit_warnings(f.fit);
    out.extend(subject_year_warning(f.fit, f.model_year));
    out.extend(subject_mileage_warning(f.fit, f.miles));
    for r in f.refused {
        out.push(
            Warning::new(
                WarningCode::ComparableNotAdjustable,
                format!(
                    "The comparable on market line {} was included by hand but is left out of the value: {}.",
                    r.listing.line, r.reason
                ),
            )
            .with("line", r.listing.line as f64),
        );
    }
    let k = f.comparables.len();
    if k < f.comparables_asked {
        out.push(
            Warning::new(
                WarningCode::FewComparables,
                format!(
                    "{} passed the filters where {} {} asked for: the value leans {} the model's estimate. Widen the model-year window, the mileage rule or the listing age, or add comparables by hand.",
                    match k {
                        0 => "No comparable".to_owned(),
                        1 => "Only 1 comparable".to_owned(),
                        _ => format!("Only {k} comparables"),
                    },
                    f.comparables_asked,
                    if f.comparables_asked == 1 { "was" } else { "were" },
                    if k == 0 { "entirely on" } else { "more on" }
                ),
            )
            .with("comparables", k as f64)
            .with("asked", f.comparables_asked as f64),
        );
    }
    let large: Vec<&AdjustedComparable> = f
        .comparables
        .iter()
        .filter(|c| c.gross_pct > LARGE_GROSS_ADJUSTMENT_PCT)
        .collect();
    if !large.is_empty() {
        let lines = large
            .iter()
            .map(|c| format!("line {} ({:.0} %)", c.listing.line, c.gross_pct))
            .collect::<Vec<_>>()
            .join(", ");
        out.push(
            Warning::new(
                WarningCode::LargeAdjustments,
                format!(
                    "{} comparable{} need{} gross adjustments above {LARGE_GROSS_ADJUSTMENT_PCT:.0} % of the price ({lines}; the threshold is a rule of thumb, common practice, no source): they resemble the subject less than comparables should. Their weight is already reduced; prefer closer comparables.",
                    large.len(),
                    if large.len() == 1 { "" } else { "s" },
                    if large.len() == 1 { "s" } else { "" }
                ),
            )
            .with("comparables", large.len() as f64),
        );
    }
    out.extend(disagreement_warning(f));
    out.extend(uncertain_equipment_warning(f));
    out.extend(vin_warnings(f));
    out
}

/// Equipment lines at fitted effects the market cannot tell from none, where they add up to a
/// noticeable part of a comparable's price.
fn uncertain_equipment_warning(f: &AppraisalFacts<'_>) -> Option<Warning> {
    let affected: Vec<String> = f
        .comparables
        .iter()
        .filter_map(|c| {
            let sum: f64 = c
                .adjustments
                .iter()
                .filter(|l| {
                    l.kind == crate::adjustment::AdjustmentKind::Equipment
                        && l.basis.contains(crate::adjustment::OPTION_UNCERTAIN)
                })
                .map(|l| l.amount.abs())
                .sum();
            let pct = 100.0 * sum / c.listing.asking_price;
            (pct >= UNCERTAIN_EQUIPMENT_PCT)
                .then(|| format!("line {} ({pct:.1} %)", c.listing.line))
        })
        .collect();
    if affected.is_empty() {
        return None;
    }
    Some(
        Warning::new(
            WarningCode::EquipmentUncertain,
            format!(
                "Equipment lines for options whose fitted effect cannot be told from none come to {UNCERTAIN_EQUIPMENT_PCT:.0} % or more of a comparable's price ({}): the market does not show it pays for those options. Read those lines as within the noise; enter your own line with its evidence, or leave the options out of the fit (--no-equipment, or Ground rules).",
                affected.join(", ")
            ),
        )
        .with("comparables", affected.len() as f64),
    )
}

/// A subject or comparable VIN that fails its check digit or names another model year: the
/// usual sign of a misread identifier. The value does not use VINs; the evidence does.
fn vin_warnings(f: &AppraisalFacts<'_>) -> Vec<Warning> {
    let mut out = Vec::new();
    if let Some(vin) = f.subject_vin.filter(|v| !v.trim().is_empty()) {
        let problems = crate::vin::problems(vin, f.model_year);
        if !problems.is_empty() {
            out.push(Warning::new(
                WarningCode::SubjectVinNotValid,
                format!(
                    "The subject's VIN {} does not check: {} ({}). Read it again from the vehicle or its title before the file goes out; the value does not depend on it.",
                    vin.trim(),
                    crate::vin::problems_text(&problems),
                    crate::vin::SOURCE
                ),
            ));
        }
    }
    let failing: Vec<String> = f
        .comparables
        .iter()
        .filter_map(|c| {
            let problems = crate::vin::listing_problems(&c.listing);
            (!problems.is_empty()).then(|| {
                format!(
                    "line {} ({})",
                    c.listing.line,
                    crate::vin::problems_text(&problems)
                )
            })
        })
        .collect();
    if !failing.is_empty() {
        out.push(
            Warning::new(
                WarningCode::ComparableVinNotValid,
                format!(
                    "The VIN of {} comparable{} does not check ({}): {}. A misread VIN weakens the evidence; check it against the listing, or replace the comparable, before relying on the value.",
                    failing.len(),
                    if failing.len() == 1 { "" } else { "s" },
                    crate::vin::SOURCE,
                    failing.join("; ")
                ),
            )
            .with("comparables", failing.len() as f64),
        );
    }
    out
}

fn subject_year_warning(fit: &MarketFit, model_year: i32) -> Option<Warning> {
    let model = &fit.model;
    let age = age_years(model_year, model.as_of_year());
    if !model.age_outside_data(age) {
        return None;
    }
    let (young, old) = model.design().age_range();
    let as_of_year = model.as_of_year();
    let (oldest, newest) = (as_of_year - old as i32, as_of_year - young as i32);
    let older = age > old;
    let rate = model.continued_age_slope(older);
    let edge = if older { "oldest" } else { "newest" };
    let rate_text = if rate < 0.0 {
        format!(
            "continues from the {edge} model year at the curve's rate there ({:.1} % a year)",
            100.0 * (1.0 - rate.exp())
        )
    } else {
        format!(
            "is held at the {edge} model year's level (the curve does not fall there, and it may not rise)"
        )
    };
    Some(
        Warning::new(
            WarningCode::SubjectYearOutsideMarket,
            format!(
                "The subject's model year {model_year} is {} every listing in the fit ({oldest} to {newest}). The fitted curve says nothing there: the value {rate_text} rather than following the curve's shape, and its band widens with the distance. Treat it as an estimate beyond the market; comparables in its year window may be few or none.",
                if older { "older than" } else { "newer than" }
            ),
        )
        .with("subject_model_year", f64::from(model_year))
        .with("oldest_model_year", f64::from(oldest))
        .with("newest_model_year", f64::from(newest)),
    )
}

fn subject_mileage_warning(fit: &MarketFit, miles: f64) -> Option<Warning> {
    let model = &fit.model;
    if !model.miles_outside_data(miles) {
        return None;
    }
    let (lo, hi) = model.miles_range();
    let above = miles > hi;
    let slope = model.miles_slope();
    let rate = if slope < 0.0 {
        format!(
            "continues the fitted mileage rate ({:+.2} % per 10,000 mi)",
            100.0 * (slope * MILES_UNIT).exp_m1()
        )
    } else {
        "stays at the level of the nearest fitted mileage".to_owned()
    };
    Some(
        Warning::new(
            WarningCode::SubjectMileageOutsideMarket,
            format!(
                "The subject's {} mi are {} every listing in the fit ({} to {} mi): its value {rate} beyond the data. Treat it as an estimate beyond the market; look for comparables of similar mileage by hand.",
                thousands(miles),
                if above { "more than" } else { "fewer than" },
                thousands(lo),
                thousands(hi)
            ),
        )
        .with("subject_miles", miles)
        .with("lowest_miles", lo)
        .with("highest_miles", hi),
    )
}

fn disagreement_warning(f: &AppraisalFacts<'_>) -> Option<Warning> {
    let r = f.reconciliation;
    let band = &r.value_band;
    if f.comparables.is_empty() || (band.lower..=band.upper).contains(&f.model_median) {
        return None;
    }
    Some(
        Warning::new(
            WarningCode::ModelAndComparablesDisagree,
            format!(
                "The comparables indicate {} while the model estimates {} for the subject ({:+.1} %), outside the value band {} to {}: one of them misreads this vehicle. Look at the comparables' adjustments and at where the subject sits in the market before choosing.",
                money(r.indicated_value),
                money(f.model_median),
                r.model_gap_pct,
                money(band.lower),
                money(band.upper)
            ),
        )
        .with("indicated_value", r.indicated_value)
        .with("model_median", f.model_median)
        .with("gap_pct", r.model_gap_pct),
    )
}

/// A forecast that reaches past the market's ages or mileages.
#[must_use]
pub fn forecast_warning(fit: &MarketFit, end_age: f64, end_miles: f64) -> Option<Warning> {
    let model = &fit.model;
    let (_, oldest) = model.design().age_range();
    let (_, most_miles) = model.miles_range();
    let past_age = end_age > oldest;
    let past_miles = end_miles > most_miles;
    if !(past_age || past_miles) {
        return None;
    }
    let mut beyond = Vec::new();
    if past_age {
        beyond.push(format!(
            "an age of {end_age:.1} years (the oldest listing is {oldest:.0})"
        ));
    }
    if past_miles {
        beyond.push(format!(
            "{} mi (the most in the market is {})",
            thousands(end_miles),
            thousands(most_miles)
        ));
    }
    Some(
        Warning::new(
            WarningCode::ForecastBeyondMarket,
            format!(
                "The forecast reaches {}, beyond the market: it continues the fitted rates rather than the curve's shape. Treat it as a projection, not a market value.",
                beyond.join(" and ")
            ),
        )
        .with("end_age", end_age)
        .with("end_miles", end_miles),
    )
}

/// A market whose held-out listings miss their estimates by more than the value band allows.
#[must_use]
pub fn backtest_warning(backtest: &Backtest, band: &Interval, value: f64) -> Option<Warning> {
    let error = backtest.model.median_abs_pct_error;
    let half_width = 100.0 * (band.upper / value - 1.0).max(1.0 - band.lower / value);
    if !(error.is_finite() && half_width.is_finite()) || error <= half_width {
        return None;
    }
    Some(
        Warning::new(
            WarningCode::BacktestErrorExceedsBand,
            format!(
                "On this market, held-out listings typically land {error:.0} % from their estimate, more than the value band's ±{half_width:.0} %: the band understates how far a price can fall from the value here. Read the value as ±{error:.0} % at best, and rely on the comparables you can check."
            ),
        )
        .with("typical_error_pct", error)
        .with("band_half_width_pct", half_width),
    )
}

/// The backtest in plain words, for beside the band: "on this market, 8 in 10 held-out
/// listings fell inside their band; typical error 9 %".
#[must_use]
pub fn accuracy_in_words(backtest: &Backtest) -> String {
    let m = &backtest.model;
    if m.evaluated == 0 || !m.band_coverage_pct.is_finite() {
        return "the market is too small to test its own accuracy".to_owned();
    }
    format!(
        "on this market, {} in 10 held-out listings fell inside their {:.0} % band; typical error {:.0} %",
        (m.band_coverage_pct / 10.0).round(),
        100.0 * m.level,
        m.median_abs_pct_error
    )
}
