//! Guarded values: every warning code raised where the market cannot support the number, no
//! curve shape beyond the data, and the age form chosen by the data. The markets are the
//! invented demo and invented small exports in `tests/data/markets/` (behavior checks, not
//! published values).

use std::sync::OnceLock;

use acceptance::{data_path, demo_market, fit_demo, shared_tessel_fit, tessel};
use model::adjustment::{AdjustmentKind, UserAdjustment};
use model::appraisal::{AppraisalRequest, FitSettings, MarketFit, appraise, fit_market};
use model::clean::Overrides;
use model::condition::Condition;
use model::hedonic::{AgeForm, Attributes};
use model::import::{ImportOptions, import_csv_file};
use model::market::Market;
use model::subject::Subject;
use model::warnings::{Warning, WarningCode, has};
use proptest::prelude::*;

fn demo() -> &'static (Market, MarketFit) {
    shared_tessel_fit(4_000, 1, AgeForm::Auto)
}

/// `subject` appraised on the demo market with the default rules.
fn on_demo(subject: Subject) -> model::appraisal::Appraisal {
    let (market, fit) = demo();
    appraise(market, fit, &AppraisalRequest::new(subject)).unwrap()
}

fn subject(spec: &str) -> Subject {
    Subject::parse(spec).unwrap()
}

fn codes(warnings: &[Warning]) -> Vec<&'static str> {
    warnings.iter().map(|w| w.code.as_str()).collect()
}

/// The 16-listing export, as pulled: no dates, the make once in capitals, the model once in
/// lower case with stray spaces.
fn small_export() -> Market {
    import_csv_file(
        &data_path("markets/small-export-16.csv"),
        &ImportOptions::default(),
    )
    .unwrap()
    .0
}

fn fit_small(market: &Market, age_form: AgeForm, as_of: Option<chrono::NaiveDate>) -> MarketFit {
    // One model in the file whatever the spelling: no --make/--model needed.
    let segments = market.segments();
    assert_eq!(segments.len(), 1, "{segments:?}");
    let settings = FitSettings {
        age_form,
        as_of,
        ..FitSettings::default()
    };
    fit_market(market, segments[0].0, &settings, &Overrides::new()).unwrap()
}

#[test]
fn a_subject_older_than_the_market_is_warned_and_never_worth_more_than_the_oldest_year() {
    // Regression: the 1990 subject on the demo market was valued at $783,221 by the quadratic
    // curve extrapolated past the data, without a word.
    let (_, fit) = demo();
    let old = on_demo(tessel(1990, 41_000.0));
    assert!(
        has(&old.warnings, WarningCode::SubjectYearOutsideMarket),
        "{:?}",
        codes(&old.warnings)
    );
    let (_, oldest_age) = fit.model.design().age_range();
    let oldest_year = fit.model.as_of_year() - oldest_age as i32;
    let at_oldest = on_demo(tessel(oldest_year, 41_000.0));
    println!(
        "1990: {} ; {oldest_year}: {}",
        old.model_estimate.median, at_oldest.model_estimate.median
    );
    assert!(old.model_estimate.median <= at_oldest.model_estimate.median + 1e-6);
    assert!(old.reconciliation.indicated_value <= at_oldest.model_estimate.median + 1e-6);
    // Its band is wider than at the edge: the distance from the data shows.
    let width = |a: &model::appraisal::Appraisal| {
        (a.model_estimate.prediction_interval.upper / a.model_estimate.prediction_interval.lower)
            .ln()
    };
    assert!(width(&old) > width(&at_oldest));
}

#[test]
fn a_subject_beyond_the_markets_mileage_is_warned() {
    // Regression: 900,000 miles on the demo gave $5,225 without a word.
    let a = on_demo(tessel(2022, 900_000.0));
    let w = a
        .warnings
        .iter()
        .find(|w| w.code == WarningCode::SubjectMileageOutsideMarket)
        .unwrap();
    assert!(w.figures["highest_miles"] < 900_000.0);
    assert!(w.message.contains("900,000 mi"), "{}", w.message);
}

#[test]
fn the_small_undated_misspelled_export_is_one_model_and_says_what_it_cannot_support() {
    // The 16-listing export as pulled: without --make or --model it is one model (two
    // spellings of the make and of the model merged), the chosen age form falls with age, and
    // the warnings say the listings are few and undated.
    let market = small_export();
    let fit = fit_small(&market, AgeForm::Auto, None);
    let choice = fit.age_form_choice.as_ref().unwrap();
    println!("{}", choice.reason);
    assert_eq!(choice.chosen, AgeForm::Linear);
    assert!(fit.model.rising_steps().is_empty());
    // The F test alone would keep variant slopes here, which make the base curve rise with
    // age: 16 listings are too few for them, and `auto` says so.
    assert!(!fit.model.design().variant_slopes);
    let test = fit.premium_fade.clone().unwrap().unwrap();
    assert!(
        test.set_aside
            .as_deref()
            .is_some_and(|w| w.contains("too few")),
        "{test:?}"
    );
    assert!(fit.model.coefficients()[1] < 0.0, "value falls with age");
    let warnings = fit.warnings();
    for code in [WarningCode::FewListings, WarningCode::NoListingDates] {
        assert!(has(&warnings, code), "{code}: {:?}", codes(&warnings));
    }
    assert!(!has(&warnings, WarningCode::AgeCurveNotFalling));
    let dates = warnings
        .iter()
        .find(|w| w.code == WarningCode::NoListingDates)
        .unwrap();
    assert!(dates.message.contains("today's date"), "{}", dates.message);
    // A date given says so instead.
    let given = fit_small(
        &market,
        AgeForm::Auto,
        chrono::NaiveDate::from_ymd_opt(2026, 6, 1),
    );
    let dates = given
        .warnings()
        .into_iter()
        .find(|w| w.code == WarningCode::NoListingDates)
        .unwrap();
    assert!(
        dates.message.contains("you gave (2026-06-01)"),
        "{}",
        dates.message
    );
    // The quadratic, forced, rises with age, and says so.
    let quadratic = fit_small(&market, AgeForm::Quadratic, None);
    assert!(!quadratic.model.rising_steps().is_empty());
    assert!(has(&quadratic.warnings(), WarningCode::AgeCurveNotFalling));
}

#[test]
fn a_subject_typed_in_any_case_finds_its_market() {
    let market = small_export();
    let fit = fit_small(&market, AgeForm::Auto, None);
    let a = appraise(
        &market,
        &fit,
        &AppraisalRequest::new(subject(
            "year=2022,make=  orvane,model=KESTREL,variant=halvet,miles=38000",
        )),
    )
    .unwrap();
    assert_eq!(a.subject.make, "Orvane");
    assert_eq!(a.subject.model, "Kestrel");
    assert_eq!(a.subject.variant.as_deref(), Some("Halvet"));
    assert!(!a.comparables.is_empty());
}

#[test]
fn few_comparables_large_adjustments_and_disagreement_are_warned() {
    let (market, fit) = demo();
    // Only one model year, no mileage limit, no older than 90 days, and 30 asked for.
    let mut request = AppraisalRequest::new(tessel(2022, 41_000.0));
    request.rules.model_year_window = 0;
    request.rules.count = 30;
    request.rules.same_variant_only = true;
    let a = appraise(market, fit, &request).unwrap();
    assert!(a.comparables.len() < 30);
    assert!(has(&a.warnings, WarningCode::FewComparables));
    // A comparable forced in from five model years away needs large adjustments.
    let far = fit
        .included_rows
        .iter()
        .copied()
        .find(|&r| market.model_year[r] == 2017 && market.variant_name(r) == "Veskel")
        .unwrap();
    let mut request = AppraisalRequest::new(tessel(2022, 41_000.0));
    request.choices.include.insert(market.line[far]);
    let a = appraise(market, fit, &request).unwrap();
    let forced = a
        .comparables
        .iter()
        .find(|c| c.listing.line == market.line[far])
        .unwrap();
    assert!(forced.gross_pct > 25.0, "{}", forced.gross_pct);
    assert!(has(&a.warnings, WarningCode::LargeAdjustments));
    // An appraiser's line adding 40 % to every comparable puts the comparables far from the
    // model: the two disagree by more than the band.
    let mut request = AppraisalRequest::new(tessel(2022, 41_000.0));
    request.user_adjustments.push(UserAdjustment {
        line: None,
        kind: AdjustmentKind::Other,
        amount: model::money::Cents::whole_dollars(12_000),
        basis: "constructed to move the comparables".into(),
    });
    let a = appraise(market, fit, &request).unwrap();
    assert!(
        has(&a.warnings, WarningCode::ModelAndComparablesDisagree),
        "{:?}",
        codes(&a.warnings)
    );
    // The plain demo appraisal has none of these.
    let plain = on_demo(tessel(2022, 41_000.0));
    assert!(plain.warnings.is_empty(), "{:?}", codes(&plain.warnings));
}

#[test]
fn a_forecast_past_the_oldest_listing_is_warned() {
    let (market, fit) = demo();
    let s = tessel(2016, 98_000.0);
    let f = model::forecast::forecast(market, fit, &s, 60.0, None, 0.8).unwrap();
    assert!(has(&f.warnings, WarningCode::ForecastBeyondMarket));
    let near =
        model::forecast::forecast(market, fit, &tessel(2023, 30_000.0), 6.0, None, 0.8).unwrap();
    assert!(near.warnings.is_empty(), "{:?}", codes(&near.warnings));
}

#[test]
fn a_market_whose_held_out_errors_exceed_the_band_is_warned() {
    use model::backtest::{Backtest, MethodAccuracy};
    let accuracy = |error: f64| MethodAccuracy {
        evaluated: 40,
        median_abs_pct_error: error,
        band_coverage_pct: 70.0,
        level: 0.8,
    };
    let backtest = |error| Backtest {
        folds: 5,
        model: accuracy(error),
        comparables: accuracy(error),
        not_valued: 0,
    };
    // A band of ±8 % around $20,000.
    let band = model::ols::Interval {
        lower: 20_000.0 / 1.08,
        upper: 20_000.0 * 1.08,
        level: 0.8,
    };
    let w = model::guards::backtest_warning(&backtest(12.0), &band, 20_000.0).unwrap();
    assert_eq!(w.code, WarningCode::BacktestErrorExceedsBand);
    assert!(model::guards::backtest_warning(&backtest(5.0), &band, 20_000.0).is_none());
    assert_eq!(
        model::guards::accuracy_in_words(&backtest(9.0)),
        "on this market, 7 in 10 held-out listings fell inside their 80 % band; typical error 9 %"
    );
}

#[test]
fn a_market_whose_value_rises_with_miles_is_warned_and_flat_beyond_its_miles() {
    // Constructed: prices that rise 1 % per 10,000 mi (a km column read as miles can do it).
    let mut market = Market::default();
    for i in 0..40_u32 {
        let age = i % 5;
        let miles = 5_000.0 + 4_000.0 * f64::from(i);
        let price = 30_000.0 * (-0.1 * f64::from(age)).exp() * (0.01 * miles / 10_000.0).exp();
        market.push(&model::market::Listing {
            listed_on: chrono::NaiveDate::from_ymd_opt(2026, 5, 1),
            seller: Some(format!("Seller {i}")),
            ..model::market::Listing::asking(
                u64::from(i) + 2,
                ("Quellmark", "Brindle"),
                2026 - age as i32,
                miles,
                (price * (1.0 + 0.01 * f64::from(i % 3))).round(),
            )
        });
    }
    let segment = market.find_segment("Quellmark", "Brindle").unwrap();
    let fit = fit_market(
        &market,
        segment,
        &FitSettings {
            age_form: AgeForm::Linear,
            as_of: chrono::NaiveDate::from_ymd_opt(2026, 6, 1),
            ..FitSettings::default()
        },
        &Overrides::new(),
    )
    .unwrap();
    assert!(fit.model.miles_slope() > 0.0);
    assert!(has(&fit.warnings(), WarningCode::MileageNotFalling));
    let at = |miles: f64| {
        fit.model
            .estimate(
                &Attributes {
                    age_years: 2.0,
                    miles,
                    variant: model::vocabulary::NO_NAME,
                    condition: Condition::Used,
                },
                0.8,
            )
            .median
    };
    let (_, most) = fit.model.miles_range();
    assert!((at(most + 300_000.0) - at(most)).abs() < 1e-6 * at(most));
}

#[test]
fn every_warning_code_is_documented_in_the_readme() {
    let readme = std::fs::read_to_string(acceptance::repo_path("README.md")).unwrap();
    for code in WarningCode::ALL {
        assert!(
            readme.contains(&format!("`{}`", code.as_str())),
            "README does not explain {code}"
        );
    }
}

#[test]
fn the_data_choose_a_curved_form_on_a_large_market() {
    // The demo's generating curve is quadratic in age (invented truth): with 40,000 listings
    // the straight line cannot stand against it.
    let market = demo_market(40_000, 3);
    let fit = fit_demo(&market, "Quellmark", "Tessel", FitSettings::default());
    let choice = fit.age_form_choice.as_ref().unwrap();
    println!("{}", choice.reason);
    assert_ne!(choice.chosen, AgeForm::Linear, "{}", choice.reason);
    let bic = |form| {
        choice
            .candidates
            .iter()
            .find(|c| c.form == form)
            .and_then(|c| c.bic)
            .unwrap()
    };
    assert!(bic(choice.chosen) < bic(AgeForm::Linear) - 10.0);
    assert!(
        choice
            .reason
            .starts_with(&format!("{} age:", choice.chosen))
    );
}

fn form_fits() -> &'static Vec<&'static (Market, MarketFit)> {
    static FITS: OnceLock<Vec<&'static (Market, MarketFit)>> = OnceLock::new();
    FITS.get_or_init(|| {
        let mut fits: Vec<&'static (Market, MarketFit)> = AgeForm::FITTED
            .into_iter()
            .map(|form| shared_tessel_fit(3_000, 8, form))
            .collect();
        let small = small_export();
        let fit = fit_small(&small, AgeForm::Quadratic, None);
        fits.push(Box::leak(Box::new((small, fit))));
        fits
    })
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(256))]

    /// Beyond the oldest age in the data, one more year never adds value, for every age form
    /// (including a quadratic that turns upward inside the data); more miles never add value
    /// where the fitted mileage rate falls, and beyond the data never at all.
    #[test]
    fn no_value_rises_with_age_beyond_the_data_or_with_miles(
        which in 0usize..4,
        beyond in 0.0f64..40.0,
        step in 0.01f64..10.0,
        miles in 0.0f64..600_000.0,
        extra in 0.0f64..400_000.0,
        variant_pick in 0usize..3,
    ) {
        let (_, fit) = &form_fits()[which];
        let model = &fit.model;
        let variants = &model.design().variants;
        let variant = variants[variant_pick % variants.len()];
        let (_, oldest) = model.design().age_range();
        let value = |age: f64, miles: f64| {
            model.estimate(&Attributes { age_years: age, miles, variant, condition: model.design().conditions[0] }, 0.8).median
        };
        let age = oldest + beyond;
        prop_assert!(value(age + step, miles) <= value(age, miles) * (1.0 + 1e-12));
        let (_, most_miles) = model.miles_range();
        if model.miles_slope() <= 0.0 || miles >= most_miles {
            prop_assert!(value(3.0, miles + extra) <= value(3.0, miles) * (1.0 + 1e-12));
        }
    }
}
