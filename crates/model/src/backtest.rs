//! K-fold cross-validated accuracy of the fitted model and of the comparables method on the
//! loaded market, so the appraiser sees how well this market supports a value.
//!
//! Each fold's listings are held out; the model is refitted on the rest and each held-out
//! listing is valued as a subject, by the model and (for an evenly spaced sample) by choosing,
//! adjusting and reconciling comparables among the remaining listings only. Asking prices stand
//! in for values, so the errors include the noise of asking prices themselves.

use linfa::ParamGuard;
use rand::SeedableRng;
use rand::seq::SliceRandom;
use rand_chacha::ChaCha8Rng;
use serde::{Deserialize, Serialize};

use crate::appraisal::{AppraisalError, AppraisalRequest, MarketFit, appraise_among};
use crate::comparables::{CandidateIndex, ComparableRules};
use crate::hedonic::HedonicParams;
use crate::market::Market;
use crate::stats;
use crate::subject::Subject;

/// Backtest settings.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct BacktestSettings {
    /// Number of folds.
    pub folds: usize,
    /// Held-out listings valued by comparables per fold (evenly spaced sample).
    pub comparable_subjects_per_fold: usize,
    /// Seed of the fold assignment.
    pub seed: u64,
    /// Interval level.
    pub level: f64,
}

impl Default for BacktestSettings {
    fn default() -> Self {
        Self {
            folds: 5,
            comparable_subjects_per_fold: 100,
            seed: 7,
            level: 0.8,
        }
    }
}

/// Accuracy of one method.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct MethodAccuracy {
    /// Listings valued.
    pub evaluated: usize,
    /// Median of |estimate - asking| / asking, percent.
    pub median_abs_pct_error: f64,
    /// Share of asking prices inside the band (model: prediction interval; comparables: value
    /// band), percent; compare with the level.
    pub band_coverage_pct: f64,
    /// The band's level.
    pub level: f64,
}

/// Backtest results.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Backtest {
    /// Folds used.
    pub folds: usize,
    /// The fitted model's accuracy.
    pub model: MethodAccuracy,
    /// The comparables method's accuracy.
    pub comparables: MethodAccuracy,
    /// Held-out listings that could not be valued (e.g. a variant absent from the training part).
    pub not_valued: usize,
}

/// The factor that carries an estimate (of the appraisal date's market, without options) to
/// each held-out listing's own date and options, by row: it was priced with them.
fn own_date_and_options(
    fit: &MarketFit,
    market: &Market,
    held: &[usize],
) -> std::collections::HashMap<usize, f64> {
    held.iter()
        .copied()
        .zip(fit.model.row_shifts(market, held).into_iter().map(f64::exp))
        .collect()
}

/// Runs the backtest over the fit's included listings.
pub fn backtest(
    market: &Market,
    fit: &MarketFit,
    rules: &ComparableRules,
    settings: &BacktestSettings,
) -> Result<Backtest, AppraisalError> {
    if !(settings.level > 0.0 && settings.level < 1.0) {
        return Err(AppraisalError::BadLevel(settings.level));
    }
    let folds = settings.folds.clamp(2, 20);
    let mut rows = fit.included_rows.clone();
    rows.shuffle(&mut ChaCha8Rng::seed_from_u64(settings.seed));
    let params = HedonicParams::new(fit.as_of)
        .age_form(fit.model.params().age_form)
        .robust(fit.model.params().robust)
        .market_time(fit.model.params().market_time)
        .variant_slopes(fit.model.params().variant_slopes)
        .equipment(fit.model.params().equipment)
        .check()?;
    let mut model_errors = Vec::new();
    let mut model_inside = 0usize;
    let mut comp_errors = Vec::new();
    let mut comp_inside = 0usize;
    let mut not_valued = 0usize;
    for fold in 0..folds {
        let held: Vec<usize> = rows.iter().copied().skip(fold).step_by(folds).collect();
        let mut training: Vec<usize> = rows
            .iter()
            .enumerate()
            .filter(|(i, _)| i % folds != fold)
            .map(|(_, r)| *r)
            .collect();
        training.sort_unstable();
        let model = params.fit(market, &training)?;
        let candidates = CandidateIndex::new(market, &training, &fit.cleaning);
        let fold_fit = MarketFit {
            segment: fit.segment,
            as_of: fit.as_of,
            cleaning: fit.cleaning.clone(),
            model,
            included_rows: training,
            candidates,
            as_of_source: fit.as_of_source,
            segment_dated: fit.segment_dated,
            age_form_choice: fit.age_form_choice.clone(),
            market_index: None,
            premium_fade: None,
        };
        let factors = own_date_and_options(&fold_fit, market, &held);
        let then = |row: usize| factors.get(&row).copied().unwrap_or(1.0);
        for &row in &held {
            let a = fold_fit.model.attributes_of_row(market, row);
            if !fold_fit.model.design().knows_variant(a.variant)
                || !fold_fit.model.design().knows_condition(a.condition)
            {
                not_valued += 1;
                continue;
            }
            let e = fold_fit.model.estimate(&a, settings.level);
            let price = market.asking_price[row];
            let shift = then(row);
            model_errors.push(100.0 * (shift * e.median - price).abs() / price);
            let band = e.prediction_interval;
            if (shift * band.lower..=shift * band.upper).contains(&price) {
                model_inside += 1;
            }
        }
        let step = held
            .len()
            .div_ceil(settings.comparable_subjects_per_fold.max(1))
            .max(1);
        for &row in held.iter().step_by(step) {
            let mut request = AppraisalRequest::new(Subject::from_listing(&market.listing(row)));
            request.rules = *rules;
            request.level = settings.level;
            match appraise_among(market, &fold_fit, &fold_fit.candidates, &request) {
                Ok(a) if !a.comparables.is_empty() => {
                    let price = market.asking_price[row];
                    let shift = then(row);
                    let v = shift * a.reconciliation.indicated_value;
                    comp_errors.push(100.0 * (v - price).abs() / price);
                    let band = a.reconciliation.value_band;
                    if (shift * band.lower..=shift * band.upper).contains(&price) {
                        comp_inside += 1;
                    }
                }
                _ => not_valued += 1,
            }
        }
    }
    let accuracy = |errors: &[f64], inside: usize| MethodAccuracy {
        evaluated: errors.len(),
        median_abs_pct_error: stats::median(errors).unwrap_or(f64::NAN),
        band_coverage_pct: if errors.is_empty() {
            f64::NAN
        } else {
            100.0 * inside as f64 / errors.len() as f64
        },
        level: settings.level,
    };
    Ok(Backtest {
        folds,
        model: accuracy(&model_errors, model_inside),
        comparables: accuracy(&comp_errors, comp_inside),
        not_valued,
    })
}
