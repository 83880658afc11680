//! The ACV offer for a trade-in: expected retail less what it costs to get there (common
//! practice, no published source): offer = retail × (1 − list-to-sale discount) − recon −
//! transport and fees − pack − target front gross − holding cost.

use serde::{Deserialize, Serialize};

use super::Line;
use crate::money::{Cents, Decimal};

/// Why a worksheet cannot be computed.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum WorksheetError {
    /// An input is negative, not a number, or out of its range.
    #[error("{field} = {} is not valid: {why}", crate::format::number(*.value))]
    BadInput {
        /// Which input.
        field: &'static str,
        /// Its value.
        value: f64,
        /// What is allowed.
        why: &'static str,
    },
}

/// How holding the unit until it sells is costed.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum HoldingCost {
    /// A fixed amount per day held.
    PerDay {
        /// Currency per day.
        amount: Cents,
    },
    /// An annual rate on the money paid for the unit (floor-plan interest), charged pro rata.
    RateOnOffer {
        /// Percent per year.
        annual_pct: f64,
    },
}

/// The trade-in worksheet's inputs.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct TradeInInputs {
    /// Expected retail asking value (the appraisal's indicated value, or an edited one; may be
    /// left out of a worksheet file, where the indicated value is used).
    #[serde(default)]
    pub retail_value: Cents,
    /// Why the retail value was edited, if it was.
    #[serde(default)]
    pub retail_value_note: Option<String>,
    /// Expected discount from list to sale, percent.
    pub list_to_sale_discount_pct: f64,
    /// Reconditioning lines.
    pub recon: Vec<Line>,
    /// Transport, auction and other fees.
    pub transport_and_fees: Cents,
    /// The dealership's pack.
    pub pack: Cents,
    /// Target front gross.
    pub target_front_gross: Cents,
    /// Expected days to sell.
    pub days_to_sell: f64,
    /// Holding cost.
    pub holding: HoldingCost,
}

impl TradeInInputs {
    /// A worksheet with the usual starting figures (common practice, no source; every one is
    /// the user's to change): 4 % list-to-sale, $300 detail and inspection, $300 transport and
    /// fees, $500 pack, $2,000 target front gross, 45 days to sell at $30 a day.
    #[must_use]
    pub fn usual() -> Self {
        let d = Cents::whole_dollars;
        Self {
            retail_value: Cents::ZERO,
            retail_value_note: None,
            list_to_sale_discount_pct: 4.0,
            recon: vec![Line {
                label: "detail and inspection".into(),
                amount: d(300),
            }],
            transport_and_fees: d(300),
            pack: d(500),
            target_front_gross: d(2_000),
            days_to_sell: 45.0,
            holding: HoldingCost::PerDay { amount: d(30) },
        }
    }
}

/// The offer with every deduction shown.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct TradeInOffer {
    /// Retail value used.
    pub retail_value: Cents,
    /// Expected sale price after the list-to-sale discount.
    pub expected_sale: Cents,
    /// Deductions, in order.
    pub deductions: Vec<Line>,
    /// The ACV offer: the expected sale less every deduction, to the cent.
    pub offer: Cents,
}

/// Largest amount a worksheet line may hold, in dollars.
const MAX_LINE_DOLLARS: f64 = 1e8;

/// Checks a decimal input (a percentage, days) is finite and within `0..=max`, and reads it
/// exactly.
pub(super) fn decimal_in(
    field: &'static str,
    value: f64,
    max: f64,
    why: &'static str,
) -> Result<Decimal, WorksheetError> {
    if value.is_finite() && (0.0..=max).contains(&value) {
        Decimal::from_f64(value).map_err(|_| WorksheetError::BadInput { field, value, why })
    } else {
        Err(WorksheetError::BadInput { field, value, why })
    }
}

/// Checks an amount is not negative and not absurdly large.
pub(super) fn amount(field: &'static str, value: Cents) -> Result<Cents, WorksheetError> {
    if value.is_negative() || value.dollars() > MAX_LINE_DOLLARS {
        Err(WorksheetError::BadInput {
            field,
            value: value.dollars(),
            why: "an amount from $0 to $100,000,000",
        })
    } else {
        Ok(value)
    }
}

/// Computes the ACV offer, every line in whole cents. With a rate on the offer, the holding
/// cost depends on the offer itself: offer = (expected sale − other deductions) / (1 + f) with
/// f = rate × days / 365, so holding = before × f / (1 + f), worked exactly in integers.
pub fn offer(inputs: &TradeInInputs) -> Result<TradeInOffer, WorksheetError> {
    let retail_value = amount("retail_value", inputs.retail_value)?;
    let discount = decimal_in(
        "list_to_sale_discount_pct",
        inputs.list_to_sale_discount_pct,
        100.0,
        "0 to 100",
    )?;
    let days = decimal_in(
        "days_to_sell",
        inputs.days_to_sell,
        3_650.0,
        "0 to 3,650 days",
    )?;
    let expected_sale = retail_value - retail_value.percent(discount);
    let mut deductions: Vec<Line> = inputs
        .recon
        .iter()
        .map(|l| {
            Ok(Line {
                label: format!("recon: {}", l.label),
                amount: amount("recon", l.amount)?,
            })
        })
        .collect::<Result<_, WorksheetError>>()?;
    deductions.push(Line {
        label: "transport and fees".into(),
        amount: amount("transport_and_fees", inputs.transport_and_fees)?,
    });
    deductions.push(Line {
        label: PACK.into(),
        amount: amount("pack", inputs.pack)?,
    });
    deductions.push(Line {
        label: FRONT_GROSS.into(),
        amount: amount("target_front_gross", inputs.target_front_gross)?,
    });
    let before_holding = expected_sale - deductions.iter().map(|l| l.amount).sum::<Cents>();
    let holding = match inputs.holding {
        HoldingCost::PerDay { amount: per_day } => {
            amount("holding per day", per_day)?;
            if per_day.dollars() > 1e6 {
                return Err(WorksheetError::BadInput {
                    field: "holding per day",
                    value: per_day.dollars(),
                    why: "$0 to $1,000,000 a day",
                });
            }
            per_day.times(days)
        }
        HoldingCost::RateOnOffer { annual_pct } => {
            let rate = decimal_in("holding rate", annual_pct, 100.0, "0 to 100 % a year")?;
            // f = (rate/100)(days/365) = r·d / (100·365·10^12) in millionths; holding =
            // before · r·d / (100·365·10^12 + r·d).
            let rd = i128::from(rate.micros()) * i128::from(days.micros());
            let scale = 100 * 365 * 1_000_000_000_000_i128;
            if before_holding.is_negative() {
                Cents::ZERO
            } else {
                before_holding.scaled(rd, scale + rd)
            }
        }
    };
    deductions.push(Line {
        label: format!("{HOLDING} {days} days"),
        amount: holding,
    });
    Ok(TradeInOffer {
        retail_value,
        expected_sale,
        offer: before_holding - holding,
        deductions,
    })
}

const PACK: &str = "pack";
const FRONT_GROSS: &str = "target front gross";
const HOLDING: &str = "holding";

/// Whether a deduction is the dealer's own margin or carrying cost (pack, target front gross,
/// holding) rather than money spent on the vehicle: a report for the customer leaves these out.
#[must_use]
pub fn is_dealer_margin(deduction: &Line) -> bool {
    deduction.label == PACK
        || deduction.label == FRONT_GROSS
        || deduction
            .label
            .strip_prefix(HOLDING)
            .is_some_and(|rest| rest.starts_with(' '))
}

/// The offer at other days to sell and at the value band's ends.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct OfferSensitivity {
    /// (days to sell, offer).
    pub by_days: Vec<(f64, Cents)>,
    /// (retail value, offer) at the band's low, the indicated value, and the band's high.
    pub by_value: [(Cents, Cents); 3],
}

impl OfferSensitivity {
    /// Recomputes the offer for each of `days` and for the band `low..high` around the inputs'
    /// retail value.
    pub fn of(
        inputs: &TradeInInputs,
        days: &[f64],
        band_low: Cents,
        band_high: Cents,
    ) -> Result<Self, WorksheetError> {
        let by_days = days
            .iter()
            .map(|&d| {
                offer(&TradeInInputs {
                    days_to_sell: d,
                    ..inputs.clone()
                })
                .map(|o| (d, o.offer))
            })
            .collect::<Result<_, _>>()?;
        let at = |v: Cents| {
            offer(&TradeInInputs {
                retail_value: v,
                ..inputs.clone()
            })
            .map(|o| (v, o.offer))
        };
        Ok(Self {
            by_days,
            by_value: [at(band_low)?, at(inputs.retail_value)?, at(band_high)?],
        })
    }

    /// The offer at each days to sell, in words: "15 days $21,400, 30 days $21,150, …".
    #[must_use]
    pub fn by_days_text(&self) -> String {
        self.by_days
            .iter()
            .map(|(d, o)| format!("{d:.0} days {}", crate::format::money(*o)))
            .collect::<Vec<_>>()
            .join(", ")
    }

    /// The offer across the value band, in words: "$20,100 if retail is $26,700 (band low), …".
    #[must_use]
    pub fn by_value_text(&self) -> String {
        let money = |c: Cents| crate::format::money(c);
        let [low, mid, high] = self.by_value;
        format!(
            "{} if retail is {} (band low), {} at {}, {} at {} (band high)",
            money(low.1),
            money(low.0),
            money(mid.1),
            money(mid.0),
            money(high.1),
            money(high.0)
        )
    }
}

#[cfg(test)]
mod tests {
    use super::OfferSensitivity;
    use crate::money::Cents;

    #[test]
    fn sensitivity_in_words() {
        let d = Cents::whole_dollars;
        let s = OfferSensitivity {
            by_days: vec![(15.0, Cents::new(2_483_440)), (30.0, d(24_354))],
            by_value: [
                (d(28_137), d(21_717)),
                (d(30_384), d(23_874)),
                (d(32_810), d(26_203)),
            ],
        };
        assert_eq!(s.by_days_text(), "15 days $24,834, 30 days $24,354");
        assert_eq!(
            s.by_value_text(),
            "$21,717 if retail is $28,137 (band low), $23,874 at $30,384, $26,203 at $32,810 (band high)"
        );
    }
}
