//! One appraisal, end to end: clean and fit the subject's segment once ([`fit_market`]), then
//! choose, adjust and reconcile comparables for a subject ([`appraise`]), cheaply enough to run
//! again on every change of the subject.

use chrono::NaiveDate;
use linfa::ParamGuard;
use serde::{Deserialize, Serialize};

use crate::adjustment::{
    AdjustmentLine, SubjectTerms, UserAdjustment, model_lines, net_and_gross, user_lines,
};
use crate::clean::{CleaningRules, Overrides, SegmentCleaning, clean_segment};
use crate::comparables::{
    CandidateIndex, ComparableChoices, ComparableRules, RuleBreak, SubjectKey, choose_comparables,
};
use crate::hedonic::market_time::{IndexError, MonthlyIndex, monthly_index};
use crate::hedonic::premium_fade::{PremiumFadeTest, VariantSlopes, test_premium_fade};
use crate::hedonic::{
    AgeForm, AgeFormChoice, Attributes, FitError, HedonicModel, HedonicParams, ValueEstimate,
    age_years, choose_age_form,
};
use crate::market::{Listing, Market, Segment};
use crate::reconcile::{BandRule, ReconcileInput, Reconciliation, reconcile};
use crate::subject::Subject;
use crate::vocabulary::NO_NAME;
use crate::warnings::Warning;

/// Why an appraisal could not be made.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum AppraisalError {
    /// The subject's make and model are not in the market.
    #[error("the market has no {make} {model}; it holds: {available}")]
    UnknownSegment {
        /// Make asked for.
        make: String,
        /// Model asked for.
        model: String,
        /// Segments present.
        available: String,
    },
    /// The subject's variant has no listing in the fitted market.
    #[error("variant '{variant}' has no usable listings for this model; known variants: {known}")]
    UnknownVariant {
        /// Variant asked for.
        variant: String,
        /// Variants present.
        known: String,
    },
    /// The subject's condition class has no listing in the fitted market.
    #[error(
        "no usable {condition} listings for this model, so the market cannot price that condition"
    )]
    UnknownCondition {
        /// Condition asked for.
        condition: String,
    },
    /// The level is not strictly between 0 and 1.
    #[error("level {} must be strictly between 0 and 1 (e.g. 0.8)", crate::format::number(*.0))]
    BadLevel(f64),
    /// A number given for the appraisal is outside what it allows.
    #[error("{what} = {} is not valid: {allowed}", crate::format::number(*.value))]
    BadInput {
        /// What it is.
        what: &'static str,
        /// Its value.
        value: f64,
        /// What is allowed.
        allowed: &'static str,
    },
    /// The fit failed.
    #[error(transparent)]
    Fit(#[from] FitError),
}

/// Settings of the market fit.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct FitSettings {
    /// Age form.
    pub age_form: AgeForm,
    /// Huber robust fit.
    pub robust: bool,
    /// Appraisal date (ages, listing ages); the market's latest date when `None`.
    pub as_of: Option<NaiveDate>,
    /// Cleaning rules.
    pub cleaning: CleaningRules,
    /// Whether the market-conditions term may enter the fit (it does when the listing dates
    /// allow; see [`crate::hedonic::market_time`]). Sessions before format 5 had no such term
    /// and read as `false`, so they replay as they were saved.
    #[serde(default)]
    pub market_time: bool,
    /// Whether each variant gets its own age slope (see
    /// [`crate::hedonic::premium_fade`]). Sessions before format 5 read as `never`.
    #[serde(default = "VariantSlopes::never")]
    pub variant_slopes: VariantSlopes,
    /// Whether options stated on enough listings get their own terms (see
    /// [`crate::equipment`]). Sessions before format 5 read as `false`.
    #[serde(default)]
    pub equipment: bool,
}

impl Default for FitSettings {
    fn default() -> Self {
        Self {
            age_form: AgeForm::default(),
            robust: false,
            as_of: None,
            cleaning: CleaningRules::default(),
            market_time: true,
            variant_slopes: VariantSlopes::Auto,
            equipment: true,
        }
    }
}

impl FitSettings {
    /// The appraisal date for `market`: the setting, else the market's latest listing or sale
    /// date, else today.
    #[must_use]
    pub fn as_of_for(&self, market: &Market) -> NaiveDate {
        self.as_of_with_source(market).0
    }

    /// The appraisal date for `market` and where it came from.
    #[must_use]
    pub fn as_of_with_source(&self, market: &Market) -> (NaiveDate, AsOfSource) {
        if let Some(d) = self.as_of {
            return (d, AsOfSource::Given);
        }
        match market.latest_date() {
            Some(d) => (d, AsOfSource::LatestInMarket),
            None => (crate::import::today(), AsOfSource::Today),
        }
    }
}

/// Where an appraisal date came from.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize, Default)]
#[serde(rename_all = "snake_case")]
pub enum AsOfSource {
    /// Given by the appraiser (`--as-of`, the date of loss, the workbench's setting).
    #[default]
    Given,
    /// The latest listing or sale date in the market file.
    LatestInMarket,
    /// The computer's clock: the file has no dates and none was given.
    Today,
}

/// A cleaned and fitted segment.
#[derive(Debug, Clone)]
pub struct MarketFit {
    /// The segment.
    pub segment: Segment,
    /// Appraisal date used.
    pub as_of: NaiveDate,
    /// Cleaning outcome.
    pub cleaning: SegmentCleaning,
    /// The fitted model.
    pub model: HedonicModel,
    /// Rows used (cleaning's included rows), cached.
    pub included_rows: Vec<usize>,
    /// Every row of the segment by model year, for the comparable search.
    pub candidates: CandidateIndex,
    /// Where the appraisal date came from.
    pub as_of_source: AsOfSource,
    /// Whether any listing of the segment has a listing or sale date.
    pub segment_dated: bool,
    /// The age form the data chose, when the settings asked for `auto`.
    pub age_form_choice: Option<AgeFormChoice>,
    /// The market's monthly index (80 % band), when the fit has the market-conditions term,
    /// or why none could be made.
    pub market_index: Option<Result<MonthlyIndex, IndexError>>,
    /// The F test of variant age slopes (not made when they are switched off), or why it could
    /// not be made.
    pub premium_fade: Option<Result<PremiumFadeTest, String>>,
}

/// Band level of the market's monthly index.
pub const MARKET_INDEX_LEVEL: f64 = 0.8;

impl MarketFit {
    /// What the fitted market cannot vouch for, whatever the subject (empty when nothing is
    /// wrong); see [`crate::guards::fit_warnings`].
    #[must_use]
    pub fn warnings(&self) -> Vec<Warning> {
        crate::guards::fit_warnings(self)
    }
}

/// Finds a segment by name, with an error listing what the market holds.
pub fn find_segment(market: &Market, make: &str, model: &str) -> Result<Segment, AppraisalError> {
    market
        .find_segment(make, model)
        .ok_or_else(|| AppraisalError::UnknownSegment {
            make: make.to_owned(),
            model: model.to_owned(),
            available: segment_list(market),
        })
}

/// "Quellmark Tessel (5,012), ..." for messages.
#[must_use]
pub fn segment_list(market: &Market) -> String {
    market
        .segments()
        .iter()
        .map(|(s, n)| {
            format!(
                "{} ({})",
                market.segment_name(*s),
                crate::format::thousands(*n as f64)
            )
        })
        .collect::<Vec<_>>()
        .join(", ")
}

/// Cleans and fits one segment.
pub fn fit_market(
    market: &Market,
    segment: Segment,
    settings: &FitSettings,
    overrides: &Overrides,
) -> Result<MarketFit, AppraisalError> {
    let (as_of, as_of_source) = settings.as_of_with_source(market);
    let cleaning = clean_segment(
        market,
        segment,
        &settings.cleaning,
        settings.age_form,
        as_of,
        overrides,
    );
    let included_rows = cleaning.included_rows();
    let age_form_choice = (settings.age_form == AgeForm::Auto).then(|| {
        choose_age_form(
            market,
            &included_rows,
            as_of,
            settings.market_time,
            settings.equipment,
        )
    });
    let age_form = age_form_choice
        .as_ref()
        .map_or(settings.age_form, |c| c.chosen);
    let premium_fade = (settings.variant_slopes != VariantSlopes::Never).then(|| {
        test_premium_fade(
            market,
            &included_rows,
            as_of,
            age_form,
            settings.market_time,
            settings.equipment,
        )
    });
    let variant_slopes = match settings.variant_slopes {
        VariantSlopes::Never => false,
        VariantSlopes::Always => true,
        VariantSlopes::Auto => premium_fade
            .as_ref()
            .is_some_and(|t| t.as_ref().is_ok_and(PremiumFadeTest::supported)),
    };
    let params = HedonicParams::new(as_of)
        .age_form(age_form)
        .robust(settings.robust)
        .market_time(settings.market_time)
        .variant_slopes(variant_slopes)
        .equipment(settings.equipment)
        .check()?;
    let segment_dated = cleaning
        .rows
        .iter()
        .any(|&r| market.listed_on[r].is_some() || market.sold_on[r].is_some());
    // The comparables' index needs only the cleaning: build it while the model is fitted.
    let (model, candidates) = std::thread::scope(|scope| {
        let index = scope.spawn(|| CandidateIndex::new(market, &cleaning.rows, &cleaning));
        let model = params.fit(market, &included_rows);
        // A panic there is a bug: pass it on rather than build the index a second time.
        let candidates = index
            .join()
            .unwrap_or_else(|panic| std::panic::resume_unwind(panic));
        (model, candidates)
    });
    let model = model?;
    let market_index = model
        .market_time()
        .in_fit()
        .then(|| monthly_index(&model, market, &included_rows, MARKET_INDEX_LEVEL));
    Ok(MarketFit {
        segment,
        as_of,
        cleaning,
        model,
        included_rows,
        candidates,
        as_of_source,
        segment_dated,
        age_form_choice,
        market_index,
        premium_fade,
    })
}

/// Everything an appraisal request carries besides the market.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct AppraisalRequest {
    /// The subject.
    pub subject: Subject,
    /// Comparable filters and ranking.
    pub rules: ComparableRules,
    /// Manual includes and excludes.
    pub choices: ComparableChoices,
    /// The appraiser's adjustment lines.
    pub user_adjustments: Vec<UserAdjustment>,
    /// Interval level, e.g. 0.8.
    pub level: f64,
}

impl AppraisalRequest {
    /// A request with default rules at the 80 % level.
    #[must_use]
    pub fn new(subject: Subject) -> Self {
        Self {
            subject,
            rules: ComparableRules::default(),
            choices: ComparableChoices::default(),
            user_adjustments: Vec::new(),
            level: 0.8,
        }
    }
}

impl AdjustedComparable {
    /// A comparable with its grid totalled (weight 0 until reconciled).
    #[must_use]
    pub fn new(
        listing: Listing,
        days_listed: Option<i64>,
        gower_distance: f64,
        manual: bool,
        rule_breaks: Vec<RuleBreak>,
        adjustments: Vec<AdjustmentLine>,
    ) -> Self {
        let price = listing.asking_price;
        let (net, gross) = net_and_gross(&adjustments);
        Self {
            listing,
            days_listed,
            gower_distance,
            similarity: 1.0 - gower_distance,
            manual,
            rule_breaks,
            adjustments,
            net_adjustment: net,
            gross_adjustment: gross,
            net_pct: 100.0 * net.abs() / price,
            gross_pct: 100.0 * gross / price,
            adjusted_price: price + net,
            weight: 0.0,
        }
    }
}

/// Reconciles adjusted comparables with the model's estimate under `rule` and writes each
/// one's weight.
pub fn reconcile_comparables(
    comparables: &mut [AdjustedComparable],
    model_estimate: &ValueEstimate,
    model_df: f64,
    level: f64,
    rule: BandRule,
) -> Reconciliation {
    let inputs: Vec<ReconcileInput> = comparables
        .iter()
        .map(|c| ReconcileInput {
            adjusted_price: c.adjusted_price,
            similarity: c.similarity,
            gross_fraction: c.gross_pct / 100.0,
        })
        .collect();
    let reconciliation = reconcile(&inputs, model_estimate, model_df, level, rule);
    for (c, w) in comparables.iter_mut().zip(&reconciliation.weights) {
        c.weight = *w;
    }
    reconciliation
}

/// A comparable with its adjustment grid and weight.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct AdjustedComparable {
    /// The listing, every field.
    pub listing: Listing,
    /// Days listed before the appraisal date.
    pub days_listed: Option<i64>,
    /// Gower distance to the subject.
    pub gower_distance: f64,
    /// 1 - Gower distance.
    pub similarity: f64,
    /// Included by hand.
    pub manual: bool,
    /// Filters it breaks (manual includes only).
    pub rule_breaks: Vec<RuleBreak>,
    /// Adjustment lines.
    pub adjustments: Vec<AdjustmentLine>,
    /// Sum of the lines.
    pub net_adjustment: f64,
    /// Sum of the lines' absolute values.
    pub gross_adjustment: f64,
    /// |net| / price, percent.
    pub net_pct: f64,
    /// gross / price, percent.
    pub gross_pct: f64,
    /// Price + net adjustment.
    pub adjusted_price: f64,
    /// Reconciliation weight (sums to 1 over the comparables).
    pub weight: f64,
}

/// The appraisal's outcome.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Appraisal {
    /// The subject.
    pub subject: Subject,
    /// Appraisal date.
    pub as_of: NaiveDate,
    /// The model's own estimate for the subject.
    pub model_estimate: ValueEstimate,
    /// Comparables, most similar first.
    pub comparables: Vec<AdjustedComparable>,
    /// Listings of the model looked at, and how many passed the filters.
    pub candidates_considered: usize,
    /// Listings passing every filter.
    pub candidates_passed: usize,
    /// Listings stopped by each filter.
    pub stopped_by: std::collections::BTreeMap<String, usize>,
    /// Comparables included by hand that the fitted market cannot adjust, with why; they are
    /// not in the grid or the value (format 3 on).
    #[serde(default)]
    pub refused: Vec<RefusedComparable>,
    /// What the market cannot support about this appraisal: the fit's warnings and the
    /// appraisal's own (format 3 on).
    #[serde(default)]
    pub warnings: Vec<Warning>,
    /// The reconciliation.
    pub reconciliation: Reconciliation,
}

/// `subject` with its make, model and variant written as the market writes them (it may have
/// been typed "QUELLMARK tessel").
fn as_the_market_spells_it(market: &Market, subject: &Subject, terms: &SubjectTerms) -> Subject {
    let spelled = |typed: &str| {
        market
            .names
            .id_ignore_case(typed)
            .map_or_else(|| typed.to_owned(), |id| market.names.name(id).to_owned())
    };
    Subject {
        make: spelled(&subject.make),
        model: spelled(&subject.model),
        variant: (terms.variant != NO_NAME).then(|| market.names.name(terms.variant).to_owned()),
        ..subject.clone()
    }
}

/// A comparable included by hand that could not be adjusted to the subject.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct RefusedComparable {
    /// The listing, every field.
    pub listing: Listing,
    /// Why it cannot be adjusted, in words for the appraiser.
    pub reason: String,
}

/// Why the fitted market cannot adjust the listing on `row`: its variant or condition has no
/// fitted effect (every listing of it was kept out of the fit by cleaning), so a grid line for
/// it would silently treat it as the base level.
fn unadjustable(market: &Market, fit: &MarketFit, row: usize) -> Option<String> {
    let design = fit.model.design();
    if !design.knows_variant(market.variant[row]) {
        return Some(format!(
            "its variant '{}' has no listing in the fit after cleaning, so the market gives no rate to adjust it by; choose another comparable or enter your own variant adjustment on one that can be adjusted",
            market.variant_name(row)
        ));
    }
    if !design.knows_condition(market.condition[row]) {
        return Some(format!(
            "no {} listing is in the fit after cleaning, so the market gives no rate to adjust its condition by; choose another comparable",
            market.condition[row]
        ));
    }
    None
}

/// The subject's attributes in the fitted market's terms, checking that the market can price
/// them.
pub fn subject_terms(
    market: &Market,
    fit: &MarketFit,
    subject: &Subject,
) -> Result<SubjectTerms, AppraisalError> {
    if !(subject.miles.is_finite() && (0.0..=crate::import::MAX_MILES).contains(&subject.miles)) {
        return Err(AppraisalError::BadInput {
            what: "subject miles",
            value: subject.miles,
            allowed: "0 to 1,000,000 miles",
        });
    }
    let design = fit.model.design();
    let variant = match &subject.variant {
        Some(v) => market.names.id_ignore_case(v),
        None => Some(NO_NAME),
    };
    let Some(variant) = variant.filter(|v| design.knows_variant(*v)) else {
        return Err(AppraisalError::UnknownVariant {
            variant: subject.variant.clone().unwrap_or_else(|| "(none)".into()),
            known: design
                .variants
                .iter()
                .map(|&v| {
                    if v == NO_NAME {
                        "(none)".to_owned()
                    } else {
                        market.names.name(v).to_owned()
                    }
                })
                .collect::<Vec<_>>()
                .join(", "),
        });
    };
    if !design.knows_condition(subject.condition) {
        return Err(AppraisalError::UnknownCondition {
            condition: subject.condition.to_string(),
        });
    }
    Ok(SubjectTerms {
        model_year: subject.model_year,
        miles: subject.miles,
        variant,
        condition: subject.condition,
    })
}

/// Appraises `request.subject` against a fitted segment.
pub fn appraise(
    market: &Market,
    fit: &MarketFit,
    request: &AppraisalRequest,
) -> Result<Appraisal, AppraisalError> {
    appraise_among(market, fit, &fit.candidates, request)
}

/// As [`appraise`], choosing comparables only among `candidates` (the backtest holds rows out).
pub fn appraise_among(
    market: &Market,
    fit: &MarketFit,
    candidates: &CandidateIndex,
    request: &AppraisalRequest,
) -> Result<Appraisal, AppraisalError> {
    if !(request.level > 0.0 && request.level < 1.0) {
        return Err(AppraisalError::BadLevel(request.level));
    }
    let terms = subject_terms(market, fit, &request.subject)?;
    let attributes = Attributes {
        age_years: age_years(terms.model_year, fit.model.as_of_year()),
        miles: terms.miles,
        variant: terms.variant,
        condition: terms.condition,
    };
    let model_estimate = fit.model.estimate_equipped(
        &attributes,
        request.subject.options.as_deref().unwrap_or(""),
        request.level,
    );
    let key = SubjectKey {
        model_year: terms.model_year,
        miles: terms.miles,
        variant: terms.variant,
        condition: terms.condition,
    };
    let selection = choose_comparables(
        market,
        &fit.cleaning,
        candidates,
        &key,
        &request.rules,
        &request.choices,
        fit.as_of,
    );
    let (chosen, refused): (Vec<_>, Vec<_>) = selection
        .chosen
        .iter()
        .map(|c| (c, unadjustable(market, fit, c.row)))
        .partition(|(_, why)| why.is_none());
    let refused: Vec<RefusedComparable> = refused
        .into_iter()
        .filter_map(|(c, why)| {
            why.map(|reason| RefusedComparable {
                listing: market.listing(c.row),
                reason,
            })
        })
        .collect();
    let mut comparables: Vec<AdjustedComparable> = chosen
        .into_iter()
        .map(|(c, _)| {
            let mut adjustments = model_lines(
                &fit.model,
                market,
                c.row,
                &terms,
                request.subject.options.as_deref().unwrap_or(""),
            );
            adjustments.extend(user_lines(&request.user_adjustments, market.line[c.row]));
            AdjustedComparable::new(
                market.listing(c.row),
                market.listed_on[c.row].map(|d| (fit.as_of - d).num_days()),
                c.gower_distance,
                c.manual,
                c.breaks.clone(),
                adjustments,
            )
        })
        .collect();
    let reconciliation = reconcile_comparables(
        &mut comparables,
        &model_estimate,
        fit.model.df_residual() as f64,
        request.level,
        crate::reconcile::BAND_RULE,
    );
    let warnings = crate::guards::appraisal_warnings(&crate::guards::AppraisalFacts {
        fit,
        model_year: terms.model_year,
        miles: terms.miles,
        subject_vin: request.subject.vin.as_deref(),
        comparables_asked: request.rules.count,
        comparables: &comparables,
        refused: &refused,
        model_median: model_estimate.median,
        reconciliation: &reconciliation,
    });
    Ok(Appraisal {
        subject: as_the_market_spells_it(market, &request.subject, &terms),
        as_of: fit.as_of,
        model_estimate,
        comparables,
        candidates_considered: selection.considered,
        candidates_passed: selection.passed,
        stopped_by: selection.stopped_by,
        warnings,
        refused,
        reconciliation,
    })
}
