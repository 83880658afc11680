//! Beyond the data, no shape: a fitted curve says nothing past the ages and mileages it saw.
//!
//! Outside the fitted ages the age effect continues in a straight line in ln price (a constant
//! geometric rate) with the slope of the fitted curve at the nearest edge of the data, and only
//! if that slope falls with age; a curve rising at its edge continues flat. So a quadratic that
//! turns upward past its data cannot lift a 1990 subject above the oldest listing, and a
//! per-year form no longer freezes at its last level. Mileage beyond the data continues the
//! fitted linear rate when it falls with miles, and flat when it does not. Every prediction
//! (the estimate, its intervals, the grid's age and mileage lines, the depreciation tables and
//! forecasts) goes through [`HedonicModel::prediction_row`] or [`HedonicModel::age_effect`], so
//! the rule holds everywhere. The interval beyond the data is computed from the row continued
//! at the edge's own fitted rate, whatever its sign (a linear combination of the coefficients,
//! so its leverage grows with the distance): the value is held from rising, but the uncertainty
//! of the rate it might have had still widens the band.

use super::{AgeForm, Attributes, HedonicModel, dot};
use crate::condition::Condition;

impl HedonicModel {
    /// The design row a prediction uses for `a`: the fitted row inside the data, continued as
    /// the module describes outside it.
    #[must_use]
    pub fn prediction_row(&self, a: &Attributes) -> Vec<f64> {
        let mut x = vec![0.0; self.design.width()];
        let (edge, _) = self.age_edge(a.age_years);
        let (miles_lo, miles_hi) = self.miles_range;
        // A falling rate continues (the column is linear in miles); a rising one stops at the
        // edge of the data.
        let miles = if a.miles.is_nan() {
            miles_lo
        } else if self.miles_slope() > 0.0 {
            a.miles.clamp(miles_lo, miles_hi)
        } else {
            a.miles
        };
        self.design
            .fill_row(edge, miles, a.variant, a.condition, &mut x);
        let mut age_columns = vec![0.0; x.len()];
        self.age_columns(a.age_years, &mut age_columns);
        let width = self.design.age_width();
        x[1..=width].copy_from_slice(&age_columns[1..=width]);
        x
    }

    /// The design row whose leverage sets a prediction's interval for `a`: as
    /// [`Self::prediction_row`], but continued beyond the data at the edge's fitted rate even
    /// where the value is held flat, so the interval widens with the distance.
    #[must_use]
    pub fn spread_row(&self, a: &Attributes) -> Vec<f64> {
        let mut x = self.prediction_row(a);
        let (edge, outside) = self.age_edge(a.age_years);
        if outside && !a.age_years.is_nan() {
            let g = self.age_gradient(edge, a.age_years > edge);
            if dot(&g, &self.coefficients) >= 0.0 {
                for (xi, gi) in x.iter_mut().zip(&g) {
                    *xi += (a.age_years - edge) * gi;
                }
            }
        }
        // A rising mileage rate is held flat beyond the data; its uncertainty still counts.
        if self.miles_slope() > 0.0 && a.miles.is_finite() {
            x[self.design.miles_column()] = a.miles / super::MILES_UNIT;
        }
        x
    }

    /// The part of ln price that depends on age alone, at (possibly fractional) `age`,
    /// continued beyond the data as the module describes.
    #[must_use]
    pub fn age_effect(&self, age: f64) -> f64 {
        let mut x = vec![0.0; self.design.width()];
        self.age_columns(age, &mut x);
        dot(&x, &self.coefficients)
    }

    /// Whether `age` lies outside the ages the fit saw.
    #[must_use]
    pub fn age_outside_data(&self, age: f64) -> bool {
        let (lo, hi) = self.design.age_range();
        !(lo..=hi).contains(&age)
    }

    /// Whether `miles` lies outside the mileages the fit saw.
    #[must_use]
    pub fn miles_outside_data(&self, miles: f64) -> bool {
        !(self.miles_range.0..=self.miles_range.1).contains(&miles)
    }

    /// Lowest and highest odometer among the fitted listings.
    #[must_use]
    pub fn miles_range(&self) -> (f64, f64) {
        self.miles_range
    }

    /// The slope of ln price per year of age used beyond the data on the older side (0 when
    /// the curve does not fall there): the constant geometric rate an older subject continues
    /// at.
    #[must_use]
    pub fn continued_age_slope(&self, older: bool) -> f64 {
        let (lo, hi) = self.design.age_range();
        let g = self.age_gradient(if older { hi } else { lo }, older);
        dot(&g, &self.coefficients).min(0.0)
    }

    /// Each step between whole ages inside the data where the fitted value rises with age:
    /// (from age, to age, rise in percent). Empty when the curve never rises.
    #[must_use]
    pub fn rising_steps(&self) -> Vec<(i32, i32, f64)> {
        let levels = &self.design.age_levels;
        let (Some(&lo), Some(&hi)) = (levels.first(), levels.last()) else {
            return Vec::new();
        };
        (lo..hi)
            .filter_map(|a| {
                let change = self.age_effect(f64::from(a + 1)) - self.age_effect(f64::from(a));
                // Rounding noise is not a rise: a hundredth of a percent is.
                (change > 1e-4).then(|| (a, a + 1, 100.0 * change.exp_m1()))
            })
            .collect()
    }

    /// The nearest age inside the data, and whether `age` was outside it.
    pub(crate) fn age_edge(&self, age: f64) -> (f64, bool) {
        let (lo, hi) = self.design.age_range();
        if age.is_nan() {
            return (lo, true);
        }
        let edge = age.clamp(lo, hi);
        (edge, age < lo || age > hi)
    }

    /// Fills the age columns of `out` (and only those) for `age`, continued beyond the data.
    fn age_columns(&self, age: f64, out: &mut [f64]) {
        let (edge, outside) = self.age_edge(age);
        let base_variant = self
            .design
            .variants
            .first()
            .copied()
            .unwrap_or(crate::vocabulary::NO_NAME);
        let base_condition = self
            .design
            .conditions
            .first()
            .copied()
            .unwrap_or(Condition::Used);
        let mut row = vec![0.0; out.len()];
        self.design
            .fill_row(edge, 0.0, base_variant, base_condition, &mut row);
        let width = self.design.age_width();
        out.fill(0.0);
        out[1..=width].copy_from_slice(&row[1..=width]);
        if outside && !age.is_nan() {
            let g = self.age_gradient(edge, age > edge);
            if dot(&g, &self.coefficients) < 0.0 {
                for (o, gi) in out.iter_mut().zip(&g) {
                    *o += (age - edge) * gi;
                }
            }
        }
    }

    /// How the design row's age columns change per year of age at `edge`, going `older` (or
    /// younger): for the per-year form, the step between the two nearest levels.
    fn age_gradient(&self, edge: f64, older: bool) -> Vec<f64> {
        let width = self.design.width();
        let mut g = vec![0.0; width];
        match self.design.age_form {
            AgeForm::Linear | AgeForm::Auto => g[1] = 1.0,
            AgeForm::Quadratic => {
                g[1] = 1.0;
                g[2] = 2.0 * edge;
            }
            AgeForm::PerYear => {
                let levels = &self.design.age_levels;
                let n = levels.len();
                if n >= 2 {
                    let (a, b) = if older {
                        (levels[n - 2], levels[n - 1])
                    } else {
                        (levels[0], levels[1])
                    };
                    let (mut ra, mut rb) = (vec![0.0; width], vec![0.0; width]);
                    let v = crate::vocabulary::NO_NAME;
                    self.design
                        .fill_row(f64::from(a), 0.0, v, Condition::Used, &mut ra);
                    self.design
                        .fill_row(f64::from(b), 0.0, v, Condition::Used, &mut rb);
                    let span = f64::from(b - a);
                    for i in 1..=self.design.age_width() {
                        g[i] = (rb[i] - ra[i]) / span;
                    }
                }
            }
        }
        g
    }
}
