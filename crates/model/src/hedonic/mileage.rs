//! Typical mileage by age, read from the market itself.

use std::collections::BTreeMap;

use serde::{Deserialize, Serialize};

use crate::condition::Condition;
use crate::market::Market;
use crate::stats;

/// Fewest listings at an age before that age's own median mileage is trusted.
const MIN_LISTINGS_PER_AGE: usize = 10;

/// Typical odometer readings for a segment.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct MileageProfile {
    /// Median of miles / (age + 0.5) over previously owned listings: a model year's vehicles have
    /// been in service about half a year longer than the whole-year age says.
    pub annual_miles: f64,
    /// Median miles of previously owned listings at each age with enough listings.
    pub median_by_age: BTreeMap<i32, f64>,
}

impl MileageProfile {
    /// Reads the profile from the given rows (new units are left out: they have no service).
    #[must_use]
    pub fn from_rows(market: &Market, rows: &[usize], as_of_year: i32) -> Self {
        let mut by_age: BTreeMap<i32, Vec<f64>> = BTreeMap::new();
        let mut per_year = Vec::new();
        for &r in rows {
            if market.condition[r] == Condition::New {
                continue;
            }
            let age = (as_of_year - market.model_year[r]).max(0);
            by_age.entry(age).or_default().push(market.miles[r]);
            per_year.push(market.miles[r] / (f64::from(age) + 0.5));
        }
        Self {
            // 12,000 a year when the file has no used units at all (common practice, no source).
            annual_miles: stats::median(&per_year).unwrap_or(12_000.0),
            median_by_age: by_age
                .into_iter()
                .filter(|(_, v)| v.len() >= MIN_LISTINGS_PER_AGE)
                .filter_map(|(a, v)| stats::median(&v).map(|m| (a, m)))
                .collect(),
        }
    }

    /// Typical miles at `age` (whole or fractional): the age's own median where the market has
    /// enough listings, otherwise `annual_miles * (age + 0.5)`.
    #[must_use]
    pub fn typical_miles(&self, age: f64) -> f64 {
        if age.fract() == 0.0 {
            if let Some(m) = self.median_by_age.get(&(age as i32)) {
                return *m;
            }
        }
        (self.annual_miles * (age + 0.5)).max(0.0)
    }
}
