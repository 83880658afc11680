//! The total-loss claim worksheet: a jurisdiction profile applied to one claim's facts.

use serde::{Deserialize, Serialize};

use super::Line;
use super::profile::{JurisdictionProfile, ProfileCheck, RegistrationPaid};
use super::total_loss::{Settlement, SettlementInputs, TotalLossVerdict, settle, total_loss_test};
use super::trade_in::{WorksheetError, amount, decimal_in};
use crate::money::Cents;

/// The facts of one claim, entered by the adjuster.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ClaimInputs {
    /// The profile's id.
    pub profile_id: String,
    /// Sales tax rate where the vehicle was registered, percent.
    pub sales_tax_pct: f64,
    /// Title fee.
    pub title_fee: Cents,
    /// Transfer fee.
    pub transfer_fee: Cents,
    /// Annual registration fee.
    pub annual_registration: Cents,
    /// Months of registration left at the date of loss.
    pub registration_months_remaining: f64,
    /// Policy deductible.
    pub deductible: Cents,
    /// Repair estimate.
    pub repair_estimate: Cents,
    /// Salvage value.
    pub salvage_value: Cents,
    /// Whether the owner keeps the salvage (its value is then deducted).
    pub owner_retains_salvage: bool,
}

impl ClaimInputs {
    /// The inputs a new claim under profile `profile_id` starts from: a $500 deductible and
    /// zero for every other amount, for the adjuster to fill in.
    #[must_use]
    pub fn starting(profile_id: &str) -> Self {
        Self {
            profile_id: profile_id.to_owned(),
            sales_tax_pct: 0.0,
            title_fee: Cents::ZERO,
            transfer_fee: Cents::ZERO,
            annual_registration: Cents::ZERO,
            registration_months_remaining: 0.0,
            deductible: Cents::whole_dollars(500),
            repair_estimate: Cents::ZERO,
            salvage_value: Cents::ZERO,
            owner_retains_salvage: false,
        }
    }
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
    /// The ACV the settlement starts from, to the cent.
    pub acv: Cents,
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
/// and the total-loss test, every amount in whole cents.
pub fn claim(
    profile: &JurisdictionProfile,
    inputs: &ClaimInputs,
    acv: Cents,
    itemized_in_acv: Vec<Line>,
    check: ProfileCheck,
) -> Result<ClaimWorksheet, WorksheetError> {
    let mut not_paid = Vec::new();
    let mut paid = |flag: bool, label: &str, citation: String| {
        if !flag {
            not_paid.push(NotPaid {
                label: label.to_owned(),
                citation,
            });
        }
        flag
    };
    let tax_paid = paid(
        profile.sales_tax_paid.value,
        "sales tax",
        profile.sales_tax_paid.source(),
    );
    let fees_paid = paid(
        profile.title_and_transfer_fees_paid.value,
        "title and transfer fees",
        profile.title_and_transfer_fees_paid.source(),
    );
    let registration_paid = paid(
        profile.registration.value == RegistrationPaid::Prorated,
        "registration",
        profile.registration.source(),
    );
    // Every input is checked, paid or not: a damaged number is an error wherever it sits.
    decimal_in("sales_tax_pct", inputs.sales_tax_pct, 100.0, "0 to 100 %")?;
    amount("annual_registration", inputs.annual_registration)?;
    let title_fee = amount("title_fee", inputs.title_fee)?;
    let transfer_fee = amount("transfer_fee", inputs.transfer_fee)?;
    let salvage_value = amount("salvage_value", inputs.salvage_value)?;
    let mut settlement = settle(&SettlementInputs {
        acv,
        sales_tax_pct: if tax_paid { inputs.sales_tax_pct } else { 0.0 },
        title_and_transfer_fees: if fees_paid {
            title_fee + transfer_fee
        } else {
            Cents::ZERO
        },
        annual_registration: if registration_paid {
            inputs.annual_registration
        } else {
            Cents::ZERO
        },
        registration_months_remaining: inputs.registration_months_remaining,
        deductible: inputs.deductible,
        owner_retains_salvage: inputs.owner_retains_salvage.then_some(salvage_value),
    })?;
    // settle() lists tax, fees and registration in that order; a part the profile does not pay
    // is listed under `not_paid` with its citation instead of as a zero line.
    let mut parts = [tax_paid, fees_paid, registration_paid].into_iter();
    settlement
        .additions
        .retain(|_| parts.next().unwrap_or(true));
    let verdict = total_loss_test(
        profile.total_loss_rule.value,
        acv,
        inputs.repair_estimate,
        salvage_value,
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
