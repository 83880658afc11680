//! The workbench driven headlessly: state-level checks through the real `Workbench`, and the
//! whole UI through egui_kittest by its accessible labels.

use app::Workbench;
use app::command::Command;
use app::document::{AppraisalDocument, MarketSource};
use egui_kittest::Harness;
use egui_kittest::kittest::Queryable;

use crate::support::{SMALL_DEMO, comparables, harness_on, indicated, workbench};

#[test]
fn starts_on_the_demo_with_a_finished_appraisal() {
    let wb = workbench();
    assert!(wb.runtime().market.is_some());
    let a = wb.runtime().appraisal.as_ref().expect("appraised");
    assert_eq!(a.comparables.len(), 8);
    assert!(a.reconciliation.value_band.lower < a.reconciliation.indicated_value);
}

#[test]
fn picking_a_listing_as_subject_updates_the_comparables_and_value() {
    let mut wb = workbench();
    let before = wb.runtime().appraisal.clone().unwrap();
    let market = wb.runtime().market.clone().unwrap();
    let fit = wb.runtime().fit.clone().unwrap();
    // A 2019 Tolvane: a different year and variant from the demo subject.
    let row = fit
        .included_rows
        .iter()
        .copied()
        .find(|&r| market.model_year[r] == 2019 && market.variant_name(r) == "Tolvane")
        .unwrap();
    wb.apply(Command::SetSubject(model::subject::Subject::from_listing(
        &market.listing(row),
    )));
    wb.wait_for_jobs();
    let after = wb.runtime().appraisal.clone().unwrap();
    assert_ne!(
        before.reconciliation.indicated_value,
        after.reconciliation.indicated_value
    );
    assert!(
        after
            .comparables
            .iter()
            .all(|c| (c.listing.model_year - 2019).abs() <= 1)
    );
}

#[test]
fn excluding_a_comparable_changes_the_value_and_undo_restores_it() {
    let mut wb = workbench();
    let before = indicated(&wb);
    let first = comparables(&wb)[0].line;
    wb.apply(Command::ExcludeComparable(first));
    wb.wait_for_jobs();
    assert_ne!(indicated(&wb), before);
    wb.undo();
    wb.wait_for_jobs();
    assert_eq!(indicated(&wb), before);
    wb.redo();
    wb.wait_for_jobs();
    assert_ne!(indicated(&wb), before);
}

#[test]
fn a_bad_file_shows_the_import_report_and_keeps_the_market() {
    let dir = std::env::temp_dir().join(format!("comptrail-wb-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let bad = dir.join("bad.csv");
    std::fs::write(
        &bad,
        "model_year,make,model,asking_price,miles\n2021,Q,T,-5,100\n",
    )
    .unwrap();
    let mut wb = workbench();
    // A hand choice made before the failed open must survive it, with the appraisal date.
    let first = comparables(&wb)[0].line;
    wb.apply(Command::ExcludeComparable(first));
    wb.wait_for_jobs();
    let before = indicated(&wb);
    let before_document = wb.document().clone();
    wb.apply(Command::OpenMarket(bad.clone()));
    wb.wait_for_jobs();
    assert_eq!(
        wb.document(),
        &before_document,
        "the failed open is undone in full"
    );
    let failure = wb.runtime().import_failure.as_ref().expect("failure shown");
    assert!(
        failure.error.to_string().contains("line 2"),
        "{}",
        failure.error
    );
    assert!(
        matches!(wb.document().market, MarketSource::Demo { .. }),
        "document points back at the loaded market"
    );
    assert_eq!(indicated(&wb), before);
    std::fs::remove_dir_all(&dir).ok();
}

#[test]
fn a_selection_made_in_one_pane_reaches_the_others() {
    // Select the most underpriced listing from the price-gaps list; the subject pane (another
    // pane) then offers it, and using it as the subject re-appraises with it.
    let mut harness = harness();
    harness.get_by_label("Price gaps").click();
    harness.run_steps(3);
    let gaps = harness.state().runtime().gaps.clone().unwrap();
    // The first row of the lower end (the tables scroll; the first row is in view).
    let pick = gaps.1.first().unwrap();
    harness
        .get_all_by_label(&pick.line.to_string())
        .next()
        .unwrap()
        .click();
    harness.run_steps(2);
    harness.get_by_label_contains(&format!("Selected: line {}:", pick.line));
    harness.get_by_label("Use as subject").click();
    harness.run_steps(2);
    harness.state_mut().wait_for_jobs();
    let market = harness.state().runtime().market.clone().unwrap();
    let listing = market.listing(pick.row);
    assert_eq!(harness.state().document().subject.miles, listing.miles);
    assert_eq!(
        harness.state().document().subject.model_year,
        listing.model_year
    );
}

fn harness() -> Harness<'static, Workbench> {
    harness_on(workbench())
}

use eframe::egui;

#[test]
fn the_real_ui_shows_the_value_and_responds_to_its_controls() {
    let mut harness = harness();
    harness.get_by_label(app::panes::value::INDICATED_VALUE_LABEL);
    let value = indicated(harness.state());
    harness.get_by_label(&model::format::money(value));
    // Exclude the first comparable through its button (the table starts in ranking order, so
    // the first button is the most similar comparable's), then undo through the toolbar.
    let appraisal = harness.state().runtime().appraisal.clone().unwrap();
    let first = appraisal.comparables[0].listing.line;
    harness.get_all_by_label("Exclude").next().unwrap().click();
    harness.run_steps(3);
    let excluded: Vec<u64> = harness
        .state()
        .document()
        .choices
        .exclude
        .iter()
        .copied()
        .collect();
    assert_eq!(excluded, vec![first]);
    let after = indicated(harness.state());
    assert_ne!(after, value);
    harness.get_by_label("Undo").click();
    harness.run_steps(3);
    assert!(harness.state().document().choices.exclude.is_empty());
    harness.get_by_label(&model::format::money(value));
}

#[test]
fn depreciation_and_price_gap_views_show_the_fitted_market() {
    let mut harness = harness();
    harness.get_by_label("Depreciation").click();
    harness.run_steps(3);
    harness.get_by_label_contains("Fitted annual depreciation over five years");
    harness.get_by_label_contains("Holding-period forecast for the subject");
    harness.get_by_label("Price gaps").click();
    harness.run_steps(3);
    harness.get_by_label("Furthest below the market");
    let gaps = harness
        .state()
        .runtime()
        .gaps
        .clone()
        .expect("gaps computed with the fit");
    assert!(gaps.1.windows(2).all(|w| w[0].gap_pct <= w[1].gap_pct));
    // Clicking the most underpriced listing selects it for every pane.
    let first = &gaps.1[0];
    harness
        .get_all_by_label(&first.line.to_string())
        .next()
        .unwrap()
        .click();
    harness.run_steps(2);
    assert_eq!(harness.state().selection().selected, Some(first.row));
}

#[test]
fn the_market_study_reports_backtest_accuracy_and_ranks_the_models() {
    let mut harness = harness();
    let study = harness
        .state()
        .runtime()
        .study
        .clone()
        .expect("study done after the fit");
    let backtest = study.backtest.as_ref().unwrap();
    assert!(backtest.model.evaluated > 1_000);
    assert!(
        (60.0..=95.0).contains(&backtest.model.band_coverage_pct),
        "{}",
        backtest.model.band_coverage_pct
    );
    let ranked: Vec<&str> = study.ranking.iter().map(|r| r.segment.as_str()).collect();
    assert_eq!(ranked.len(), 3, "{ranked:?}");
    harness.get_by_label_contains("Accuracy: on this market");
    harness.get_by_label("Depreciation").click();
    harness.run_steps(3);
    harness.get_by_label_contains("Models in the file by fitted annual decline");
    harness.get_by_label_contains("Orvane Kestrel:");
}

#[test]
fn switching_the_subject_to_another_model_refits_and_appraises_it() {
    let mut harness = harness();
    harness.get_by_label("Make and model").click();
    harness.run_steps(2);
    harness.get_by_label_contains("Orvane Kestrel (").click();
    harness.run_steps(2);
    harness.state_mut().wait_for_jobs();
    harness.run_steps(2);
    let wb = harness.state();
    assert_eq!(wb.document().subject.model, "Kestrel");
    let fit = wb.runtime().fit.clone().unwrap();
    let market = wb.runtime().market.clone().unwrap();
    assert_eq!(market.segment_name(fit.segment), "Orvane Kestrel");
    let a = wb
        .runtime()
        .appraisal
        .as_ref()
        .expect("the new model is appraised");
    assert!(a.comparables.iter().all(|c| c.listing.model == "Kestrel"));
}

#[test]
fn your_own_adjustment_lines_are_itemized_and_removable() {
    let mut harness = harness();
    let base = harness.state().runtime().appraisal.clone().unwrap();
    let before = base.reconciliation.indicated_value;
    // Without an amount and a basis the Add button stays disabled.
    harness.get_by_label("Add adjustment").click();
    harness.run_steps(2);
    assert!(harness.state().document().user_adjustments.is_empty());
    harness.state_mut().apply(Command::AddUserAdjustment(
        model::adjustment::UserAdjustment {
            line: None,
            kind: model::adjustment::AdjustmentKind::PriorDamage,
            amount: model::money::Cents::whole_dollars(-750),
            basis: "subject has a repaired rear quarter panel".into(),
        },
    ));
    harness.run_steps(3);
    let a = harness.state().runtime().appraisal.clone().unwrap();
    // Each comparable's adjusted price falls by exactly the line's amount; the value falls by
    // about as much (the larger gross adjustment shifts the weights a little).
    for (c, b) in a.comparables.iter().zip(&base.comparables) {
        assert_eq!(c.listing.line, b.listing.line);
        assert!((c.adjusted_price - (b.adjusted_price - 750.0)).abs() < 1e-6);
        assert!(
            c.adjustments
                .iter()
                .any(|l| l.basis.contains("rear quarter panel"))
        );
    }
    let drop = before - a.reconciliation.indicated_value;
    assert!((600.0..=900.0).contains(&drop), "{drop}");
    harness.get_by_label_contains("prior damage: subject has a repaired rear quarter panel");
    harness.get_by_label("Remove").click();
    harness.run_steps(3);
    assert!(harness.state().document().user_adjustments.is_empty());
    assert_eq!(indicated(harness.state()), before);
}

#[test]
fn a_cleaning_override_made_on_screen_refits_the_market() {
    let mut harness = harness();
    let fit = harness.state().runtime().fit.clone().unwrap();
    let excluded = fit.cleaning.set_aside_rows().next().unwrap();
    harness.state_mut().select(Some(excluded));
    harness.run_steps(2);
    harness.get_by_label("Keep in the fit").click();
    harness.run_steps(2);
    harness.state_mut().wait_for_jobs();
    harness.run_steps(2);
    let refit = harness.state().runtime().fit.clone().unwrap();
    assert!(refit.cleaning.is_included(excluded));
    assert_eq!(refit.model.rows(), fit.model.rows() + 1);
    harness.get_by_label("Undo hand override").click();
    harness.run_steps(2);
    harness.state_mut().wait_for_jobs();
    assert!(
        !harness
            .state()
            .runtime()
            .fit
            .clone()
            .unwrap()
            .cleaning
            .is_included(excluded)
    );
}

#[test]
fn cancelling_an_import_keeps_the_loaded_market_and_does_not_restart_it() {
    // Regression: Cancel used to drop the result but leave the document naming the new market,
    // so the next frame started the same import again.
    let dir = std::env::temp_dir().join(format!("comptrail-cancel-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let big = dir.join("big.csv");
    // Large enough that the import is still running when Cancel is pressed.
    std::fs::write(&big, model::demo::demo_csv_bytes(300_000, 4)).unwrap();
    let wb = workbench();
    let before = indicated(&wb);
    let mut harness = Harness::new_ui_state(|ui, wb: &mut Workbench| wb.ui(ui), wb);
    harness.state_mut().apply(Command::OpenMarket(big));
    harness.step(); // submits the import
    assert!(harness.state().is_busy());
    harness.state_mut().cancel_jobs();
    harness.state_mut().wait_for_jobs();
    harness.step();
    let wb = harness.state();
    assert!(!wb.is_busy(), "the import was not restarted");
    assert_eq!(
        wb.document().market,
        MarketSource::Demo { rows: SMALL_DEMO }
    );
    assert_eq!(indicated(wb), before);
    std::fs::remove_dir_all(&dir).ok();
}

#[test]
fn selecting_a_comparable_elsewhere_scrolls_the_table_to_it() {
    let mut wb = workbench();
    wb.apply(Command::SetComparableCount(20));
    wb.wait_for_jobs();
    let last = comparables(&wb).last().unwrap().clone();
    let mut harness = Harness::builder()
        .with_size(egui::Vec2::new(1500.0, 950.0))
        .build_ui_state(|ui, wb: &mut Workbench| wb.ui(ui), wb);
    harness.run_steps(3);
    // The row's line number, marked "• " once the row is selected.
    let (plain, marked) = (last.line.to_string(), format!("• {}", last.line));
    let below = |h: &Harness<'static, Workbench>| {
        h.query_all_by_label(&plain)
            .chain(h.query_all_by_label(&marked))
            .map(|n| n.rect().max.y)
            .fold(f32::MIN, f32::max)
    };
    assert!(
        below(&harness) > 950.0,
        "the 20th comparable starts out of view"
    );
    // As clicking it in a chart does.
    harness.state_mut().select(Some(last.row));
    harness.run_steps(4);
    assert!(below(&harness) <= 950.0, "scrolled into view");
}

#[test]
fn a_market_too_large_to_draw_point_by_point_is_drawn_as_a_density_grid() {
    // 44,000 listings: the subject's model alone has more than the 20,000 a chart draws one by
    // one, while its three-year mileage window has fewer.
    let wb = crate::support::workbench_on(AppraisalDocument::demo(44_000));
    let fit = wb.runtime().fit.clone().unwrap();
    assert!(fit.cleaning.rows.len() > app::panes::MAX_POINTS);
    let mut harness = Harness::builder()
        .with_size(egui::Vec2::new(1500.0, 950.0))
        .build_ui_state(|ui, wb: &mut Workbench| wb.ui(ui), wb);
    harness.run_steps(4);
    assert_eq!(
        harness
            .query_all_by_label_contains("too many to tell apart")
            .count(),
        1,
        "only the price-by-year chart is binned"
    );
    harness.get_by_label_contains(&format!(
        "{} listings in view: too many to tell apart",
        model::format::thousands(fit.cleaning.rows.len() as f64)
    ));
}

#[test]
fn a_subject_outside_the_market_shows_its_warning_beside_the_value() {
    let mut harness = harness();
    // The demo subject is inside the market: no warning box.
    assert!(
        harness
            .query_by_label_contains(app::panes::WARNINGS_LABEL)
            .is_none()
    );
    let mut subject = harness.state().document().subject.clone();
    subject.model_year = 1990;
    harness.state_mut().apply(Command::SetSubject(subject));
    harness.state_mut().wait_for_jobs();
    harness.run_steps(3);
    let a = harness.state().runtime().appraisal.clone().unwrap();
    assert!(model::warnings::has(
        &a.warnings,
        model::warnings::WarningCode::SubjectYearOutsideMarket
    ));
    harness.get_by_label_contains(app::panes::WARNINGS_LABEL);
    harness.get_by_label_contains("The subject's model year 1990 is older than every listing");
    // The value pane also says when the value is as of, and how accurate the market is.
    harness.get_by_label_contains("Appraisal date");
    // The subject stays as set: the year field does not pull it back into the market.
    assert_eq!(harness.state().document().subject.model_year, 1990);
}

#[test]
fn a_listing_hovered_in_a_chart_is_marked_in_the_table_drawn_before_it() {
    // Regression: the hover was cleared before the side panels drew and set by the charts
    // after, so hovering a chart never reached the comparables table. Hover is now read from
    // the previous frame by every pane.
    let mut harness = harness();
    let first = comparables(harness.state())[0].clone();
    assert!(
        harness
            .query_by_label(&format!("• {}", first.line))
            .is_none()
    );
    // What a chart does when the pointer is over the listing's point.
    harness.state_mut().hover(first.row);
    harness.run_steps(1);
    assert_eq!(harness.state().selection().hovered, Some(first.row));
    harness.get_by_label(&format!("• {}", first.line));
    // The pointer gone, the mark goes with it.
    harness.run_steps(2);
    assert!(
        harness
            .query_by_label(&format!("• {}", first.line))
            .is_none()
    );
}
