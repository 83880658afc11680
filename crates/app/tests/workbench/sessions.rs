//! The appraisal workflows in the workbench: a trade-in and a claim from the demo, saved as
//! sessions and reopened to the same numbers; a session whose market file is gone or changed;
//! unsaved work recovered after a crash; closing with unsaved changes asks first.

use std::path::PathBuf;

use app::Workbench;
use app::command::Command;
use app::document::{AppraisalDocument, MarketSource, default_trade_in};
use app::workbench::{CentralView, MarketState};
use eframe::egui;
use egui_kittest::kittest::Queryable;
use model::format::cents;
use model::session::{Purpose, WorksheetOutcome, work_out};

use crate::support::{SMALL_DEMO, harness_on, indicated, scratch, workbench_on};

fn bottom_line(wb: &Workbench) -> model::money::Cents {
    let doc = wb.document();
    let outcome = work_out(
        &doc.purpose,
        wb.runtime().appraisal.as_ref().unwrap(),
        &doc.request(),
    )
    .unwrap();
    outcome.bottom_line().unwrap().1
}

#[test]
fn a_trade_in_from_the_demo_is_worked_saved_and_reopened_to_the_same_numbers() {
    let mut wb = workbench_on(AppraisalDocument::demo(SMALL_DEMO));
    assert!(!wb.has_unsaved_changes());
    wb.show_view(CentralView::Worksheet);
    let mut harness = harness_on(wb);
    // Choose the trade-in through the real UI.
    harness.get_by_label("A trade-in offer").click();
    harness.run_steps(2);
    harness.state_mut().wait_for_jobs();
    harness.run_steps(1);
    assert!(matches!(
        harness.state().document().purpose,
        Purpose::TradeIn(_)
    ));
    let offer = bottom_line(harness.state());
    harness.get_by_label(&format!("ACV offer: {}", cents(offer)));
    assert!(harness.state().has_unsaved_changes());

    let dir = scratch("trade-in");
    let path = dir.join("trade.ron");
    harness.state_mut().save_session(&path).unwrap();
    assert!(!harness.state().has_unsaved_changes());
    let value = indicated(harness.state());

    // A fresh workbench reopens it live (the demo market regenerates to the same bytes).
    let mut other = workbench_on(AppraisalDocument::demo(SMALL_DEMO / 2));
    other.open_session(&path).unwrap();
    other.wait_for_jobs();
    let opened = other.case_file().opened.as_ref().unwrap();
    assert!(opened.reproduction.reproduces());
    assert!(opened.live);
    assert_eq!(
        opened.market,
        MarketState::Unchanged(MarketSource::Demo { rows: SMALL_DEMO })
    );
    let again = other.runtime().appraisal.as_ref().unwrap();
    assert_eq!(cents(again.reconciliation.indicated_value), cents(value));
    assert_eq!(cents(bottom_line(&other)), cents(offer));
    assert!(!other.has_unsaved_changes());
}

#[test]
fn a_claim_shows_the_settlement_the_profile_check_and_the_cautions() {
    let mut wb = workbench_on(AppraisalDocument::demo(SMALL_DEMO));
    crate::support::claim_in_new_york(&mut wb, 25_000);
    wb.wait_for_jobs();
    wb.show_view(CentralView::Worksheet);
    let payment = bottom_line(&wb);
    let mut harness = harness_on(wb);
    harness.get_by_label(&format!("Settlement payment: {}", cents(payment)));
    harness.get_by_label("Total loss: yes");
    harness.get_by_label_contains("meet every rule of the profile");
    for caution in model::cautions::CAUTIONS {
        harness.get_by_label(&format!("• {caution}"));
    }
    // The claim searched with the profile's mileage rule (11 NYCRR 216.7).
    let subject_miles = harness.state().document().subject.miles;
    for c in &harness
        .state()
        .runtime()
        .appraisal
        .as_ref()
        .unwrap()
        .comparables
    {
        assert!(c.listing.miles <= subject_miles + 4_000f64.max(0.1 * subject_miles));
    }
    // And it saves and reopens to the same payment.
    let dir = scratch("claim");
    let path = dir.join("claim.ron");
    harness.state_mut().save_session(&path).unwrap();
    let session = model::session::read_session(&path).unwrap();
    assert!(matches!(
        session.result.worksheet,
        Some(WorksheetOutcome::Claim(_))
    ));
    assert_eq!(
        cents(session.result.bottom_line().unwrap().1),
        cents(payment)
    );
}

fn file_market(dir: &std::path::Path) -> PathBuf {
    let market = dir.join("market.csv");
    std::fs::write(&market, model::demo::demo_csv_bytes(3_000, 5)).unwrap();
    market
}

fn file_document(market: PathBuf) -> AppraisalDocument {
    AppraisalDocument {
        market: MarketSource::File(market),
        ..AppraisalDocument::demo(3_000)
    }
}

#[test]
fn a_session_whose_market_file_is_gone_shows_its_saved_evidence() {
    let dir = scratch("gone");
    let market = file_market(&dir);
    let mut wb = workbench_on(file_document(market.clone()));
    wb.apply(Command::ChoosePurpose(Purpose::TradeIn(default_trade_in())));
    wb.wait_for_jobs();
    let offer = bottom_line(&wb);
    let path = dir.join("case.ron");
    wb.save_session(&path).unwrap();
    std::fs::remove_file(&market).unwrap();

    let mut other = workbench_on(AppraisalDocument::demo(SMALL_DEMO));
    other.open_session(&path).unwrap();
    let opened = other.case_file().opened.as_ref().unwrap();
    assert_eq!(opened.market, MarketState::Missing);
    assert!(!opened.live);
    assert!(opened.reproduction.reproduces());
    let harness = harness_on(other);
    harness.get_by_label_contains("the saved evidence reproduces");
    harness.get_by_label_contains("is not where it was");
    harness.get_by_label("Locate the market file…");
    harness.get_by_label(&format!("ACV offer: {}", cents(offer)));
}

#[test]
fn a_session_whose_market_file_changed_offers_to_rerun_on_the_new_data() {
    let dir = scratch("changed");
    let market = file_market(&dir);
    let mut wb = workbench_on(file_document(market.clone()));
    wb.wait_for_jobs();
    let path = dir.join("case.ron");
    wb.save_session(&path).unwrap();
    let saved_value = indicated(&wb);
    // Another market in the same place.
    std::fs::write(&market, model::demo::demo_csv_bytes(3_000, 6)).unwrap();

    let mut other = workbench_on(AppraisalDocument::demo(SMALL_DEMO));
    other.open_session(&path).unwrap();
    assert!(matches!(
        other.case_file().opened.as_ref().unwrap().market,
        MarketState::Changed(_)
    ));
    let mut harness = harness_on(other);
    harness.get_by_label_contains("has changed since the session was saved");
    harness.get_by_label("Re-run on the current file").click();
    harness.run_steps(2);
    harness.state_mut().wait_for_jobs();
    harness.run_steps(2);
    let wb = harness.state();
    assert!(wb.case_file().opened.as_ref().unwrap().live);
    assert_eq!(wb.document().market, MarketSource::File(market));
    let now = indicated(wb);
    assert_ne!(
        cents(now),
        cents(saved_value),
        "the new data gives a new value"
    );
}

#[test]
fn unsaved_work_is_offered_back_after_a_crash() {
    let dir = scratch("recovery");
    let recovery = dir.join("unsaved.ron");
    let mut wb =
        workbench_on(AppraisalDocument::demo(SMALL_DEMO)).with_recovery_file(recovery.clone());
    wb.set_autosave_seconds(0.0);
    let mut harness = harness_on(wb);
    harness.state_mut().apply(Command::SetNotes(
        "customer mentioned a windscreen chip".into(),
    ));
    harness.run_steps(2);
    assert!(recovery.exists(), "the recovery file is written");
    let changed = harness.state().document().clone();
    // "Crash": the workbench goes away without saving or cleaning up.
    drop(harness);

    let wb = workbench_on(AppraisalDocument::demo(SMALL_DEMO)).with_recovery_file(recovery.clone());
    assert!(wb.case_file().recovery_offer.is_some());
    let mut harness = harness_on(wb);
    harness.get_by_label_contains("closed with unsaved work");
    harness.get_by_label("Recover").click();
    harness.run_steps(2);
    assert_eq!(harness.state().document(), &changed);
    assert!(harness.state().has_unsaved_changes());
}

#[test]
fn closing_with_unsaved_changes_asks_first() {
    let wb = workbench_on(AppraisalDocument::demo(SMALL_DEMO));
    let mut harness = harness_on(wb);
    harness
        .state_mut()
        .apply(Command::SetAppraiser("Test".into()));
    harness
        .input_mut()
        .viewports
        .entry(egui::ViewportId::ROOT)
        .or_default()
        .events
        .push(egui::ViewportEvent::Close);
    harness.run_steps(2);
    harness.get_by_label("This appraisal has changes that are not saved in a session file.");
    harness.get_by_label("Cancel").click();
    harness.run_steps(2);
    assert!(harness.query_by_label("Close without saving").is_none());
}

#[test]
fn a_damaged_session_leaves_the_workbench_as_it_was_and_says_where() {
    let dir = scratch("damaged");
    let path = dir.join("bad.ron");
    std::fs::write(
        &path,
        "(\n  format_version: 2,\n  authorship: (appraiser: 12),\n)",
    )
    .unwrap();
    let mut wb = workbench_on(AppraisalDocument::demo(SMALL_DEMO));
    let before = wb.document().clone();
    let e = wb.open_session(&path).unwrap_err();
    assert!(e.to_string().contains("line 3"), "{e}");
    assert!(e.to_string().contains("appraiser"), "{e}");
    assert_eq!(wb.document(), &before);
}

#[test]
fn a_session_is_not_saved_from_an_appraisal_that_no_longer_matches_the_subject() {
    let mut wb = workbench_on(AppraisalDocument::demo(SMALL_DEMO));
    let mut subject = wb.document().subject.clone();
    subject.model = "Nonesuch".into();
    wb.apply(Command::SetSubject(subject));
    wb.wait_for_jobs();
    // The fit for a model the market lacks fails; the last appraisal is of another subject.
    assert!(wb.runtime().fit_error.is_some());
    let dir = scratch("stale");
    let e = wb.save_session(&dir.join("stale.ron")).unwrap_err();
    assert!(e.to_string().contains("up to date"), "{e}");
    assert!(!dir.join("stale.ron").exists());
}

#[test]
fn a_profiles_file_of_the_users_own_is_offered_for_claims_and_remembered() {
    let dir = scratch("profiles");
    let own = dir.join("mine.ron");
    // The shipped file with New York renamed to a county office's own copy.
    let text = model::worksheet::SHIPPED_PROFILES
        .replacen("id: \"ny\"", "id: \"county\"", 1)
        .replacen("name: \"New York\"", "name: \"County claims office\"", 1);
    std::fs::write(&own, text).unwrap();
    let mut wb = workbench_on(AppraisalDocument::demo(SMALL_DEMO));
    wb.load_profiles(&own).unwrap();
    assert!(wb.profiles().get("county").is_some());
    assert!(wb.profiles().get("ny").is_none());
    assert_eq!(
        wb.preferences().profiles_file.as_deref(),
        Some(own.as_path())
    );
    // A broken file is refused by line and the profiles in use stay.
    let broken = dir.join("broken.ron");
    std::fs::write(
        &broken,
        "(\n  format_version: 1,\n  profiles: [ (id: 7) ],\n)",
    )
    .unwrap();
    let e = wb.load_profiles(&broken).unwrap_err();
    assert!(e.to_string().contains("broken.ron:3:"), "{e}");
    assert!(wb.profiles().get("county").is_some());
    // The next start reads the remembered file.
    let prefs = wb.preferences().clone();
    let again = Workbench::with_document(AppraisalDocument::demo(SMALL_DEMO), prefs, || {});
    assert!(again.profiles().get("county").is_some());
}

#[test]
fn a_reopened_session_shows_the_warnings_it_was_saved_with() {
    // A subject outside the market, saved; the market file then removed: the saved evidence
    // is shown with its saved warnings beside the value.
    let dir = scratch("warned");
    let market = file_market(&dir);
    let mut document = file_document(market.clone());
    document.subject.model_year = 1995;
    let mut wb = workbench_on(document);
    let warnings = wb.runtime().appraisal.as_ref().unwrap().warnings.clone();
    assert!(model::warnings::has(
        &warnings,
        model::warnings::WarningCode::SubjectYearOutsideMarket
    ));
    let path = dir.join("case.ron");
    wb.save_session(&path).unwrap();
    std::fs::remove_file(&market).unwrap();
    let saved = model::session::read_session(&path).unwrap();
    assert!(model::warnings::has(
        &saved.appraisal.warnings,
        model::warnings::WarningCode::SubjectYearOutsideMarket
    ));
    let mut other = workbench_on(AppraisalDocument::demo(SMALL_DEMO));
    other.open_session(&path).unwrap();
    let harness = harness_on(other);
    harness.get_by_label_contains(app::panes::WARNINGS_LABEL);
    harness.get_by_label_contains("The subject's model year 1995 is older than every listing");
}

#[test]
fn opening_a_session_is_one_change_that_undo_takes_back() {
    // Every change of the document goes through the one apply, so opening a session is on the
    // undo history like any edit.
    let dir = scratch("undo-open");
    let path = dir.join("case.ron");
    let mut first = workbench_on(AppraisalDocument::demo(SMALL_DEMO));
    first.apply(Command::ChoosePurpose(Purpose::TradeIn(default_trade_in())));
    first.wait_for_jobs();
    first.save_session(&path).unwrap();

    let mut wb = workbench_on(AppraisalDocument::demo(SMALL_DEMO));
    let before = wb.document().clone();
    wb.open_session(&path).unwrap();
    assert!(matches!(wb.document().purpose, Purpose::TradeIn(_)));
    assert_ne!(wb.document(), &before);
    wb.undo();
    assert_eq!(wb.document(), &before);
    wb.redo();
    assert!(matches!(wb.document().purpose, Purpose::TradeIn(_)));
}

#[test]
fn a_recovery_file_that_cannot_be_written_is_said_not_dropped() {
    // The recovery file's folder is a file: every write fails. The failure is in the banner.
    let dir = scratch("recovery-fails");
    let blocker = dir.join("not-a-folder");
    std::fs::write(&blocker, b"a file where a folder should be").unwrap();
    let mut wb = workbench_on(AppraisalDocument::demo(SMALL_DEMO))
        .with_recovery_file(blocker.join("recovery.ron"));
    wb.set_autosave_seconds(0.0);
    wb.apply(Command::SetNotes("unsaved work".into()));
    let mut harness = harness_on(wb);
    harness.run_steps(2);
    let notice = harness.state().notice().cloned().unwrap();
    assert!(notice.is_failure(), "{notice:?}");
    assert!(notice.text.contains("recovery file"), "{}", notice.text);
    harness.get_by_label_contains("could not be written to the recovery file");
}

#[test]
fn the_worksheet_shows_every_row_as_the_command_line_and_the_report_word_it() {
    // The sample trade-in and claim, reopened live: every row of the worded worksheet
    // (model::worksheet::rows, which the command line and the report print too) is on screen
    // with its amount, the bottom line in large type.
    let samples = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../../sample-sessions");
    for name in ["dealer-trade-in", "total-loss-claim"] {
        let path = samples.join(format!("{name}.ron"));
        let saved = model::session::read_session(&path).unwrap();
        let mut wb = workbench_on(AppraisalDocument::demo(SMALL_DEMO / 3));
        wb.open_session(&path).unwrap();
        wb.wait_for_jobs();
        assert!(wb.case_file().opened.as_ref().unwrap().live, "{name}");
        wb.show_view(CentralView::Worksheet);
        let harness = harness_on(wb);
        let rows = model::session::worksheet_rows(&saved.purpose, saved.result.worksheet.as_ref());
        assert!(rows.len() >= 3, "{name}");
        for r in &rows {
            let shown = |text: &str| harness.query_all_by_label(text).next().is_some();
            if r.kind == model::worksheet::rows::RowKind::Result {
                assert!(
                    shown(&format!("{}: {}", r.label, r.amount_text())),
                    "{name}: {r:?}"
                );
            } else {
                assert!(shown(&r.label), "{name}: {} not shown", r.label);
                assert!(
                    shown(&r.amount_text()),
                    "{name}: {} not shown",
                    r.amount_text()
                );
            }
        }
    }
}
