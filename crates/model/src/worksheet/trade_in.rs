//! The ACV offer for a trade-in: expected retail less what it costs to get there (common
//! practice, no published source): offer = retail × (1 − list-to-sale discount) − recon −
//! transport and fees − pack − target front gross − holding cost.

use serde::{Deserialize, Serialize};

use super::{Line, to_cents};

/// Why a worksheet cannot be computed.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum WorksheetError {
    /// An input is negative, not a number, or out of its range.
    #[error("{field} = {value} is not valid: {why}")]
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
        amount: f64,
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
    pub retail_value: f64,
    /// Why the retail value was edited, if it was.
    #[serde(default)]
    pub retail_value_note: Option<String>,
    /// Expected discount from list to sale, percent.
    pub list_to_sale_discount_pct: f64,
    /// Reconditioning lines.
    pub recon: Vec<Line>,
    /// Transport, auction and other fees.
    pub transport_and_fees: f64,
    /// The dealership's pack.
    pub pack: f64,
    /// Target front gross.
    pub target_front_gross: f64,
    /// Expected days to sell.
    pub days_to_sell: f64,
    /// Holding cost.
    pub holding: HoldingCost,
}

/// The offer with every deduction shown.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct TradeInOffer {
    /// Retail value used.
    pub retail_value: f64,
    /// Expected sale price after the list-to-sale discount.
    pub expected_sale: f64,
    /// Deductions, in order.
    pub deductions: Vec<Line>,
    /// The ACV offer.
    pub offer: f64,
}

fn check(
    field: &'static str,
    value: f64,
    max: f64,
    why: &'static str,
) -> Result<(), WorksheetError> {
    if value.is_finite() && (0.0..=max).contains(&value) {
        Ok(())
    } else {
        Err(WorksheetError::BadInput { field, value, why })
    }
}

/// Computes the ACV offer. With a rate on the offer, the holding cost depends on the offer
/// itself: offer = (expected sale − other deductions) / (1 + rate × days / 365).
pub fn offer(inputs: &TradeInInputs) -> Result<TradeInOffer, WorksheetError> {
    check(
        "retail_value",
        inputs.retail_value,
        1e8,
        "a non-negative amount",
    )?;
    check(
        "list_to_sale_discount_pct",
        inputs.list_to_sale_discount_pct,
        100.0,
        "0 to 100",
    )?;
    check(
        "transport_and_fees",
        inputs.transport_and_fees,
        1e8,
        "a non-negative amount",
    )?;
    check("pack", inputs.pack, 1e8, "a non-negative amount")?;
    check(
        "target_front_gross",
        inputs.target_front_gross,
        1e8,
        "a non-negative amount",
    )?;
    check(
        "days_to_sell",
        inputs.days_to_sell,
        3_650.0,
        "0 to 3,650 days",
    )?;
    for line in &inputs.recon {
        check("recon", line.amount, 1e8, "a non-negative amount")?;
    }
    let expected_sale =
        to_cents(inputs.retail_value * (1.0 - inputs.list_to_sale_discount_pct / 100.0));
    let mut deductions: Vec<Line> = inputs
        .recon
        .iter()
        .map(|l| Line {
            label: format!("recon: {}", l.label),
            amount: to_cents(l.amount),
        })
        .collect();
    deductions.push(Line {
        label: "transport and fees".into(),
        amount: to_cents(inputs.transport_and_fees),
    });
    deductions.push(Line {
        label: "pack".into(),
        amount: to_cents(inputs.pack),
    });
    deductions.push(Line {
        label: "target front gross".into(),
        amount: to_cents(inputs.target_front_gross),
    });
    let before_holding = expected_sale - deductions.iter().map(|l| l.amount).sum::<f64>();
    let (offer, holding) = match inputs.holding {
        HoldingCost::PerDay { amount } => {
            check("holding per day", amount, 1e6, "a non-negative amount")?;
            let holding = to_cents(amount * inputs.days_to_sell);
            (before_holding - holding, holding)
        }
        HoldingCost::RateOnOffer { annual_pct } => {
            check("holding rate", annual_pct, 100.0, "0 to 100 % a year")?;
            let factor = annual_pct / 100.0 * inputs.days_to_sell / 365.0;
            let holding = to_cents(before_holding / (1.0 + factor) * factor);
            (before_holding - holding, holding)
        }
    };
    deductions.push(Line {
        label: format!("holding {:.0} days", inputs.days_to_sell),
        amount: holding,
    });
    Ok(TradeInOffer {
        retail_value: inputs.retail_value,
        expected_sale,
        deductions,
        offer: to_cents(offer),
    })
}

/// The offer at other days to sell and at the value band's ends.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct OfferSensitivity {
    /// (days to sell, offer).
    pub by_days: Vec<(f64, f64)>,
    /// Offer at the band's low, the indicated value, and the band's high.
    pub by_value: [(f64, f64); 3],
}

impl OfferSensitivity {
    /// Recomputes the offer for each of `days` and for the band `low..high` around the inputs'
    /// retail value.
    pub fn of(
        inputs: &TradeInInputs,
        days: &[f64],
        band_low: f64,
        band_high: f64,
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
        let at = |v: f64| {
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
        let money = crate::format::money;
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

    #[test]
    fn sensitivity_in_words() {
        let s = OfferSensitivity {
            by_days: vec![(15.0, 24_834.4), (30.0, 24_354.0)],
            by_value: [
                (28_137.0, 21_717.0),
                (30_384.0, 23_874.0),
                (32_810.0, 26_203.0),
            ],
        };
        assert_eq!(s.by_days_text(), "15 days $24,834, 30 days $24,354");
        assert_eq!(
            s.by_value_text(),
            "$21,717 if retail is $28,137 (band low), $23,874 at $30,384, $26,203 at $32,810 (band high)"
        );
    }
}
