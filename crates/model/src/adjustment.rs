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
    /// Condition-class difference, from the fitted condition terms.
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
    /// Amount in currency added to the comparable's price.
    pub amount: f64,
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
) -> Vec<AdjustmentLine> {
    let price = market.asking_price[row];
    let as_of_year = model.as_of_year();
    let line = |kind, log_change: f64, basis: String| AdjustmentLine {
        kind,
        amount: price * (log_change.exp() - 1.0),
        basis,
    };
    let mut lines = Vec::with_capacity(4);

    let d_miles = subject.miles - market.miles[row];
    let slope = model.miles_slope();
    lines.push(line(
        AdjustmentKind::Mileage,
        slope * d_miles,
        format!(
            "fitted {:+.2} % per 10,000 mi × ({} − {}) mi",
            100.0 * ((slope * 10_000.0).exp() - 1.0),
            thousands(subject.miles),
            thousands(market.miles[row])
        ),
    ));

    let (age_s, age_c) = (
        age_years(subject.model_year, as_of_year),
        age_years(market.model_year[row], as_of_year),
    );
    let d_age = model.age_effect(age_s) - model.age_effect(age_c);
    lines.push(line(
        AdjustmentKind::ModelYear,
        d_age,
        format!(
            "fitted age curve: model year {} vs {} ({:+.1} %)",
            subject.model_year,
            market.model_year[row],
            100.0 * (d_age.exp() - 1.0)
        ),
    ));

    let d_variant =
        model.variant_effect(subject.variant) - model.variant_effect(market.variant[row]);
    lines.push(line(
        AdjustmentKind::Variant,
        d_variant,
        format!(
            "fitted variant terms: {} vs {} ({:+.1} %)",
            variant_label(market, subject.variant),
            market.variant_name(row),
            100.0 * (d_variant.exp() - 1.0)
        ),
    ));

    let d_condition =
        model.condition_effect(subject.condition) - model.condition_effect(market.condition[row]);
    lines.push(line(
        AdjustmentKind::Condition,
        d_condition,
        format!(
            "fitted condition terms: {} vs {} ({:+.1} %)",
            subject.condition,
            market.condition[row],
            100.0 * (d_condition.exp() - 1.0)
        ),
    ));
    lines
}

fn variant_label(market: &Market, variant: NameId) -> &str {
    if variant == crate::vocabulary::NO_NAME {
        "(no variant)"
    } else {
        market.names.name(variant)
    }
}

/// The appraiser's lines that apply to the comparable on `line`.
#[must_use]
pub fn user_lines(user: &[UserAdjustment], line: u64) -> Vec<AdjustmentLine> {
    user.iter()
        .filter(|u| u.line.is_none_or(|l| l == line))
        .map(|u| AdjustmentLine {
            kind: u.kind,
            amount: u.amount,
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
