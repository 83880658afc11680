//! Price gaps: every listing's asking price against the market's expectation for its own
//! attributes, ranked from the furthest below to the furthest above.

use serde::{Deserialize, Serialize};

use crate::appraisal::MarketFit;
use crate::market::Market;

/// Where a listing sits against its prediction interval.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum GapFlag {
    /// Inside the prediction interval.
    Within,
    /// Below it: a possible deal, or a possible problem (branded title, damage); look before use.
    BelowMarket,
    /// Above it.
    AboveMarket,
}

/// One listing's gap.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct PriceGap {
    /// Market row.
    pub row: usize,
    /// File line.
    pub line: u64,
    /// "2021 Ambrel, 48,000 mi, used".
    pub description: String,
    /// Asking price.
    pub asking_price: f64,
    /// Market median for its attributes.
    pub expected: f64,
    /// Asking - expected.
    pub gap: f64,
    /// Gap as a percentage of expected.
    pub gap_pct: f64,
    /// Against the prediction interval.
    pub flag: GapFlag,
    /// The cleaning rule that excluded it, if any.
    pub exclusion: Option<String>,
}

/// Gaps of every listing in the fitted segment at `level`, most negative first.
#[must_use]
pub fn price_gaps(market: &Market, fit: &MarketFit, level: f64) -> Vec<PriceGap> {
    let shifts = fit.model.row_shifts(market, &fit.cleaning.rows);
    let mut gaps: Vec<PriceGap> = fit
        .cleaning
        .rows
        .iter()
        .zip(shifts)
        .map(|(&row, shift)| {
            let attributes = fit.model.attributes_of_row(market, row);
            let estimate = fit.model.estimate(&attributes, level);
            // The market on the listing's own date and with its own options.
            let shift = shift.exp();
            let expected = shift * estimate.median;
            let band = estimate.prediction_interval;
            let price = market.asking_price[row];
            let flag = if price < shift * band.lower {
                GapFlag::BelowMarket
            } else if price > shift * band.upper {
                GapFlag::AboveMarket
            } else {
                GapFlag::Within
            };
            PriceGap {
                row,
                line: market.line[row],
                description: format!(
                    "{} {}, {} mi, {}",
                    market.model_year[row],
                    market.variant_name(row),
                    crate::format::thousands(market.miles[row]),
                    market.condition[row]
                ),
                asking_price: price,
                expected,
                gap: price - expected,
                gap_pct: 100.0 * (price / expected - 1.0),
                flag,
                exclusion: fit
                    .cleaning
                    .exclusion_of(row)
                    .filter(|_| !fit.cleaning.is_included(row))
                    .map(|e| e.code().to_owned()),
            }
        })
        .collect();
    gaps.sort_by(|a, b| a.gap_pct.total_cmp(&b.gap_pct));
    gaps
}
