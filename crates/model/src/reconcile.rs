//! Reconciling adjusted comparables into one indicated value with a value band.
//!
//! Weights: raw_j = similarity_j / (1 + 10 · gross_j), where similarity = 1 - Gower distance
//! and gross_j is the gross adjustment as a fraction of the comparable's price (a comparable
//! needing 10 % gross adjustment counts half as much as one needing none); w_j = raw_j / Σ raw.
//! Indicated value V = Σ w_j · adjusted_j.
//!
//! Band, in ln price: the comparables' spread σ_c = weighted SD of ln(adjusted_j) inflated by
//! sqrt(1 + 1/n_eff) with n_eff = 1/Σw² (a new sale drawn from the same spread, around a center
//! estimated from n_eff comparables); the model's σ_m = its prediction standard error for the
//! subject. Each gives a half-width in ln price, t·σ, with t at that source's degrees of
//! freedom (n_eff − 1 for the comparables, n − p for the model). The band takes the source
//! whose half-width is wider, so few comparables (a large t) widen it; the comparables can set
//! it only when there are at least two with weight and n_eff > 1.5 (at least half a degree of
//! freedom: below that their t is not a usable number). The band is V · exp(±t σ), not
//! symmetric in currency.

use serde::{Deserialize, Serialize};

use crate::hedonic::ValueEstimate;
use crate::ols::Interval;
use crate::stats;

/// The comparables' spread can set the band only above this effective count (n_eff − 1 ≥ 0.5
/// degrees of freedom).
pub const MIN_EFFECTIVE_COUNT: f64 = 1.5;

/// Gross-adjustment penalty: weight halves at 10 % gross adjustment.
pub const GROSS_PENALTY: f64 = 10.0;

/// Which source set the band's width.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum BandSource {
    /// The spread of the adjusted comparables.
    Comparables,
    /// The model's prediction interval.
    Model,
    /// No comparables: the model's estimate and prediction interval stand alone.
    ModelOnly,
}

/// How the band's source was chosen. Kept with every reconciliation, so a session saved under
/// an earlier rule is recomputed under the rule it was made with.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize, Default)]
#[serde(rename_all = "snake_case")]
pub enum BandRule {
    /// Session formats 1 and 2: the source with the larger σ (with n_eff > 1.5 for the
    /// comparables). At few comparables it could pick the narrower band; kept only to
    /// recompute those sessions as they were made.
    #[default]
    WiderSigma,
    /// The source with the wider half-width t·σ (format 3 on).
    WiderHalfWidth,
}

/// The rule every new reconciliation uses.
pub const BAND_RULE: BandRule = BandRule::WiderHalfWidth;

/// One comparable's input to the reconciliation.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ReconcileInput {
    /// Adjusted price.
    pub adjusted_price: f64,
    /// 1 - Gower distance.
    pub similarity: f64,
    /// Gross adjustment as a fraction of the comparable's price.
    pub gross_fraction: f64,
}

/// The reconciled value.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Reconciliation {
    /// The indicated value.
    pub indicated_value: f64,
    /// Weight of each comparable, in input order; they sum to 1.
    pub weights: Vec<f64>,
    /// Effective number of comparables, 1/Σw².
    pub effective_count: f64,
    /// Weighted SD of ln(adjusted price) among the comparables, if at least two.
    pub comparables_log_sd: Option<f64>,
    /// σ_c: the comparables' spread for one new sale (ln units).
    pub comparables_sigma: Option<f64>,
    /// σ_m: the model's prediction SE for the subject (ln units).
    pub model_sigma: f64,
    /// The value band.
    pub value_band: Interval,
    /// Which source set the band.
    pub band_source: BandSource,
    /// The rule that chose it (absent from sessions before format 3, which used
    /// [`BandRule::WiderSigma`]).
    #[serde(default)]
    pub band_rule: BandRule,
    /// (V - model median) / model median, in percent: how far comparables and model disagree.
    pub model_gap_pct: f64,
}

/// Reconciles `comparables` (possibly none) with the model's estimate for the subject, choosing
/// the band's source by `rule` ([`BAND_RULE`] for every new appraisal).
#[must_use]
pub fn reconcile(
    comparables: &[ReconcileInput],
    model: &ValueEstimate,
    model_df: f64,
    level: f64,
    rule: BandRule,
) -> Reconciliation {
    let model_sigma = model.log_se_prediction;
    if comparables.is_empty() {
        return Reconciliation {
            indicated_value: model.median,
            weights: Vec::new(),
            effective_count: 0.0,
            comparables_log_sd: None,
            comparables_sigma: None,
            model_sigma,
            value_band: model.prediction_interval,
            band_source: BandSource::ModelOnly,
            band_rule: rule,
            model_gap_pct: 0.0,
        };
    }
    let raw: Vec<f64> = comparables
        .iter()
        .map(|c| c.similarity.max(0.0) / (1.0 + GROSS_PENALTY * c.gross_fraction.max(0.0)))
        .collect();
    let total: f64 = raw.iter().sum();
    let weights: Vec<f64> = if total > 0.0 {
        raw.iter().map(|r| r / total).collect()
    } else {
        vec![1.0 / comparables.len() as f64; comparables.len()]
    };
    let indicated_value: f64 = comparables
        .iter()
        .zip(&weights)
        .map(|(c, w)| w * c.adjusted_price)
        .sum();
    let effective_count = 1.0 / weights.iter().map(|w| w * w).sum::<f64>();
    let logs: Vec<f64> = comparables.iter().map(|c| c.adjusted_price.ln()).collect();
    let (_, comparables_log_sd) = stats::weighted_mean_sd(&logs, &weights);
    let comparables_sigma = comparables_log_sd.map(|s| s * (1.0 + 1.0 / effective_count).sqrt());
    let model_half = stats::t_two_sided(level, model_df) * model_sigma;
    let usable_sigma = comparables_sigma.filter(|_| effective_count > MIN_EFFECTIVE_COUNT);
    let comparables_half =
        usable_sigma.map(|sc| (sc, stats::t_two_sided(level, effective_count - 1.0) * sc));
    let comparables_win = |sc: f64, hc: f64| match rule {
        BandRule::WiderSigma => sc > model_sigma,
        // A NaN half-width (no usable spread) never wins.
        BandRule::WiderHalfWidth => hc > model_half || model_half.is_nan() && hc.is_finite(),
    };
    let (half_width, band_source) = match comparables_half {
        Some((sc, hc)) if comparables_win(sc, hc) => (hc, BandSource::Comparables),
        _ => (model_half, BandSource::Model),
    };
    Reconciliation {
        indicated_value,
        weights,
        effective_count,
        comparables_log_sd,
        comparables_sigma,
        model_sigma,
        value_band: Interval {
            lower: indicated_value * (-half_width).exp(),
            upper: indicated_value * half_width.exp(),
            level,
        },
        band_source,
        band_rule: rule,
        model_gap_pct: 100.0 * (indicated_value / model.median - 1.0),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A model estimate of 30,000 with prediction SE `sigma` in ln price.
    fn model(sigma: f64) -> ValueEstimate {
        ValueEstimate {
            median: 30_000.0,
            mean: 30_000.0,
            confidence_interval: Interval {
                lower: 29_000.0,
                upper: 31_000.0,
                level: 0.8,
            },
            prediction_interval: Interval {
                lower: 25_000.0,
                upper: 35_000.0,
                level: 0.8,
            },
            log_fitted: 30_000_f64.ln(),
            log_se_fit: 0.01,
            log_se_prediction: sigma,
        }
    }

    /// Two comparables of equal weight whose spread gives σ_c = `sigma_c`: ln prices ±a about
    /// the center give a weighted SD of a·√2 and σ_c = a·√2·√(1 + 1/2) = a·√3.
    fn pair(sigma_c: f64) -> [ReconcileInput; 2] {
        let a = sigma_c / 3_f64.sqrt();
        [a, -a].map(|d| ReconcileInput {
            adjusted_price: 30_000.0 * d.exp(),
            similarity: 0.9,
            gross_fraction: 0.0,
        })
    }

    #[test]
    fn the_wider_half_width_sets_the_band_on_both_sides_of_the_crossover() {
        // Constructed by the definition: n_eff = 2, so the comparables' t has 1 degree of
        // freedom (t(0.9; 1) = 3.078) while the model's has 200 (1.286): at equal σ the
        // comparables' band is the wider. They cross where σ_c · t_c = σ_m · t_m.
        let (level, model_df, sigma_m) = (0.8, 200.0, 0.06);
        let t_c = stats::t_two_sided(level, 1.0);
        let t_m = stats::t_two_sided(level, model_df);
        assert!((t_c - 3.077_683_537).abs() < 1e-6, "{t_c}");
        let crossover = sigma_m * t_m / t_c;
        for (factor, expected) in [
            (1.02, BandSource::Comparables),
            (0.98, BandSource::Model),
            // σ_c below σ_m (the old rule's "model") but its half-width wider.
            (0.9 * t_c / t_m, BandSource::Comparables),
        ] {
            let sigma_c = crossover * factor;
            let r = reconcile(&pair(sigma_c), &model(sigma_m), model_df, level, BAND_RULE);
            assert!((r.effective_count - 2.0).abs() < 1e-12);
            assert!((r.comparables_sigma.unwrap() - sigma_c).abs() < 1e-12);
            assert_eq!(r.band_source, expected, "σ_c = {factor} × crossover");
            let half = (r.value_band.upper / r.indicated_value).ln();
            let expected_half = match expected {
                BandSource::Comparables => t_c * sigma_c,
                _ => t_m * sigma_m,
            };
            assert!(
                (half - expected_half).abs() < 1e-9,
                "{half} vs {expected_half}"
            );
            // Not symmetric in currency, symmetric in ln price.
            assert!((r.indicated_value / r.value_band.lower).ln() - half < 1e-9);
        }
    }

    #[test]
    fn a_session_made_under_the_earlier_rule_recomputes_under_it() {
        // σ_c just below σ_m but its half-width wider: the earlier rule took the model.
        let (t_c, t_m) = (stats::t_two_sided(0.8, 1.0), stats::t_two_sided(0.8, 200.0));
        let sigma_c = 0.06 * 0.9;
        assert!(sigma_c * t_c > 0.06 * t_m);
        let old = reconcile(
            &pair(sigma_c),
            &model(0.06),
            200.0,
            0.8,
            BandRule::WiderSigma,
        );
        assert_eq!(old.band_source, BandSource::Model);
        assert_eq!(old.band_rule, BandRule::WiderSigma);
        let new = reconcile(&pair(sigma_c), &model(0.06), 200.0, 0.8, BAND_RULE);
        assert_eq!(new.band_source, BandSource::Comparables);
    }

    #[test]
    fn at_most_one_and_a_half_effective_comparables_the_model_sets_the_band() {
        // Weights 0.9 and 0.1 (n_eff = 1/0.82 ≈ 1.22): however wide the comparables' spread,
        // they cannot estimate it; the model's band stands.
        let inputs = [
            ReconcileInput {
                adjusted_price: 20_000.0,
                similarity: 0.9,
                gross_fraction: 0.0,
            },
            ReconcileInput {
                adjusted_price: 40_000.0,
                similarity: 0.1,
                gross_fraction: 0.0,
            },
        ];
        let r = reconcile(&inputs, &model(0.06), 200.0, 0.8, BAND_RULE);
        assert!(r.effective_count < MIN_EFFECTIVE_COUNT);
        assert_eq!(r.band_source, BandSource::Model);
        // Just above 1.5 (weights 0.72/0.28: n_eff = 1.67) the comparables' wide spread wins.
        let mut above = inputs;
        above[0].similarity = 0.72;
        above[1].similarity = 0.28;
        let r = reconcile(&above, &model(0.06), 200.0, 0.8, BAND_RULE);
        assert!(r.effective_count > MIN_EFFECTIVE_COUNT);
        assert_eq!(r.band_source, BandSource::Comparables);
    }
}
