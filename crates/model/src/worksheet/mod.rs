//! Turning a value into the decision: the dealer's trade-in offer and the insurer's total-loss
//! settlement. Pure arithmetic with every part shown, so the worksheet can be printed and
//! checked by hand.

mod claim;
mod profile;
pub mod rows;
mod total_loss;
mod trade_in;

pub use claim::{ClaimInputs, ClaimWorksheet, NotPaid, claim};
pub use profile::{
    Cited, ComparableCheck, JurisdictionProfile, PROFILES_FORMAT_VERSION, ProfileCheck,
    ProfileError, ProfileFile, RegistrationPaid, RuleRow, SHIPPED_PROFILES, shipped_profiles,
};
pub use total_loss::{
    Boundary, Settlement, SettlementInputs, TotalLossRule, TotalLossVerdict, settle,
    total_loss_test,
};
pub use trade_in::{
    HoldingCost, OfferSensitivity, TradeInInputs, TradeInOffer, WorksheetError, offer,
};

/// A named amount on a worksheet.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Line {
    /// What it is.
    pub label: String,
    /// Amount in whole cents (deductions positive; the worksheet says which way it goes).
    pub amount: crate::money::Cents,
}
