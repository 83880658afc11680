//! Prints how long each stage of the full appraise path takes on one CSV file: reading, import,
//! clean and fit together, then cleaning, fitting and the comparables' index again one by one,
//! and the appraisal. A quick look between criterion runs when working on speed; the figures in
//! the README come from `cargo bench -p model --bench appraise`.
//!
//! Run: `cargo run --release -p model --example stages -- FILE.csv|DATASET [MAKE MODEL SUBJECT]`, e.g. on
//! a file from `comptrail demo-market --rows 1000000 --seed 3 --out m1m.csv`.

// A developer's probe: a bad argument may stop it with the reason.
#![allow(clippy::unwrap_used, clippy::expect_used, missing_docs)]

use std::time::Instant;

use linfa::ParamGuard;
use model::appraisal::{AppraisalRequest, FitSettings, appraise, find_segment, fit_market};
use model::clean::{Overrides, clean_segment};
use model::comparables::CandidateIndex;
use model::hedonic::HedonicParams;
use model::import::{ImportOptions, import_csv_bytes};
use model::subject::Subject;

// One stage after another, each timed and printed: a script, read top to bottom.
#[allow(clippy::too_many_lines)]
fn main() {
    let args: Vec<String> = std::env::args().skip(1).collect();
    let path = args
        .first()
        .expect("usage: stages FILE.csv [MAKE MODEL SUBJECT]");
    let make = args.get(1).map_or("Quellmark", String::as_str);
    let model_name = args.get(2).map_or("Tessel", String::as_str);
    let subject = args.get(3).map_or(
        "year=2022,make=Quellmark,model=Tessel,variant=Ambrel,miles=41000,condition=used",
        String::as_str,
    );

    let t = Instant::now();
    let (market, report) = if model::import::dataset::is_parquet_market(path.as_ref()) {
        // A Parquet market: its read is part of the import, for the one model only.
        let wanted = [(make.to_owned(), model_name.to_owned())];
        model::import::import_market(path.as_ref(), &ImportOptions::default(), &wanted)
            .expect("the dataset imports")
    } else {
        let bytes = std::fs::read(path).expect("the file can be read");
        println!("read            {:>9.1?}", t.elapsed());
        let t = Instant::now();
        let imported = import_csv_bytes("file.csv", bytes, &ImportOptions::default())
            .expect("the file imports");
        println!("  (import alone {:>9.1?})", t.elapsed());
        imported
    };
    println!(
        "import          {:>9.1?}  ({} rows used of {})",
        t.elapsed(),
        report.rows_used,
        report.rows_read
    );

    let settings = FitSettings {
        as_of: market.latest_date(),
        ..FitSettings::default()
    };
    let segment = find_segment(&market, make, model_name).expect("the segment is in the file");
    let t = Instant::now();
    let fit = fit_market(&market, segment, &settings, &Overrides::new()).expect("the fit runs");
    println!("clean + fit     {:>9.1?}", t.elapsed());

    let as_of = settings.as_of_for(&market);
    let t = Instant::now();
    let cleaning = clean_segment(
        &market,
        segment,
        &settings.cleaning,
        settings.age_form,
        as_of,
        &Overrides::new(),
    );
    println!(
        "  clean alone   {:>9.1?}  ({} rows)",
        t.elapsed(),
        cleaning.rows.len()
    );
    let included = cleaning.included_rows();
    let t = Instant::now();
    let choice = model::hedonic::choose_age_form(
        &market,
        &included,
        as_of,
        settings.market_time,
        settings.equipment,
    );
    println!("  age form      {:>9.1?}  ({})", t.elapsed(), choice.chosen);
    let t = Instant::now();
    let fade = model::hedonic::premium_fade::test_premium_fade(
        &market,
        &included,
        as_of,
        choice.chosen,
        settings.market_time,
        settings.equipment,
    );
    println!(
        "  premium test  {:>9.1?}  (kept: {})",
        t.elapsed(),
        fade.as_ref()
            .is_ok_and(model::hedonic::PremiumFadeTest::supported)
    );
    let t = Instant::now();
    // The fit as `fit_market` makes it (its own age form, slopes, time and option terms).
    let used = fit.model.params();
    let params = HedonicParams::new(as_of)
        .age_form(used.age_form)
        .robust(used.robust)
        .market_time(used.market_time)
        .variant_slopes(used.variant_slopes)
        .equipment(used.equipment)
        .check()
        .expect("the settings are valid");
    let model = params.fit(&market, &included).expect("the fit runs");
    println!(
        "  fit alone     {:>9.1?}  ({} rows, {} terms)",
        t.elapsed(),
        model.rows(),
        model.coefficients().len()
    );
    let t = Instant::now();
    let index = model::hedonic::market_time::monthly_index(&model, &market, &included, 0.8);
    println!(
        "  month index   {:>9.1?}  ({})",
        t.elapsed(),
        index.map_or_else(|e| e.to_string(), |i| format!("{} periods", i.months.len()))
    );
    let t = Instant::now();
    let index = CandidateIndex::new(&market, &cleaning.rows, &cleaning);
    println!(
        "  index alone   {:>9.1?}  ({} candidates)",
        t.elapsed(),
        index.len()
    );

    let t = Instant::now();
    let request = AppraisalRequest::new(Subject::parse(subject).expect("the subject parses"));
    let appraisal = appraise(&market, &fit, &request).expect("the appraisal runs");
    println!(
        "appraise        {:>9.1?}  (indicated value {:.0})",
        t.elapsed(),
        appraisal.reconciliation.indicated_value
    );
}
