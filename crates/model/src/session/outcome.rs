//! What an appraisal is for, and working its worksheet out from the appraisal.

use serde::{Deserialize, Serialize};

use crate::adjustment::AdjustmentKind;
use crate::adjustment::UserAdjustment;
use crate::appraisal::{Appraisal, AppraisalRequest};
use crate::money::Cents;
use crate::ols::Interval;
use crate::worksheet::rows::{self, Row};
use crate::worksheet::{
    ClaimInputs, ClaimWorksheet, JurisdictionProfile, Line, OfferSensitivity, TradeInInputs,
    TradeInOffer, WorksheetError, claim, offer,
};

/// Days to sell the trade-in offer is also shown at.
pub const SENSITIVITY_DAYS: [f64; 5] = [15.0, 30.0, 45.0, 60.0, 90.0];

/// What the value is for. (The claim variant carries its profile as evidence; sessions hold
/// one purpose, so the size difference between variants does not matter.)
#[allow(clippy::large_enum_variant)]
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Purpose {
    /// A value only.
    Value,
    /// A dealer's trade-in offer. With no `retail_value_note` the retail value is the
    /// indicated value; with one, the stored `retail_value` is the appraiser's edit.
    TradeIn(TradeInInputs),
    /// A total-loss claim under a jurisdiction's rules (the profile is copied in as evidence
    /// of the rules applied).
    Claim {
        /// The rules.
        profile: JurisdictionProfile,
        /// The claim's facts.
        inputs: ClaimInputs,
    },
}

impl Purpose {
    /// Short name for titles.
    #[must_use]
    pub fn title(&self) -> &'static str {
        match self {
            Purpose::Value => "Market value",
            Purpose::TradeIn(_) => "Trade-in offer",
            Purpose::Claim { .. } => "Total-loss claim",
        }
    }
}

/// A worked worksheet.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum WorksheetOutcome {
    /// The trade-in offer and its sensitivity.
    TradeIn {
        /// The offer with every deduction.
        offer: TradeInOffer,
        /// The offer at other days to sell and across the value band.
        sensitivity: OfferSensitivity,
    },
    /// The claim.
    Claim(ClaimWorksheet),
}

/// The numbers an appraisal ends in.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Outcome {
    /// The reconciled value.
    pub indicated_value: f64,
    /// Its band.
    pub value_band: Interval,
    /// The worksheet, if the purpose has one.
    pub worksheet: Option<WorksheetOutcome>,
}

impl Outcome {
    /// The worksheet's bottom line: the offer, or the claim payment.
    #[must_use]
    pub fn bottom_line(&self) -> Option<(&'static str, Cents)> {
        match &self.worksheet {
            Some(WorksheetOutcome::TradeIn { offer, .. }) => Some(("ACV offer", offer.offer)),
            Some(WorksheetOutcome::Claim(c)) => Some(("settlement payment", c.settlement.payment)),
            None => None,
        }
    }
}

/// The worked worksheet of `purpose` as rows, worded once for every front end (see
/// [`crate::worksheet::rows`]); empty for a value only.
#[must_use]
pub fn worksheet_rows(purpose: &Purpose, worksheet: Option<&WorksheetOutcome>) -> Vec<Row> {
    match (purpose, worksheet) {
        (Purpose::TradeIn(inputs), Some(WorksheetOutcome::TradeIn { offer, .. })) => {
            rows::trade_in_rows(inputs, offer)
        }
        (_, Some(WorksheetOutcome::Claim(worked))) => rows::claim_rows(worked),
        _ => Vec::new(),
    }
}

/// The trade-in inputs with the retail value the worksheet uses: the indicated value unless
/// the appraiser edited it with a reason.
#[must_use]
pub fn trade_in_inputs(inputs: &TradeInInputs, indicated_value: Cents) -> TradeInInputs {
    let mut inputs = inputs.clone();
    if inputs
        .retail_value_note
        .as_deref()
        .is_none_or(|n| n.trim().is_empty())
    {
        inputs.retail_value = indicated_value;
        inputs.retail_value_note = None;
    }
    inputs
}

/// The condition and prior-damage lines the appraiser applied to every comparable: they sit
/// inside the ACV and are itemized on the claim.
#[must_use]
pub fn itemized_deductions(user: &[UserAdjustment]) -> Vec<Line> {
    user.iter()
        .filter(|u| {
            u.line.is_none()
                && matches!(
                    u.kind,
                    AdjustmentKind::Condition | AdjustmentKind::PriorDamage
                )
        })
        .map(|u| Line {
            label: format!("{}: {}", u.kind.label(), u.basis),
            amount: u.amount,
        })
        .collect()
}

/// A statistical value (the indicated value, a band end) as money, to the cent.
fn as_money(field: &'static str, dollars: f64) -> Result<Cents, WorksheetError> {
    Cents::round_dollars(dollars).map_err(|_| WorksheetError::BadInput {
        field,
        value: dollars,
        why: "a finite amount of at most $10,000,000,000",
    })
}

/// Works out the purpose's worksheet from an appraisal made for `request`. The indicated value
/// becomes money here, rounded once to the cent; everything after is worked in whole cents.
pub fn work_out(
    purpose: &Purpose,
    appraisal: &Appraisal,
    request: &AppraisalRequest,
) -> Result<Outcome, WorksheetError> {
    let r = &appraisal.reconciliation;
    let value = r.indicated_value;
    let worksheet = match purpose {
        Purpose::Value => None,
        Purpose::TradeIn(inputs) => {
            let inputs = trade_in_inputs(inputs, as_money("indicated value", value)?);
            let worked = offer(&inputs)?;
            let sensitivity = OfferSensitivity::of(
                &inputs,
                &SENSITIVITY_DAYS,
                as_money("value band, low", r.value_band.lower)?,
                as_money("value band, high", r.value_band.upper)?,
            )?;
            Some(WorksheetOutcome::TradeIn {
                offer: worked,
                sensitivity,
            })
        }
        Purpose::Claim { profile, inputs } => {
            let check = profile.check(&request.subject, &appraisal.comparables);
            Some(WorksheetOutcome::Claim(claim(
                profile,
                inputs,
                as_money("indicated value", value)?,
                itemized_deductions(&request.user_adjustments),
                check,
            )?))
        }
    };
    Ok(Outcome {
        indicated_value: value,
        value_band: r.value_band,
        worksheet,
    })
}
