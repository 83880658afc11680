//! The total-loss claim worksheet: a jurisdiction profile applied to one claim's facts.

use serde::{Deserialize, Serialize};

use super::Line;
use super::profile::{JurisdictionProfile, ProfileCheck, RegistrationPaid};
use super::total_loss::{Settlement, SettlementInputs, TotalLossVerdict, settle, total_loss_test};
use super::trade_in::WorksheetError;

/// The facts of one claim, entered by the adjuster.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ClaimInputs {
    /// The profile's id.
    pub profile_id: String,
    /// Sales tax rate where the vehicle was registered, percent.
    pub sales_tax_pct: f64,
    /// Title fee.
    pub title_fee: f64,
    /// Transfer fee.
    pub transfer_fee: f64,
    /// Annual registration fee.
    pub annual_registration: f64,
    /// Months of registration left at the date of loss.
    pub registration_months_remaining: f64,
    /// Policy deductible.
    pub deductible: f64,
    /// Repair estimate.
    pub repair_estimate: f64,
    /// Salvage value.
    pub salvage_value: f64,
    /// Whether the owner keeps the salvage (its value is then deducted).
    pub owner_retains_salvage: bool,
}

/// A part the profile does not pay, with why.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct NotPaid {
    /// What.
    pub label: String,
    /// The profile's citation.
    pub citation: String,
}

/// The claim worksheet with every part shown.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ClaimWorksheet {
    /// The ACV the settlement starts from.
    pub acv: f64,
    /// Itemized deductions already inside the ACV (condition and prior damage lines applied to
    /// every comparable), shown again so the claimant sees them.
    pub itemized_in_acv: Vec<Line>,
    /// The settlement.
    pub settlement: Settlement,
    /// Parts the profile does not pay.
    pub not_paid: Vec<NotPaid>,
    /// The total-loss test.
    pub verdict: TotalLossVerdict,
    /// The total-loss rule's citation.
    pub total_loss_citation: String,
    /// The comparables against the profile.
    pub check: ProfileCheck,
}

/// Works the claim: taxes and fees as the profile pays them, the deductible, retained salvage,
/// and the total-loss test.
pub fn claim(
    profile: &JurisdictionProfile,
    inputs: &ClaimInputs,
    acv: f64,
    itemized_in_acv: Vec<Line>,
    check: ProfileCheck,
) -> Result<ClaimWorksheet, WorksheetError> {
    let mut not_paid = Vec::new();
    let mut paid = |flag: bool, amount: f64, label: &str, citation: String| {
        if flag {
            amount
        } else {
            not_paid.push(NotPaid {
                label: label.to_owned(),
                citation,
            });
            0.0
        }
    };
    let sales_tax_pct = paid(
        profile.sales_tax_paid.value,
        inputs.sales_tax_pct,
        "sales tax",
        profile.sales_tax_paid.source(),
    );
    let fees = paid(
        profile.title_and_transfer_fees_paid.value,
        inputs.title_fee + inputs.transfer_fee,
        "title and transfer fees",
        profile.title_and_transfer_fees_paid.source(),
    );
    let annual_registration = paid(
        profile.registration.value == RegistrationPaid::Prorated,
        inputs.annual_registration,
        "registration",
        profile.registration.source(),
    );
    for (field, value) in [
        ("title_fee", inputs.title_fee),
        ("transfer_fee", inputs.transfer_fee),
        ("annual_registration", inputs.annual_registration),
        ("salvage_value", inputs.salvage_value),
    ] {
        if !(value.is_finite() && value >= 0.0) {
            return Err(WorksheetError::BadInput {
                field,
                value,
                why: "a non-negative amount",
            });
        }
    }
    let acv = super::to_cents(acv);
    let mut settlement = settle(&SettlementInputs {
        acv,
        sales_tax_pct,
        title_and_transfer_fees: fees,
        annual_registration,
        registration_months_remaining: inputs.registration_months_remaining,
        deductible: inputs.deductible,
        owner_retains_salvage: inputs.owner_retains_salvage.then_some(inputs.salvage_value),
    })?;
    // settle() lists tax, fees and registration in that order; a part the profile does not pay
    // is listed under `not_paid` with its citation instead of as a zero line.
    let paid_parts = [
        profile.sales_tax_paid.value,
        profile.title_and_transfer_fees_paid.value,
        profile.registration.value == RegistrationPaid::Prorated,
    ];
    let mut parts = paid_parts.iter();
    settlement
        .additions
        .retain(|_| parts.next().copied().unwrap_or(true));
    let verdict = total_loss_test(
        profile.total_loss_rule.value,
        acv,
        inputs.repair_estimate,
        inputs.salvage_value,
    )?;
    Ok(ClaimWorksheet {
        acv,
        itemized_in_acv,
        settlement,
        not_paid,
        verdict,
        total_loss_citation: profile.total_loss_rule.source(),
        check,
    })
}
