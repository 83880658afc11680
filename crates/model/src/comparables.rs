//! Choosing comparables for a subject: hard filters first, then ranking by Gower similarity,
//! then the appraiser's manual includes and excludes.

use std::collections::{BTreeMap, BTreeSet};

use chrono::{Datelike, NaiveDate};
use serde::{Deserialize, Serialize};

use crate::clean::SegmentCleaning;
use crate::condition::Condition;
use crate::gower::{GowerPart, GowerWeights, gower_distance};
use crate::market::Market;
use crate::vocabulary::NameId;

/// "The greater of `miles` or `percent` % of the subject's mileage".
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct Allowance {
    /// Fixed allowance in miles.
    pub miles: f64,
    /// Allowance as a percentage of the subject's miles.
    pub percent: f64,
}

impl Allowance {
    /// The allowance for a subject with `subject_miles`.
    #[must_use]
    pub fn limit_for(&self, subject_miles: f64) -> f64 {
        self.miles.max(self.percent / 100.0 * subject_miles)
    }
}

/// How far a comparable's mileage may be from the subject's.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct MileageRule {
    /// Most a comparable may exceed the subject by; `None` for no limit.
    pub max_over: Option<Allowance>,
    /// Most a comparable may fall short of the subject by; `None` for no limit.
    pub max_under: Option<Allowance>,
}

impl MileageRule {
    /// 11 NYCRR 216.7: a comparable's mileage may exceed the insured vehicle's by at most
    /// 4,000 miles or 10 %, whichever is greater; no limit below.
    #[must_use]
    pub fn new_york() -> Self {
        Self {
            max_over: Some(Allowance {
                miles: 4_000.0,
                percent: 10.0,
            }),
            max_under: None,
        }
    }

    /// The default for pricing: within the greater of 15,000 miles or 30 % either way (a choice
    /// of ours, common practice, no source).
    #[must_use]
    pub fn default_pricing() -> Self {
        let a = Allowance {
            miles: 15_000.0,
            percent: 30.0,
        };
        Self {
            max_over: Some(a),
            max_under: Some(a),
        }
    }

    /// Within `rows` ordered by miles, the range that passes [`Self::check`]: the rows before
    /// it fail by being under, the rows after by being over. The same comparisons as the check,
    /// so the split agrees with it row for row.
    #[must_use]
    pub fn passing_range(&self, rows: &[CandidateRow], subject_miles: f64) -> (usize, usize) {
        let under = self.max_under.map_or(0, |a| {
            let limit = a.limit_for(subject_miles);
            rows.partition_point(|c| subject_miles - c.miles > limit)
        });
        let over_from = self.max_over.map_or(rows.len(), |a| {
            let limit = a.limit_for(subject_miles);
            rows.partition_point(|c| c.miles - subject_miles <= limit)
        });
        (under.min(over_from), over_from)
    }

    /// Checks a comparable's mileage against the subject's; the broken limit on failure.
    #[must_use]
    pub fn check(&self, subject_miles: f64, comparable_miles: f64) -> Option<RuleBreak> {
        if let Some(a) = self.max_over {
            let limit = a.limit_for(subject_miles);
            if comparable_miles - subject_miles > limit {
                return Some(RuleBreak::MilesOver {
                    over_by: comparable_miles - subject_miles,
                    limit,
                });
            }
        }
        if let Some(a) = self.max_under {
            let limit = a.limit_for(subject_miles);
            if subject_miles - comparable_miles > limit {
                return Some(RuleBreak::MilesUnder {
                    under_by: subject_miles - comparable_miles,
                    limit,
                });
            }
        }
        None
    }
}

/// The hard filters and ranking settings for comparables.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct ComparableRules {
    /// Model years within this many of the subject's.
    pub model_year_window: i32,
    /// Mileage rule.
    pub mileage: MileageRule,
    /// Listed no more than this many days before the appraisal date; `None` for no limit.
    pub max_listing_age_days: Option<u32>,
    /// No farther than this many miles; `None` for no limit.
    pub max_distance_miles: Option<f64>,
    /// Only the subject's own variant.
    pub same_variant_only: bool,
    /// How many comparables to keep.
    pub count: usize,
    /// Similarity weights.
    pub weights: GowerWeights,
}

impl Default for ComparableRules {
    fn default() -> Self {
        Self {
            model_year_window: 1,
            mileage: MileageRule::default_pricing(),
            // NAIC model regulation §8(A): comparables available within the last 90 days.
            max_listing_age_days: Some(90),
            max_distance_miles: None,
            same_variant_only: false,
            count: 8,
            weights: GowerWeights::default(),
        }
    }
}

/// A hard filter a listing fails.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum RuleBreak {
    /// Model year outside the window.
    ModelYearOutsideWindow {
        /// Years apart.
        years_apart: i32,
        /// The window.
        window: i32,
    },
    /// Too many more miles than the subject.
    MilesOver {
        /// Miles above the subject.
        over_by: f64,
        /// The allowance.
        limit: f64,
    },
    /// Too many fewer miles than the subject.
    MilesUnder {
        /// Miles below the subject.
        under_by: f64,
        /// The allowance.
        limit: f64,
    },
    /// Listed too long before the appraisal date.
    ListingTooOld {
        /// Days listed.
        days: i64,
        /// The limit.
        limit: u32,
    },
    /// Listed after the appraisal date: not on the market on that date (a claim's date of loss
    /// set before the market's latest listing).
    ListedAfterAppraisalDate {
        /// Days after the appraisal date.
        days: i64,
    },
    /// Too far away.
    TooFar {
        /// Miles away.
        miles: f64,
        /// The limit.
        limit: f64,
    },
    /// Another variant, when only the subject's is allowed.
    OtherVariant,
    /// Excluded by cleaning or by hand.
    Excluded {
        /// The exclusion's rule code.
        code: String,
    },
}

impl RuleBreak {
    /// Stable short code.
    #[must_use]
    pub fn code(&self) -> &'static str {
        match self {
            RuleBreak::ModelYearOutsideWindow { .. } => "model_year_outside_window",
            RuleBreak::MilesOver { .. } => MILES_OVER,
            RuleBreak::MilesUnder { .. } => MILES_UNDER,
            RuleBreak::ListingTooOld { .. } => "listing_too_old",
            RuleBreak::ListedAfterAppraisalDate { .. } => "listed_after_appraisal_date",
            RuleBreak::TooFar { .. } => "too_far",
            RuleBreak::OtherVariant => "other_variant",
            RuleBreak::Excluded { .. } => "excluded_by_cleaning",
        }
    }
}

/// A filter's code (as counted in `stopped_by`) in words for people; the code itself when it is
/// not one of ours.
#[must_use]
pub fn filter_in_words(code: &str) -> &str {
    match code {
        "model_year_outside_window" => "model year outside the window",
        "miles_over_limit" => "more miles than the mileage rule allows",
        "miles_under_limit" => "fewer miles than the mileage rule allows",
        "listing_too_old" => "listed too long before the appraisal date",
        "listed_after_appraisal_date" => "listed after the appraisal date",
        "too_far" => "too far away",
        "other_variant" => "another variant",
        "excluded_by_cleaning" => "set aside by cleaning",
        other => other,
    }
}

impl std::fmt::Display for RuleBreak {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        use crate::format::thousands;
        match self {
            RuleBreak::ModelYearOutsideWindow {
                years_apart,
                window,
            } => {
                write!(f, "model year {years_apart} apart (window ±{window})")
            }
            RuleBreak::MilesOver { over_by, limit } => write!(
                f,
                "{} mi more than the subject (allowed {})",
                thousands(*over_by),
                thousands(*limit)
            ),
            RuleBreak::MilesUnder { under_by, limit } => write!(
                f,
                "{} mi fewer than the subject (allowed {})",
                thousands(*under_by),
                thousands(*limit)
            ),
            RuleBreak::ListingTooOld { days, limit } => {
                write!(f, "listed {days} days ago (limit {limit})")
            }
            RuleBreak::ListedAfterAppraisalDate { days } => {
                write!(
                    f,
                    "listed {days} day{} after the appraisal date",
                    if *days == 1 { "" } else { "s" }
                )
            }
            RuleBreak::TooFar { miles, limit } => {
                write!(f, "{miles:.0} mi away (limit {limit:.0})")
            }
            RuleBreak::OtherVariant => write!(f, "another variant"),
            RuleBreak::Excluded { code } => write!(f, "excluded by cleaning ({code})"),
        }
    }
}

/// The appraiser's manual choices, by file line.
#[derive(Debug, Clone, Default, PartialEq, Eq, Serialize, Deserialize)]
pub struct ComparableChoices {
    /// Always use these, whatever the filters say (the broken rules are still shown).
    pub include: BTreeSet<u64>,
    /// Never use these.
    pub exclude: BTreeSet<u64>,
}

/// The subject as the comparable search sees it.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SubjectKey {
    /// Model year.
    pub model_year: i32,
    /// Miles.
    pub miles: f64,
    /// Variant id.
    pub variant: NameId,
    /// Condition.
    pub condition: Condition,
}

/// A chosen comparable before adjustment.
#[derive(Debug, Clone, PartialEq)]
pub struct ChosenComparable {
    /// Market row.
    pub row: usize,
    /// Gower distance to the subject.
    pub gower_distance: f64,
    /// Included by hand.
    pub manual: bool,
    /// Filters it breaks (only manual includes can break any).
    pub breaks: Vec<RuleBreak>,
}

/// The outcome of the comparable search.
#[derive(Debug, Clone, PartialEq)]
pub struct ComparableSelection {
    /// Chosen comparables, most similar first.
    pub chosen: Vec<ChosenComparable>,
    /// Listings of the subject's make and model looked at.
    pub considered: usize,
    /// How many passed every filter.
    pub passed: usize,
    /// Listings stopped by each filter (first failing filter counted).
    pub stopped_by: BTreeMap<String, usize>,
}

/// The code of the first hard filter a candidate fails (the model-year window is not checked:
/// the search visits only rows inside it). Allocation-free, for the search loop.
fn first_failing_filter(
    c: &CandidateRow,
    subject: &SubjectKey,
    rules: &ComparableRules,
    as_of: NaiveDate,
) -> Option<&'static str> {
    if let Some(b) = rules.mileage.check(subject.miles, c.miles) {
        return Some(b.code());
    }
    filter_after_mileage(c, subject, rules, as_of)
}

/// The filters after the mileage rule (for candidates already inside its range).
fn filter_after_mileage(
    c: &CandidateRow,
    subject: &SubjectKey,
    rules: &ComparableRules,
    as_of: NaiveDate,
) -> Option<&'static str> {
    filters_after_mileage(
        FilterValues {
            listed_day: c.listed_day,
            distance_miles: c.distance_miles,
            variant: c.variant,
            included: c.included,
        },
        subject,
        rules,
        i64::from(as_of.num_days_from_ce()),
    )
}

/// What the filters after the mileage rule read of a candidate.
#[derive(Clone, Copy)]
struct FilterValues {
    listed_day: Option<i32>,
    distance_miles: Option<f32>,
    variant: NameId,
    included: bool,
}

/// The filters after the mileage rule, in their order; `as_of_day` is the appraisal date's day
/// number. The one place their rules are written.
#[inline]
fn filters_after_mileage(
    c: FilterValues,
    subject: &SubjectKey,
    rules: &ComparableRules,
    as_of_day: i64,
) -> Option<&'static str> {
    if let Some(listed) = c.listed_day {
        let days = as_of_day - i64::from(listed);
        if days < 0 {
            return Some("listed_after_appraisal_date");
        }
        if rules
            .max_listing_age_days
            .is_some_and(|limit| days > i64::from(limit))
        {
            return Some("listing_too_old");
        }
    }
    if let (Some(limit), Some(d)) = (rules.max_distance_miles, c.distance_miles) {
        if f64::from(d) > limit {
            return Some("too_far");
        }
    }
    if rules.same_variant_only && c.variant != subject.variant {
        return Some("other_variant");
    }
    if !c.included {
        return Some("excluded_by_cleaning");
    }
    None
}

/// Checks one listing against the hard filters.
#[must_use]
pub fn filter_breaks(
    market: &Market,
    row: usize,
    subject: &SubjectKey,
    rules: &ComparableRules,
    as_of: NaiveDate,
) -> Vec<RuleBreak> {
    let mut breaks = Vec::new();
    let years_apart = market.model_year[row].abs_diff(subject.model_year);
    let years_apart = i32::try_from(years_apart).unwrap_or(i32::MAX);
    if years_apart > rules.model_year_window {
        breaks.push(RuleBreak::ModelYearOutsideWindow {
            years_apart,
            window: rules.model_year_window,
        });
    }
    if let Some(b) = rules.mileage.check(subject.miles, market.miles[row]) {
        breaks.push(b);
    }
    if let Some(listed) = market.listed_on[row] {
        let days = (as_of - listed).num_days();
        if days < 0 {
            breaks.push(RuleBreak::ListedAfterAppraisalDate { days: -days });
        } else if let Some(limit) = rules.max_listing_age_days.filter(|&l| days > i64::from(l)) {
            breaks.push(RuleBreak::ListingTooOld { days, limit });
        }
    }
    if let (Some(limit), Some(d)) = (rules.max_distance_miles, market.distance_miles[row]) {
        if f64::from(d) > limit {
            breaks.push(RuleBreak::TooFar {
                miles: f64::from(d),
                limit,
            });
        }
    }
    if rules.same_variant_only && market.variant[row] != subject.variant {
        breaks.push(RuleBreak::OtherVariant);
    }
    breaks
}

/// What the comparable search reads of one candidate, stored contiguously by model year so a
/// search over a million-listing market reads sequential memory.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CandidateRow {
    /// Market row.
    pub row: usize,
    /// Model year.
    pub model_year: i32,
    /// Miles.
    pub miles: f64,
    /// Listing date.
    pub listed_on: Option<NaiveDate>,
    /// The listing date as a day number (days from the common era), so that "days listed" is
    /// one subtraction of integers.
    pub listed_day: Option<i32>,
    /// Distance in miles.
    pub distance_miles: Option<f32>,
    /// Variant id.
    pub variant: NameId,
    /// Condition.
    pub condition: Condition,
    /// Whether cleaning kept it.
    pub included: bool,
}

/// Candidate rows grouped by model year and ordered by miles within each year, so a search
/// visits only the subject's year window and, within it, only the mileage the rule allows (the
/// rows outside are counted, not visited).
#[derive(Debug, Clone, Default, PartialEq)]
pub struct CandidateIndex {
    by_year: BTreeMap<i32, YearRows>,
    total: usize,
}

/// One model year's candidates in miles order, with the values the filter pass reads kept
/// beside them column by column: the pass over tens of thousands of candidates reads a dozen
/// bytes of each, not its whole record.
#[derive(Debug, Clone, Default)]
struct YearRows {
    rows: Vec<CandidateRow>,
    listed_day: Vec<Option<i32>>,
    distance_miles: Vec<Option<f32>>,
    variant: Vec<NameId>,
    included: Vec<bool>,
}

impl PartialEq for YearRows {
    /// The columns are copies of the rows' values.
    fn eq(&self, other: &Self) -> bool {
        self.rows == other.rows
    }
}

impl YearRows {
    fn from_rows(rows: Vec<CandidateRow>) -> Self {
        Self {
            listed_day: rows.iter().map(|c| c.listed_day).collect(),
            distance_miles: rows.iter().map(|c| c.distance_miles).collect(),
            variant: rows.iter().map(|c| c.variant).collect(),
            included: rows.iter().map(|c| c.included).collect(),
            rows,
        }
    }

    fn values(&self, i: usize) -> FilterValues {
        FilterValues {
            listed_day: self.listed_day[i],
            distance_miles: self.distance_miles[i],
            variant: self.variant[i],
            included: self.included[i],
        }
    }
}

impl CandidateIndex {
    /// Indexes `rows` (any order) of `market`, with cleaning's verdict on each.
    #[must_use]
    pub fn new(market: &Market, rows: &[usize], cleaning: &SegmentCleaning) -> Self {
        let mut by_year: BTreeMap<i32, Vec<CandidateRow>> = BTreeMap::new();
        for &row in rows {
            by_year
                .entry(market.model_year[row])
                .or_default()
                .push(CandidateRow {
                    row,
                    model_year: market.model_year[row],
                    miles: market.miles[row],
                    listed_on: market.listed_on[row],
                    listed_day: market.listed_on[row].map(|d| d.num_days_from_ce()),
                    distance_miles: market.distance_miles[row],
                    variant: market.variant[row],
                    condition: market.condition[row],
                    included: cleaning.is_included(row),
                });
        }
        let by_year = by_year
            .into_iter()
            .map(|(year, mut v)| {
                v.sort_unstable_by(|a, b| a.miles.total_cmp(&b.miles).then(a.row.cmp(&b.row)));
                (year, YearRows::from_rows(v))
            })
            .collect();
        Self {
            by_year,
            total: rows.len(),
        }
    }

    /// Number of rows indexed.
    #[must_use]
    pub fn len(&self) -> usize {
        self.total
    }

    /// Whether no row is indexed.
    #[must_use]
    pub fn is_empty(&self) -> bool {
        self.total == 0
    }

    /// The candidate record of `row` of `market`, if it is a candidate.
    #[must_use]
    pub fn get(&self, market: &Market, row: usize) -> Option<&CandidateRow> {
        let rows = &self.by_year.get(&market.model_year[row])?.rows;
        // By miles first: the row is among those at its own mileage.
        let miles = market.miles[row];
        let from = rows.partition_point(|c| c.miles.total_cmp(&miles).is_lt());
        rows[from..]
            .iter()
            .take_while(|c| c.miles.total_cmp(&miles).is_eq())
            .find(|c| c.row == row)
    }

    /// Each model year's candidates in the window, ordered by miles.
    fn years(&self, first_year: i32, last_year: i32) -> impl Iterator<Item = &YearRows> {
        self.by_year
            .range(first_year..=last_year)
            .map(|(_, rows)| rows)
    }
}

/// The codes of the mileage rule's two breaks, as [`RuleBreak::code`] gives them.
const MILES_UNDER: &str = "miles_under_limit";
const MILES_OVER: &str = "miles_over_limit";

/// Listings stopped, by the code of the first filter each failed: a few codes, counted in a
/// short list (a map keyed by text cost a tenth of a search's time).
#[derive(Default)]
struct StopCounts(Vec<(&'static str, usize)>);

impl StopCounts {
    fn add(&mut self, code: &'static str, n: usize) {
        // The same literal nearly always: its address is compared before its text.
        match self
            .0
            .iter_mut()
            .find(|(c, _)| std::ptr::eq(*c, code) || *c == code)
        {
            Some((_, count)) => *count += n,
            None => self.0.push((code, n)),
        }
    }
}

/// What a search's window holds: the candidates passing every filter (each model year's run in
/// miles order), their ranges, and the count stopped by each filter.
struct Window<'c> {
    passing: Vec<&'c CandidateRow>,
    runs: Vec<std::ops::Range<usize>>,
    spans: Spans,
    stopped: StopCounts,
    inside: usize,
}

/// Applies the hard filters to the candidates of the subject's model-year window.
fn scan_window<'c>(
    market: &Market,
    candidates: &'c CandidateIndex,
    subject: &SubjectKey,
    rules: &ComparableRules,
    choices: &ComparableChoices,
    as_of: NaiveDate,
) -> Window<'c> {
    let mut stopped = StopCounts::default();
    let window = rules.model_year_window.max(0);
    let (first, last) = (
        subject.model_year.saturating_sub(window),
        subject.model_year.saturating_add(window),
    );
    let mut in_window = 0usize;
    let mut passing: Vec<&CandidateRow> = Vec::new();
    let mut spans = Spans::default();
    // Each model year's passing rows, in miles order.
    let mut runs: Vec<std::ops::Range<usize>> = Vec::new();
    let hand_picked = !choices.include.is_empty() || !choices.exclude.is_empty();
    // Ok(true): passes; Ok(false): kept by hand, handled below with every rule it breaks;
    // Err: the first filter it fails.
    let verdict = |c: &CandidateRow| -> Result<bool, &'static str> {
        let line = if hand_picked { market.line[c.row] } else { 0 };
        if hand_picked && choices.include.contains(&line) {
            return Ok(false);
        }
        match first_failing_filter(c, subject, rules, as_of).or_else(|| {
            (hand_picked && choices.exclude.contains(&line)).then_some("excluded_by_hand")
        }) {
            Some(code) => Err(code),
            None => Ok(true),
        }
    };
    let as_of_day = i64::from(as_of.num_days_from_ce());
    for year in candidates.years(first, last) {
        let rows = &year.rows;
        in_window += rows.len();
        // By hand, every row is visited (a row kept by hand is not counted as stopped);
        // otherwise the rows outside the mileage rule are counted without a visit.
        let (from, to) = if hand_picked {
            (0, rows.len())
        } else {
            rules.mileage.passing_range(rows, subject.miles)
        };
        if from > 0 {
            stopped.add(MILES_UNDER, from);
        }
        if to < rows.len() {
            stopped.add(MILES_OVER, rows.len() - to);
        }
        let run_start = passing.len();
        let as_of_day_f64 = f64::from(as_of.num_days_from_ce());
        if hand_picked {
            for c in &rows[from..to] {
                match verdict(c) {
                    Ok(true) => {
                        spans.add(c, as_of);
                        passing.push(c);
                    }
                    Ok(false) => {}
                    Err(code) => stopped.add(code, 1),
                }
            }
        } else {
            // Inside the mileage range: the other filters on the year's filter columns.
            for (i, c) in rows.iter().enumerate().take(to).skip(from) {
                let values = year.values(i);
                match filters_after_mileage(values, subject, rules, as_of_day) {
                    None => {
                        spans.add_filter_values(
                            values.distance_miles,
                            values.listed_day,
                            as_of_day_f64,
                        );
                        passing.push(c);
                    }
                    Some(code) => stopped.add(code, 1),
                }
            }
            spans.add_run(&passing[run_start..]);
        }
        runs.push(run_start..passing.len());
    }
    Window {
        passing,
        runs,
        spans,
        stopped,
        inside: in_window,
    }
}

/// Chooses comparables for `subject` among the indexed candidates. Filters apply in this order,
/// and a listing is counted under the first it fails: model-year window, mileage, listing age,
/// distance, variant, cleaning exclusions, then the appraiser's exclusions.
#[must_use]
pub fn choose_comparables(
    market: &Market,
    cleaning: &SegmentCleaning,
    candidates: &CandidateIndex,
    subject: &SubjectKey,
    rules: &ComparableRules,
    choices: &ComparableChoices,
    as_of: NaiveDate,
) -> ComparableSelection {
    let Window {
        passing,
        runs,
        mut spans,
        mut stopped,
        inside: in_window,
    } = scan_window(market, candidates, subject, rules, choices, as_of);
    let outside = candidates.len() - in_window;
    if outside > 0 {
        stopped.add("model_year_outside_window", outside);
    }
    let stopped_by: BTreeMap<String, usize> = stopped
        .0
        .into_iter()
        .map(|(k, v)| (k.to_owned(), v))
        .collect();
    let forced: Vec<(&CandidateRow, Vec<RuleBreak>)> = choices
        .include
        .iter()
        .filter_map(|line| market.line.binary_search(line).ok())
        .filter(|&row| !choices.exclude.contains(&market.line[row]))
        .filter_map(|row| candidates.get(market, row))
        .map(|c| {
            let mut breaks = filter_breaks(market, c.row, subject, rules, as_of);
            if !c.included {
                if let Some(e) = cleaning.exclusion_of(c.row) {
                    breaks.push(RuleBreak::Excluded {
                        code: e.code().to_owned(),
                    });
                }
            }
            (c, breaks)
        })
        .collect();
    let passed = passing.len();
    for (c, _) in &forced {
        spans.add(c, as_of);
    }
    let ranges = spans.ranges(subject);
    let distance = |c: &CandidateRow| gower_to_subject(c, subject, &rules.weights, &ranges, as_of);
    // Most similar first; ties to the more recent listing, then file order (rows are in file order).
    let order = |a: &(&CandidateRow, f64), b: &(&CandidateRow, f64)| {
        a.1.total_cmp(&b.1)
            .then_with(|| b.0.listed_on.cmp(&a.0.listed_on))
            .then_with(|| a.0.row.cmp(&b.0.row))
    };
    let slots = rules.count.saturating_sub(forced.len());
    let mut ranked: Vec<(&CandidateRow, f64)> = if slots > 0 && passing.len() > slots {
        nearest(
            &passing, &runs, slots, subject, rules, &ranges, &distance, &order,
        )
    } else {
        passing.into_iter().map(|c| (c, distance(c))).collect()
    };
    if ranked.len() > slots && slots > 0 {
        ranked.select_nth_unstable_by(slots - 1, order);
        ranked.truncate(slots);
    }
    ranked.sort_by(order);
    let mut chosen: Vec<ChosenComparable> = forced
        .into_iter()
        .map(|(c, breaks)| ChosenComparable {
            row: c.row,
            gower_distance: distance(c),
            manual: true,
            breaks,
        })
        .collect();
    chosen.extend(
        ranked
            .into_iter()
            .take(slots)
            .map(|(c, d)| ChosenComparable {
                row: c.row,
                gower_distance: d,
                manual: false,
                breaks: Vec::new(),
            }),
    );
    chosen.sort_by(|a, b| a.gower_distance.total_cmp(&b.gower_distance));
    ComparableSelection {
        chosen,
        considered: candidates.len(),
        passed,
        stopped_by,
    }
}

/// A candidate with its distance to the subject.
type Ranked<'c> = (&'c CandidateRow, f64);

/// The `slots` passing candidates nearest the subject under `order`, without working out every
/// candidate's distance: each model year's run is walked outward from the subject's mileage,
/// and a direction stops once the mileage part alone puts a candidate's distance above the
/// farthest kept (the distance is a weighted mean of parts that are never negative, so the
/// mileage part over the sum of all weights bounds it from below). The result is the one a full
/// sort gives, candidate for candidate; the bound is only trusted when it is clearly above.
#[allow(clippy::too_many_arguments)]
fn nearest<'c>(
    passing: &[&'c CandidateRow],
    runs: &[std::ops::Range<usize>],
    slots: usize,
    subject: &SubjectKey,
    rules: &ComparableRules,
    ranges: &Ranges,
    distance: &dyn Fn(&CandidateRow) -> f64,
    order: &dyn Fn(&Ranked<'c>, &Ranked<'c>) -> std::cmp::Ordering,
) -> Vec<(&'c CandidateRow, f64)> {
    let w = &rules.weights;
    let all_weight: f64 = [
        w.model_year,
        w.miles,
        w.variant,
        w.condition,
        w.distance,
        w.days_listed,
    ]
    .into_iter()
    .filter(|&x| x > 0.0)
    .sum();
    // The year and mileage parts, computed as the distance computes them; the parts that are
    // not counted are at least zero, and a missing part only raises the distance.
    let part = |weight: f64, a: f64, b: f64, range: f64| {
        if weight > 0.0 && range > 0.0 {
            weight * ((a - b).abs() / range).min(1.0)
        } else {
            0.0
        }
    };
    let bound = |c: &CandidateRow| {
        if all_weight > 0.0 {
            (part(
                w.model_year,
                f64::from(subject.model_year),
                f64::from(c.model_year),
                ranges.model_year,
            ) + part(w.miles, subject.miles, c.miles, ranges.miles))
                / all_weight
        } else {
            0.0
        }
    };
    let mut best: Vec<(&'c CandidateRow, f64)> = Vec::with_capacity(slots + 1);
    // Whether `c` cannot be among the nearest: the bound clearly above the farthest kept.
    let beyond = |best: &Vec<(&'c CandidateRow, f64)>, c: &CandidateRow| {
        best.len() == slots
            && best
                .last()
                .is_some_and(|&(_, far)| bound(c) > far * (1.0 + 1e-9) + 1e-12)
    };
    let consider = |best: &mut Vec<(&'c CandidateRow, f64)>, c: &'c CandidateRow| {
        let item = (c, distance(c));
        if best.len() == slots {
            match best.last() {
                Some(last) if order(&item, last).is_lt() => {
                    best.pop();
                }
                _ => return,
            }
        }
        let at = best.partition_point(|b| order(b, &item).is_lt());
        best.insert(at, item);
    };
    // The subject's own model year first: its nearest fill the list soonest, and the other
    // years' runs then stop sooner.
    let mut runs: Vec<&std::ops::Range<usize>> = runs.iter().filter(|r| !r.is_empty()).collect();
    runs.sort_by_key(|r| (passing[r.start].model_year - subject.model_year).abs());
    for run in runs {
        let rows = &passing[run.clone()];
        let start = rows.partition_point(|c| c.miles < subject.miles);
        for &c in &rows[start..] {
            if beyond(&best, c) {
                break;
            }
            consider(&mut best, c);
        }
        for &c in rows[..start].iter().rev() {
            if beyond(&best, c) {
                break;
            }
            consider(&mut best, c);
        }
    }
    best
}

/// Ranges of the numeric attributes over the candidate pool and the subject (Gower's ranges
/// are taken over the sample compared).
struct Ranges {
    model_year: f64,
    miles: f64,
    distance: f64,
    days_listed: f64,
}

#[cfg(test)]
impl Ranges {
    fn over<'a>(
        pool: impl Iterator<Item = &'a CandidateRow>,
        subject: &SubjectKey,
        as_of: NaiveDate,
    ) -> Self {
        let mut spans = Spans::default();
        for c in pool {
            spans.add(c, as_of);
        }
        spans.ranges(subject)
    }
}

/// The lowest and highest of each numeric attribute over a pool, gathered one candidate at a
/// time (during the filter pass, so the pool is not read twice).
#[derive(Debug, Clone, Copy)]
struct Spans([(f64, f64); 4]);

impl Default for Spans {
    fn default() -> Self {
        Self([(f64::INFINITY, f64::NEG_INFINITY); 4])
    }
}

impl Spans {
    const YEAR: usize = 0;
    const MILES: usize = 1;

    fn add(&mut self, c: &CandidateRow, as_of: NaiveDate) {
        self.take(Self::YEAR, f64::from(c.model_year));
        self.take(Self::MILES, c.miles);
        self.add_distance_and_days(c, as_of);
    }

    /// The distance and days listed of `c` only: within one model year's run in miles order,
    /// the year and the miles are taken from the run's ends ([`Self::add_run`]).
    fn add_distance_and_days(&mut self, c: &CandidateRow, as_of: NaiveDate) {
        self.add_filter_values(
            c.distance_miles,
            c.listed_day,
            f64::from(as_of.num_days_from_ce()),
        );
    }

    /// [`Self::add_distance_and_days`] from the year's filter columns (the record itself is
    /// not read: in the filter pass that read was a sixth of the search's time).
    fn add_filter_values(
        &mut self,
        distance_miles: Option<f32>,
        listed_day: Option<i32>,
        as_of_day: f64,
    ) {
        if let Some(d) = distance_miles {
            self.take(2, f64::from(d));
        }
        if let Some(days) = listed_day.map(|d| as_of_day - f64::from(d)) {
            self.take(3, days);
        }
    }

    /// The year and the lowest and highest miles of a run of one model year in miles order.
    fn add_run(&mut self, run: &[&CandidateRow]) {
        if let (Some(first), Some(last)) = (run.first(), run.last()) {
            self.take(Self::YEAR, f64::from(first.model_year));
            self.take(Self::MILES, first.miles);
            self.take(Self::MILES, last.miles);
        }
    }

    fn take(&mut self, k: usize, v: f64) {
        let (lo, hi) = &mut self.0[k];
        if v < *lo {
            *lo = v;
        }
        if v > *hi {
            *hi = v;
        }
    }

    /// The ranges with the subject's year and miles, and the subject's distance 0 and "listed
    /// today", taken in.
    fn ranges(mut self, subject: &SubjectKey) -> Ranges {
        let with = [f64::from(subject.model_year), subject.miles, 0.0, 0.0];
        for ((lo, hi), v) in self.0.iter_mut().zip(with) {
            *lo = lo.min(v);
            *hi = hi.max(v);
        }
        let span = |(lo, hi): (f64, f64)| if hi > lo { hi - lo } else { 0.0 };
        Ranges {
            model_year: span(self.0[0]),
            miles: span(self.0[1]),
            distance: span(self.0[2]),
            days_listed: span(self.0[3]),
        }
    }
}

/// Days from a candidate's listing to the appraisal date.
fn days_listed(c: &CandidateRow, as_of: NaiveDate) -> Option<f64> {
    c.listed_day
        .map(|d| f64::from(as_of.num_days_from_ce()) - f64::from(d))
}

fn gower_to_subject(
    c: &CandidateRow,
    subject: &SubjectKey,
    w: &GowerWeights,
    ranges: &Ranges,
    as_of: NaiveDate,
) -> f64 {
    let parts = [
        (
            GowerPart::Numeric {
                a: Some(f64::from(subject.model_year)),
                b: Some(f64::from(c.model_year)),
                range: ranges.model_year,
            },
            w.model_year,
        ),
        (
            GowerPart::Numeric {
                a: Some(subject.miles),
                b: Some(c.miles),
                range: ranges.miles,
            },
            w.miles,
        ),
        (
            GowerPart::Categorical(Some(subject.variant == c.variant)),
            w.variant,
        ),
        (
            GowerPart::Categorical(Some(subject.condition == c.condition)),
            w.condition,
        ),
        // The subject sits at distance 0 and is "listed today".
        (
            GowerPart::Numeric {
                a: Some(0.0),
                b: c.distance_miles.map(f64::from),
                range: ranges.distance,
            },
            w.distance,
        ),
        (
            GowerPart::Numeric {
                a: Some(0.0),
                b: days_listed(c, as_of),
                range: ranges.days_listed,
            },
            w.days_listed,
        ),
    ];
    gower_distance(&parts).unwrap_or(1.0)
}

impl std::fmt::Display for MileageRule {
    /// "at most the greater of 4,000 mi or 10 % above the subject; no limit below".
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        use crate::format::thousands;
        let side = |a: Option<Allowance>, which: &str| match a {
            Some(a) => format!(
                "at most the greater of {} mi or {} % {which} the subject",
                thousands(a.miles),
                a.percent
            ),
            None => format!("no limit {which}"),
        };
        write!(
            f,
            "{}; {}",
            side(self.max_over, "above"),
            side(self.max_under, "below")
        )
    }
}

#[cfg(test)]
mod tests {
    use rand::{Rng, SeedableRng};

    use super::*;

    /// The walk outward from the subject's mileage keeps exactly the candidates a full sort
    /// keeps, in the same order, on random pools with many ties (whole-thousand miles, a few
    /// dates and variants) and any count.
    #[test]
    fn the_nearest_walk_keeps_what_a_full_sort_keeps() {
        let mut rng = rand_chacha::ChaCha8Rng::seed_from_u64(7);
        let as_of = NaiveDate::from_ymd_opt(2026, 12, 1).unwrap_or_default();
        for case in 0..300 {
            let n = rng.random_range(1..400);
            let mut rows: Vec<CandidateRow> = (0..n)
                .map(|row| {
                    let listed = as_of - chrono::TimeDelta::days(rng.random_range(0..5));
                    CandidateRow {
                        row,
                        model_year: 2020 + rng.random_range(0..3),
                        miles: f64::from(rng.random_range(0..60)) * 1_000.0,
                        listed_on: Some(listed),
                        listed_day: Some(listed.num_days_from_ce()),
                        distance_miles: (rng.random_range(0..4) > 0)
                            .then(|| rng.random_range(0..3) as f32 * 10.0),
                        variant: rng.random_range(0..3),
                        condition: Condition::Used,
                        included: true,
                    }
                })
                .collect();
            rows.sort_by(|a, b| {
                a.model_year
                    .cmp(&b.model_year)
                    .then(a.miles.total_cmp(&b.miles))
                    .then(a.row.cmp(&b.row))
            });
            let passing: Vec<&CandidateRow> = rows.iter().collect();
            let mut runs = Vec::new();
            let mut start = 0;
            for i in 1..=passing.len() {
                if i == passing.len() || passing[i].model_year != passing[start].model_year {
                    runs.push(start..i);
                    start = i;
                }
            }
            let subject = SubjectKey {
                model_year: 2021,
                miles: f64::from(rng.random_range(0..60)) * 1_000.0,
                variant: 1,
                condition: Condition::Used,
            };
            let rules = ComparableRules::default();
            let ranges = Ranges::over(passing.iter().copied(), &subject, as_of);
            let distance =
                |c: &CandidateRow| gower_to_subject(c, &subject, &rules.weights, &ranges, as_of);
            let order = |a: &(&CandidateRow, f64), b: &(&CandidateRow, f64)| {
                a.1.total_cmp(&b.1)
                    .then_with(|| b.0.listed_on.cmp(&a.0.listed_on))
                    .then_with(|| a.0.row.cmp(&b.0.row))
            };
            let slots = rng.random_range(1..12);
            let walked = nearest(
                &passing, &runs, slots, &subject, &rules, &ranges, &distance, &order,
            );
            let mut sorted: Vec<(&CandidateRow, f64)> =
                passing.iter().map(|&c| (c, distance(c))).collect();
            sorted.sort_by(order);
            sorted.truncate(slots);
            let rows_of =
                |v: &[(&CandidateRow, f64)]| v.iter().map(|(c, _)| c.row).collect::<Vec<_>>();
            assert_eq!(rows_of(&walked), rows_of(&sorted), "case {case}");
        }
    }
}
