//! A few image snapshots of the workbench, drawn on the CPU (no GPU needed) and compared with
//! the PNGs under `tests/snapshots/`. Regenerate after a deliberate change of the look with
//! `UPDATE_SNAPSHOTS=1 cargo test -p app --test workbench snapshots`, and look at the new
//! images before committing them.

use app::Workbench;
use app::document::AppraisalDocument;
use app::workbench::CentralView;
use cpu_render::CpuRenderer;
use eframe::egui;
use egui_kittest::{Harness, SnapshotOptions};

/// How far one pixel's color may move (YIQ distance, kittest's measure) before it counts as
/// changed, and how many changed pixels a snapshot tolerates. The CPU renderer is
/// deterministic, so these only absorb floating-point differences between machines; changing
/// one digit of a figure changes about 70 pixels, a moved widget or a color hundreds.
const PIXEL_THRESHOLD: f32 = 0.6;
const MAX_CHANGED_PIXELS: usize = 8;

/// The one way a snapshot is taken here.
fn snapshot(harness: &mut Harness<'static, Workbench>, name: &str) {
    harness.snapshot_options(
        name,
        &SnapshotOptions::new()
            .threshold(PIXEL_THRESHOLD)
            .max_failed_pixels(MAX_CHANGED_PIXELS),
    );
}

fn harness(mut wb: Workbench) -> Harness<'static, Workbench> {
    wb.wait_for_jobs();
    let mut harness = Harness::builder()
        .with_size(egui::Vec2::new(1280.0, 820.0))
        .renderer(CpuRenderer::new())
        .build_ui_state(|ui, wb: &mut Workbench| wb.ui(ui), wb);
    harness.run_steps(4);
    harness
}

#[test]
fn the_demo_appraisal_looks_as_it_should() {
    let wb = crate::support::workbench_on(AppraisalDocument::demo(4_000));
    let mut harness = harness(wb);
    snapshot(&mut harness, "demo_appraisal");
}

#[test]
fn the_claim_worksheet_looks_as_it_should() {
    let mut wb = crate::support::workbench_on(AppraisalDocument::demo(4_000));
    crate::support::claim_in_new_york(&mut wb, 24_000);
    wb.show_view(CentralView::Worksheet);
    let mut harness = harness(wb);
    snapshot(&mut harness, "claim_worksheet");
}
