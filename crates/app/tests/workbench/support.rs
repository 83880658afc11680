//! What the workbench's checks share: a workbench on a small demo market, a harness around it,
//! and scratch folders.

use std::path::PathBuf;

use app::Workbench;
use app::document::AppraisalDocument;
use app::preferences::Preferences;
use eframe::egui;
use egui_kittest::Harness;

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

/// The indicated value on screen.
pub fn indicated(wb: &Workbench) -> f64 {
    wb.runtime()
        .appraisal
        .as_ref()
        .expect("appraised")
        .reconciliation
        .indicated_value
}
