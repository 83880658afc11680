//! Frame time of the workbench stepped headlessly (egui_kittest, no GPU): UI logic, layout and
//! plot building for one frame (`steady_frame`), and the same plus tessellating the frame's
//! shapes into the triangle meshes a renderer uploads (`tessellated_frame`: everything on the
//! CPU side of a rendered frame), on markets of 20k and 1M invented listings, with the demo
//! subject's appraisal on screen. The GPU's own drawing is not included. Figures are in the
//! README.
//!
//! Run: `cargo bench -p app --bench frame` (`COMPTRAIL_BENCH_SIZES=20000` to choose sizes).

// A benchmark's fixed inputs cannot fail; the criterion macros generate undocumented functions.
#![allow(clippy::unwrap_used, clippy::expect_used, missing_docs)]

use std::time::Duration;

use app::Workbench;
use app::document::AppraisalDocument;
use app::preferences::Preferences;
use criterion::{BenchmarkId, Criterion, criterion_group, criterion_main};
use egui_kittest::Harness;

fn sizes() -> Vec<usize> {
    std::env::var("COMPTRAIL_BENCH_SIZES").ok().map_or_else(
        || vec![20_000, 1_000_000],
        |s| s.split(',').filter_map(|v| v.trim().parse().ok()).collect(),
    )
}

fn bench(c: &mut Criterion) {
    let mut group = c.benchmark_group("workbench_frame");
    group
        .sample_size(20)
        .measurement_time(Duration::from_secs(6))
        .warm_up_time(Duration::from_secs(1));
    for rows in sizes() {
        let mut wb =
            Workbench::with_document(AppraisalDocument::demo(rows), Preferences::default(), || {});
        wb.wait_for_jobs();
        let mut harness = Harness::builder()
            .with_size(eframe::egui::Vec2::new(1500.0, 950.0))
            .build_ui_state(|ui, wb: &mut Workbench| wb.ui(ui), wb);
        harness.run_steps(3);
        group.bench_with_input(BenchmarkId::new("steady_frame", rows), &rows, |b, _| {
            b.iter(|| harness.step());
        });
        group.bench_with_input(
            BenchmarkId::new("tessellated_frame", rows),
            &rows,
            |b, _| {
                b.iter(|| {
                    harness.step();
                    let output = harness.output();
                    let meshes = harness
                        .ctx
                        .tessellate(output.shapes.clone(), output.pixels_per_point);
                    std::hint::black_box(meshes.len())
                });
            },
        );
    }
    group.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
