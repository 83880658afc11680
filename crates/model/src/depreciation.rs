//! Describing depreciation from the fitted market: value by age at typical mileage, loss per
//! year, cumulative loss, each variant's premium over the base by age, and a ranking of the
//! models in a file by their fitted annual decline.

use serde::{Deserialize, Serialize};

use crate::appraisal::{FitSettings, fit_market};
use crate::clean::Overrides;
use crate::condition::Condition;
use crate::hedonic::{AgeForm, Attributes, HedonicModel};
use crate::market::Market;

/// One age of one variant.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct DepreciationRow {
    /// Age in model years; `None` for the "new" row (new condition, delivery miles).
    pub age_years: Option<u32>,
    /// Typical miles used at that age.
    pub typical_miles: f64,
    /// Market median value.
    pub value: f64,
    /// Loss since the row before, in currency.
    pub loss: f64,
    /// Loss since the row before, percent of that row's value.
    pub loss_pct: f64,
    /// Loss since the first row, in currency.
    pub cumulative_loss: f64,
    /// Loss since the first row, percent of the first row's value.
    pub cumulative_loss_pct: f64,
}

/// The depreciation table of one variant.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct VariantCurve {
    /// Variant name.
    pub variant: String,
    /// Rows, youngest first.
    pub rows: Vec<DepreciationRow>,
}

/// A variant's premium over the base variant at one age.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct PremiumRow {
    /// Age in model years.
    pub age_years: u32,
    /// Premium in currency.
    pub premium: f64,
    /// Premium as a percentage of the base variant's value.
    pub premium_pct: f64,
    /// Lower end of the premium's 80 % band, percent (from the standard error of the fitted
    /// premium at this age).
    pub lower_pct: f64,
    /// Upper end of the band, percent.
    pub upper_pct: f64,
}

/// Oldest age the premium words describe (the depreciation view's last age).
pub const PREMIUM_MAX_AGE: u32 = 10;

/// Level of the premium-by-age band.
pub const PREMIUM_BAND_LEVEL: f64 = 0.8;

/// A variant's premium by age.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct VariantPremium {
    /// Variant.
    pub variant: String,
    /// Base variant it is compared with.
    pub base: String,
    /// Premium by age.
    pub by_age: Vec<PremiumRow>,
}

/// The full depreciation description of a fitted segment.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct DepreciationTable {
    /// Per-variant curves.
    pub curves: Vec<VariantCurve>,
    /// Per-variant premium over the base.
    pub premiums: Vec<VariantPremium>,
}

/// Value by age for every variant, ages 0..=`max_age`, used condition at typical miles; a first
/// "new" row when the market has new listings.
#[must_use]
pub fn depreciation_table(
    model: &HedonicModel,
    market: &Market,
    max_age: u32,
) -> DepreciationTable {
    let design = model.design();
    let has_new = design.knows_condition(Condition::New);
    let used = if design.knows_condition(Condition::Used) {
        Condition::Used
    } else {
        design.conditions[0]
    };
    let name = |v| market.names.variant_name(v).to_owned();
    let value = |variant, age: u32, condition, miles| {
        model
            .estimate(
                &Attributes {
                    age_years: f64::from(age),
                    miles,
                    variant,
                    condition,
                },
                0.8,
            )
            .median
    };
    let curves = design
        .variants
        .iter()
        .map(|&variant| {
            let mut points: Vec<(Option<u32>, f64, f64)> = Vec::new();
            if has_new {
                points.push((None, 0.0, value(variant, 0, Condition::New, 0.0)));
            }
            for age in 0..=max_age {
                let miles = model.mileage().typical_miles(f64::from(age));
                points.push((Some(age), miles, value(variant, age, used, miles)));
            }
            VariantCurve {
                variant: name(variant),
                rows: to_rows(&points),
            }
        })
        .collect();
    let base = design.variants[0];
    let t = crate::stats::t_two_sided(PREMIUM_BAND_LEVEL, model.df_residual() as f64);
    let premiums = design
        .variants
        .iter()
        .skip(1)
        .map(|&variant| VariantPremium {
            variant: name(variant),
            base: name(base),
            by_age: (0..=max_age)
                .map(|age| {
                    let miles = model.mileage().typical_miles(f64::from(age));
                    let v = value(variant, age, used, miles);
                    let b = value(base, age, used, miles);
                    let (effect, se) = model.premium(variant, f64::from(age));
                    PremiumRow {
                        age_years: age,
                        premium: v - b,
                        premium_pct: 100.0 * (v / b - 1.0),
                        lower_pct: 100.0 * ((effect - t * se).exp() - 1.0),
                        upper_pct: 100.0 * ((effect + t * se).exp() - 1.0),
                    }
                })
                .collect(),
        })
        .collect();
    DepreciationTable { curves, premiums }
}

fn to_rows(points: &[(Option<u32>, f64, f64)]) -> Vec<DepreciationRow> {
    let first = points.first().map_or(0.0, |p| p.2);
    let mut previous = first;
    points
        .iter()
        .map(|&(age, miles, value)| {
            let loss = previous - value;
            let row = DepreciationRow {
                age_years: age,
                typical_miles: miles,
                value,
                loss,
                loss_pct: 100.0 * loss / previous,
                cumulative_loss: first - value,
                cumulative_loss_pct: 100.0 * (first - value) / first,
            };
            previous = value;
            row
        })
        .collect()
}

/// Fitted annual decline of one make and model.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct DeclineRank {
    /// "Make Model".
    pub segment: String,
    /// Listings fitted.
    pub listings: usize,
    /// Percent per year from age alone (linear age form).
    pub age_only_pct: f64,
    /// Percent per year with typical mileage growth, over five years.
    pub with_typical_miles_pct: f64,
    /// Why the segment could not be ranked, if it could not.
    pub skipped: Option<String>,
}

/// Ranks every segment of at least `min_listings` by fitted annual decline (steepest first),
/// each fitted with a linear age term so the rates compare like for like.
#[must_use]
pub fn rank_segments(
    market: &Market,
    settings: &FitSettings,
    min_listings: usize,
) -> Vec<DeclineRank> {
    let linear = FitSettings {
        age_form: AgeForm::Linear,
        ..*settings
    };
    let mut ranks: Vec<DeclineRank> = market
        .segments()
        .into_iter()
        .map(|(segment, count)| {
            let name = market.segment_name(segment);
            if count < min_listings {
                return DeclineRank {
                    segment: name,
                    listings: count,
                    age_only_pct: f64::NAN,
                    with_typical_miles_pct: f64::NAN,
                    skipped: Some(format!("{count} listings (fewer than {min_listings})")),
                };
            }
            match fit_market(market, segment, &linear, &Overrides::new()) {
                Ok(fit) => {
                    let d = fit.model.annual_depreciation(5);
                    DeclineRank {
                        segment: name,
                        listings: fit.model.rows(),
                        age_only_pct: d.age_only_pct,
                        with_typical_miles_pct: d.with_typical_miles_pct,
                        skipped: None,
                    }
                }
                Err(e) => DeclineRank {
                    segment: name,
                    listings: count,
                    age_only_pct: f64::NAN,
                    with_typical_miles_pct: f64::NAN,
                    skipped: Some(e.to_string()),
                },
            }
        })
        .collect();
    ranks.sort_by(|a, b| {
        a.skipped.is_some().cmp(&b.skipped.is_some()).then(
            b.with_typical_miles_pct
                .total_cmp(&a.with_typical_miles_pct),
        )
    });
    ranks
}
