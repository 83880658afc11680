//! Market conditions: the time term of the fit, the grid's market-conditions line and the
//! monthly index. Exact checks are on markets constructed by definition (no noise, so the fitted
//! numbers are the ones put in, to rounding); the demo's drift is recovered within its standard
//! error (invented data: a check of the engine, not a published value).

use std::fmt::Write as _;

use acceptance::{demo_market, shared_tessel_fit, tessel};
use chrono::{Datelike, NaiveDate};
use linfa::ParamGuard;
use model::adjustment::AdjustmentKind;
use model::appraisal::{AppraisalRequest, FitSettings, appraise};
use model::hedonic::market_time::{MarketTimeTerm, monthly_index, months_before};
use model::hedonic::{AgeForm, HedonicParams};
use model::market::Market;
use model::warnings::WarningCode;

const AS_OF: (i32, u32, u32) = (2026, 6, 30);

fn as_of() -> NaiveDate {
    NaiveDate::from_ymd_opt(AS_OF.0, AS_OF.1, AS_OF.2).unwrap()
}

/// A market constructed by definition: one model, two variants, ages 1 to 6, miles from the age,
/// and each listing's ln price `10.3 − 0.12·age − 0.02·miles/10,000 + 0.1·[Upper] + level(date)
/// + noise(i)`, prices written with six decimals. `noise` repeats the same pattern in every month.
fn constructed(dates: &[NaiveDate], level: impl Fn(NaiveDate) -> f64, noise: &[f64]) -> Market {
    let mut csv = String::from("model_year,make,model,variant,asking_price,miles,listed_on\n");
    for &date in dates {
        for (i, e) in noise.iter().enumerate() {
            let age = 1 + (i % 6) as i32;
            let upper = i % 2 == 1;
            let miles = 11_000.0 * f64::from(age) + 700.0 * (i % 5) as f64;
            let ln_price = 10.3 - 0.12 * f64::from(age) - 0.02 * miles / 10_000.0
                + if upper { 0.1 } else { 0.0 }
                + level(date)
                + e;
            let _ = writeln!(
                csv,
                "{},Ostrell,Varn,{},{:.6},{miles},{date}",
                AS_OF.0 - age,
                if upper { "Upper" } else { "Base" },
                ln_price.exp()
            );
        }
    }
    acceptance::constructed_market(csv).0
}

fn all_rows(market: &Market) -> Vec<usize> {
    (0..market.len()).collect()
}

fn fit(market: &Market) -> model::hedonic::HedonicModel {
    HedonicParams::new(as_of())
        .age_form(AgeForm::Linear)
        .check()
        .unwrap()
        .fit(market, &all_rows(market))
        .unwrap()
}

/// Every 10th day from 2026-01-05 to the appraisal date: about six months.
fn every_tenth_day() -> Vec<NaiveDate> {
    let start = NaiveDate::from_ymd_opt(2026, 1, 5).unwrap();
    (0..18).map(|k| start + chrono::Days::new(10 * k)).collect()
}

#[test]
fn a_linear_drift_put_into_a_constructed_market_is_recovered_exactly() {
    // Constructed by definition: the market fell at ln 0.004 per month before the appraisal
    // date, with no noise, so the fit must return 0.004 to the rounding of the prices.
    let drift = 0.004;
    let market = constructed(
        &every_tenth_day(),
        |d| drift * months_before(as_of(), d),
        &[0.0; 24],
    );
    let model = fit(&market);
    assert!(model.market_time().in_fit(), "{:?}", model.market_time());
    let d = model.market_drift().unwrap();
    assert!((d.per_month_before - drift).abs() < 1e-6, "{d:?}");
    let names: Vec<&str> = model.design().names.iter().map(String::as_str).collect();
    assert_eq!(names.last(), Some(&"months_before_as_of"));
    // A listing dated three months before is worth e^(−0.012) of its price today.
    let then = as_of() - chrono::Days::new(91);
    let effect = model.market_conditions_effect(Some(then));
    assert!((effect - drift * months_before(as_of(), then)).abs() < 1e-6);
}

#[test]
fn monthly_levels_put_into_a_constructed_market_come_back_as_its_index() {
    // Constructed by definition: each calendar month has its own level (not a straight line);
    // the time-dummy index returns 100·e^(level − latest level) for each month exactly.
    let levels = [
        (1, 0.05),
        (2, 0.02),
        (3, 0.04),
        (4, 0.01),
        (5, 0.015),
        (6, 0.0),
    ];
    let level = |d: NaiveDate| {
        levels
            .iter()
            .find(|(m, _)| *m == d.month())
            .map_or(0.0, |(_, l)| *l)
    };
    let market = constructed(&every_tenth_day(), level, &[0.0; 24]);
    let model = fit(&market);
    let index = monthly_index(&model, &market, &all_rows(&market), 0.8).unwrap();
    let months: Vec<&str> = index.months.iter().map(|m| m.month.as_str()).collect();
    assert_eq!(
        months,
        [
            "2026-01", "2026-02", "2026-03", "2026-04", "2026-05", "2026-06"
        ]
    );
    for (m, (_, l)) in index.months.iter().zip(levels) {
        let expected = 100.0 * f64::exp(l);
        assert!(
            (m.index - expected).abs() < 1e-4,
            "{}: {} vs {expected}",
            m.month,
            m.index
        );
        assert!(m.lower <= m.index + 1e-9 && m.index <= m.upper + 1e-9);
    }
}

#[test]
fn no_drift_is_said_to_be_indistinguishable_from_none() {
    // Constructed: listings on the 15th of six months, the same noise pattern in each month, so
    // the noise is orthogonal to the date and the fitted drift is zero; the warning says the
    // term cannot be told from no drift, and the grid still shows the line at its fitted value.
    let dates: Vec<NaiveDate> = (1..=6)
        .map(|m| NaiveDate::from_ymd_opt(2026, m, 15).unwrap())
        .collect();
    let noise: Vec<f64> = (0..24)
        .map(|i| 0.05 * (f64::from(i) * 2.399).sin())
        .collect();
    let market = constructed(&dates, |_| 0.0, &noise);
    let model = fit(&market);
    let d = model.market_drift().unwrap();
    assert!(d.per_month_before.abs() < 1e-9, "{d:?}");
    assert!(!d.is_distinguishable());
    let codes: Vec<WarningCode> = model.warnings().iter().map(|w| w.code).collect();
    assert!(
        codes.contains(&WarningCode::MarketTrendUncertain),
        "{codes:?}"
    );
}

#[test]
fn the_term_stays_out_when_the_dates_cannot_carry_it_and_says_why() {
    // Two months of dates: too short a span.
    let dates: Vec<NaiveDate> = (0..6)
        .map(|k| NaiveDate::from_ymd_opt(2026, 5, 3).unwrap() + chrono::Days::new(10 * k))
        .collect();
    let market = constructed(&dates, |_| 0.0, &[0.0; 24]);
    let model = fit(&market);
    match model.market_time() {
        MarketTimeTerm::NotInFit { reason } => {
            assert!(reason.contains("at least 90 days"), "{reason}");
        }
        other @ MarketTimeTerm::InFit { .. } => panic!("{other:?}"),
    }
    assert!(model.market_drift().is_none());
    assert!(
        !model
            .design()
            .names
            .iter()
            .any(|n| n == "months_before_as_of")
    );
    // Switched off by the appraiser.
    let market = constructed(&every_tenth_day(), |_| 0.0, &[0.0; 24]);
    let off = HedonicParams::new(as_of())
        .age_form(AgeForm::Linear)
        .market_time(false)
        .check()
        .unwrap()
        .fit(&market, &all_rows(&market))
        .unwrap();
    assert_eq!(
        off.market_time(),
        &MarketTimeTerm::NotInFit {
            reason: "switched off in the fit settings".into()
        }
    );
}

#[test]
fn the_demo_markets_drift_is_recovered_within_three_standard_errors() {
    // Invented data: the demo draws each listing's price in a market that fell at ln 0.003 per
    // month before the appraisal date (`DemoTruth::per_month_before`).
    let truth = model::demo::demo_truth().per_month_before;
    let (_, fit) = shared_tessel_fit(20_000, 1, AgeForm::Auto);
    let d = fit
        .model
        .market_drift()
        .expect("the demo's dates carry the term");
    let z = (d.per_month_before - truth) / d.std_error;
    assert!(z.abs() < 3.0, "estimate {d:?}, truth {truth}, z {z}");
    assert!(d.is_distinguishable(), "{d:?}");
    let index = fit.market_index.as_ref().unwrap().as_ref().unwrap();
    // The oldest period stands above the latest, as a falling market's should.
    assert!(index.months[0].index > 100.0, "{index:?}");
}

#[test]
fn the_grid_brings_each_comparable_to_the_appraisal_date() {
    let market = demo_market(20_000, 1);
    let (_, fit) = shared_tessel_fit(20_000, 1, AgeForm::Auto);
    let a = appraise(&market, fit, &AppraisalRequest::new(tessel(2022, 41_000.0))).unwrap();
    let d = fit.model.market_drift().unwrap();
    for c in &a.comparables {
        let line = c
            .adjustments
            .iter()
            .find(|l| l.kind == AdjustmentKind::MarketConditions)
            .expect("a market-conditions line");
        let months = months_before(fit.as_of, c.listing.listed_on.unwrap());
        let expected = c.listing.asking_price * ((-d.per_month_before * months).exp() - 1.0);
        assert!((line.amount - expected).abs() < 1e-9, "{line:?}");
        // The market fell: an older listing is brought down to today's market.
        assert_eq!(line.amount < 0.0, months > 0.0, "{line:?}");
        assert!(line.basis.contains("market fell"), "{}", line.basis);
        assert!(
            line.basis.contains(&format!(
                "listed {months:.1} months before the appraisal date"
            )),
            "{}",
            line.basis
        );
    }
}

#[test]
fn an_appraisal_with_market_conditions_is_saved_and_reproduces() {
    let again = acceptance::saved_and_read_back(
        FitSettings::default(),
        AppraisalRequest::new(tessel(2022, 41_000.0)),
    );
    assert!(again.fit.rates.market_drift.is_some());
    assert!(again.fit.market_time.as_ref().unwrap().in_fit());
    assert!(again.appraisal.comparables.iter().all(|c| {
        c.adjustments
            .iter()
            .any(|l| l.kind == AdjustmentKind::MarketConditions)
    }));
    // A hand edit of the saved drift is found by the replay.
    let mut edited = again.clone();
    if let Some(d) = edited.fit.rates.market_drift.as_mut() {
        d.per_month_before *= 2.0;
    }
    assert!(!model::session::reproduce(&edited).unwrap().reproduces());
}
