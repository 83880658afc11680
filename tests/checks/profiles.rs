//! Jurisdiction profiles: the shipped file reads and cites every value; comparables are checked
//! against a profile by rule; a claim is worked as the profile says.

use acceptance::demo_session;
use model::money::Cents;
use model::session::{Purpose, WorksheetOutcome};
use model::worksheet::{
    ClaimInputs, ProfileError, ProfileFile, RegistrationPaid, TotalLossRule, shipped_profiles,
};

fn claim_inputs(profile_id: &str) -> ClaimInputs {
    ClaimInputs {
        profile_id: profile_id.into(),
        sales_tax_pct: 6.0,
        title_fee: Cents::whole_dollars(40),
        transfer_fee: Cents::whole_dollars(20),
        annual_registration: Cents::whole_dollars(240),
        registration_months_remaining: 6.0,
        deductible: Cents::whole_dollars(500),
        repair_estimate: Cents::whole_dollars(9_000),
        salvage_value: Cents::whole_dollars(4_000),
        owner_retains_salvage: false,
    }
}

#[test]
fn the_shipped_profiles_read_and_every_value_has_a_citation() {
    let file = shipped_profiles().unwrap();
    assert!(file.profiles.len() >= 3);
    for p in &file.profiles {
        for citation in [
            &p.min_comparables.citation,
            &p.max_listing_age_days.citation,
            &p.max_distance_miles.citation,
            &p.mileage_rule.citation,
            &p.sales_tax_paid.citation,
            &p.title_and_transfer_fees_paid.citation,
            &p.registration.citation,
            &p.total_loss_rule.citation,
        ] {
            assert!(citation.len() > 10, "{}: {citation:?}", p.id);
        }
    }
}

#[test]
fn the_shipped_profiles_carry_the_published_rules() {
    let file = shipped_profiles().unwrap();
    // NAIC Unfair Property/Casualty Claims Settlement Practices Model Regulation §8(A): two or
    // more comparables, available within the last 90 days.
    let naic = file.get("naic-model").unwrap();
    assert_eq!(naic.min_comparables.value, 2);
    assert_eq!(naic.max_listing_age_days.value, Some(90));
    // 11 NYCRR 216.7: at most 4,000 miles or 10 % more than the insured vehicle, whichever is
    // greater.
    let ny = file.get("ny").unwrap();
    let rule = ny.mileage_rule.value.unwrap();
    assert_eq!(rule.max_over.unwrap().limit_for(30_000.0), 4_000.0);
    assert_eq!(rule.max_over.unwrap().limit_for(60_000.0), 6_000.0);
    assert!(ny.mileage_rule.citation.contains("216.7"));
    // 10 CCR 2695.8(b): taxes, one-time transfer fees and prorated registration are paid.
    let ca = file.get("ca").unwrap();
    assert!(ca.sales_tax_paid.value && ca.title_and_transfer_fees_paid.value);
    assert_eq!(ca.registration.value, RegistrationPaid::Prorated);
    assert!(ca.registration.citation.contains("2695.8(b)"));
    // WAC 284-30-392: each comparable's source, date, identifier and location.
    let wa = file.get("wa").unwrap();
    assert!(
        wa.documentation
            .as_ref()
            .unwrap()
            .citation
            .contains("284-30-392")
    );
}

#[test]
fn a_profile_file_with_a_mistake_says_where() {
    let shipped = model::worksheet::SHIPPED_PROFILES;
    let newer = shipped.replacen("format_version: 1,", "format_version: 4,", 1);
    assert!(matches!(
        ProfileFile::parse(&newer, "p.ron"),
        Err(ProfileError::NewerVersion { found: 4, .. })
    ));
    let broken = shipped.replacen("value: Some(90),", "value: Some(ninety),", 1);
    let e = ProfileFile::parse(&broken, "p.ron")
        .unwrap_err()
        .to_string();
    let line = broken.lines().position(|l| l.contains("ninety")).unwrap() + 1;
    assert!(e.starts_with(&format!("p.ron:{line}:")), "{e}");
    let twice = shipped.replacen("id: \"ca\"", "id: \"ny\"", 1);
    let e = ProfileFile::parse(&twice, "p.ron").unwrap_err().to_string();
    assert!(e.contains("\"ny\"") && e.contains("twice"), "{e}");
    let threshold = shipped.replacen("threshold_pct: 75.0", "threshold_pct: 175.0", 1);
    let e = ProfileFile::parse(&threshold, "p.ron")
        .unwrap_err()
        .to_string();
    assert!(e.contains("175"), "{e}");
}

#[test]
fn a_profile_with_too_few_comparables_says_so_plainly() {
    // Eight comparables, two of them listed too long ago, against a profile that asks for seven.
    let mut profile = shipped_profiles()
        .unwrap()
        .get("naic-model")
        .unwrap()
        .clone();
    profile.min_comparables.value = 7;
    let mut session = demo_session(Purpose::Value, None);
    assert_eq!(session.appraisal.comparables.len(), 8);
    session.appraisal.comparables[3].days_listed = Some(120);
    session.appraisal.comparables[5].days_listed = Some(200);
    let check = profile.check(&session.request.subject, &session.appraisal.comparables);
    assert_eq!(check.complying, 6);
    assert!(!check.enough());
    assert_eq!(
        check.summary(),
        "Too few comparables: 6 meet every rule, the profile requires at least 7 (2 break a rule, listed below)."
    );
    profile.min_comparables.value = 6;
    assert!(
        profile
            .check(&session.request.subject, &session.appraisal.comparables)
            .enough()
    );
}

#[test]
fn a_comparable_that_breaks_the_new_york_mileage_rule_is_named_with_the_rule() {
    let ny = shipped_profiles().unwrap().get("ny").unwrap().clone();
    let mut session = demo_session(
        Purpose::Claim {
            profile: ny.clone(),
            inputs: claim_inputs("ny"),
        },
        None,
    );
    // Subject 41,000 mi: the allowance is max(4,000, 4,100) = 4,100 mi above it.
    let comparable = &mut session.appraisal.comparables[0];
    comparable.listing.miles = 45_101.0;
    let check = ny.check(&session.request.subject, &session.appraisal.comparables);
    assert_eq!(
        check.comparables[0].breaks.len(),
        1,
        "{:?}",
        check.comparables[0]
    );
    assert!(check.comparables[0].breaks[0].contains("11 NYCRR 216.7"));
    session.appraisal.comparables[0].listing.miles = 45_100.0;
    let check = ny.check(&session.request.subject, &session.appraisal.comparables);
    assert!(check.comparables[0].breaks.is_empty());
}

#[test]
fn a_comparable_listed_too_long_ago_or_without_a_date_breaks_the_listing_age_rule() {
    let naic = shipped_profiles()
        .unwrap()
        .get("naic-model")
        .unwrap()
        .clone();
    let mut session = demo_session(Purpose::Value, None);
    session.appraisal.comparables[0].days_listed = Some(91);
    session.appraisal.comparables[1].days_listed = None;
    session.appraisal.comparables[2].days_listed = Some(90);
    let check = naic.check(&session.request.subject, &session.appraisal.comparables);
    assert!(check.comparables[0].breaks[0].contains("listed 91 days"));
    assert!(check.comparables[1].breaks[0].contains("no listing date"));
    assert!(check.comparables[2].breaks.is_empty());
}

#[test]
fn a_claim_pays_what_the_profile_pays_worked_by_hand() {
    // New York profile: tax and title/transfer paid, registration not paid, 75 % rule (≥).
    let ny = shipped_profiles().unwrap().get("ny").unwrap().clone();
    let inputs = claim_inputs("ny");
    let session = demo_session(
        Purpose::Claim {
            profile: ny,
            inputs,
        },
        None,
    );
    let Some(WorksheetOutcome::Claim(c)) = &session.result.worksheet else {
        panic!("no claim");
    };
    let acv = (session.result.indicated_value * 100.0).round() as i64;
    assert_eq!(c.acv, Cents::new(acv));
    // Tax = ACV × 6 %, to the cent (half away from zero); fees 40 + 20 = 60; registration not
    // paid; deductible 500.
    let tax = (acv * 6 + 50) / 100;
    assert_eq!(c.settlement.additions.len(), 2);
    assert_eq!(c.settlement.additions[0].amount, Cents::new(tax));
    assert_eq!(c.settlement.additions[1].amount, Cents::whole_dollars(60));
    assert_eq!(c.settlement.payment, Cents::new(acv + tax + 6_000 - 50_000));
    assert_eq!(c.not_paid.len(), 1);
    assert_eq!(c.not_paid[0].label, "registration");
    // Repair 9,000 on an ACV near $30,600 is about 29 %: not a total loss under 75 %.
    assert!(matches!(
        shipped_profiles().unwrap().get("ny").unwrap().total_loss_rule.value,
        TotalLossRule::Percentage { threshold_pct, .. } if threshold_pct == 75.0
    ));
    assert!(!c.verdict.total_loss);
    assert!((c.verdict.measure - 100.0 * 9_000.0 / c.acv.dollars()).abs() < 1e-9);
}

#[test]
fn claim_mode_searches_with_the_profiles_filters() {
    let ny = shipped_profiles().unwrap().get("ny").unwrap().clone();
    let rules = ny.comparable_rules(&model::comparables::ComparableRules::default());
    assert_eq!(rules.mileage, ny.mileage_rule.value.unwrap());
    assert_eq!(rules.max_listing_age_days, Some(90));
    let session = demo_session(
        Purpose::Claim {
            profile: ny,
            inputs: claim_inputs("ny"),
        },
        None,
    );
    for c in &session.appraisal.comparables {
        assert!(c.listing.miles <= 41_000.0 + 4_100.0, "{}", c.listing.miles);
    }
}
