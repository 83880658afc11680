//! The hedonic design: which columns a listing contributes to ln(price) and what each is called.

use serde::{Deserialize, Serialize};

use crate::condition::Condition;
use crate::market::Market;
use crate::vocabulary::NameId;

/// Age in model years at the appraisal date: the appraisal year minus the model year, so 0 for
/// the appraisal year's model year. Next year's models, on sale early, also count as age 0: they
/// have not begun to depreciate. Fractional ages arise only in forecasts.
#[must_use]
pub fn age_years(model_year: i32, as_of_year: i32) -> f64 {
    f64::from((as_of_year - model_year).max(0))
}

/// How age enters the model.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize, Default)]
#[serde(rename_all = "snake_case")]
pub enum AgeForm {
    /// Chosen by the data: the form whose value falls with age and whose BIC is lowest (see
    /// `hedonic::choose_age_form`). Resolved before any fit; a fit is always of one of the
    /// forms below.
    #[default]
    Auto,
    /// ln P linear in age: geometric depreciation at a constant rate.
    Linear,
    /// ln P quadratic in age: the rate may fall (or rise) with age.
    Quadratic,
    /// One indicator per age in the data: no shape imposed.
    PerYear,
}

impl std::fmt::Display for AgeForm {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(match self {
            AgeForm::Auto => "auto",
            AgeForm::Linear => "linear",
            AgeForm::Quadratic => "quadratic",
            AgeForm::PerYear => "per-year",
        })
    }
}

impl AgeForm {
    /// The forms a fit can take, simplest first.
    pub const FITTED: [AgeForm; 3] = [AgeForm::Linear, AgeForm::Quadratic, AgeForm::PerYear];

    /// Reads "auto", "linear", "quadratic" or "per-year".
    #[must_use]
    pub fn parse(text: &str) -> Option<Self> {
        match text.trim().to_ascii_lowercase().replace('_', "-").as_str() {
            "auto" => Some(Self::Auto),
            "linear" => Some(Self::Linear),
            "quadratic" => Some(Self::Quadratic),
            "per-year" | "peryear" | "dummies" => Some(Self::PerYear),
            _ => None,
        }
    }
}

/// Mileage enters in units of 10,000 miles so its coefficient reads as "per 10,000 miles".
pub const MILES_UNIT: f64 = 10_000.0;

/// The columns of the design matrix for one segment.
#[derive(Debug, Clone, PartialEq)]
pub struct Design {
    /// Age form.
    pub age_form: AgeForm,
    /// Ages with their own indicator (per-year form), youngest (the base) first.
    pub age_levels: Vec<i32>,
    /// Variants in the fit; the first is the base (no indicator).
    pub variants: Vec<NameId>,
    /// Conditions in the fit; the first is the base (no indicator).
    pub conditions: Vec<Condition>,
    /// Whether each variant but the base has its own age slope (a `variant=<name>:age_years`
    /// column after the condition indicators): its premium may fade or grow with age.
    pub variant_slopes: bool,
    /// Options with their own indicator (`option=<name>`, after the variant slopes): (matching
    /// key, name shown).
    pub options: Vec<(String, String)>,
    /// Whether the last column is the market-conditions term (months before the appraisal
    /// date; see `market_time`). [`Self::fill_row`] leaves it 0, the appraisal date: a
    /// prediction is of today's market, and the fit sets each listing's own.
    pub time: bool,
    /// Column names, intercept first.
    pub names: Vec<String>,
}

impl Design {
    /// Builds the design for the given rows: levels present in the data, bases chosen as the
    /// youngest age, the variant with the lowest median asking price, and `used` when present;
    /// with a variant × age slope per variant when `variant_slopes`, and the market-conditions
    /// term last when `time`.
    #[must_use]
    pub fn for_rows(
        market: &Market,
        rows: &[usize],
        age_form: AgeForm,
        as_of_year: i32,
        variant_slopes: bool,
        options: Vec<(String, String)>,
        time: bool,
    ) -> Self {
        let ages = distinct_ages(market, rows, as_of_year);

        let mut by_variant: std::collections::HashMap<NameId, Vec<f64>> =
            std::collections::HashMap::new();
        for &r in rows {
            by_variant
                .entry(market.variant[r])
                .or_default()
                .push(market.asking_price[r]);
        }
        let mut variants: Vec<(NameId, f64)> = by_variant
            .into_iter()
            .map(|(v, prices)| (v, crate::stats::median(&prices).unwrap_or(0.0)))
            .collect();
        variants.sort_by(|a, b| {
            a.1.total_cmp(&b.1)
                .then_with(|| market.names.name(a.0).cmp(market.names.name(b.0)))
        });
        let variants: Vec<NameId> = variants.into_iter().map(|(v, _)| v).collect();

        let mut conditions: Vec<Condition> = Condition::ALL
            .into_iter()
            .filter(|c| rows.iter().any(|&r| market.condition[r] == *c))
            .collect();
        if let Some(pos) = conditions.iter().position(|c| *c == Condition::Used) {
            conditions.swap(0, pos);
            conditions[1..].sort();
        }

        let mut names = vec!["intercept".to_owned()];
        match age_form {
            // `Auto` is resolved before a fit; a design asked for it directly is linear.
            AgeForm::Linear | AgeForm::Auto => names.push("age_years".into()),
            AgeForm::Quadratic => {
                names.push("age_years".into());
                names.push("age_years_squared".into());
            }
            AgeForm::PerYear => {
                names.extend(ages.iter().skip(1).map(|a| format!("age={a}")));
            }
        }
        names.push("miles_10k".into());
        for &v in variants.iter().skip(1) {
            names.push(format!("variant={}", market.names.variant_name(v)));
        }
        for c in conditions.iter().skip(1) {
            names.push(format!("condition={c}"));
        }
        if variant_slopes {
            for &v in variants.iter().skip(1) {
                names.push(format!(
                    "variant={}:age_years",
                    market.names.variant_name(v)
                ));
            }
        }
        for (_, name) in &options {
            names.push(format!("option={name}"));
        }
        if time {
            names.push(super::market_time::TERM_NAME.into());
        }
        Self {
            age_form,
            age_levels: ages,
            variants,
            conditions,
            variant_slopes,
            options,
            time,
            names,
        }
    }

    /// Number of columns.
    #[must_use]
    pub fn width(&self) -> usize {
        self.names.len()
    }

    /// Index of the age-slope column of `variant`, when the design has variant slopes and it is
    /// not the base.
    #[must_use]
    pub fn slope_column(&self, variant: NameId) -> Option<usize> {
        if !self.variant_slopes {
            return None;
        }
        let pos = self.variants.iter().position(|v| *v == variant)?;
        (pos > 0).then(|| {
            // After the intercept, age, mileage, variant and condition columns; the first
            // slope belongs to the second variant.
            self.miles_column()
                + (self.variants.len() - 1)
                + self.conditions.len().saturating_sub(1)
                + pos
        })
    }

    /// Index of the column of the design's `index`-th option.
    #[must_use]
    pub fn option_column(&self, index: usize) -> usize {
        let slopes = if self.variant_slopes {
            self.variants.len().saturating_sub(1)
        } else {
            0
        };
        self.miles_column()
            + self.variants.len().saturating_sub(1)
            + self.conditions.len().saturating_sub(1)
            + slopes
            + 1
            + index
    }

    /// The option columns a listing or subject stating `cell` sets (its options that have a
    /// term).
    #[must_use]
    pub fn option_columns(&self, cell: &str) -> Vec<usize> {
        let keys = crate::equipment::keys(cell);
        self.options
            .iter()
            .enumerate()
            .filter(|(_, (key, _))| keys.contains(key))
            .map(|(i, _)| self.option_column(i))
            .collect()
    }

    /// Index of the market-conditions column, when the design has one (always the last).
    #[must_use]
    pub fn time_column(&self) -> Option<usize> {
        self.time.then(|| self.names.len() - 1)
    }

    /// Index of the mileage column.
    #[must_use]
    pub fn miles_column(&self) -> usize {
        1 + self.age_width()
    }

    /// Number of age columns (after the intercept).
    #[must_use]
    pub fn age_width(&self) -> usize {
        match self.age_form {
            AgeForm::Linear | AgeForm::Auto => 1,
            AgeForm::Quadratic => 2,
            AgeForm::PerYear => self.age_levels.len().saturating_sub(1),
        }
    }

    /// Youngest and oldest age in the fitted data, years.
    #[must_use]
    pub fn age_range(&self) -> (f64, f64) {
        match (self.age_levels.first(), self.age_levels.last()) {
            (Some(&lo), Some(&hi)) => (f64::from(lo), f64::from(hi)),
            _ => (0.0, 0.0),
        }
    }

    /// Whether `variant` has a level in the design.
    #[must_use]
    pub fn knows_variant(&self, variant: NameId) -> bool {
        self.variants.contains(&variant)
    }

    /// Whether `condition` has a level in the design.
    #[must_use]
    pub fn knows_condition(&self, condition: Condition) -> bool {
        self.conditions.contains(&condition)
    }

    /// Fills `out` (length [`Self::width`]) with the design row. An unknown variant or condition
    /// contributes as the base level; callers check with [`Self::knows_variant`] first where it
    /// matters. Ages between per-year levels are interpolated linearly; beyond them, clamped.
    pub fn fill_row(
        &self,
        age: f64,
        miles: f64,
        variant: NameId,
        condition: Condition,
        out: &mut [f64],
    ) {
        out.fill(0.0);
        out[0] = 1.0;
        match self.age_form {
            AgeForm::Linear | AgeForm::Auto => out[1] = age,
            AgeForm::Quadratic => {
                out[1] = age;
                out[2] = age * age;
            }
            AgeForm::PerYear => self.fill_age_levels(age, &mut out[1..=self.age_width()]),
        }
        let m = self.miles_column();
        out[m] = miles / MILES_UNIT;
        let mut next = m + 1;
        if let Some(pos) = self.variants.iter().position(|v| *v == variant) {
            if pos > 0 {
                out[next + pos - 1] = 1.0;
            }
        }
        next += self.variants.len().saturating_sub(1);
        if let Some(pos) = self.conditions.iter().position(|c| *c == condition) {
            if pos > 0 {
                out[next + pos - 1] = 1.0;
            }
        }
        if let Some(c) = self.slope_column(variant) {
            out[c] = age;
        }
    }

    fn fill_age_levels(&self, age: f64, out: &mut [f64]) {
        let levels = &self.age_levels;
        let Some(&first) = levels.first() else { return };
        let last = levels[levels.len() - 1];
        // A NaN age (never from the data; from a caller's arithmetic) takes the base level
        // rather than an index before the first.
        let age = if age.is_nan() {
            f64::from(first)
        } else {
            age.clamp(f64::from(first), f64::from(last))
        };
        // Indicator k (0-based) belongs to levels[k + 1]; the base level has none.
        let set = |out: &mut [f64], level_index: usize, weight: f64| {
            if level_index > 0 {
                out[level_index - 1] += weight;
            }
        };
        let upper = levels.partition_point(|&l| f64::from(l) < age);
        // Exactly on a level (ages are whole years in the data, so this is an exact match).
        if upper < levels.len() && (f64::from(levels[upper]) - age).abs() < 1e-12 {
            set(out, upper, 1.0);
            return;
        }
        let (lo, hi) = (upper - 1, upper);
        let (a, b) = (f64::from(levels[lo]), f64::from(levels[hi]));
        let t = (age - a) / (b - a);
        set(out, lo, 1.0 - t);
        set(out, hi, t);
    }
}

/// The distinct ages of the rows, youngest first. Ages span a few dozen years at most, so a
/// table of seen ages replaces sorting every row's age.
fn distinct_ages(market: &Market, rows: &[usize], as_of_year: i32) -> Vec<i32> {
    let age = |r: usize| (as_of_year - market.model_year[r]).max(0);
    let oldest = rows.iter().map(|&r| age(r)).max().unwrap_or(0);
    let mut seen = vec![false; oldest as usize + 1];
    for &r in rows {
        seen[age(r) as usize] = true;
    }
    (0..=oldest).filter(|&a| seen[a as usize]).collect()
}
