//! Reconciling adjusted comparables into one indicated value with a value band.
//!
//! Weights: raw_j = similarity_j / (1 + 10 · gross_j), where similarity = 1 - Gower distance
//! and gross_j is the gross adjustment as a fraction of the comparable's price (a comparable
//! needing 10 % gross adjustment counts half as much as one needing none); w_j = raw_j / Σ raw.
//! Indicated value V = Σ w_j · adjusted_j.
//!
//! Band, in ln price: the comparables' spread σ_c = weighted SD of ln(adjusted_j) inflated by
//! sqrt(1 + 1/n_eff) with n_eff = 1/Σw² (a new sale drawn from the same spread, around a centre
//! estimated from n_eff comparables); the model's σ_m = its prediction standard error for the
//! subject. The band uses the wider: σ = max(σ_c, σ_m), with t at that source's degrees of
//! freedom (n_eff - 1 or n - p), and is V · exp(±t σ). It is not symmetric in currency.

use serde::{Deserialize, Serialize};

use crate::hedonic::ValueEstimate;
use crate::ols::Interval;
use crate::stats;

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
    /// (V - model median) / model median, in percent: how far comparables and model disagree.
    pub model_gap_pct: f64,
}

/// Reconciles `comparables` (possibly none) with the model's estimate for the subject.
#[must_use]
pub fn reconcile(
    comparables: &[ReconcileInput],
    model: &ValueEstimate,
    model_df: f64,
    level: f64,
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
    let (sigma, df, band_source) = match comparables_sigma {
        Some(sc) if sc > model_sigma && effective_count > 1.5 => {
            (sc, effective_count - 1.0, BandSource::Comparables)
        }
        _ => (model_sigma, model_df, BandSource::Model),
    };
    let t = stats::t_two_sided(level, df);
    Reconciliation {
        indicated_value,
        weights,
        effective_count,
        comparables_log_sd,
        comparables_sigma,
        model_sigma,
        value_band: Interval {
            lower: indicated_value * (-t * sigma).exp(),
            upper: indicated_value * (t * sigma).exp(),
            level,
        },
        band_source,
        model_gap_pct: 100.0 * (indicated_value / model.median - 1.0),
    }
}
