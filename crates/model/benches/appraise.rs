//! The appraise path at 10k, 100k and 1M listings: import (from bytes in memory), clean and fit,
//! the full path from the CSV file on disk to the value band, and re-appraising a changed subject
//! against a fitted market. Figures are recorded in the README.
//!
//! Run: `cargo bench -p model --bench appraise` (set `COMPTRAIL_BENCH_SIZES=10000,100000` to
//! choose sizes).

// A benchmark's fixed inputs cannot fail; unwrapping keeps the timed code plain. The
// criterion macros generate undocumented functions.
#![allow(clippy::unwrap_used, missing_docs)]

use std::hint::black_box;
use std::time::Duration;

use criterion::{BenchmarkId, Criterion, criterion_group, criterion_main};
use model::appraisal::{AppraisalRequest, FitSettings, appraise, find_segment, fit_market};
use model::clean::Overrides;
use model::import::{ImportOptions, import_csv_bytes, import_csv_file};
use model::subject::Subject;

fn sizes() -> Vec<usize> {
    std::env::var("COMPTRAIL_BENCH_SIZES").ok().map_or_else(
        || vec![10_000, 100_000, 1_000_000],
        |s| s.split(',').filter_map(|v| v.trim().parse().ok()).collect(),
    )
}

fn options() -> ImportOptions {
    ImportOptions {
        latest_model_year: 2027,
        ..ImportOptions::default()
    }
}

fn settings() -> FitSettings {
    FitSettings {
        as_of: Some(model::demo::demo_as_of()),
        ..FitSettings::default()
    }
}

fn subject(miles: f64) -> Subject {
    Subject::parse(&format!(
        "year=2022,make=Quellmark,model=Tessel,variant=Ambrel,miles={miles},condition=used"
    ))
    .unwrap()
}

fn bench(c: &mut Criterion) {
    let mut group = c.benchmark_group("appraise");
    group
        .sample_size(10)
        .measurement_time(Duration::from_secs(8))
        .warm_up_time(Duration::from_secs(1));
    for rows in sizes() {
        let bytes = model::demo::demo_csv_bytes(rows, 3);
        group.bench_with_input(BenchmarkId::new("import", rows), &bytes, |b, bytes| {
            b.iter(|| import_csv_bytes("bench.csv", bytes.clone(), &options()).unwrap());
        });
        let (market, _) = import_csv_bytes("bench.csv", bytes.clone(), &options()).unwrap();
        let segment = find_segment(&market, "Quellmark", "Tessel").unwrap();
        group.bench_with_input(
            BenchmarkId::new("clean_and_fit", rows),
            &market,
            |b, market| {
                b.iter(|| fit_market(market, segment, &settings(), &Overrides::new()).unwrap());
            },
        );
        // The full path starts from the file on disk, as `comptrail appraise` does (the operating
        // system's cache holds it after the first pass, as it does for an appraiser re-running).
        let file = std::env::temp_dir().join(format!("comptrail-bench-{rows}.csv"));
        std::fs::write(&file, &bytes).unwrap();
        group.bench_with_input(BenchmarkId::new("full_path", rows), &file, |b, file| {
            b.iter(|| {
                let (market, _) = import_csv_file(file, &options()).unwrap();
                let segment = find_segment(&market, "Quellmark", "Tessel").unwrap();
                let fit = fit_market(&market, segment, &settings(), &Overrides::new()).unwrap();
                appraise(&market, &fit, &AppraisalRequest::new(subject(41_000.0))).unwrap()
            });
        });
        std::fs::remove_file(&file).ok();
        let fit = fit_market(&market, segment, &settings(), &Overrides::new()).unwrap();
        let mut miles = 30_000.0;
        group.bench_with_input(
            BenchmarkId::new("reappraise_changed_subject", rows),
            &fit,
            |b, fit| {
                b.iter(|| {
                    miles = if miles > 60_000.0 {
                        30_000.0
                    } else {
                        miles + 997.0
                    };
                    black_box(
                        appraise(&market, fit, &AppraisalRequest::new(subject(miles))).unwrap(),
                    )
                });
            },
        );
    }
    group.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
