//! The total-loss settlement and the total-loss test.
//!
//! Settlement (NAIC Unfair Property/Casualty Claims Settlement Practices Model Regulation §8(A);
//! 10 CCR 2695.8(b) for taxes and fees in California): the ACV plus sales tax, title and
//! transfer fees and the registration prorated to the remaining months, less the deductible;
//! when the owner keeps the salvage, its value is deducted too. Which taxes and fees apply is the jurisdiction's rule,
//! given here as inputs. Total-loss test: either repair / ACV against a threshold T, or the
//! total-loss formula repair + salvage against ACV; whether the boundary counts is a setting.

use serde::{Deserialize, Serialize};

use super::trade_in::WorksheetError;
use super::{Line, to_cents};
use crate::format::cents;

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
    fn reached(self, measure: f64, threshold: f64) -> bool {
        match self {
            Boundary::AtLeast => measure >= threshold,
            Boundary::GreaterThan => measure > threshold,
        }
    }
}

/// The jurisdiction's total-loss rule.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum TotalLossRule {
    /// Repair cost as a percentage of ACV against a threshold.
    Percentage {
        /// Threshold, percent of ACV.
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
    /// Whether the vehicle is a total loss.
    pub total_loss: bool,
    /// The measure compared (percent of ACV, or repair + salvage in currency).
    pub measure: f64,
    /// What it was compared with.
    pub threshold: f64,
    /// The comparison in words.
    pub explanation: String,
}

/// Applies `rule` to a repair estimate and salvage value.
pub fn total_loss_test(
    rule: TotalLossRule,
    acv: f64,
    repair_estimate: f64,
    salvage_value: f64,
) -> Result<TotalLossVerdict, WorksheetError> {
    for (field, value) in [
        ("acv", acv),
        ("repair_estimate", repair_estimate),
        ("salvage_value", salvage_value),
    ] {
        if !(value.is_finite() && value >= 0.0) {
            return Err(WorksheetError::BadInput {
                field,
                value,
                why: "a non-negative amount",
            });
        }
    }
    if acv <= 0.0 {
        return Err(WorksheetError::BadInput {
            field: "acv",
            value: acv,
            why: "a positive amount",
        });
    }
    let sign = |b: Boundary| {
        if matches!(b, Boundary::AtLeast) {
            "≥"
        } else {
            ">"
        }
    };
    Ok(match rule {
        TotalLossRule::Percentage {
            threshold_pct,
            boundary,
        } => {
            let measure = 100.0 * repair_estimate / acv;
            let total_loss = boundary.reached(measure, threshold_pct);
            TotalLossVerdict {
                total_loss,
                measure,
                threshold: threshold_pct,
                explanation: format!(
                    "repair {} is {measure:.2} % of ACV {}; total loss when {} {threshold_pct} %: {}",
                    cents(repair_estimate),
                    cents(acv),
                    sign(boundary),
                    if total_loss { "yes" } else { "no" }
                ),
            }
        }
        TotalLossRule::Formula { boundary } => {
            let measure = repair_estimate + salvage_value;
            let total_loss = boundary.reached(measure, acv);
            TotalLossVerdict {
                total_loss,
                measure,
                threshold: acv,
                explanation: format!(
                    "repair {} + salvage {} = {}; total loss when {} ACV {}: {}",
                    cents(repair_estimate),
                    cents(salvage_value),
                    cents(measure),
                    sign(boundary),
                    cents(acv),
                    if total_loss { "yes" } else { "no" }
                ),
            }
        }
    })
}

/// Inputs of the settlement.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct SettlementInputs {
    /// Actual cash value (the reconciled value, after any itemized deductions).
    pub acv: f64,
    /// Sales tax rate, percent, when the jurisdiction pays it.
    pub sales_tax_pct: f64,
    /// Title and transfer fees.
    pub title_and_transfer_fees: f64,
    /// Annual registration fee.
    pub annual_registration: f64,
    /// Months of registration remaining (prorated).
    pub registration_months_remaining: f64,
    /// Policy deductible.
    pub deductible: f64,
    /// Salvage value deducted when the owner keeps the vehicle; `None` when the insurer takes it.
    pub owner_retains_salvage: Option<f64>,
}

/// The settlement with each part shown.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Settlement {
    /// Additions to ACV (taxes and fees).
    pub additions: Vec<Line>,
    /// Deductions (deductible, retained salvage).
    pub deductions: Vec<Line>,
    /// The amount paid.
    pub payment: f64,
}

/// Computes the settlement.
pub fn settle(inputs: &SettlementInputs) -> Result<Settlement, WorksheetError> {
    let fields = [
        ("acv", inputs.acv),
        ("sales_tax_pct", inputs.sales_tax_pct),
        ("title_and_transfer_fees", inputs.title_and_transfer_fees),
        ("annual_registration", inputs.annual_registration),
        (
            "registration_months_remaining",
            inputs.registration_months_remaining,
        ),
        ("deductible", inputs.deductible),
        (
            "owner_retains_salvage",
            inputs.owner_retains_salvage.unwrap_or(0.0),
        ),
    ];
    for (field, value) in fields {
        if !(value.is_finite() && value >= 0.0) {
            return Err(WorksheetError::BadInput {
                field,
                value,
                why: "a non-negative amount",
            });
        }
    }
    if inputs.registration_months_remaining > 12.0 {
        return Err(WorksheetError::BadInput {
            field: "registration_months_remaining",
            value: inputs.registration_months_remaining,
            why: "0 to 12 months",
        });
    }
    // The ACV is paid to the cent; each line is rounded and the payment is their sum.
    let acv = to_cents(inputs.acv);
    let additions = vec![
        Line {
            label: format!("sales tax {} %", inputs.sales_tax_pct),
            amount: to_cents(acv * inputs.sales_tax_pct / 100.0),
        },
        Line {
            label: "title and transfer fees".into(),
            amount: to_cents(inputs.title_and_transfer_fees),
        },
        Line {
            label: format!(
                "registration, {} of 12 months remaining",
                inputs.registration_months_remaining
            ),
            amount: to_cents(
                inputs.annual_registration * inputs.registration_months_remaining / 12.0,
            ),
        },
    ];
    let mut deductions = vec![Line {
        label: "deductible".into(),
        amount: to_cents(inputs.deductible),
    }];
    if let Some(salvage) = inputs.owner_retains_salvage {
        deductions.push(Line {
            label: "salvage retained by the owner".into(),
            amount: to_cents(salvage),
        });
    }
    let payment = to_cents(
        acv + additions.iter().map(|l| l.amount).sum::<f64>()
            - deductions.iter().map(|l| l.amount).sum::<f64>(),
    );
    Ok(Settlement {
        additions,
        deductions,
        payment,
    })
}

impl std::fmt::Display for TotalLossRule {
    /// "repair ≥ 75 % of ACV" or "repair + salvage ≥ ACV".
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        let sign = |b: Boundary| match b {
            Boundary::AtLeast => "≥",
            Boundary::GreaterThan => ">",
        };
        match *self {
            TotalLossRule::Percentage {
                threshold_pct,
                boundary,
            } => write!(f, "repair {} {threshold_pct} % of ACV", sign(boundary)),
            TotalLossRule::Formula { boundary } => {
                write!(f, "repair + salvage {} ACV", sign(boundary))
            }
        }
    }
}
