//! The total-loss settlement and the total-loss test.
//!
//! Settlement (NAIC Unfair Property/Casualty Claims Settlement Practices Model Regulation §8(A);
//! 10 CCR 2695.8(b) for taxes and fees in California): the ACV plus sales tax, title and
//! transfer fees and the registration prorated to the remaining months, less the deductible;
//! when the owner keeps the salvage, its value is deducted too. Which taxes and fees apply is the jurisdiction's rule,
//! given here as inputs. Total-loss test: either repair / ACV against a threshold T, or the
//! total-loss formula repair + salvage against ACV; whether the boundary counts is a setting.

use std::cmp::Ordering;

use serde::{Deserialize, Serialize};

use super::Line;
use super::trade_in::{WorksheetError, amount, decimal_in};
use crate::money::{Cents, Decimal};

/// Whether reaching the threshold exactly makes a total loss.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Boundary {
    /// Total loss when the measure is greater than or equal to the threshold.
    AtLeast,
    /// Total loss only when the measure is strictly greater.
    GreaterThan,
}

impl Boundary {
    /// Whether a measure that compares with the threshold as `ordering` is a total loss.
    #[must_use]
    pub fn reached(self, ordering: Ordering) -> bool {
        match self {
            Boundary::AtLeast => ordering != Ordering::Less,
            Boundary::GreaterThan => ordering == Ordering::Greater,
        }
    }

    /// "≥" or ">".
    #[must_use]
    pub fn sign(self) -> &'static str {
        match self {
            Boundary::AtLeast => "≥",
            Boundary::GreaterThan => ">",
        }
    }
}

/// The jurisdiction's total-loss rule.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum TotalLossRule {
    /// Repair cost as a percentage of ACV against a threshold.
    Percentage {
        /// Threshold, percent of ACV (exact to a millionth of a point).
        threshold_pct: f64,
        /// Boundary.
        boundary: Boundary,
    },
    /// Repair cost plus salvage value against ACV.
    Formula {
        /// Boundary.
        boundary: Boundary,
    },
}

/// The outcome of the total-loss test, with its inputs.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct TotalLossVerdict {
    /// Whether the vehicle is a total loss, decided exactly on whole cents.
    pub total_loss: bool,
    /// The measure compared (percent of ACV, or repair + salvage in dollars), for display.
    pub measure: f64,
    /// What it was compared with (percent, or the ACV in dollars), for display.
    pub threshold: f64,
    /// The comparison in words.
    pub explanation: String,
}

/// How `100 · repair / acv` compares with `threshold` %, exactly: `100 · repair · 10^6`
/// against `threshold (in millionths) · acv`, in integers.
#[must_use]
pub fn percentage_ordering(repair: Cents, acv: Cents, threshold: Decimal) -> Ordering {
    let lhs = 100 * 1_000_000 * i128::from(repair.get());
    let rhs = i128::from(threshold.micros()) * i128::from(acv.get());
    lhs.cmp(&rhs)
}

/// `measure` with as many decimals (2 to 9) as it takes for the printed number to stand on the
/// same side of `threshold` as the exact comparison: 74.9999 % is never printed "75.00 %"
/// beside a "no" under "≥ 75 %".
fn percent_beside(measure: f64, threshold: f64, exact: Ordering) -> String {
    for decimals in 2..=9 {
        let text = format!("{measure:.decimals$}");
        let shown: f64 = text.parse().unwrap_or(measure);
        if shown.partial_cmp(&threshold) == Some(exact) {
            return text;
        }
    }
    let side = match exact {
        Ordering::Less => "just under ",
        Ordering::Greater => "just over ",
        Ordering::Equal => "",
    };
    format!("{side}{threshold}")
}

/// Applies `rule` to a repair estimate and salvage value; the verdict is decided on whole
/// cents, so a sum that reaches the ACV to the cent reaches it.
pub fn total_loss_test(
    rule: TotalLossRule,
    acv: Cents,
    repair_estimate: Cents,
    salvage_value: Cents,
) -> Result<TotalLossVerdict, WorksheetError> {
    let acv = amount("acv", acv)?;
    let repair_estimate = amount("repair_estimate", repair_estimate)?;
    let salvage_value = amount("salvage_value", salvage_value)?;
    if acv == Cents::ZERO {
        return Err(WorksheetError::BadInput {
            field: "acv",
            value: 0.0,
            why: "a positive amount",
        });
    }
    let yes_no = |b: bool| if b { "yes" } else { "no" };
    Ok(match rule {
        TotalLossRule::Percentage {
            threshold_pct,
            boundary,
        } => {
            let threshold = decimal_in(
                "total-loss threshold",
                threshold_pct,
                1_000.0,
                "0 to 1,000 % of ACV",
            )?;
            let exact = percentage_ordering(repair_estimate, acv, threshold);
            let total_loss = boundary.reached(exact);
            let measure = 100.0 * repair_estimate.dollars() / acv.dollars();
            TotalLossVerdict {
                total_loss,
                measure,
                threshold: threshold.to_f64(),
                explanation: format!(
                    "repair {repair_estimate} is {} % of ACV {acv}; total loss when {} {threshold} %: {}",
                    percent_beside(measure, threshold.to_f64(), exact),
                    boundary.sign(),
                    yes_no(total_loss)
                ),
            }
        }
        TotalLossRule::Formula { boundary } => {
            let measure = repair_estimate + salvage_value;
            let total_loss = boundary.reached(measure.cmp(&acv));
            TotalLossVerdict {
                total_loss,
                measure: measure.dollars(),
                threshold: acv.dollars(),
                explanation: format!(
                    "repair {repair_estimate} + salvage {salvage_value} = {measure}; total loss when {} ACV {acv}: {}",
                    boundary.sign(),
                    yes_no(total_loss)
                ),
            }
        }
    })
}

/// Inputs of the settlement.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct SettlementInputs {
    /// Actual cash value (the reconciled value, after any itemized deductions).
    pub acv: Cents,
    /// Sales tax rate, percent, when the jurisdiction pays it.
    pub sales_tax_pct: f64,
    /// Title and transfer fees.
    pub title_and_transfer_fees: Cents,
    /// Annual registration fee.
    pub annual_registration: Cents,
    /// Months of registration remaining (prorated).
    pub registration_months_remaining: f64,
    /// Policy deductible.
    pub deductible: Cents,
    /// Salvage value deducted when the owner keeps the vehicle; `None` when the insurer takes it.
    pub owner_retains_salvage: Option<Cents>,
}

/// The settlement with each part shown.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Settlement {
    /// Additions to ACV (taxes and fees).
    pub additions: Vec<Line>,
    /// Deductions (deductible, retained salvage).
    pub deductions: Vec<Line>,
    /// The amount paid: the ACV plus the additions less the deductions, to the cent.
    pub payment: Cents,
}

/// Computes the settlement: each line is worked exactly in cents (a rate is an exact decimal)
/// and rounded once; the payment is the sum of the lines as printed.
pub fn settle(inputs: &SettlementInputs) -> Result<Settlement, WorksheetError> {
    let acv = amount("acv", inputs.acv)?;
    let tax = decimal_in("sales_tax_pct", inputs.sales_tax_pct, 100.0, "0 to 100 %")?;
    let months = decimal_in(
        "registration_months_remaining",
        inputs.registration_months_remaining,
        12.0,
        "0 to 12 months",
    )?;
    let fees = amount("title_and_transfer_fees", inputs.title_and_transfer_fees)?;
    let registration = amount("annual_registration", inputs.annual_registration)?;
    let additions = vec![
        Line {
            label: format!("sales tax {tax} %"),
            amount: acv.percent(tax),
        },
        Line {
            label: "title and transfer fees".into(),
            amount: fees,
        },
        Line {
            label: format!("registration, {months} of 12 months remaining"),
            amount: registration.scaled(i128::from(months.micros()), 12 * 1_000_000),
        },
    ];
    let mut deductions = vec![Line {
        label: "deductible".into(),
        amount: amount("deductible", inputs.deductible)?,
    }];
    if let Some(salvage) = inputs.owner_retains_salvage {
        deductions.push(Line {
            label: "salvage retained by the owner".into(),
            amount: amount("owner_retains_salvage", salvage)?,
        });
    }
    let payment = acv + additions.iter().map(|l| l.amount).sum::<Cents>()
        - deductions.iter().map(|l| l.amount).sum::<Cents>();
    Ok(Settlement {
        additions,
        deductions,
        payment,
    })
}

impl std::fmt::Display for TotalLossRule {
    /// "repair ≥ 75 % of ACV" or "repair + salvage ≥ ACV".
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match *self {
            TotalLossRule::Percentage {
                threshold_pct,
                boundary,
            } => write!(f, "repair {} {threshold_pct} % of ACV", boundary.sign()),
            TotalLossRule::Formula { boundary } => {
                write!(f, "repair + salvage {} ACV", boundary.sign())
            }
        }
    }
}
