//! Trade-in and total-loss worksheets against hand-worked arithmetic (the arithmetic is written
//! beside each check; the formulas are common practice and the public rules named in the
//! model's docs, the numbers invented), and the total-loss boundaries decided exactly on cents.

// Amounts in cents are written dollars_cents (`c(2_968_37)` is $2,968.37), so the last group
// has two digits on purpose.
#![allow(clippy::inconsistent_digit_grouping)]

use model::money::Cents;
use model::worksheet::{
    Boundary, HoldingCost, Line, OfferSensitivity, SettlementInputs, TotalLossRule, TradeInInputs,
    offer, settle, total_loss_test,
};
use proptest::prelude::*;

/// Dollars and cents, written as in the hand arithmetic: `c(2968_37)` is $2,968.37.
fn c(cents: i64) -> Cents {
    Cents::new(cents)
}

/// Whole dollars.
fn d(dollars: i64) -> Cents {
    Cents::whole_dollars(dollars)
}

fn trade_in() -> TradeInInputs {
    TradeInInputs {
        retail_value: d(30_000),
        retail_value_note: None,
        list_to_sale_discount_pct: 4.0,
        recon: vec![
            Line {
                label: "two tires".into(),
                amount: d(600),
            },
            Line {
                label: "detail".into(),
                amount: d(250),
            },
        ],
        transport_and_fees: d(400),
        pack: d(500),
        target_front_gross: d(2_000),
        days_to_sell: 45.0,
        holding: HoldingCost::PerDay { amount: d(35) },
    }
}

#[test]
fn trade_in_offer_by_hand() {
    // 30,000 × (1 − 0.04) = 28,800 expected sale.
    // Deductions: recon 600 + 250 = 850; transport 400; pack 500; gross 2,000; holding 45 × 35 = 1,575.
    // Offer = 28,800 − 850 − 400 − 500 − 2,000 − 1,575 = 23,475.
    let o = offer(&trade_in()).unwrap();
    assert_eq!(o.expected_sale, d(28_800));
    assert_eq!(o.offer, d(23_475));
    let total: Cents = o.deductions.iter().map(|l| l.amount).sum();
    assert_eq!(
        o.expected_sale - total,
        o.offer,
        "every deduction is shown and the offer is their difference to the cent"
    );
    assert_eq!(o.deductions.len(), 6);
}

#[test]
fn holding_cost_as_a_rate_on_the_offer() {
    // 7.3 % a year for 45 days is 0.073 × 45 / 365 = 0.009 of the offer.
    // Before holding: 28,800 − 3,750 = 25,050; offer = 25,050 / 1.009 = 24,826.5609…;
    // holding = 25,050 × 0.009 / 1.009 = 223.4390…, paid to the cent: 223.44; offer = 25,050 −
    // 223.44 = 24,826.56, so offer + holding = 25,050 exactly as printed.
    let mut inputs = trade_in();
    inputs.holding = HoldingCost::RateOnOffer { annual_pct: 7.3 };
    let o = offer(&inputs).unwrap();
    let holding = o.deductions.last().unwrap().amount;
    assert_eq!(holding, c(223_44));
    assert_eq!(o.offer, c(24_826_56));
    assert_eq!(o.offer + holding, d(25_050));
}

#[test]
fn offer_sensitivity_to_days_and_to_the_band() {
    // 30 days: holding 1,050, offer 28,800 − 3,750 − 1,050 = 24,000.
    // Band low 28,000: 26,880 − 3,750 − 1,575 = 21,555; high 32,000: 30,720 − 5,325 = 25,395.
    let s = OfferSensitivity::of(&trade_in(), &[30.0, 45.0], d(28_000), d(32_000)).unwrap();
    assert_eq!(s.by_days[0].1, d(24_000));
    assert_eq!(s.by_days[1].1, d(23_475));
    assert_eq!(s.by_value[0].1, d(21_555));
    assert_eq!(s.by_value[1].1, d(23_475));
    assert_eq!(s.by_value[2].1, d(25_395));
}

#[test]
fn bad_worksheet_inputs_are_refused_with_their_field() {
    let mut inputs = trade_in();
    inputs.list_to_sale_discount_pct = 120.0;
    let e = offer(&inputs).unwrap_err();
    assert!(e.to_string().contains("list_to_sale_discount_pct"), "{e}");
    inputs = trade_in();
    inputs.days_to_sell = f64::NAN;
    assert!(offer(&inputs).is_err());
    inputs = trade_in();
    inputs.recon[0].amount = d(-5);
    let e = offer(&inputs).unwrap_err();
    assert!(e.to_string().contains("recon"), "{e}");
    inputs = trade_in();
    inputs.holding = HoldingCost::RateOnOffer {
        annual_pct: f64::INFINITY,
    };
    assert!(offer(&inputs).is_err());
}

#[test]
fn a_worksheet_file_with_a_fraction_of_a_cent_is_refused() {
    // The number in the file is the number used: 420.005 cannot be paid.
    let text = "(label: \"tires\", amount: 420.005)";
    let e = ron::from_str::<Line>(text).unwrap_err();
    assert!(e.to_string().contains("fraction of a cent"), "{e}");
    let ok = ron::from_str::<Line>("(label: \"tires\", amount: 420.01)").unwrap();
    assert_eq!(ok.amount, c(420_01));
    let whole = ron::from_str::<Line>("(label: \"tires\", amount: 420)").unwrap();
    assert_eq!(whole.amount, d(420));
}

fn claim() -> SettlementInputs {
    SettlementInputs {
        acv: d(20_000),
        sales_tax_pct: 6.25,
        title_and_transfer_fees: d(75),
        annual_registration: d(180),
        registration_months_remaining: 7.0,
        deductible: d(500),
        owner_retains_salvage: None,
    }
}

#[test]
fn settlement_by_hand() {
    // Tax 20,000 × 6.25 % = 1,250; fees 75; registration 180 × 7/12 = 105; deductible 500.
    // Payment = 20,000 + 1,250 + 75 + 105 − 500 = 20,930. Owner keeps salvage worth 3,000:
    // 20,930 − 3,000 = 17,930.
    let s = settle(&claim()).unwrap();
    assert_eq!(s.payment, d(20_930));
    assert_eq!(s.additions[2].amount, d(105));
    let kept = settle(&SettlementInputs {
        owner_retains_salvage: Some(d(3_000)),
        ..claim()
    })
    .unwrap();
    assert_eq!(kept.payment, d(17_930));
    assert_eq!(kept.deductions.len(), 2);
    assert!(
        settle(&SettlementInputs {
            registration_months_remaining: 13.0,
            ..claim()
        })
        .is_err()
    );
    assert!(
        settle(&SettlementInputs {
            deductible: c(-1),
            ..claim()
        })
        .is_err()
    );
}

#[test]
fn settlement_taxes_are_exact_at_the_half_cent() {
    // 8.875 % of $1,234.00 = $109.5175 → $109.52; 8.875 % of $1,234.04 = $109.52105 → $109.52;
    // 0.5 % of $1.01 = $0.00505 → $0.01 (half a cent and more rounds up); registration $100 ×
    // 5/12 = $41.666… → $41.67. The payment is the sum of the printed lines.
    let s = settle(&SettlementInputs {
        acv: d(1_234),
        sales_tax_pct: 8.875,
        title_and_transfer_fees: Cents::ZERO,
        annual_registration: d(100),
        registration_months_remaining: 5.0,
        deductible: Cents::ZERO,
        owner_retains_salvage: None,
    })
    .unwrap();
    assert_eq!(s.additions[0].amount, c(109_52));
    assert_eq!(s.additions[2].amount, c(41_67));
    assert_eq!(s.payment, d(1_234) + c(109_52) + c(41_67));
    let half = settle(&SettlementInputs {
        acv: c(1_01),
        sales_tax_pct: 0.5,
        annual_registration: Cents::ZERO,
        ..claim()
    })
    .unwrap();
    assert_eq!(half.additions[0].amount, c(1));
}

fn percentage(threshold_pct: f64, boundary: Boundary) -> TotalLossRule {
    TotalLossRule::Percentage {
        threshold_pct,
        boundary,
    }
}

fn formula(boundary: Boundary) -> TotalLossRule {
    TotalLossRule::Formula { boundary }
}

fn verdict(rule: TotalLossRule, acv: Cents, repair: Cents, salvage: Cents) -> bool {
    total_loss_test(rule, acv, repair, salvage)
        .unwrap()
        .total_loss
}

#[test]
fn percentage_threshold_on_both_sides_of_its_boundary() {
    // Threshold 75 %, ACV 20,000: repair 15,000 is exactly 75 %.
    let at_least = percentage(75.0, Boundary::AtLeast);
    let greater = percentage(75.0, Boundary::GreaterThan);
    assert!(verdict(at_least, d(20_000), d(15_000), Cents::ZERO));
    assert!(!verdict(greater, d(20_000), d(15_000), Cents::ZERO));
    assert!(verdict(greater, d(20_000), c(15_000_01), Cents::ZERO));
    assert!(!verdict(at_least, d(20_000), c(14_999_99), Cents::ZERO));
    let v = total_loss_test(at_least, d(20_000), d(15_000), Cents::ZERO).unwrap();
    assert!((v.measure - 75.0).abs() < 1e-12);
    assert!(v.explanation.contains("75.00 %"), "{}", v.explanation);
}

#[test]
fn total_loss_formula_on_both_sides_of_its_boundary() {
    // Repair 16,000 + salvage 4,000 = 20,000 = ACV.
    let at_least = formula(Boundary::AtLeast);
    let greater = formula(Boundary::GreaterThan);
    assert!(verdict(at_least, d(20_000), d(16_000), d(4_000)));
    assert!(!verdict(greater, d(20_000), d(16_000), d(4_000)));
    assert!(verdict(greater, d(20_000), d(16_000), c(4_000_01)));
    assert!(!verdict(at_least, d(20_000), c(15_999_99), d(4_000)));
    assert!(
        total_loss_test(at_least, Cents::ZERO, d(1), d(1)).is_err(),
        "ACV must be positive"
    );
}

#[test]
fn regression_formula_sum_that_reaches_the_acv_in_cents_but_not_in_floats() {
    // Constructed by the definition (repair + salvage ≥ ACV): 2,968.37 + 2,657.77 = 5,626.14
    // exactly, while 2968.37 + 2657.77 in binary floating point is 5626.139999…; the old float
    // comparison said "not a total loss".
    assert!(
        std::hint::black_box(2968.37_f64) + 2657.77_f64 < 5626.14_f64,
        "the float trap is real"
    );
    let rule = formula(Boundary::AtLeast);
    let v = total_loss_test(rule, c(5_626_14), c(2_968_37), c(2_657_77)).unwrap();
    assert!(v.total_loss, "{}", v.explanation);
    assert!(v.explanation.contains("= $5,626.14"), "{}", v.explanation);
    // One cent less is not; under ">" the exact sum is not either.
    assert!(!verdict(rule, c(5_626_14), c(2_968_36), c(2_657_77)));
    assert!(!verdict(
        formula(Boundary::GreaterThan),
        c(5_626_14),
        c(2_968_37),
        c(2_657_77)
    ));
}

#[test]
fn regression_percentage_that_is_exactly_the_threshold_in_cents() {
    // Constructed by the definition (100 · repair / ACV ≥ 75): 8,192.13 / 10,922.84 is
    // 0.75000000 exactly in cents (819,213 × 4 = 3,276,852 = 1,092,284 × 3), while
    // 100 × 8192.13 / 10922.84 in floats is 74.999…; the old float comparison said "no".
    assert_eq!(819_213_i64 * 4, 1_092_284_i64 * 3);
    let rule = percentage(75.0, Boundary::AtLeast);
    let v = total_loss_test(rule, c(10_922_84), c(8_192_13), Cents::ZERO).unwrap();
    assert!(v.total_loss, "{}", v.explanation);
    assert!(!verdict(
        percentage(75.0, Boundary::GreaterThan),
        c(10_922_84),
        c(8_192_13),
        Cents::ZERO
    ));
    assert!(!verdict(rule, c(10_922_84), c(8_192_12), Cents::ZERO));
}

#[test]
fn a_measure_just_under_the_threshold_is_never_printed_as_the_threshold() {
    // 7,499.99 of 10,000.00 is 74.9999 %: printed to two decimals it would read "75.00 %"
    // beside a "no" under "≥ 75 %". The explanation shows enough decimals to stand on the
    // right side.
    let v = total_loss_test(
        percentage(75.0, Boundary::AtLeast),
        d(10_000),
        c(7_499_99),
        Cents::ZERO,
    )
    .unwrap();
    assert!(!v.total_loss);
    assert!(v.explanation.contains("74.9999 %"), "{}", v.explanation);
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(2_000))]

    /// For any ACV and any split of it into repair and salvage (the formula's boundary), and one
    /// cent either side, both boundary kinds decide as the integer definition says.
    #[test]
    fn formula_boundaries_are_exact(
        acv in 1i64..50_000_000,
        split in 0.0f64..=1.0,
        delta in -1i64..=1,
    ) {
        let repair = (acv as f64 * split).round() as i64;
        let salvage = acv - repair + delta;
        prop_assume!(salvage >= 0);
        let sum = repair + salvage;
        for (boundary, expected) in [
            (Boundary::AtLeast, sum >= acv),
            (Boundary::GreaterThan, sum > acv),
        ] {
            prop_assert_eq!(
                verdict(formula(boundary), c(acv), c(repair), c(salvage)),
                expected,
                "acv {} repair {} salvage {} {:?}", acv, repair, salvage, boundary
            );
        }
    }

    /// For any ACV and threshold, the repair exactly at the threshold (when a whole number of
    /// cents reaches it) and one cent either side decide as `100 · repair · 10^6` against
    /// `threshold_micros · acv` in integers says.
    #[test]
    fn percentage_boundaries_are_exact(
        acv in 1i64..50_000_000,
        threshold_hundredths in 1i64..10_000,
        delta in -1i64..=1,
    ) {
        let threshold_pct = threshold_hundredths as f64 / 100.0;
        // The smallest repair at or above the threshold, in cents: ceil(t · acv / 100).
        let at = (threshold_hundredths * acv + 9_999) / 10_000;
        let repair = at + delta;
        prop_assume!(repair >= 0);
        let lhs = i128::from(repair) * 10_000;
        let rhs = i128::from(threshold_hundredths) * i128::from(acv);
        for (boundary, expected) in [
            (Boundary::AtLeast, lhs >= rhs),
            (Boundary::GreaterThan, lhs > rhs),
        ] {
            let v = total_loss_test(percentage(threshold_pct, boundary), c(acv), c(repair), Cents::ZERO).unwrap();
            prop_assert_eq!(v.total_loss, expected, "acv {} repair {} threshold {} {:?}: {}", acv, repair, threshold_pct, boundary, v.explanation);
            // The words never contradict the verdict.
            let word = if expected { "yes" } else { "no" };
            prop_assert!(v.explanation.ends_with(word), "{}", v.explanation);
        }
    }

    /// The settlement payment is the ACV plus the printed additions less the printed
    /// deductions, to the cent, for any inputs.
    #[test]
    fn the_payment_is_the_sum_of_the_printed_lines(
        acv in 0i64..20_000_000,
        tax_thousandths in 0i64..15_000,
        fees in 0i64..100_000,
        registration in 0i64..100_000,
        months in 0u32..=12,
        deductible in 0i64..500_000,
    ) {
        let s = settle(&SettlementInputs {
            acv: c(acv),
            sales_tax_pct: tax_thousandths as f64 / 1_000.0,
            title_and_transfer_fees: c(fees),
            annual_registration: c(registration),
            registration_months_remaining: f64::from(months),
            deductible: c(deductible),
            owner_retains_salvage: None,
        }).unwrap();
        let added: Cents = s.additions.iter().map(|l| l.amount).sum();
        let taken: Cents = s.deductions.iter().map(|l| l.amount).sum();
        prop_assert_eq!(s.payment, c(acv) + added - taken);
        // The tax line is within half a cent of the exact product.
        let exact_tax_times_100000 = i128::from(acv) * i128::from(tax_thousandths);
        let printed = i128::from(s.additions[0].amount.get()) * 100_000;
        prop_assert!((exact_tax_times_100000 - printed).abs() <= 50_000);
    }
}
