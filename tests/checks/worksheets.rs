//! Trade-in and total-loss worksheets against hand-worked arithmetic (the arithmetic is written
//! beside each check; the formulas are common practice and the public rules named in the
//! model's docs, the numbers invented).

use model::worksheet::{
    Boundary, HoldingCost, Line, OfferSensitivity, SettlementInputs, TotalLossRule, TradeInInputs,
    offer, settle, total_loss_test,
};

fn trade_in() -> TradeInInputs {
    TradeInInputs {
        retail_value: 30_000.0,
        retail_value_note: None,
        list_to_sale_discount_pct: 4.0,
        recon: vec![
            Line {
                label: "two tires".into(),
                amount: 600.0,
            },
            Line {
                label: "detail".into(),
                amount: 250.0,
            },
        ],
        transport_and_fees: 400.0,
        pack: 500.0,
        target_front_gross: 2_000.0,
        days_to_sell: 45.0,
        holding: HoldingCost::PerDay { amount: 35.0 },
    }
}

#[test]
fn trade_in_offer_by_hand() {
    // 30,000 × (1 − 0.04) = 28,800 expected sale.
    // Deductions: recon 600 + 250 = 850; transport 400; pack 500; gross 2,000; holding 45 × 35 = 1,575.
    // Offer = 28,800 − 850 − 400 − 500 − 2,000 − 1,575 = 23,475.
    let o = offer(&trade_in()).unwrap();
    assert!((o.expected_sale - 28_800.0).abs() < 1e-9);
    assert!((o.offer - 23_475.0).abs() < 1e-9, "{}", o.offer);
    let total: f64 = o.deductions.iter().map(|l| l.amount).sum();
    assert!(
        (o.expected_sale - total - o.offer).abs() < 1e-9,
        "every deduction is shown"
    );
    assert_eq!(o.deductions.len(), 6);
}

#[test]
fn holding_cost_as_a_rate_on_the_offer() {
    // 7.3 % a year for 45 days is 0.073 × 45 / 365 = 0.009 of the offer.
    // Before holding: 28,800 − 3,750 = 25,050; offer = 25,050 / 1.009 = 24,826.5609…;
    // holding = 0.009 × offer = 223.4390…, paid to the cent: 223.44; offer = 25,050 − 223.44
    // = 24,826.56, so offer + holding = 25,050 exactly as printed.
    let mut inputs = trade_in();
    inputs.holding = HoldingCost::RateOnOffer { annual_pct: 7.3 };
    let o = offer(&inputs).unwrap();
    let holding = o.deductions.last().unwrap().amount;
    assert_eq!(holding, 223.44);
    assert_eq!(o.offer, 24_826.56);
    assert!((o.offer + holding - 25_050.0).abs() < 1e-9);
}

#[test]
fn offer_sensitivity_to_days_and_to_the_band() {
    // 30 days: holding 1,050, offer 28,800 − 3,750 − 1,050 = 24,000.
    // Band low 28,000: 26,880 − 3,750 − 1,575 = 21,555; high 32,000: 30,720 − 5,325 = 25,395.
    let s = OfferSensitivity::of(&trade_in(), &[30.0, 45.0], 28_000.0, 32_000.0).unwrap();
    assert!((s.by_days[0].1 - 24_000.0).abs() < 1e-9);
    assert!((s.by_days[1].1 - 23_475.0).abs() < 1e-9);
    assert!((s.by_value[0].1 - 21_555.0).abs() < 1e-9);
    assert!((s.by_value[1].1 - 23_475.0).abs() < 1e-9);
    assert!((s.by_value[2].1 - 25_395.0).abs() < 1e-9);
}

#[test]
fn bad_worksheet_inputs_are_refused_with_their_field() {
    let mut inputs = trade_in();
    inputs.list_to_sale_discount_pct = 120.0;
    let e = offer(&inputs).unwrap_err();
    assert!(e.to_string().contains("list_to_sale_discount_pct"), "{e}");
    inputs = trade_in();
    inputs.recon[0].amount = f64::NAN;
    assert!(offer(&inputs).is_err());
}

fn claim() -> SettlementInputs {
    SettlementInputs {
        acv: 20_000.0,
        sales_tax_pct: 6.25,
        title_and_transfer_fees: 75.0,
        annual_registration: 180.0,
        registration_months_remaining: 7.0,
        deductible: 500.0,
        owner_retains_salvage: None,
    }
}

#[test]
fn settlement_by_hand() {
    // Tax 20,000 × 6.25 % = 1,250; fees 75; registration 180 × 7/12 = 105; deductible 500.
    // Payment = 20,000 + 1,250 + 75 + 105 − 500 = 20,930. Owner keeps salvage worth 3,000:
    // 20,930 − 3,000 = 17,930.
    let s = settle(&claim()).unwrap();
    assert!((s.payment - 20_930.0).abs() < 1e-9, "{}", s.payment);
    assert!((s.additions[2].amount - 105.0).abs() < 1e-9);
    let kept = settle(&SettlementInputs {
        owner_retains_salvage: Some(3_000.0),
        ..claim()
    })
    .unwrap();
    assert!((kept.payment - 17_930.0).abs() < 1e-9);
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
            deductible: -1.0,
            ..claim()
        })
        .is_err()
    );
}

#[test]
fn percentage_threshold_on_both_sides_of_its_boundary() {
    // Threshold 75 %, ACV 20,000: repair 15,000 is exactly 75 %.
    let at_least = TotalLossRule::Percentage {
        threshold_pct: 75.0,
        boundary: Boundary::AtLeast,
    };
    let greater = TotalLossRule::Percentage {
        threshold_pct: 75.0,
        boundary: Boundary::GreaterThan,
    };
    assert!(
        total_loss_test(at_least, 20_000.0, 15_000.0, 0.0)
            .unwrap()
            .total_loss
    );
    assert!(
        !total_loss_test(greater, 20_000.0, 15_000.0, 0.0)
            .unwrap()
            .total_loss
    );
    assert!(
        total_loss_test(greater, 20_000.0, 15_000.02, 0.0)
            .unwrap()
            .total_loss
    );
    assert!(
        !total_loss_test(at_least, 20_000.0, 14_999.98, 0.0)
            .unwrap()
            .total_loss
    );
    let v = total_loss_test(at_least, 20_000.0, 15_000.0, 0.0).unwrap();
    assert!((v.measure - 75.0).abs() < 1e-12);
    assert!(v.explanation.contains("75"), "{}", v.explanation);
}

#[test]
fn total_loss_formula_on_both_sides_of_its_boundary() {
    // Repair 16,000 + salvage 4,000 = 20,000 = ACV.
    let at_least = TotalLossRule::Formula {
        boundary: Boundary::AtLeast,
    };
    let greater = TotalLossRule::Formula {
        boundary: Boundary::GreaterThan,
    };
    assert!(
        total_loss_test(at_least, 20_000.0, 16_000.0, 4_000.0)
            .unwrap()
            .total_loss
    );
    assert!(
        !total_loss_test(greater, 20_000.0, 16_000.0, 4_000.0)
            .unwrap()
            .total_loss
    );
    assert!(
        total_loss_test(greater, 20_000.0, 16_000.0, 4_000.01)
            .unwrap()
            .total_loss
    );
    assert!(
        !total_loss_test(at_least, 20_000.0, 15_999.99, 4_000.0)
            .unwrap()
            .total_loss
    );
    assert!(
        total_loss_test(at_least, 0.0, 1.0, 1.0).is_err(),
        "ACV must be positive"
    );
}
