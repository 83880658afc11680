//! The two desks' day in the workbench: every engine setting changed on screen (undone, saved,
//! reopened), a claim's case details and date of loss, the subject's VIN checked, the session
//! found again by its number, and a trade-in report fit to hand to the customer.

use app::command::Command;
use app::document::{AppraisalDocument, default_trade_in};
use app::panes::settings::{SETTINGS_LABEL, YEAR_WINDOW_LABEL};
use app::workbench::CentralView;
use app::workbench::finder::{FINDER_FILTER_LABEL, FINDER_TITLE};
use chrono::NaiveDate;
use egui_kittest::kittest::Queryable;
use model::case::{self, CaseDetails, LossType};
use model::format::cents;
use model::hedonic::AgeForm;
use model::session::{Purpose, read_session};

use crate::support::{
    SMALL_DEMO, claim_in_new_york, comparables, harness_on, indicated, scratch, workbench,
    workbench_on,
};

/// The age form the fit on screen uses (the data's choice under `auto`).
fn form_in_use(wb: &app::Workbench) -> AgeForm {
    wb.runtime().fit.as_ref().unwrap().model.params().age_form
}

#[test]
fn every_ground_rule_is_on_screen_and_a_change_is_undone_saved_and_reopened() {
    let mut wb = workbench();
    wb.show_view(CentralView::Settings);
    let mut harness = harness_on(wb);
    // The tab and the pane's heading.
    assert_eq!(harness.get_all_by_label(SETTINGS_LABEL).count(), 2);
    harness.get_by_label(YEAR_WINDOW_LABEL);
    for words in [
        "Robust fit (Huber): listings far from the curve count less",
        "Set aside unsold listings older than",
        "only the subject's own variant",
        "Use the market's latest date",
    ] {
        harness.get_by_label_contains(words);
    }
    // The age form, chosen on screen: the fit changes to it, and undo brings the data's choice
    // back.
    let chosen_by_data = form_in_use(harness.state());
    let other = if chosen_by_data == AgeForm::Linear {
        ("A rate that changes smoothly with age", AgeForm::Quadratic)
    } else {
        ("A constant rate each year", AgeForm::Linear)
    };
    harness.get_by_label(other.0).click();
    harness.run_steps(2);
    harness.state_mut().wait_for_jobs();
    harness.run_steps(1);
    assert_eq!(harness.state().document().fit.age_form, other.1);
    assert_eq!(form_in_use(harness.state()), other.1);
    harness.state_mut().undo();
    harness.state_mut().wait_for_jobs();
    assert_eq!(harness.state().document().fit.age_form, AgeForm::Auto);
    assert_eq!(form_in_use(harness.state()), chosen_by_data);

    // The robust fit, switched on screen.
    harness.run_steps(1);
    harness
        .get_by_label("Robust fit (Huber): listings far from the curve count less")
        .click();
    harness.run_steps(2);
    harness.state_mut().wait_for_jobs();
    let robust = !AppraisalDocument::demo(SMALL_DEMO).fit.robust;
    assert_eq!(harness.state().document().fit.robust, robust);

    // A wider year window and a date of its own; saved and reopened with both.
    let mut wb = harness.into_state();
    wb.apply(Command::SetYearWindow(3));
    let date = NaiveDate::from_ymd_opt(2026, 10, 15).unwrap();
    wb.apply(Command::SetAppraisalDate(Some(date)));
    wb.wait_for_jobs();
    let subject_year = wb.document().subject.model_year;
    assert!(
        comparables(&wb)
            .iter()
            .all(|l| (l.model_year - subject_year).abs() <= 3)
    );
    assert_eq!(wb.runtime().fit.as_ref().unwrap().as_of, date);
    let value = indicated(&wb);
    let path = scratch("ground-rules").join("rules.ron");
    wb.save_session(&path).unwrap();
    let session = read_session(&path).unwrap();
    assert_eq!(session.request.rules.model_year_window, 3);
    assert_eq!(session.fit.settings.robust, robust);

    let mut other = workbench_on(AppraisalDocument::demo(SMALL_DEMO));
    other.open_session(&path).unwrap();
    other.wait_for_jobs();
    assert_eq!(other.document().rules.model_year_window, 3);
    assert_eq!(other.document().fit.as_of, Some(date));
    assert_eq!(other.document().fit.robust, robust);
    assert_eq!(cents(indicated(&other)), cents(value));
}

#[test]
fn a_claims_profile_locks_its_rules_on_screen_with_their_source() {
    let mut wb = workbench();
    claim_in_new_york(&mut wb, 9_000);
    wb.wait_for_jobs();
    wb.show_view(CentralView::Settings);
    let harness = harness_on(wb);
    // Mileage, listing age and distance.
    assert_eq!(
        harness
            .get_all_by_label_contains("(set by the profile)")
            .count(),
        3
    );
    harness.get_by_label_contains("Source: 11 NYCRR 216.7");
    harness.get_by_label("Date of loss");
}

#[test]
fn a_claims_case_details_and_date_of_loss_are_saved_shown_and_printed() {
    let mut wb = workbench();
    claim_in_new_york(&mut wb, 9_000);
    let loss = NaiveDate::from_ymd_opt(2026, 11, 2).unwrap();
    wb.apply(Command::SetAppraisalDate(Some(loss)));
    wb.apply(Command::SetCase(CaseDetails {
        claim_number: "CL-77-1203".into(),
        insured: "Oda Prenn (invented)".into(),
        loss_type: Some(LossType::Flood),
        ..CaseDetails::default()
    }));
    wb.wait_for_jobs();
    // The date of loss is the appraisal date, both ways.
    assert_eq!(wb.document().case.date_of_loss, Some(loss));
    assert_eq!(wb.runtime().fit.as_ref().unwrap().as_of, loss);
    wb.show_view(CentralView::Worksheet);
    let harness = harness_on(wb);
    // The banner carries the case line; the worksheet its fields.
    harness.get_by_label_contains("Claim number CL-77-1203");
    harness.get_by_label(case::CLAIM_NUMBER);
    harness.get_by_label(case::INSURED);
    let mut wb = harness.into_state();

    let dir = scratch("case-details");
    let path = dir.join("flood.ron");
    wb.save_session(&path).unwrap();
    let session = read_session(&path).unwrap();
    assert_eq!(session.case.claim_number, "CL-77-1203");
    assert_eq!(session.case.date_of_loss, Some(loss));
    assert_eq!(session.fit.settings.as_of, Some(loss));

    let (pdf, html) = wb
        .write_report(&dir.join("flood"), report::Audience::Full)
        .unwrap();
    let html = std::fs::read_to_string(html).unwrap();
    for words in [
        "CL-77-1203",
        "Oda Prenn (invented)",
        "flood",
        "2026-11-02",
        case::DATE_OF_LOSS,
    ] {
        assert!(html.contains(words), "{words} missing from the report");
    }
    assert!(pdf.exists());

    // Found again by its number in the session finder.
    wb.find_sessions_in(&dir);
    wb.filter_sessions("cl-77");
    let harness = harness_on(wb);
    harness.get_by_label(FINDER_TITLE);
    harness.get_by_label(FINDER_FILTER_LABEL);
    harness.get_by_label_contains("1 of 1 session in");
    harness.get_by_label("Open claim");
    harness.get_by_label("Oda Prenn (invented)");
    let mut wb = harness.into_state();
    wb.filter_sessions("someone else");
    let harness = harness_on(wb);
    harness.get_by_label_contains("0 of 1 session in");
    std::fs::remove_dir_all(&dir).ok();
}

#[test]
fn the_subjects_vin_is_checked_and_a_bad_one_is_a_warning_beside_the_value() {
    let mut wb = workbench();
    let year = wb.document().subject.model_year;
    let good =
        model::vin::with_check_digit(&format!("0UT4PL220{}7M01556", model::vin::year_code(year)))
            .unwrap();
    wb.apply(Command::SetSubjectVin(Some(good.to_lowercase())));
    wb.wait_for_jobs();
    assert_eq!(wb.document().subject.vin.as_deref(), Some(good.as_str()));
    let codes = |wb: &app::Workbench| -> Vec<&'static str> {
        wb.runtime()
            .appraisal
            .as_ref()
            .unwrap()
            .warnings
            .iter()
            .map(|w| w.code.as_str())
            .collect()
    };
    assert!(!codes(&wb).contains(&"subject_vin_not_valid"));
    let harness = harness_on(wb);
    harness.get_by_label("Checks (check digit and model year)");

    // One character misread: the check digit no longer holds.
    let mut wb = harness.into_state();
    let mut bad = good.clone().into_bytes();
    bad[12] = if bad[12] == b'5' { b'6' } else { b'5' };
    let bad = String::from_utf8(bad).unwrap();
    wb.apply(Command::SetSubjectVin(Some(bad)));
    wb.wait_for_jobs();
    assert!(codes(&wb).contains(&"subject_vin_not_valid"));
    let harness = harness_on(wb);
    harness.get_by_label_contains("Does not check:");
    // The warning stands beside the value as well.
    harness.get_by_label_contains("The subject's VIN");

    // Clearing it clears the warning.
    let mut wb = harness.into_state();
    wb.apply(Command::SetSubjectVin(Some("  ".into())));
    wb.wait_for_jobs();
    assert_eq!(wb.document().subject.vin, None);
    assert!(!codes(&wb).contains(&"subject_vin_not_valid"));
}

#[test]
fn using_a_listing_as_the_subject_keeps_the_subjects_own_vin() {
    let mut wb = workbench();
    wb.apply(Command::SetSubjectVin(Some("0UT4PL220N7M01556".into())));
    wb.wait_for_jobs();
    let listing = comparables(&wb)[0].clone();
    assert_ne!(listing.vin.as_deref(), Some("0UT4PL220N7M01556"));
    wb.select(Some(listing.row));
    let mut harness = harness_on(wb);
    harness.get_by_label("Use as subject").click();
    harness.run_steps(2);
    let wb = harness.state();
    assert_eq!(wb.document().subject.miles, listing.miles);
    assert_eq!(
        wb.document().subject.vin.as_deref(),
        Some("0UT4PL220N7M01556"),
        "the listing's VIN is another vehicle's"
    );
}

#[test]
fn the_customers_trade_in_report_leaves_out_the_dealers_margin() {
    let mut wb = workbench_on(AppraisalDocument::demo(SMALL_DEMO));
    wb.apply(Command::ChoosePurpose(Purpose::TradeIn(default_trade_in())));
    wb.apply(Command::SetCase(CaseDetails {
        stock_number: "T-88-0017".into(),
        customer: "Lis Avenholt (invented)".into(),
        ..CaseDetails::default()
    }));
    wb.wait_for_jobs();
    let dir = scratch("customer-report");
    let (_, full) = wb
        .write_report(&dir.join("full"), report::Audience::Full)
        .unwrap();
    let (_, customer) = wb
        .write_report(&dir.join("customer"), report::Audience::Customer)
        .unwrap();
    let full = std::fs::read_to_string(full).unwrap();
    let customer = std::fs::read_to_string(customer).unwrap();
    let offer = {
        let doc = wb.document();
        let outcome = model::session::work_out(
            &doc.purpose,
            wb.runtime().appraisal.as_ref().unwrap(),
            &doc.request(),
        )
        .unwrap();
        outcome.bottom_line().unwrap().1
    };
    for html in [&full, &customer] {
        assert!(html.contains(&cents(offer)), "the offer is in both");
        assert!(html.contains("Lis Avenholt (invented)"));
    }
    for internal in ["less pack", "less target front gross", "less holding"] {
        assert!(full.contains(internal), "{internal} in the full report");
        assert!(
            !customer.contains(internal),
            "{internal} must not reach the customer"
        );
    }
    assert!(customer.contains("Your trade-in"));
    std::fs::remove_dir_all(&dir).ok();
}

#[test]
fn the_market_conditions_term_is_switched_on_screen_and_its_lines_follow() {
    let mut wb = workbench();
    wb.show_view(CentralView::Settings);
    let has_market_lines = |wb: &app::Workbench| {
        wb.runtime()
            .appraisal
            .as_ref()
            .unwrap()
            .comparables
            .iter()
            .all(|c| {
                c.adjustments
                    .iter()
                    .any(|l| l.kind == model::adjustment::AdjustmentKind::MarketConditions)
            })
    };
    assert!(has_market_lines(&wb), "the demo's dates carry the term");
    let mut harness = harness_on(wb);
    harness.get_by_label_contains("In use: the market fell");
    harness
        .get_by_label_contains("Adjust for market conditions")
        .click();
    harness.run_steps(2);
    harness.state_mut().wait_for_jobs();
    harness.run_steps(2);
    let wb = harness.state();
    assert!(!wb.document().fit.market_time);
    assert!(
        wb.runtime()
            .fit
            .as_ref()
            .unwrap()
            .model
            .market_drift()
            .is_none()
    );
    assert!(
        !wb.runtime()
            .appraisal
            .as_ref()
            .unwrap()
            .comparables
            .iter()
            .any(|c| c
                .adjustments
                .iter()
                .any(|l| l.kind == model::adjustment::AdjustmentKind::MarketConditions))
    );
    harness.get_by_label_contains("switched off in the fit settings");
    let mut wb = harness.into_state();
    wb.undo();
    wb.wait_for_jobs();
    assert!(has_market_lines(&wb));
}

#[test]
fn variant_slopes_are_chosen_on_screen_and_the_depreciation_view_says_what_the_data_support() {
    let slopes_in_fit = |wb: &app::Workbench| {
        wb.runtime()
            .fit
            .as_ref()
            .unwrap()
            .model
            .design()
            .variant_slopes
    };
    let mut wb = workbench();
    wb.show_view(CentralView::Settings);
    let mut harness = harness_on(wb);
    harness.get_by_label_contains("In use: one premium per variant at every age");
    harness
        .get_by_label("Each variant its own age slope, always")
        .click();
    harness.run_steps(2);
    harness.state_mut().wait_for_jobs();
    harness.run_steps(1);
    assert_eq!(
        harness.state().document().fit.variant_slopes,
        model::hedonic::VariantSlopes::Always
    );
    assert!(slopes_in_fit(harness.state()));
    harness
        .get_by_label("One premium per variant at every age")
        .click();
    harness.run_steps(2);
    harness.state_mut().wait_for_jobs();
    harness.run_steps(1);
    assert!(!slopes_in_fit(harness.state()));
    let mut wb = harness.into_state();
    wb.undo();
    wb.wait_for_jobs();
    assert!(slopes_in_fit(&wb));
    // The demo's top variant's premium fades (invented): the view says so, with the index.
    wb.show_view(CentralView::Depreciation);
    let harness = harness_on(wb);
    harness.get_by_label_contains("Tolvane's premium over Veskel falls");
    harness.get_by_label_contains("The market's level by month");
}

#[test]
fn the_subjects_options_are_typed_and_priced_by_the_market() {
    let mut wb = workbench();
    let before = indicated(&wb);
    let harness = harness_on(wb);
    harness.get_by_label(app::panes::subject::OPTIONS_LABEL);
    harness.get_by_label_contains("Priced by the market: ");
    wb = harness.into_state();
    wb.apply(Command::SetSubjectOptions(Some(
        "driver assist; sunroof ".into(),
    )));
    wb.wait_for_jobs();
    assert_eq!(
        wb.document().subject.options.as_deref(),
        Some("driver assist; sunroof")
    );
    assert!(
        indicated(&wb) > before,
        "options the market prices raise the value"
    );
    assert!(!comparables(&wb).is_empty());
    let lines = wb
        .runtime()
        .appraisal
        .as_ref()
        .unwrap()
        .comparables
        .iter()
        .flat_map(|c| c.adjustments.iter())
        .filter(|l| l.kind == model::adjustment::AdjustmentKind::Equipment)
        .count();
    assert!(lines > 0);
    wb.undo();
    wb.wait_for_jobs();
    assert_eq!(wb.document().subject.options, None);
}

#[test]
fn a_market_without_the_subjects_model_starts_from_a_typical_vehicle_of_it() {
    // Regression: opening a file of another model left an empty screen ("the market has no
    // Quellmark Tessel") with no subject pane to choose another vehicle from.
    let mut wb = workbench();
    let path = std::path::PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("../../tests/data/markets/small-export-16.csv");
    wb.apply(Command::OpenMarket(path));
    wb.wait_for_jobs();
    let subject = &wb.document().subject;
    assert_eq!(
        (subject.make.as_str(), subject.model.as_str()),
        ("Orvane", "Kestrel")
    );
    assert!(
        wb.runtime().appraisal.is_some(),
        "{:?}",
        wb.runtime().fit_error
    );
    let notice = wb.notice().expect("a notice");
    assert!(
        notice.text.contains("The file has no Quellmark Tessel"),
        "{}",
        notice.text
    );
    let harness = harness_on(wb);
    harness.get_by_label_contains("Indicated value");
}

#[test]
fn a_parquet_folder_opens_like_its_csv_dropped_typed_or_from_recent() {
    let dir = scratch("lake");
    let csv = dir.join("market.csv");
    std::fs::write(&csv, model::demo::demo_csv_bytes(SMALL_DEMO, 4)).unwrap();
    let lake = dir.join("lake");
    let options = model::import::ImportOptions::default();
    model::convert::convert_csv(&csv, &lake, &options, model::convert::BLOCK_BYTES).unwrap();

    let mut from_csv = workbench();
    from_csv.apply(Command::OpenMarket(csv.clone()));
    from_csv.wait_for_jobs();
    let expected = indicated(&from_csv);

    // Dropped on the window, as a file manager drops a folder.
    let mut harness = harness_on(workbench());
    harness
        .input_mut()
        .dropped_files
        .push(std::sync::Arc::new(Dropped(lake.clone())));
    harness.run_steps(2);
    harness.state_mut().wait_for_jobs();
    harness.run_steps(2);
    let wb = harness.state();
    let market = wb.runtime().market.as_ref().expect("the folder opened");
    assert_eq!(market.source.file_name, "lake");
    assert_eq!(
        market.len(),
        from_csv.runtime().market.as_ref().unwrap().len()
    );
    assert!(
        (indicated(wb) - expected).abs() < 0.005,
        "{} against {expected}",
        indicated(wb)
    );
    assert_eq!(wb.preferences().recent_files.first(), Some(&lake));
    harness.get_by_label_contains("Indicated value");
    harness.get_by_label_contains("(Parquet, 3 files)");

    // Typed into the path box and loaded.
    let mut harness = harness_on(workbench());
    // The path box is the first text field, in the toolbar.
    let path_box = || eframe::egui::accesskit::Role::TextInput;
    harness
        .get_all_by_role(path_box())
        .next()
        .expect("the path box")
        .click();
    harness.run_steps(1);
    harness
        .get_all_by_role(path_box())
        .next()
        .expect("the path box")
        .type_text(&lake.display().to_string());
    harness.run_steps(1);
    harness.get_by_label("Load").click();
    harness.run_steps(2);
    harness.state_mut().wait_for_jobs();
    harness.run_steps(2);
    assert_eq!(
        harness
            .state()
            .runtime()
            .market
            .as_ref()
            .map(|m| m.source.file_name.clone()),
        Some("lake".to_owned())
    );
    std::fs::remove_dir_all(&dir).ok();
}

/// A folder dropped from a file manager.
#[derive(Debug)]
struct Dropped(std::path::PathBuf);

impl eframe::egui::DroppedFile for Dropped {
    fn path(&self) -> &std::path::Path {
        &self.0
    }

    fn bytes(&self) -> Result<Vec<u8>, String> {
        Err("a folder".into())
    }
}

#[test]
fn a_parquet_folder_too_large_to_read_whole_is_read_for_the_subjects_model_with_a_note() {
    let dir = scratch("large-lake");
    let csv = dir.join("market.csv");
    std::fs::write(&csv, model::demo::demo_csv_bytes(3_000, 4)).unwrap();
    let lake = dir.join("lake");
    let options = model::import::ImportOptions::default();
    model::convert::convert_csv(&csv, &lake, &options, model::convert::BLOCK_BYTES).unwrap();
    let load =
        |prefer: (&str, &str), limit: u64| app::jobs::load_file(&lake, &options, prefer, limit);

    // Under the limit: every model, no note.
    let (whole, note) = load(("Orvane", "Kestrel"), 1_000_000);
    assert_eq!(whole.unwrap().0.segments().len(), 3);
    assert!(note.is_none());

    // Over it: the subject's model only, and a note that says so and names the others.
    let (one, note) = load(("orvane", "KESTREL"), 1_000);
    let market = one.unwrap().0;
    assert_eq!(market.segments().len(), 1);
    assert!(market.find_segment("Orvane", "Kestrel").is_some());
    let note = note.expect("a note");
    assert!(note.contains("3,000 listings of 3 models"), "{note}");
    assert!(note.contains("it read Orvane Kestrel only"), "{note}");
    assert!(note.contains("Quellmark Tessel ("), "{note}");
    // A subject the folder does not hold: its largest model.
    let (largest, _) = load(("Nobody", "Nothing"), 1_000);
    assert!(
        largest
            .unwrap()
            .0
            .find_segment("Quellmark", "Tessel")
            .is_some()
    );

    // One model's own folder opens on its own: its make and model come from the folders
    // above it.
    let kestrel = lake.join("make=Orvane").join("model=Kestrel");
    let (alone, note) = load(("Quellmark", "Tessel"), 1_000);
    drop(alone);
    assert!(note.is_some());
    let (alone, note) = app::jobs::load_file(&kestrel, &options, ("Quellmark", "Tessel"), 1_000);
    assert!(note.is_none(), "one model: nothing to choose between");
    assert!(alone.unwrap().0.find_segment("Orvane", "Kestrel").is_some());
    std::fs::remove_dir_all(&dir).ok();
}

#[test]
fn between_opening_a_market_and_its_fit_nothing_of_the_old_fit_is_shown() {
    // Regression (seen opening a Parquet folder under Xvfb): while the new market's fit ran,
    // the old market's fit was paired with the new market's rows and names ("variant 'Ambrel'
    // has no usable listings; known variants: Seller 001, …"); with other files it could show
    // a value from the wrong market or index a row the new market does not have.
    let dir = scratch("between");
    let csv = dir.join("other.csv");
    std::fs::write(&csv, model::demo::demo_csv_bytes(900, 8)).unwrap();
    let mut wb = workbench();
    assert!(wb.runtime().appraisal.is_some());
    wb.apply(Command::OpenMarket(csv.clone()));
    // Up to the import's result only (the first step asks for the import): the new market
    // is in, its fit not yet.
    for _ in 0..3 {
        wb.take_next_result();
        if wb.runtime().market.as_ref().unwrap().len() == 900 {
            break;
        }
    }
    assert_eq!(wb.runtime().market.as_ref().unwrap().len(), 900);
    assert!(
        wb.runtime().fit.is_none(),
        "the old fit is gone with its market"
    );
    assert!(wb.runtime().appraisal.is_none());
    assert!(
        wb.runtime().appraisal_error.is_none(),
        "{:?}",
        wb.runtime().appraisal_error
    );
    wb.wait_for_jobs();
    // Then the new market's own appraisal, the one a fresh start on the file gives.
    let mut fresh = workbench();
    fresh.apply(Command::OpenMarket(csv));
    fresh.wait_for_jobs();
    assert!(
        wb.runtime().appraisal.is_some(),
        "{:?}",
        wb.runtime().appraisal_error
    );
    assert_eq!(indicated(&wb), indicated(&fresh));
    std::fs::remove_dir_all(&dir).ok();
}
