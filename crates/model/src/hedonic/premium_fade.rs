//! Whether a variant's premium fades with age: a variant × age slope per variant, tested
//! against the constant-premium model.
//!
//! With one variant term in ln price every variant's premium over the base is the same
//! percentage at every age by construction. Giving each variant but the base its own age slope
//! (`variant=<name>:age_years`) lets the premium fade or grow; the nested-model F test (the
//! general linear test, Kutner et al., *Applied Linear Statistical Models*, 5th ed., 2005,
//! §2.8 and §7.3) says whether the data support it:
//! `F = ((RSS_r − RSS_f) / q) / (RSS_f / (n − p_f))` on `(q, n − p_f)` degrees of freedom,
//! with `q` the slopes added. Under `auto` (the default) the slopes are kept when p < 0.05.
//! Both models are fitted by least squares on the listings the age-form choice uses (an evenly
//! spaced sample of at most [`super::CHOICE_SAMPLE`]), so the test costs two bounded fits.

use chrono::NaiveDate;
use linfa::ParamGuard;
use serde::{Deserialize, Serialize};

use super::{AgeForm, HedonicModel, HedonicParams};
use crate::market::Market;

/// A variant's value rising by more than this fraction in one year of age sets the slopes
/// aside under `auto` (0.5 %: smaller rises at the end of a curve, where few listings are, are
/// within its noise; our choice, common practice, no source).
pub const MATERIAL_RISE: f64 = 0.005;

/// Level below which the test's p-value keeps the variant slopes under `auto`.
pub const KEEP_BELOW_P: f64 = 0.05;

/// Whether each variant gets its own age slope.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize, Default)]
#[serde(rename_all = "snake_case")]
pub enum VariantSlopes {
    /// When the F test supports them (p < 0.05).
    #[default]
    Auto,
    /// Never: one premium per variant at every age (sessions before format 5).
    Never,
    /// Always, whatever the test says.
    Always,
}

impl VariantSlopes {
    /// Reads "auto", "never" or "always".
    #[must_use]
    pub fn parse(text: &str) -> Option<Self> {
        match text.trim().to_ascii_lowercase().as_str() {
            "auto" => Some(Self::Auto),
            "never" | "off" => Some(Self::Never),
            "always" | "on" => Some(Self::Always),
            _ => None,
        }
    }

    /// The setting sessions before format 5 were made under.
    #[must_use]
    pub fn never() -> Self {
        Self::Never
    }
}

impl std::fmt::Display for VariantSlopes {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(match self {
            Self::Auto => "auto",
            Self::Never => "never",
            Self::Always => "always",
        })
    }
}

/// The F test of the variant slopes against the constant-premium model.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct PremiumFadeTest {
    /// The F statistic.
    pub f: f64,
    /// Slopes added (numerator degrees of freedom).
    pub df1: usize,
    /// Residual degrees of freedom of the model with the slopes.
    pub df2: usize,
    /// Upper-tail p-value.
    pub p_value: f64,
    /// Listings the two models were fitted on.
    pub listings: usize,
    /// Why the slopes are not kept under `auto` although the test may support them: too few
    /// listings for the terms, or a variant whose value would then rise with age.
    #[serde(default)]
    pub set_aside: Option<String>,
}

impl PremiumFadeTest {
    /// Whether the data support premiums that change with age: p < [`KEEP_BELOW_P`], enough
    /// listings for the terms, and every variant's value still falling with age.
    #[must_use]
    pub fn supported(&self) -> bool {
        self.p_value < KEEP_BELOW_P && self.set_aside.is_none()
    }

    /// The test in words: "F = 14.20 on 2 and 940 degrees of freedom, p < 0.001".
    #[must_use]
    pub fn describe(&self) -> String {
        format!(
            "F = {:.2} on {} and {} degrees of freedom, {}",
            self.f,
            self.df1,
            self.df2,
            p_words(self.p_value)
        )
    }
}

/// The nested-model F statistic and its p-value from the two fits' residual sums of squares.
#[must_use]
pub fn nested_f(rss_reduced: f64, rss_full: f64, added: usize, df_full: usize) -> (f64, f64) {
    let f = ((rss_reduced - rss_full) / added as f64) / (rss_full / df_full as f64);
    // A difference below zero is rounding (the full model cannot fit worse): F = 0.
    let f = if f < 0.0 { 0.0 } else { f };
    (f, crate::stats::f_p_value(f, added as f64, df_full as f64))
}

/// Tests variant age slopes on `rows` (least squares, on the age-form choice's sample).
///
/// # Errors
/// In words, when the test cannot be made: one variant only, or the slopes cannot be told apart
/// from the other terms.
pub fn test_premium_fade(
    market: &Market,
    rows: &[usize],
    as_of: NaiveDate,
    age_form: AgeForm,
    market_time: bool,
    equipment: bool,
) -> Result<PremiumFadeTest, String> {
    let step = rows.len().div_ceil(super::CHOICE_SAMPLE).max(1);
    let sample: Vec<usize> = rows.iter().copied().step_by(step).collect();
    let fit = |slopes: bool| -> Result<HedonicModel, String> {
        HedonicParams::new(as_of)
            .age_form(age_form)
            .market_time(market_time)
            .equipment(equipment)
            .variant_slopes(slopes)
            .check()
            .and_then(|p| p.fit(market, &sample))
            .map_err(|e| e.to_string())
    };
    let reduced = fit(false)?;
    if reduced.design().variants.len() < 2 {
        return Err("the model has one variant: no premium to fade".into());
    }
    let full = fit(true).map_err(|e| format!("the variant slopes cannot be fitted ({e})"))?;
    let added = full.coefficients().len() - reduced.coefficients().len();
    let df2 = full.df_residual();
    let (f, p_value) = nested_f(reduced.rss(), full.rss(), added, df2);
    let terms = full.coefficients().len();
    // The same guards as the age form's choice: enough listings per term, and no curve that
    // says an older vehicle is worth more.
    let set_aside = if sample.len() < super::LISTINGS_PER_TERM * terms {
        Some(format!(
            "{} listings are too few for the {terms} terms with the slopes (at least {} per term)",
            sample.len(),
            super::LISTINGS_PER_TERM
        ))
    } else if let (Some(&(a, b, pct)), true) = (
        full.rising_steps().first(),
        reduced.rising_steps().is_empty(),
    ) {
        // The slopes would raise the warning the constant-premium fit does not.
        Some(format!(
            "with the slopes, {}'s value would rise with age (ages {a} to {b}: {pct:+.1} %)",
            market.names.variant_name(full.design().variants[0])
        ))
    } else {
        rising_variant(&full, market)
    };
    Ok(PremiumFadeTest {
        f,
        df1: added,
        df2,
        p_value,
        listings: sample.len(),
        set_aside,
    })
}

/// The first variant whose fitted value rises by more than [`MATERIAL_RISE`] between two whole
/// ages inside the data, in words; `None` when every variant's value falls (or nearly holds)
/// with age.
fn rising_variant(model: &HedonicModel, market: &Market) -> Option<String> {
    let design = model.design();
    let (lo, hi) = (
        design.age_levels.first().copied()?,
        design.age_levels.last().copied()?,
    );
    for &v in &design.variants {
        for a in lo..hi {
            let (young, old) = (f64::from(a), f64::from(a + 1));
            let change = model.age_effect(old) - model.age_effect(young)
                + model.variant_slope_effect(v, old)
                - model.variant_slope_effect(v, young);
            if change > MATERIAL_RISE.ln_1p() {
                return Some(format!(
                    "with the slopes, {}'s value would rise with age (ages {a} to {}: {:+.1} %)",
                    market.names.variant_name(v),
                    a + 1,
                    100.0 * change.exp_m1()
                ));
            }
        }
    }
    None
}

/// What the data say about each variant's premium, in words, for every front end: first the
/// test's verdict, then one line per variant, from the fitted `model`, the `test` (when made)
/// and the ages up to `max_age`.
#[must_use]
pub fn summary(
    model: &HedonicModel,
    market: &Market,
    test: Option<&Result<PremiumFadeTest, String>>,
    max_age: u32,
) -> Vec<String> {
    let design = model.design();
    let Some(&base) = design.variants.first() else {
        return Vec::new();
    };
    if design.variants.len() < 2 {
        return Vec::new();
    }
    let name = |v| market.names.variant_name(v).to_owned();
    let pct = |log: f64| 100.0 * (log.exp() - 1.0);
    let (lo, hi) = design.age_range();
    let (young, old) = (lo.max(0.0), hi.min(f64::from(max_age)).max(lo));
    let verdict = match (test, design.variant_slopes) {
        (Some(Ok(t)), true) if t.supported() => format!(
            "each variant has its own age slope: the data support premiums that change with age ({})",
            t.describe()
        ),
        (Some(Ok(t)), true) => format!(
            "each variant has its own age slope, as set, though the test does not support it ({})",
            t.describe()
        ),
        (Some(Ok(t)), false) => match &t.set_aside {
            Some(why) if t.p_value < KEEP_BELOW_P => format!(
                "one premium per variant at every age: {why} ({})",
                t.describe()
            ),
            _ => format!(
                "one premium per variant at every age: premiums that change with age are not supported ({})",
                t.describe()
            ),
        },
        (Some(Err(why)), slopes) => format!(
            "{}: no test ({why})",
            if slopes {
                "each variant has its own age slope"
            } else {
                "one premium per variant at every age"
            }
        ),
        (None, true) => "each variant has its own age slope, as set".to_owned(),
        (None, false) => {
            "one premium per variant at every age: variant slopes switched off".to_owned()
        }
    };
    let terms = model.terms();
    let mut lines = vec![verdict];
    for &v in design.variants.iter().skip(1) {
        let (at_young, _) = model.premium(v, young);
        let (at_old, _) = model.premium(v, old);
        let slope_p = terms
            .iter()
            .find(|t| t.name == format!("variant={}:age_years", name(v)))
            .map(|t| t.p_value);
        lines.push(match slope_p {
            Some(p) if p < KEEP_BELOW_P => format!(
                "{}'s premium over {} {} from {:.1} % at age {young:.0} to {:.1} % at age {old:.0} (its own slope: {})",
                name(v),
                name(base),
                if at_old < at_young { "falls" } else { "rises" },
                pct(at_young),
                pct(at_old),
                p_words(p)
            ),
            Some(p) => format!(
                "{}'s premium over {} holds at about {:.1} % ({:.1} % at age {old:.0}; its own slope cannot be told from none, {})",
                name(v),
                name(base),
                pct(at_young),
                pct(at_old),
                p_words(p)
            ),
            None => format!(
                "{}'s premium over {} is {:.1} % at every age",
                name(v),
                name(base),
                pct(at_young)
            ),
        });
    }
    lines
}

fn p_words(p: f64) -> String {
    if p < 0.001 {
        "p < 0.001".to_owned()
    } else {
        format!("p = {p:.3}")
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_f_statistic_follows_its_definition() {
        // Constructed: RSS 120 → 100 with 2 slopes added and 50 residual degrees of freedom:
        // F = (20 / 2) / (100 / 50) = 5.
        let (f, p) = nested_f(120.0, 100.0, 2, 50);
        assert!((f - 5.0).abs() < 1e-12);
        assert!(p > 0.0 && p < 0.05, "{p}");
        let (f, p) = nested_f(100.0, 100.0 + 1e-12, 2, 50);
        assert!(f.abs() < f64::EPSILON);
        assert!((p - 1.0).abs() < 1e-12);
        assert_eq!(
            VariantSlopes::parse(" Always "),
            Some(VariantSlopes::Always)
        );
        assert_eq!(VariantSlopes::parse("sometimes"), None);
    }
}
