//! Adjusting each comparable to the subject, line by line, in currency with its basis.
//!
//! Sales-comparison grid (Appraisal Institute, The Appraisal of Real Estate; USPAP SR 7-4 for
//! personal property): adjusted_j = P_j + sum_k a_k. From the log model a line is
//! a_k = P_j (exp(b_k Δx_k) - 1) with Δx = subject - comparable, each line computed on P_j
//! alone (the grid is additive, as appraisers read it). A comparable better than the subject
//! takes a minus adjustment.

use serde::{Deserialize, Serialize};

use crate::condition::Condition;
use crate::format::{signed_money, thousands};
use crate::hedonic::{HedonicModel, age_years};
use crate::market::Market;
use crate::money::Cents;
use crate::vocabulary::NameId;

/// What an adjustment line corrects for.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum AdjustmentKind {
    /// Odometer difference, from the fitted mileage slope.
    Mileage,
    /// Model-year difference, from the fitted age curve.
    ModelYear,
    /// Variant difference, from the fitted variant terms.
    Variant,
    /// Sale-class difference (new, used, certified pre-owned), from the fitted terms. Sessions
    /// before format 4 called it `condition`; reading one renames it.
    SaleClass,
    /// The market's change between the comparable's listing date and the appraisal date, from
    /// the fitted market-conditions term (a time adjustment).
    MarketConditions,
    /// An option the subject and the comparable differ in, from its fitted term.
    Equipment,
    /// The vehicle's physical condition (wear, damage beyond the usual for its age), entered
    /// by the appraiser.
    Condition,
    /// Options or equipment, entered by the appraiser.
    Options,
    /// Prior damage, entered by the appraiser.
    PriorDamage,
    /// Anything else, entered by the appraiser.
    Other,
}

impl AdjustmentKind {
    /// Reads "options", "prior-damage"/"damage" or "other".
    #[must_use]
    pub fn parse_user(text: &str) -> Option<Self> {
        match text.trim().to_ascii_lowercase().replace('-', "_").as_str() {
            "options" | "option" | "equipment" => Some(Self::Options),
            "prior_damage" | "damage" => Some(Self::PriorDamage),
            "condition" => Some(Self::Condition),
            "other" => Some(Self::Other),
            _ => None,
        }
    }

    /// Label for tables.
    #[must_use]
    pub fn label(self) -> &'static str {
        match self {
            Self::Mileage => "mileage",
            Self::ModelYear => "model year",
            Self::Variant => "variant",
            Self::SaleClass => "sold as",
            Self::MarketConditions => "market conditions",
            Self::Equipment => "equipment",
            Self::Condition => "condition",
            Self::Options => "options",
            Self::PriorDamage => "prior damage",
            Self::Other => "other",
        }
    }
}

/// One line of a comparable's adjustment grid.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct AdjustmentLine {
    /// What it corrects for.
    pub kind: AdjustmentKind,
    /// Amount in currency added to the comparable's price.
    pub amount: f64,
    /// Why: the fitted term and the difference, or the appraiser's note.
    pub basis: String,
}

/// An adjustment the appraiser enters.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct UserAdjustment {
    /// The comparable's file line; `None` applies it to every comparable.
    pub line: Option<u64>,
    /// What it corrects for.
    pub kind: AdjustmentKind,
    /// Amount added to the comparable's price, in whole cents as the appraiser entered it.
    pub amount: Cents,
    /// The appraiser's basis (required: every dollar needs one).
    pub basis: String,
}

/// The subject in the model's terms.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SubjectTerms {
    /// Model year.
    pub model_year: i32,
    /// Miles.
    pub miles: f64,
    /// Variant id.
    pub variant: NameId,
    /// Condition.
    pub condition: Condition,
}

/// The model-derived adjustment lines for comparable `row` (zero lines are kept, so the grid
/// shows every attribute was considered).
#[must_use]
pub fn model_lines(
    model: &HedonicModel,
    market: &Market,
    row: usize,
    subject: &SubjectTerms,
    subject_options: &str,
) -> Vec<AdjustmentLine> {
    let equipment = option_differences(
        &model.option_effects(),
        subject_options,
        market.names.name(market.options[row]),
    );
    let as_of_year = model.as_of_year();
    let (age_s, age_c) = (
        age_years(subject.model_year, as_of_year),
        age_years(market.model_year[row], as_of_year),
    );
    // With variant age slopes, the model-year line follows the comparable's own variant curve
    // across the age difference, and the variant line compares the variants at the subject's
    // age: the two add up to the whole difference.
    let (vs, vc) = (subject.variant, market.variant[row]);
    let slope = |v, age| model.variant_slope_effect(v, age);
    grid_lines(&GridInputs {
        price: market.asking_price[row],
        miles_slope: model.miles_slope(),
        miles: (subject.miles, market.miles[row]),
        model_year: (subject.model_year, market.model_year[row]),
        age_log_change: model.age_effect(age_s) - model.age_effect(age_c) + slope(vc, age_s)
            - slope(vc, age_c),
        variant: (
            variant_label(market, subject.variant),
            market.variant_name(row),
        ),
        variant_log_change: model.variant_effect(vs) - model.variant_effect(vc) + slope(vs, age_s)
            - slope(vc, age_s),
        condition: (subject.condition, market.condition[row]),
        condition_log_change: model.condition_effect(subject.condition)
            - model.condition_effect(market.condition[row]),
        market: model.market_drift().map(|d| MarketConditions {
            per_month_before: d.per_month_before,
            distinguishable: d.is_distinguishable(),
            months_before: market.listed_on[row]
                .map(|date| crate::hedonic::market_time::months_before(model.params().as_of, date)),
        }),
        equipment: &equipment,
    })
}

/// Everything one comparable's model lines are computed from: each pair is (subject,
/// comparable), each log change is the fitted effect of the subject's value minus the
/// comparable's.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct GridInputs<'a> {
    /// The comparable's asking price.
    pub price: f64,
    /// Fitted change in ln price per mile.
    pub miles_slope: f64,
    /// Odometers.
    pub miles: (f64, f64),
    /// Model years.
    pub model_year: (i32, i32),
    /// Fitted age effect difference.
    pub age_log_change: f64,
    /// Variant labels.
    pub variant: (&'a str, &'a str),
    /// Fitted variant effect difference.
    pub variant_log_change: f64,
    /// Condition classes.
    pub condition: (Condition, Condition),
    /// Fitted condition effect difference.
    pub condition_log_change: f64,
    /// The market's fitted drift and the comparable's listing date, when the fit has the
    /// market-conditions term.
    pub market: Option<MarketConditions>,
    /// Each fitted option the subject and the comparable differ in.
    pub equipment: &'a [OptionDifference],
}

/// Said in an equipment line's basis when its option's fitted effect cannot be told from none
/// (|estimate / standard error| below 1.96, the normal 5 % two-sided point).
pub const OPTION_UNCERTAIN: &str = "not distinguishable from none";

/// A fitted option the subject and a comparable differ in.
#[derive(Debug, Clone, PartialEq)]
pub struct OptionDifference {
    /// The option's name.
    pub name: String,
    /// Its fitted effect on ln price.
    pub effect: f64,
    /// The effect's standard error.
    pub std_error: f64,
    /// Whether the subject has it (else the comparable has it).
    pub subject_has: bool,
}

/// The fitted options (name, effect, standard error) that the subject's options cell and the
/// comparable's differ in.
#[must_use]
pub fn option_differences(
    fitted: &[(String, f64, f64)],
    subject_options: &str,
    comparable_options: &str,
) -> Vec<OptionDifference> {
    let (s, c) = (
        crate::equipment::keys(subject_options),
        crate::equipment::keys(comparable_options),
    );
    fitted
        .iter()
        .filter_map(|(name, effect, std_error)| {
            let key = crate::vocabulary::name_key(name);
            let (in_s, in_c) = (s.contains(&key), c.contains(&key));
            (in_s != in_c).then(|| OptionDifference {
                name: name.clone(),
                effect: *effect,
                std_error: *std_error,
                subject_has: in_s,
            })
        })
        .collect()
}

/// What a comparable's market-conditions line is computed from.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct MarketConditions {
    /// Fitted coefficient on ln price per month before the appraisal date.
    pub per_month_before: f64,
    /// Whether the drift is distinguishable from none (5 % level).
    pub distinguishable: bool,
    /// Months from the comparable's listing date back to the appraisal date (`None`: undated).
    pub months_before: Option<f64>,
}

/// The model lines (mileage, model year, variant, sale class, and market conditions when the
/// fit has the term) from their inputs; the one place the grid's arithmetic and wording live,
/// used for a live fit and for a saved session.
#[must_use]
pub fn grid_lines(g: &GridInputs<'_>) -> Vec<AdjustmentLine> {
    let line = |kind, log_change: f64, basis: String| AdjustmentLine {
        kind,
        amount: g.price * (log_change.exp() - 1.0),
        basis,
    };
    let d_miles = g.miles.0 - g.miles.1;
    let mut lines = vec![
        line(
            AdjustmentKind::Mileage,
            g.miles_slope * d_miles,
            format!(
                "fitted {:+.2} % per 10,000 mi × ({} − {}) mi",
                100.0 * ((g.miles_slope * 10_000.0).exp() - 1.0),
                thousands(g.miles.0),
                thousands(g.miles.1)
            ),
        ),
        line(
            AdjustmentKind::ModelYear,
            g.age_log_change,
            format!(
                "fitted age curve: model year {} vs {} ({:+.1} %)",
                g.model_year.0,
                g.model_year.1,
                100.0 * (g.age_log_change.exp() - 1.0)
            ),
        ),
        line(
            AdjustmentKind::Variant,
            g.variant_log_change,
            format!(
                "fitted variant terms: {} vs {} ({:+.1} %)",
                g.variant.0,
                g.variant.1,
                100.0 * (g.variant_log_change.exp() - 1.0)
            ),
        ),
        line(
            AdjustmentKind::SaleClass,
            g.condition_log_change,
            format!(
                "fitted sale-class terms: sold {} vs {} ({:+.1} %)",
                g.condition.0.sold_as(),
                g.condition.1.sold_as(),
                100.0 * (g.condition_log_change.exp() - 1.0)
            ),
        ),
    ];
    if let Some(m) = g.market {
        let pct = crate::hedonic::market_time::monthly_change_pct(m.per_month_before);
        let trend = format!(
            "market {} {:.2} % a month (fitted{})",
            if pct < 0.0 { "fell" } else { "rose" },
            pct.abs(),
            if m.distinguishable {
                ""
            } else {
                "; not distinguishable from no drift"
            }
        );
        // Brought to the appraisal date: 0 months before it.
        let (log_change, basis) = match m.months_before {
            Some(months) => (
                -m.per_month_before * months,
                format!("{trend}; listed {months:.1} months before the appraisal date"),
            ),
            None => (0.0, format!("{trend}; no listing date, so not adjusted")),
        };
        lines.push(line(AdjustmentKind::MarketConditions, log_change, basis));
    }
    for d in g.equipment {
        let sign = if d.subject_has { 1.0 } else { -1.0 };
        lines.push(line(
            AdjustmentKind::Equipment,
            sign * d.effect,
            format!(
                "fitted option {}: {:+.1} % (standard error {:.1} points{}); {}",
                d.name,
                100.0 * d.effect.exp_m1(),
                100.0 * d.std_error,
                if (d.effect / d.std_error).abs() < 1.96 {
                    format!("; {OPTION_UNCERTAIN}")
                } else {
                    String::new()
                },
                if d.subject_has {
                    "the subject has it, the comparable does not"
                } else {
                    "the comparable has it, the subject does not"
                }
            ),
        ));
    }
    lines
}

fn variant_label(market: &Market, variant: NameId) -> &str {
    market.names.variant_name(variant)
}

/// The appraiser's lines that apply to the comparable on `line`.
#[must_use]
pub fn user_lines(user: &[UserAdjustment], line: u64) -> Vec<AdjustmentLine> {
    user.iter()
        .filter(|u| u.line.is_none_or(|l| l == line))
        .map(|u| AdjustmentLine {
            kind: u.kind,
            amount: u.amount.dollars(),
            basis: format!(
                "{} ({})",
                u.basis,
                if u.line.is_some() {
                    "this comparable"
                } else {
                    "every comparable"
                }
            ),
        })
        .collect()
}

/// Net and gross adjustment of a grid: (sum, sum of absolute values).
#[must_use]
pub fn net_and_gross(lines: &[AdjustmentLine]) -> (f64, f64) {
    lines.iter().fold((0.0, 0.0), |(net, gross), l| {
        (net + l.amount, gross + l.amount.abs())
    })
}

/// Formats a line for a table: "+$812  mileage: fitted ...".
#[must_use]
pub fn describe(line: &AdjustmentLine) -> String {
    format!(
        "{:>9}  {}: {}",
        signed_money(line.amount),
        line.kind.label(),
        line.basis
    )
}
