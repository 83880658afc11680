//! Whether a variant's premium fades: the variant × age slopes, their F test, the grid and the
//! depreciation view. Exact checks are on markets constructed by definition; the demo's fade is
//! recovered within its standard error (invented data: a check of the engine, not a published
//! value). The F test itself is checked against statsmodels in `crosscheck.rs`.

use std::fmt::Write as _;

use acceptance::{demo_market, shared_tessel_fit, tessel};
use linfa::ParamGuard;
use model::adjustment::AdjustmentKind;
use model::appraisal::{AppraisalRequest, FitSettings, appraise, find_segment, fit_market};
use model::clean::Overrides;
use model::hedonic::premium_fade::{summary, test_premium_fade};
use model::hedonic::{AgeForm, HedonicParams, VariantSlopes};
use model::market::Market;

fn as_of() -> chrono::NaiveDate {
    chrono::NaiveDate::from_ymd_opt(2026, 6, 30).unwrap()
}

/// Constructed by definition: one model, three variants, ages 0 to 9, undated, 210 listings (7
/// in each variant and age, with the same seven odometer offsets); ln price
/// `10.4 − 0.11·age − 0.02·miles/10,000 + premium(variant) + fade(variant)·age + noise(age)`.
fn constructed(fade: [f64; 3], noise: impl Fn(usize) -> f64) -> Market {
    let premium = [0.0, 0.1, 0.25];
    let names = ["Plain", "Mid", "Top"];
    let mut csv = String::from("model_year,make,model,variant,asking_price,miles\n");
    for i in 0..210 {
        let v = i % 3;
        let age = (i / 3) % 10;
        let miles = 12_000.0 * age as f64 + 900.0 * (i % 7) as f64;
        let ln_price = 10.4 - 0.11 * age as f64 - 0.02 * miles / 10_000.0
            + premium[v]
            + fade[v] * age as f64
            + noise(age);
        let _ = writeln!(
            csv,
            "{},Ostrell,Varn,{},{:.6},{miles}",
            2026 - age as i32,
            names[v],
            ln_price.exp()
        );
    }
    acceptance::constructed_market(csv).0
}

fn rows(market: &Market) -> Vec<usize> {
    (0..market.len()).collect()
}

#[test]
fn a_fade_put_into_a_constructed_market_is_recovered_exactly_and_kept() {
    // Constructed: the Top variant's premium falls by 0.015 of ln price a year, no noise.
    let market = constructed([0.0, 0.0, -0.015], |_| 0.0);
    let model = HedonicParams::new(as_of())
        .age_form(AgeForm::Linear)
        .variant_slopes(true)
        .check()
        .unwrap()
        .fit(&market, &rows(&market))
        .unwrap();
    let top = market.names.id_ignore_case("Top").unwrap();
    let mid = market.names.id_ignore_case("Mid").unwrap();
    assert!((model.variant_age_slope(top) + 0.015).abs() < 1e-6);
    assert!(model.variant_age_slope(mid).abs() < 1e-6);
    let names: Vec<&str> = model.design().names.iter().map(String::as_str).collect();
    assert!(names.contains(&"variant=Top:age_years"), "{names:?}");
    // The premium at age 8 is 0.25 − 0.12 = 0.13 of ln price.
    let (at8, se) = model.premium(top, 8.0);
    assert!((at8 - 0.13).abs() < 1e-6 && se < 1e-4, "{at8} {se}");
    let test = test_premium_fade(
        &market,
        &rows(&market),
        as_of(),
        AgeForm::Linear,
        true,
        true,
    )
    .unwrap();
    assert!(test.supported(), "{test:?}");
    assert_eq!(test.df1, 2);
    let words = summary(&model, &market, Some(&Ok(test)), 9);
    assert!(words[0].contains("the data support"), "{words:?}");
    assert!(
        words[2]
            .starts_with("Top's premium over Plain falls from 28.4 % at age 0 to 12.2 % at age 9"),
        "{words:?}"
    );
}

#[test]
fn no_fade_is_not_kept_under_auto_and_the_words_say_so() {
    // Constructed: no fade; a departure from the straight age line that is the same for every
    // variant (so orthogonal to every variant slope in this balanced design): F = 0.
    let market = constructed([0.0; 3], |age| 0.04 * (age as f64 * 1.7).sin());
    let segment = find_segment(&market, "Ostrell", "Varn").unwrap();
    let settings = FitSettings {
        as_of: Some(as_of()),
        age_form: AgeForm::Linear,
        ..FitSettings::default()
    };
    let fit = fit_market(&market, segment, &settings, &Overrides::new()).unwrap();
    let test = fit.premium_fade.clone().unwrap().unwrap();
    assert!(!test.supported(), "{test:?}");
    assert!(!fit.model.design().variant_slopes);
    let words = summary(&fit.model, &market, fit.premium_fade.as_ref(), 9);
    assert!(words[0].contains("not supported"), "{words:?}");
    assert!(words[1].contains("at every age"), "{words:?}");
    // Forced on, the slopes enter whatever the test says; switched off, no test is made.
    let always = fit_market(
        &market,
        segment,
        &FitSettings {
            variant_slopes: VariantSlopes::Always,
            ..settings
        },
        &Overrides::new(),
    )
    .unwrap();
    assert!(always.model.design().variant_slopes);
    let never = fit_market(
        &market,
        segment,
        &FitSettings {
            variant_slopes: VariantSlopes::Never,
            ..settings
        },
        &Overrides::new(),
    )
    .unwrap();
    assert!(never.premium_fade.is_none());
    assert!(!never.model.design().variant_slopes);
}

#[test]
fn the_demo_top_variants_fade_is_recovered_within_three_standard_errors() {
    // Invented data: the demo's top variant loses 0.012 of ln price of its premium a year
    // (`DemoTruth::top_variant_fade`); the middle variant none.
    let truth = model::demo::demo_truth().top_variant_fade;
    let (market, fit) = shared_tessel_fit(20_000, 1, AgeForm::Auto);
    assert!(fit.model.design().variant_slopes, "auto keeps the slopes");
    let terms = fit.model.terms();
    let slope = |name: &str| {
        terms
            .iter()
            .find(|t| t.name == format!("variant={name}:age_years"))
            .unwrap()
            .clone()
    };
    let top = slope("Tolvane");
    let z = (top.estimate - truth) / top.std_error;
    assert!(z.abs() < 3.0, "{top:?} vs {truth}: z {z}");
    let mid = slope("Ambrel");
    assert!((mid.estimate / mid.std_error).abs() < 3.0, "{mid:?}");
    // The depreciation view shows the fade with its band.
    let table = model::depreciation::depreciation_table(&fit.model, market, 10);
    let premium = table
        .premiums
        .iter()
        .find(|p| p.variant == "Tolvane")
        .unwrap();
    let (first, last) = (&premium.by_age[0], premium.by_age.last().unwrap());
    assert!(last.premium_pct < first.premium_pct - 5.0, "{premium:?}");
    for r in &premium.by_age {
        assert!(
            r.lower_pct < r.premium_pct && r.premium_pct < r.upper_pct,
            "{r:?}"
        );
    }
}

#[test]
fn with_variant_slopes_the_variant_line_compares_the_variants_at_the_subjects_age() {
    let market = demo_market(20_000, 1);
    let (_, fit) = shared_tessel_fit(20_000, 1, AgeForm::Auto);
    let mut subject = tessel(2019, 70_000.0);
    subject.variant = Some("Tolvane".into());
    let mut request = AppraisalRequest::new(subject);
    // Two comparables of other variants, included by hand.
    for other in ["Ambrel", "Veskel"] {
        let row = fit
            .included_rows
            .iter()
            .copied()
            .find(|&r| market.model_year[r] == 2019 && market.variant_name(r) == other)
            .unwrap();
        request.choices.include.insert(market.line[row]);
    }
    let a = appraise(&market, fit, &request).unwrap();
    let age_s = f64::from(chrono::Datelike::year(&fit.as_of) - 2019);
    let tolvane = market.names.id_ignore_case("Tolvane").unwrap();
    let others = a
        .comparables
        .iter()
        .filter(|c| c.listing.variant.as_deref() != Some("Tolvane"))
        .count();
    assert!(
        others > 0,
        "the check needs a comparable of another variant"
    );
    for c in &a.comparables {
        let vc = market.variant[c.listing.row];
        let line = c
            .adjustments
            .iter()
            .find(|l| l.kind == AdjustmentKind::Variant)
            .unwrap();
        let log_change = fit.model.premium(tolvane, age_s).0 - fit.model.premium(vc, age_s).0;
        let expected = c.listing.asking_price * (log_change.exp() - 1.0);
        assert!(
            (line.amount - expected).abs() < 1e-6,
            "{line:?} vs {expected}"
        );
    }
}

#[test]
fn an_appraisal_with_variant_slopes_is_saved_and_reproduces() {
    let mut subject = tessel(2020, 60_000.0);
    subject.variant = Some("Tolvane".into());
    let again = acceptance::saved_and_read_back(
        FitSettings {
            variant_slopes: VariantSlopes::Always,
            ..FitSettings::default()
        },
        AppraisalRequest::new(subject),
    );
    assert!(!again.fit.rates.variant_age_slopes.is_empty());
    assert!(!again.fit.premiums.is_empty());
    // A hand edit of a saved slope is found.
    let mut edited = again.clone();
    for v in edited.fit.rates.variant_age_slopes.values_mut() {
        *v += 0.05;
    }
    assert!(!model::session::reproduce(&edited).unwrap().reproduces());
}
