//! The case an appraisal belongs to: the numbers and names the desk files it under (a claim's
//! number, date of loss, insured and type of loss; a trade-in's stock number and customer).
//! Saved in the session, shown in the workbench's banner, printed at the top of the report and
//! searched by the session finder.

use chrono::NaiveDate;
use serde::{Deserialize, Serialize};

use crate::session::Purpose;

/// The case fields' names, as every front end shows them.
pub const CLAIM_NUMBER: &str = "Claim number";
/// See [`CLAIM_NUMBER`].
pub const DATE_OF_LOSS: &str = "Date of loss";
/// See [`CLAIM_NUMBER`].
pub const INSURED: &str = "Insured";
/// See [`CLAIM_NUMBER`].
pub const LOSS_TYPE: &str = "Type of loss";
/// See [`CLAIM_NUMBER`].
pub const STOCK_NUMBER: &str = "Stock number";
/// See [`CLAIM_NUMBER`].
pub const CUSTOMER: &str = "Customer";

/// What happened to an insured vehicle.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum LossType {
    /// Struck another vehicle or an object.
    Collision,
    /// Stolen (and not recovered, or recovered damaged).
    Theft,
    /// Water damage.
    Flood,
    /// Fire damage.
    Fire,
    /// Hail damage.
    Hail,
    /// Damaged on purpose by someone else.
    Vandalism,
    /// Anything else (say what in the notes).
    Other,
}

impl LossType {
    /// Every type, in the order they are offered.
    pub const ALL: [LossType; 7] = [
        Self::Collision,
        Self::Theft,
        Self::Flood,
        Self::Fire,
        Self::Hail,
        Self::Vandalism,
        Self::Other,
    ];

    /// The word for it, as typed on the command line and shown.
    #[must_use]
    pub fn as_str(self) -> &'static str {
        match self {
            Self::Collision => "collision",
            Self::Theft => "theft",
            Self::Flood => "flood",
            Self::Fire => "fire",
            Self::Hail => "hail",
            Self::Vandalism => "vandalism",
            Self::Other => "other",
        }
    }
}

impl std::fmt::Display for LossType {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.as_str())
    }
}

impl std::str::FromStr for LossType {
    type Err = String;

    fn from_str(s: &str) -> Result<Self, Self::Err> {
        let word = s.trim().to_ascii_lowercase();
        Self::ALL
            .into_iter()
            .find(|t| t.as_str() == word)
            .ok_or_else(|| {
                format!(
                    "\"{s}\" is not a type of loss; use one of {}",
                    Self::ALL.map(Self::as_str).join(", ")
                )
            })
    }
}

/// The case's numbers and names. Those of the other purpose are kept when the purpose changes
/// (a trade-in turned into a claim keeps its stock number) but only the purpose's own are shown
/// and printed.
#[derive(Debug, Clone, Default, PartialEq, Eq, Serialize, Deserialize)]
pub struct CaseDetails {
    /// The claim number the insurer files the loss under.
    pub claim_number: String,
    /// The date of loss: the appraisal date of a claim.
    pub date_of_loss: Option<NaiveDate>,
    /// The insured or owner of the vehicle.
    pub insured: String,
    /// What happened.
    pub loss_type: Option<LossType>,
    /// The dealer's stock number for the traded vehicle.
    pub stock_number: String,
    /// The customer trading the vehicle in.
    pub customer: String,
}

/// One case field as shown and printed.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct CaseField {
    /// Its name ("Claim number").
    pub label: &'static str,
    /// Its value; empty when not filled in.
    pub value: String,
}

impl CaseDetails {
    /// The fields of `purpose`, in order, filled in or not (a value only has none).
    #[must_use]
    pub fn fields(&self, purpose: &Purpose) -> Vec<CaseField> {
        match purpose {
            Purpose::Claim { .. } => self.claim_fields(),
            Purpose::TradeIn(_) => self.trade_in_fields(),
            Purpose::Value => Vec::new(),
        }
    }

    fn claim_fields(&self) -> Vec<CaseField> {
        let field = |label, value: String| CaseField { label, value };
        vec![
            field(CLAIM_NUMBER, self.claim_number.clone()),
            field(
                DATE_OF_LOSS,
                self.date_of_loss.map(|d| d.to_string()).unwrap_or_default(),
            ),
            field(INSURED, self.insured.clone()),
            field(
                LOSS_TYPE,
                self.loss_type.map(|t| t.to_string()).unwrap_or_default(),
            ),
        ]
    }

    fn trade_in_fields(&self) -> Vec<CaseField> {
        vec![
            CaseField {
                label: STOCK_NUMBER,
                value: self.stock_number.clone(),
            },
            CaseField {
                label: CUSTOMER,
                value: self.customer.clone(),
            },
        ]
    }

    /// The filled-in fields of `purpose`, trimmed. A value without a worksheet has whatever was
    /// filled in, of either kind.
    #[must_use]
    pub fn filled(&self, purpose: &Purpose) -> Vec<CaseField> {
        let fields = match purpose {
            Purpose::Value => {
                let mut all = self.claim_fields();
                all.extend(self.trade_in_fields());
                all
            }
            _ => self.fields(purpose),
        };
        fields
            .into_iter()
            .filter(|f| !f.value.trim().is_empty())
            .map(|f| CaseField {
                label: f.label,
                value: f.value.trim().to_owned(),
            })
            .collect()
    }

    /// The filled-in fields of `purpose` in one line: "Claim number CL-1043 · Insured …".
    #[must_use]
    pub fn line(&self, purpose: &Purpose) -> String {
        self.filled(purpose)
            .into_iter()
            .map(|f| format!("{} {}", f.label, f.value))
            .collect::<Vec<_>>()
            .join(" · ")
    }

    /// The number the desk files it under: the claim number of a claim, the stock number of a
    /// trade-in (whichever is filled in when the purpose has none).
    #[must_use]
    pub fn number(&self, purpose: &Purpose) -> &str {
        let (first, second) = match purpose {
            Purpose::TradeIn(_) => (&self.stock_number, &self.claim_number),
            _ => (&self.claim_number, &self.stock_number),
        };
        if first.trim().is_empty() {
            second.trim()
        } else {
            first.trim()
        }
    }

    /// The person the case is for: the insured of a claim, the customer of a trade-in.
    #[must_use]
    pub fn person(&self, purpose: &Purpose) -> &str {
        match purpose {
            Purpose::TradeIn(_) => self.customer.trim(),
            _ => self.insured.trim(),
        }
    }
}
