//! The fitted rates an appraisal's adjustment grid used, kept with a saved session so the grid
//! can be recomputed line by line without the market file or the fit.

use std::collections::BTreeMap;

use serde::{Deserialize, Serialize};

use crate::adjustment::{AdjustmentLine, GridInputs, grid_lines};
use crate::appraisal::{Appraisal, MarketFit};
use crate::condition::Condition;
use crate::hedonic::age_years;
use crate::market::{Listing, Market};
use crate::subject::Subject;
use crate::vocabulary::name_key;

pub use crate::vocabulary::NO_VARIANT;

/// The part of a fitted model an adjustment grid reads: effects in ln price.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct FittedRates {
    /// Change in ln price per mile.
    pub miles_slope: f64,
    /// Fitted age effect for each model year the grid needs (at the appraisal's date).
    pub model_year_effects: BTreeMap<i32, f64>,
    /// Fitted effect of each variant the model knows, by its label.
    pub variant_effects: BTreeMap<String, f64>,
    /// Fitted effect of each condition class the model knows.
    pub condition_effects: BTreeMap<Condition, f64>,
    /// Residual degrees of freedom of the fit (the model band's t quantile uses them).
    pub df_residual: f64,
    /// The fitted market drift, when the fit had the market-conditions term (sessions before
    /// format 5 have none).
    #[serde(default)]
    pub market_drift: Option<SavedDrift>,
    /// Each variant's own age slope over the base's, when the fit had variant slopes (format 5
    /// on; empty otherwise).
    #[serde(default, skip_serializing_if = "BTreeMap::is_empty")]
    pub variant_age_slopes: BTreeMap<String, f64>,
    /// The age each model year the grid needs is at, held at the edge of the fitted ages, for
    /// the variant slopes (empty without them).
    #[serde(default, skip_serializing_if = "BTreeMap::is_empty")]
    pub slope_ages: BTreeMap<i32, f64>,
    /// Each option with a term: (name, fitted effect on ln price, standard error) (format 5
    /// on; empty otherwise).
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub option_effects: Vec<(String, f64, f64)>,
}

/// The market-conditions term as a session keeps it.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct SavedDrift {
    /// Coefficient on ln price per month before the appraisal date.
    pub per_month_before: f64,
    /// Whether it was distinguishable from no drift (5 % level).
    pub distinguishable: bool,
    /// The appraisal date the months are counted back from.
    pub as_of: chrono::NaiveDate,
}

/// Why the stored rates cannot adjust a comparable.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum RatesError {
    /// No age effect stored for this model year.
    #[error("the saved fit has no rate for model year {0}")]
    ModelYear(i32),
    /// No effect stored for this variant.
    #[error("the saved fit has no rate for variant \"{0}\"")]
    Variant(String),
    /// No effect stored for this condition.
    #[error("the saved fit has no rate for condition \"{0}\"")]
    Condition(Condition),
}

impl FittedRates {
    /// The rates of `fit` that `appraisal`'s subject and comparables need.
    #[must_use]
    pub fn of(market: &Market, fit: &MarketFit, appraisal: &Appraisal) -> Self {
        let model = &fit.model;
        let as_of_year = model.as_of_year();
        let years = std::iter::once(appraisal.subject.model_year)
            .chain(appraisal.comparables.iter().map(|c| c.listing.model_year));
        let years: Vec<i32> = years.collect();
        let model_year_effects = years
            .iter()
            .map(|&y| (y, model.age_effect(age_years(y, as_of_year))))
            .collect();
        let design = model.design();
        let variant_effects = design
            .variants
            .iter()
            .map(|&v| {
                (
                    market.names.variant_name(v).to_owned(),
                    model.variant_effect(v),
                )
            })
            .collect();
        let condition_effects = Condition::ALL
            .into_iter()
            .filter(|c| design.knows_condition(*c))
            .map(|c| (c, model.condition_effect(c)))
            .collect();
        Self {
            miles_slope: model.miles_slope(),
            model_year_effects,
            variant_effects,
            condition_effects,
            df_residual: model.df_residual() as f64,
            market_drift: model.market_drift().map(|d| SavedDrift {
                per_month_before: d.per_month_before,
                distinguishable: d.is_distinguishable(),
                as_of: model.params().as_of,
            }),
            variant_age_slopes: design
                .variants
                .iter()
                .filter(|&&v| design.slope_column(v).is_some())
                .map(|&v| {
                    (
                        market.names.variant_name(v).to_owned(),
                        model.variant_age_slope(v),
                    )
                })
                .collect(),
            option_effects: model.option_effects(),
            slope_ages: if design.variant_slopes {
                years
                    .iter()
                    .map(|&y| (y, model.age_edge(age_years(y, as_of_year)).0))
                    .collect()
            } else {
                BTreeMap::new()
            },
        }
    }

    /// The part of `label`'s premium that changes with age, at model year `year` (0 without
    /// variant slopes or for the base variant).
    fn slope_effect(&self, label: &str, year: i32) -> Result<f64, RatesError> {
        if self.variant_age_slopes.is_empty() {
            return Ok(0.0);
        }
        let key = name_key(label);
        let slope = self.variant_age_slopes.get(label).copied().or_else(|| {
            let mut found = self
                .variant_age_slopes
                .iter()
                .filter(|(k, _)| name_key(k) == key);
            match (found.next(), found.next()) {
                (Some((_, v)), None) => Some(*v),
                _ => None,
            }
        });
        let Some(slope) = slope else { return Ok(0.0) };
        let age = self
            .slope_ages
            .get(&year)
            .copied()
            .ok_or(RatesError::ModelYear(year))?;
        Ok(slope * age)
    }

    fn year(&self, year: i32) -> Result<f64, RatesError> {
        self.model_year_effects
            .get(&year)
            .copied()
            .ok_or(RatesError::ModelYear(year))
    }

    /// The stored effect of a variant: by its exact label, else by the one stored label with
    /// the same [`name_key`] (two stored labels that share a key are not guessed between).
    fn variant(&self, label: &str) -> Result<f64, RatesError> {
        if let Some(v) = self.variant_effects.get(label) {
            return Ok(*v);
        }
        let key = name_key(label);
        let mut matches = self
            .variant_effects
            .iter()
            .filter(|(k, _)| name_key(k) == key);
        match (matches.next(), matches.next()) {
            (Some((_, v)), None) => Ok(*v),
            _ => Err(RatesError::Variant(label.to_owned())),
        }
    }

    fn condition(&self, condition: Condition) -> Result<f64, RatesError> {
        self.condition_effects
            .get(&condition)
            .copied()
            .ok_or(RatesError::Condition(condition))
    }

    /// The model lines that adjust `comparable` to `subject`, exactly as the live grid
    /// computes them.
    pub fn lines(
        &self,
        subject: &Subject,
        comparable: &Listing,
    ) -> Result<Vec<AdjustmentLine>, RatesError> {
        let (vs, vc) = (
            crate::vocabulary::variant_text(subject.variant.as_deref()),
            crate::vocabulary::variant_text(comparable.variant.as_deref()),
        );
        let equipment = crate::adjustment::option_differences(
            &self.option_effects,
            subject.options.as_deref().unwrap_or(""),
            comparable.options.as_deref().unwrap_or(""),
        );
        // Labels as the live grid writes them: the market's spelling for the comparable and
        // the subject's own when it has one.
        Ok(grid_lines(&GridInputs {
            price: comparable.asking_price,
            miles_slope: self.miles_slope,
            miles: (subject.miles, comparable.miles),
            model_year: (subject.model_year, comparable.model_year),
            age_log_change: self.year(subject.model_year)? - self.year(comparable.model_year)?
                + self.slope_effect(vc, subject.model_year)?
                - self.slope_effect(vc, comparable.model_year)?,
            variant: (vs, vc),
            variant_log_change: self.variant(vs)? - self.variant(vc)?
                + self.slope_effect(vs, subject.model_year)?
                - self.slope_effect(vc, subject.model_year)?,
            condition: (subject.condition, comparable.condition),
            condition_log_change: self.condition(subject.condition)?
                - self.condition(comparable.condition)?,
            market: self
                .market_drift
                .map(|d| crate::adjustment::MarketConditions {
                    per_month_before: d.per_month_before,
                    distinguishable: d.distinguishable,
                    months_before: comparable
                        .listed_on
                        .map(|date| crate::hedonic::market_time::months_before(d.as_of, date)),
                }),
            equipment: &equipment,
        }))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn rates(variants: &[(&str, f64)]) -> FittedRates {
        FittedRates {
            miles_slope: 0.0,
            model_year_effects: BTreeMap::new(),
            variant_effects: variants
                .iter()
                .map(|(k, v)| ((*k).to_owned(), *v))
                .collect(),
            condition_effects: BTreeMap::new(),
            df_residual: 10.0,
            market_drift: None,
            variant_age_slopes: BTreeMap::new(),
            slope_ages: BTreeMap::new(),
            option_effects: Vec::new(),
        }
    }

    #[test]
    fn a_variant_is_found_by_its_exact_label_before_its_spelling() {
        // Regression: look-ups ignored case, so with "Ambrel" and "AMBREL" both stored,
        // "Ambrel" found "AMBREL" first (BTreeMap order) and replayed with the wrong effect.
        let r = rates(&[("Ambrel", 0.1), ("AMBREL", 0.3), ("Veskel", 0.0)]);
        assert_eq!(r.variant("Ambrel"), Ok(0.1));
        assert_eq!(r.variant("AMBREL"), Ok(0.3));
        // Another spelling of two stored labels is not guessed between.
        assert!(r.variant("ambrel").is_err());
        // One stored label matches another spelling by its name key.
        assert_eq!(r.variant(" veskel "), Ok(0.0));
        assert_eq!(r.variant("VESKEL"), Ok(0.0));
    }
}
