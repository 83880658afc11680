//! Cleaning a segment before it is fitted: every exclusion carries its rule and reason, and the
//! appraiser can override any of them by hand.
//!
//! Rules, first match wins: duplicate VIN; duplicate listing (same attributes, no VIN); stale
//! listing (unsold and listed longer than the limit); old-model-year stock listed as new (priced
//! as new, it would flatten the age curve); branded title; then, from a first robust fit,
//! implausibly cheap listings (possible branded title or damage) and high outliers by their
//! studentized residual.

use std::collections::BTreeMap;

use chrono::{Datelike, NaiveDate};
use linfa::ParamGuard;
use serde::{Deserialize, Serialize};

use crate::condition::{Condition, TitleStatus};
use crate::hedonic::{AgeForm, HedonicParams};
use crate::market::{Market, Segment};

/// Why a listing is kept out of the fit and the comparables.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(tag = "rule", rename_all = "snake_case")]
pub enum Exclusion {
    /// Same VIN as an earlier listing.
    DuplicateVin {
        /// Line of the listing kept.
        of_line: u64,
    },
    /// Same year, variant, mileage, price and seller as an earlier listing without a VIN.
    DuplicateListing {
        /// Line of the listing kept.
        of_line: u64,
    },
    /// Unsold and listed for longer than the limit.
    StaleListing {
        /// Days since listed.
        days_listed: i64,
        /// The limit.
        limit_days: u32,
    },
    /// A new unit of an earlier model year: priced as new, so it would distort the age curve.
    OldStockListedAsNew {
        /// Its model year.
        model_year: i32,
    },
    /// The title carries a brand.
    BrandedTitle {
        /// The brand.
        title: TitleStatus,
    },
    /// Far below the market for its attributes: possible branded title or damage.
    ImplausiblyCheap {
        /// Asking price as a percentage of the fitted market median.
        percent_of_market: f64,
        /// Studentized residual from the first robust fit.
        studentized: f64,
    },
    /// Far above the market for its attributes.
    HighOutlier {
        /// Asking price as a percentage of the fitted market median.
        percent_of_market: f64,
        /// Studentized residual from the first robust fit.
        studentized: f64,
    },
    /// Excluded by the appraiser.
    Manual {
        /// The appraiser's reason.
        note: String,
    },
}

impl Exclusion {
    /// Stable short code.
    #[must_use]
    pub fn code(&self) -> &'static str {
        match self {
            Exclusion::DuplicateVin { .. } => "duplicate_vin",
            Exclusion::DuplicateListing { .. } => "duplicate_listing",
            Exclusion::StaleListing { .. } => "stale_listing",
            Exclusion::OldStockListedAsNew { .. } => "old_stock_listed_as_new",
            Exclusion::BrandedTitle { .. } => "branded_title",
            Exclusion::ImplausiblyCheap { .. } => "implausibly_cheap",
            Exclusion::HighOutlier { .. } => "high_outlier",
            Exclusion::Manual { .. } => "manual",
        }
    }
}

/// A cleaning rule's code (as counted by [`SegmentCleaning::counts`]) in words for people; the
/// code itself when it is not one of ours.
#[must_use]
pub fn rule_in_words(code: &str) -> &str {
    match code {
        "duplicate_vin" => "the same VIN as an earlier listing",
        "duplicate_listing" => "the same vehicle and price as an earlier listing",
        "stale_listing" => "listed too long without selling",
        "old_stock_listed_as_new" => "an earlier model year listed as new",
        "branded_title" => "a branded title",
        "implausibly_cheap" => "implausibly cheap for the market",
        "high_outlier" => "priced far from the market",
        "manual" => "set aside by hand",
        other => other,
    }
}

impl std::fmt::Display for Exclusion {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            Exclusion::DuplicateVin { of_line } => write!(f, "same VIN as line {of_line}"),
            Exclusion::DuplicateListing { of_line } => {
                write!(f, "same vehicle and price as line {of_line}")
            }
            Exclusion::StaleListing {
                days_listed,
                limit_days,
            } => {
                write!(
                    f,
                    "listed {days_listed} days ago and unsold (limit {limit_days})"
                )
            }
            Exclusion::OldStockListedAsNew { model_year } => {
                write!(
                    f,
                    "model year {model_year} still listed as new: priced as new, not by age"
                )
            }
            Exclusion::BrandedTitle { title } => write!(f, "{} title", title.as_str()),
            Exclusion::ImplausiblyCheap {
                percent_of_market,
                studentized,
            } => write!(
                f,
                "asks {percent_of_market:.0} % of the market for its attributes (studentized residual {studentized:.1}): possible branded title or damage; check before use"
            ),
            Exclusion::HighOutlier {
                percent_of_market,
                studentized,
            } => write!(
                f,
                "asks {percent_of_market:.0} % of the market for its attributes (studentized residual {studentized:.1})"
            ),
            Exclusion::Manual { note } => write!(f, "excluded by hand: {note}"),
        }
    }
}

/// The appraiser's decision on one listing, keyed by its file line.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
#[serde(tag = "decision", rename_all = "snake_case")]
pub enum Override {
    /// Keep the listing even though a rule excluded it.
    Include {
        /// Why.
        note: String,
    },
    /// Exclude the listing.
    Exclude {
        /// Why.
        note: String,
    },
}

/// Overrides by file line.
pub type Overrides = BTreeMap<u64, Override>;

/// Settings of the cleaning rules.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct CleaningRules {
    /// Exclude duplicates.
    pub drop_duplicates: bool,
    /// Unsold listings older than this many days are stale; `None` keeps them.
    pub stale_after_days: Option<u32>,
    /// Exclude new units of earlier model years.
    pub exclude_old_stock_as_new: bool,
    /// Exclude branded titles.
    pub exclude_branded_titles: bool,
    /// |studentized residual| above which a listing is an outlier.
    pub outlier_threshold: f64,
    /// A listing asking less than this fraction of the fitted market is implausibly cheap.
    pub cheap_below_fraction: f64,
    /// Largest number of listings the first robust fit uses (evenly spaced sample beyond it).
    pub robust_sample_limit: usize,
}

impl Default for CleaningRules {
    fn default() -> Self {
        Self {
            drop_duplicates: true,
            stale_after_days: Some(180),
            exclude_old_stock_as_new: true,
            exclude_branded_titles: true,
            outlier_threshold: 3.5,
            cheap_below_fraction: 0.70,
            robust_sample_limit: 50_000,
        }
    }
}

/// The outcome of cleaning one segment.
#[derive(Debug, Clone, PartialEq)]
pub struct SegmentCleaning {
    /// The segment.
    pub segment: Segment,
    /// Every row of the segment, ascending.
    pub rows: Vec<usize>,
    /// The rule that excluded each row (parallel to `rows`), before overrides.
    pub exclusions: Vec<Option<Exclusion>>,
    /// Whether each row is used after overrides (parallel to `rows`).
    pub included: Vec<bool>,
    /// Why the outlier rules could not run, if they could not.
    pub outlier_check_skipped: Option<String>,
    /// `included` by market row (false for rows of other segments): a constant-time lookup for
    /// the comparable search.
    included_by_row: Vec<bool>,
}

impl SegmentCleaning {
    /// Rows used for the fit and as comparables.
    #[must_use]
    pub fn included_rows(&self) -> Vec<usize> {
        self.rows
            .iter()
            .zip(&self.included)
            .filter(|(_, inc)| **inc)
            .map(|(r, _)| *r)
            .collect()
    }

    /// Rows set aside from the fit and the comparables (by a rule or by hand), ascending.
    pub fn set_aside_rows(&self) -> impl Iterator<Item = usize> + '_ {
        self.rows
            .iter()
            .zip(&self.included)
            .filter(|(_, inc)| !**inc)
            .map(|(r, _)| *r)
    }

    fn position(&self, row: usize) -> Option<usize> {
        self.rows.binary_search(&row).ok()
    }

    /// The exclusion recorded for `row`, if any (even when overridden).
    #[must_use]
    pub fn exclusion_of(&self, row: usize) -> Option<&Exclusion> {
        self.position(row).and_then(|i| self.exclusions[i].as_ref())
    }

    /// Whether `row` is used.
    #[must_use]
    pub fn is_included(&self, row: usize) -> bool {
        self.included_by_row.get(row).copied().unwrap_or(false)
    }

    /// Exclusions in force, counted by rule code.
    #[must_use]
    pub fn counts(&self) -> BTreeMap<String, usize> {
        let mut counts = BTreeMap::new();
        for (e, inc) in self.exclusions.iter().zip(&self.included) {
            if let (Some(e), false) = (e, inc) {
                *counts.entry(e.code().to_owned()).or_default() += 1;
            }
        }
        counts
    }
}

/// Cleans `segment` of `market` as of `as_of`, applying the appraiser's `overrides` last.
#[must_use]
pub fn clean_segment(
    market: &Market,
    segment: Segment,
    rules: &CleaningRules,
    age_form: AgeForm,
    as_of: NaiveDate,
    overrides: &Overrides,
) -> SegmentCleaning {
    let rows = market.rows_of(segment);
    let mut exclusions: Vec<Option<Exclusion>> = rows
        .iter()
        .map(|&r| {
            let manual = match overrides.get(&market.line[r]) {
                Some(Override::Exclude { note }) => Some(Exclusion::Manual { note: note.clone() }),
                _ => None,
            };
            manual.or_else(|| stock_rules(market, r, rules, as_of))
        })
        .collect();
    if rules.drop_duplicates {
        mark_duplicates(market, &rows, &mut exclusions);
    }
    let overridden_in = |r: usize| {
        matches!(
            overrides.get(&market.line[r]),
            Some(Override::Include { .. })
        )
    };
    let outlier_check_skipped = mark_outliers(
        market,
        &rows,
        &mut exclusions,
        rules,
        age_form,
        as_of,
        &overridden_in,
    );
    let included: Vec<bool> = rows
        .iter()
        .zip(&exclusions)
        .map(|(&r, e)| {
            e.is_none() || (overridden_in(r) && !matches!(e, Some(Exclusion::Manual { .. })))
        })
        .collect();
    let mut included_by_row = vec![false; market.len()];
    for (&r, &inc) in rows.iter().zip(&included) {
        included_by_row[r] = inc;
    }
    SegmentCleaning {
        segment,
        rows,
        exclusions,
        included,
        outlier_check_skipped,
        included_by_row,
    }
}

fn stock_rules(
    market: &Market,
    r: usize,
    rules: &CleaningRules,
    as_of: NaiveDate,
) -> Option<Exclusion> {
    if let (Some(limit), Some(listed), None) = (
        rules.stale_after_days,
        market.listed_on[r],
        market.sold_on[r],
    ) {
        let days = (as_of - listed).num_days();
        if days > i64::from(limit) {
            return Some(Exclusion::StaleListing {
                days_listed: days,
                limit_days: limit,
            });
        }
    }
    if rules.exclude_old_stock_as_new
        && market.condition[r] == Condition::New
        && as_of.year() - market.model_year[r] >= 1
    {
        return Some(Exclusion::OldStockListedAsNew {
            model_year: market.model_year[r],
        });
    }
    if rules.exclude_branded_titles {
        if let Some(title) = market.title[r].filter(|t| t.is_branded()) {
            return Some(Exclusion::BrandedTitle { title });
        }
    }
    None
}

/// For `items` of (position, key) in position order: each item whose key already appeared, with
/// the position where it first did. Sorting hashes keeps this fast at half a million keys (a
/// hash map of that size spends its time on cache misses); equal hashes are checked key by key.
fn repeats<K: Eq + std::hash::Hash>(items: &[(usize, K)]) -> Vec<(usize, usize)> {
    use std::hash::BuildHasher;
    let state = foldhash::fast::FixedState::with_seed(0x636f_6d70);
    let mut keyed: Vec<(u64, usize)> = items
        .iter()
        .enumerate()
        .map(|(j, (_, k))| (state.hash_one(k), j))
        .collect();
    keyed.sort_unstable();
    let mut out = Vec::new();
    for run in keyed
        .chunk_by(|a, b| a.0 == b.0)
        .filter(|run| run.len() > 1)
    {
        // Within a run `j` ascends, so the first of each distinct key is its first occurrence.
        let mut firsts: Vec<usize> = Vec::new();
        for &(_, j) in run {
            match firsts.iter().find(|&&f| items[f].1 == items[j].1) {
                Some(&f) => out.push((items[j].0, items[f].0)),
                None => firsts.push(j),
            }
        }
    }
    out
}

/// What makes two listings without a VIN the same: model year, variant, miles, price in
/// cents, seller.
type ListingKey = (i32, u32, u64, u64, u32);

fn mark_duplicates(market: &Market, rows: &[usize], exclusions: &mut [Option<Exclusion>]) {
    let mut by_vin: Vec<(usize, &str)> = Vec::new();
    let mut by_attributes: Vec<(usize, ListingKey)> = Vec::new();
    for (i, &r) in rows.iter().enumerate() {
        match market.vin.get(r) {
            Some(vin) => by_vin.push((i, vin)),
            None => by_attributes.push((
                i,
                (
                    market.model_year[r],
                    market.variant[r],
                    market.miles[r].round() as u64,
                    (market.asking_price[r] * 100.0).round() as u64,
                    market.seller[r],
                ),
            )),
        }
    }
    let (vin_repeats, attribute_repeats) = std::thread::scope(|scope| {
        let vins = scope.spawn(|| repeats(&by_vin));
        let attributes = repeats(&by_attributes);
        let vins = vins
            .join()
            .unwrap_or_else(|panic| std::panic::resume_unwind(panic));
        (vins, attributes)
    });
    for (i, first) in vin_repeats {
        if exclusions[i].is_none() {
            exclusions[i] = Some(Exclusion::DuplicateVin {
                of_line: market.line[rows[first]],
            });
        }
    }
    for (i, first) in attribute_repeats {
        if exclusions[i].is_none() {
            exclusions[i] = Some(Exclusion::DuplicateListing {
                of_line: market.line[rows[first]],
            });
        }
    }
}

/// Marks cheap listings and outliers from a first robust fit over the rows not yet excluded.
/// Returns why the check was skipped, if it was.
fn mark_outliers(
    market: &Market,
    rows: &[usize],
    exclusions: &mut [Option<Exclusion>],
    rules: &CleaningRules,
    age_form: AgeForm,
    as_of: NaiveDate,
    overridden_in: &dyn Fn(usize) -> bool,
) -> Option<String> {
    let clean: Vec<usize> = rows
        .iter()
        .zip(exclusions.iter())
        .filter(|(r, e)| e.is_none() || overridden_in(**r))
        .map(|(r, _)| *r)
        .collect();
    // An evenly spaced sample is enough to place the market; every listing is then scored.
    let step = clean
        .len()
        .div_ceil(rules.robust_sample_limit.max(1))
        .max(1);
    let sample: Vec<usize> = clean.iter().copied().step_by(step).collect();
    // The automatic form is chosen after cleaning; this first fit takes the quadratic only
    // when the listings can carry it.
    let age_form = if age_form == AgeForm::Auto {
        let width = crate::hedonic::Design::for_rows(
            market,
            &sample,
            AgeForm::Quadratic,
            as_of.year(),
            false,
            Vec::new(),
            false,
        )
        .width();
        crate::hedonic::cleaning_form(clean.len(), width)
    } else {
        age_form
    };
    // Without the market-conditions term: listings are scored against the market's level over
    // the whole pull, which a drift of a few percent does not turn into outliers.
    let params = match HedonicParams::new(as_of)
        .age_form(age_form)
        .robust(true)
        .market_time(false)
        .check()
    {
        Ok(p) => p,
        Err(e) => return Some(e.to_string()),
    };
    let model = match params.fit(market, &sample) {
        Ok(m) => m,
        Err(e) => return Some(format!("first robust fit failed: {e}")),
    };
    let s = model.residual_sd();
    if model.robust_report().is_some_and(|r| r.scale_collapsed) || s.is_nan() || s <= 0.0 {
        return Some(
            "more than half the listings sit exactly on the first fit, so there is no spread to measure outliers against".into(),
        );
    }
    // Leverage from the sample's cross-products, rescaled to the number of listings scored.
    let leverage_scale = sample.len() as f64 / clean.len().max(1) as f64;
    let score = |r: usize, x: &mut [f64]| {
        let a = model.attributes_of_row(market, r);
        model
            .design()
            .fill_row(a.age_years, a.miles, a.variant, a.condition, x);
        let resid = market.asking_price[r].ln() - model.linear_predictor(x);
        let h = (model.factor_leverage(x) * leverage_scale).min(0.99);
        let studentized = resid / (s * (1.0 - h).sqrt());
        let percent_of_market = 100.0 * resid.exp();
        if resid.exp() < rules.cheap_below_fraction || studentized < -rules.outlier_threshold {
            Some(Exclusion::ImplausiblyCheap {
                percent_of_market,
                studentized,
            })
        } else if studentized > rules.outlier_threshold {
            Some(Exclusion::HighOutlier {
                percent_of_market,
                studentized,
            })
        } else {
            None
        }
    };
    let width = model.design().width();
    let threads = std::thread::available_parallelism().map_or(1, std::num::NonZero::get);
    let per = rows.len().div_ceil(threads).max(4_096);
    std::thread::scope(|scope| {
        for (row_part, exclusion_part) in rows.chunks(per).zip(exclusions.chunks_mut(per)) {
            scope.spawn(move || {
                let mut x = vec![0.0; width];
                for (&r, e) in row_part.iter().zip(exclusion_part.iter_mut()) {
                    if e.is_none() {
                        *e = score(r, &mut x);
                    }
                }
            });
        }
    });
    None
}

#[cfg(test)]
mod duplicate_tests {
    use foldhash::{HashMap, HashMapExt};

    use super::*;

    fn mark_duplicates_by_map(
        market: &Market,
        rows: &[usize],
        exclusions: &mut [Option<Exclusion>],
    ) {
        // Sized up front: growing a map of half a million keys rehashes it many times over.
        let with_vin = rows
            .iter()
            .filter(|&&r| market.vin.get(r).is_some())
            .count();
        let mut by_vin: HashMap<&str, u64> = HashMap::with_capacity(with_vin);
        let mut by_attributes: HashMap<(i32, u32, u64, u64, u32), u64> =
            HashMap::with_capacity(rows.len() - with_vin);
        for (i, &r) in rows.iter().enumerate() {
            let line = market.line[r];
            let duplicate = if let Some(vin) = market.vin.get(r) {
                let first = *by_vin.entry(vin).or_insert(line);
                (first != line).then_some(Exclusion::DuplicateVin { of_line: first })
            } else {
                let key = (
                    market.model_year[r],
                    market.variant[r],
                    market.miles[r].round() as u64,
                    (market.asking_price[r] * 100.0).round() as u64,
                    market.seller[r],
                );
                let first = *by_attributes.entry(key).or_insert(line);
                (first != line).then_some(Exclusion::DuplicateListing { of_line: first })
            };
            if exclusions[i].is_none() {
                exclusions[i] = duplicate;
            }
        }
    }

    #[test]
    fn sorted_hashes_find_the_same_duplicates_as_a_hash_map() {
        // The demo market plants duplicate VINs; rows without a VIN exercise the other key.
        let bytes = crate::demo::demo_csv_bytes(40_000, 5);
        let options = crate::import::ImportOptions {
            latest_model_year: 2027,
            ..crate::import::ImportOptions::default()
        };
        let Ok((mut market, _)) = crate::import::import_csv_bytes("demo", bytes, &options) else {
            panic!("the demo market imports");
        };
        let vins = std::mem::take(&mut market.vin);
        market.vin = vins
            .iter()
            .enumerate()
            .map(|(r, vin)| vin.filter(|_| r % 7 != 0))
            .collect();
        // Plant attribute duplicates among the rows without a VIN.
        for r in (0..700).step_by(7) {
            let twin = r + 7;
            market.model_year[twin] = market.model_year[r];
            market.variant[twin] = market.variant[r];
            market.miles[twin] = market.miles[r];
            market.asking_price[twin] = market.asking_price[r];
            market.seller[twin] = market.seller[r];
        }
        let rows: Vec<usize> = (0..market.len()).collect();
        let mut sorted = vec![None; rows.len()];
        let mut mapped = vec![None; rows.len()];
        mark_duplicates(&market, &rows, &mut sorted);
        mark_duplicates_by_map(&market, &rows, &mut mapped);
        assert_eq!(sorted, mapped);
        let found = |code: &str| sorted.iter().flatten().filter(|e| e.code() == code).count();
        assert!(found("duplicate_vin") > 0 && found("duplicate_listing") >= 99);
    }
}
