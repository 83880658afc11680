//! What the workbench's checks share: a workbench on a small demo market, a harness around it,
//! and scratch folders.

use std::path::PathBuf;

use app::Workbench;
use app::command::Command;
use app::document::AppraisalDocument;
use app::preferences::Preferences;
use eframe::egui;
use egui_kittest::Harness;
use model::money::Cents;
use model::session::Purpose;

/// Listings of the demo market most checks run on: enough for every segment to fit, small
/// enough to import in a moment.
pub const SMALL_DEMO: usize = 6_000;

/// A workbench on `document` with every background job done.
pub fn workbench_on(document: AppraisalDocument) -> Workbench {
    let mut wb = Workbench::with_document(document, Preferences::default(), || {});
    wb.wait_for_jobs();
    wb
}

/// A workbench on the small demo market, appraised.
pub fn workbench() -> Workbench {
    workbench_on(AppraisalDocument::demo(SMALL_DEMO))
}

/// The real UI of `wb` in a headless harness, a few frames in.
pub fn harness_on(wb: Workbench) -> Harness<'static, Workbench> {
    let mut harness = Harness::builder()
        .with_size(egui::Vec2::new(1500.0, 950.0))
        .build_ui_state(|ui, wb: &mut Workbench| wb.ui(ui), wb);
    harness.run_steps(3);
    harness
}

/// A fresh empty folder for files a check writes.
pub fn scratch(name: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("comptrail-app-{name}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    dir
}

/// Turns the appraisal into a New York total-loss claim: 8 % sales tax, $50 title and $25
/// transfer fees, $5,000 salvage and the given repair estimate in dollars (invented figures).
pub fn claim_in_new_york(wb: &mut Workbench, repair_dollars: i64) {
    let ny = wb.profiles().get("ny").expect("shipped profile").clone();
    let mut inputs = app::document::default_claim_inputs(&ny);
    inputs.sales_tax_pct = 8.0;
    inputs.title_fee = Cents::whole_dollars(50);
    inputs.transfer_fee = Cents::whole_dollars(25);
    inputs.repair_estimate = Cents::whole_dollars(repair_dollars);
    inputs.salvage_value = Cents::whole_dollars(5_000);
    wb.apply(Command::ChoosePurpose(Purpose::Claim {
        profile: ny,
        inputs,
    }));
}

/// The listings of the appraisal's comparables, in the table's order.
pub fn comparables(wb: &Workbench) -> Vec<model::market::Listing> {
    wb.runtime()
        .appraisal
        .as_ref()
        .expect("appraised")
        .comparables
        .iter()
        .map(|c| c.listing.clone())
        .collect()
}

/// The indicated value on screen.
pub fn indicated(wb: &Workbench) -> f64 {
    wb.runtime()
        .appraisal
        .as_ref()
        .expect("appraised")
        .reconciliation
        .indicated_value
}
