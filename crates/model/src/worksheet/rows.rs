//! Every worked worksheet as rows of label and amount, worded once here for the command line,
//! the workbench and the report, which only lay them out. A label cannot drift between them.

use super::claim::ClaimWorksheet;
use super::profile::ProfileCheck;
use super::trade_in::{HoldingCost, TradeInInputs, TradeInOffer, is_dealer_margin};
use crate::format::{cents, signed_cents};
use crate::money::Cents;

/// The trade-in's bottom line.
pub const OFFER_LABEL: &str = "ACV offer";

/// What a customer's copy of a trade-in says in place of the dealer's margin lines.
pub const CUSTOMER_OFFER_NOTE: &str = "The offer also allows for the dealer's costs of holding and selling the vehicle. It is based on the market evidence above and is valid for the period stated by the dealer.";

/// The claim's bottom line.
pub const PAYMENT_LABEL: &str = "Settlement payment";

/// The heading over a claim profile's rules and their citations.
pub const PROFILE_RULES_HEADING: &str = "The profile's rules and their sources";

/// What a row does to the amount it stands in.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum RowKind {
    /// The amount the worksheet starts from (retail value, ACV) or a subtotal.
    Start,
    /// Added.
    Addition,
    /// Taken off.
    Deduction,
    /// Already inside the amount above it, shown so the reader sees it (itemized deductions
    /// inside the ACV).
    Included,
    /// The bottom line.
    Result,
}

/// One row of a worked worksheet.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Row {
    /// What it is.
    pub label: String,
    /// The amount as it applies (a deduction is negative).
    pub amount: Cents,
    /// What it does.
    pub kind: RowKind,
    /// A dealer's internal margin (pack, target front gross, holding cost): left out of a
    /// report for the customer.
    pub internal: bool,
}

impl Row {
    fn new(label: impl Into<String>, amount: Cents, kind: RowKind) -> Self {
        Self {
            label: label.into(),
            amount,
            kind,
            internal: false,
        }
    }

    /// The amount as every front end prints it: a starting amount or the bottom line plain
    /// ("$24,112.08"), the others with their sign ("-$500.00", "+$1,250.00").
    #[must_use]
    pub fn amount_text(&self) -> String {
        match self.kind {
            RowKind::Start | RowKind::Result => cents(self.amount),
            RowKind::Addition | RowKind::Deduction | RowKind::Included => signed_cents(self.amount),
        }
    }
}

/// The trade-in offer, every line.
#[must_use]
pub fn trade_in_rows(inputs: &TradeInInputs, offer: &TradeInOffer) -> Vec<Row> {
    let mut rows = vec![
        Row::new(
            match &inputs.retail_value_note {
                Some(note) => format!("Expected retail value (edited: {note})"),
                None => "Expected retail value (the indicated value)".to_owned(),
            },
            offer.retail_value,
            RowKind::Start,
        ),
        Row::new(
            format!(
                "Expected sale after a {} % list-to-sale discount",
                inputs.list_to_sale_discount_pct
            ),
            offer.expected_sale,
            RowKind::Start,
        ),
    ];
    for d in &offer.deductions {
        rows.push(Row {
            internal: is_dealer_margin(d),
            ..Row::new(format!("less {}", d.label), -d.amount, RowKind::Deduction)
        });
    }
    rows.push(Row::new(OFFER_LABEL, offer.offer, RowKind::Result));
    rows
}

/// How the holding cost was charged, in words: "$30.00 a day for 45 days".
#[must_use]
pub fn holding_text(inputs: &TradeInInputs) -> String {
    let days = inputs.days_to_sell;
    match inputs.holding {
        HoldingCost::PerDay { amount } => format!("{} a day for {days} days", cents(amount)),
        HoldingCost::RateOnOffer { annual_pct } => {
            format!("{annual_pct} % a year on the offer, for {days} days")
        }
    }
}

/// The claim's settlement, every line.
#[must_use]
pub fn claim_rows(worked: &ClaimWorksheet) -> Vec<Row> {
    let mut rows = vec![Row::new(
        "Actual cash value (the indicated value)",
        worked.acv,
        RowKind::Start,
    )];
    for l in &worked.itemized_in_acv {
        rows.push(Row::new(
            format!("of which, itemized: {}", l.label),
            l.amount,
            RowKind::Included,
        ));
    }
    for l in &worked.settlement.additions {
        rows.push(Row::new(
            format!("plus {}", l.label),
            l.amount,
            RowKind::Addition,
        ));
    }
    for l in &worked.settlement.deductions {
        rows.push(Row::new(
            format!("less {}", l.label),
            -l.amount,
            RowKind::Deduction,
        ));
    }
    rows.push(Row::new(
        PAYMENT_LABEL,
        worked.settlement.payment,
        RowKind::Result,
    ));
    rows
}

/// The parts of the settlement the profile does not pay, each with its citation.
#[must_use]
pub fn not_paid_lines(worked: &ClaimWorksheet) -> Vec<String> {
    worked
        .not_paid
        .iter()
        .map(|n| format!("Not paid: {} ({})", n.label, n.citation))
        .collect()
}

/// The total-loss verdict as a heading: "Total loss: yes".
#[must_use]
pub fn verdict_heading(worked: &ClaimWorksheet) -> &'static str {
    if worked.verdict.total_loss {
        "Total loss: yes"
    } else {
        "Total loss: no"
    }
}

/// Each rule a comparable breaks, one line each: "Comparable 2 (line 260): listed 120 days…".
#[must_use]
pub fn rule_break_lines(check: &ProfileCheck) -> Vec<String> {
    check
        .comparables
        .iter()
        .enumerate()
        .flat_map(|(i, c)| {
            c.breaks
                .iter()
                .map(move |b| format!("Comparable {} (line {}): {b}", i + 1, c.line))
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::worksheet::{Line, offer};

    #[test]
    fn a_trade_in_is_worded_with_every_deduction_and_its_margin_marked() {
        let d = Cents::whole_dollars;
        let inputs = TradeInInputs {
            retail_value: d(30_000),
            recon: vec![Line {
                label: "tires".into(),
                amount: d(600),
            }],
            ..TradeInInputs::usual()
        };
        let worked = offer(&inputs).unwrap_or_else(|e| panic!("{e}"));
        let rows = trade_in_rows(&inputs, &worked);
        let labels: Vec<&str> = rows.iter().map(|r| r.label.as_str()).collect();
        assert_eq!(
            labels,
            [
                "Expected retail value (the indicated value)",
                "Expected sale after a 4 % list-to-sale discount",
                "less recon: tires",
                "less transport and fees",
                "less pack",
                "less target front gross",
                "less holding 45 days",
                "ACV offer",
            ]
        );
        let internal: Vec<&str> = rows
            .iter()
            .filter(|r| r.internal)
            .map(|r| r.label.as_str())
            .collect();
        assert_eq!(
            internal,
            [
                "less pack",
                "less target front gross",
                "less holding 45 days"
            ]
        );
        assert_eq!(rows[2].amount_text(), "-$600.00");
        assert_eq!(rows[7].amount_text(), cents(worked.offer));
        // The rows add up to the bottom line.
        let sum: Cents = rows[1..7].iter().map(|r| r.amount).sum();
        assert_eq!(sum, worked.offer);
        assert_eq!(holding_text(&inputs), "$30.00 a day for 45 days");
    }
}
