//! Helpers shared by the checks: reading reference data and measuring agreement.

use std::path::PathBuf;

use ndarray::{Array1, Array2};

/// Path of a file in `tests/data`.
#[must_use]
pub fn data_path(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("data")
        .join(name)
}

/// Reads a numeric CSV whose first column is the response: returns (X, y).
///
/// # Panics
/// On a missing or malformed reference file: these are fixed test inputs.
#[must_use]
pub fn read_reference(name: &str) -> (Array2<f64>, Array1<f64>) {
    read_reference_with_response(name, 0)
}

/// Reads a numeric CSV, taking column `response` as y and the others, in order, as X.
///
/// # Panics
/// On a missing or malformed reference file: these are fixed test inputs.
#[must_use]
#[allow(clippy::expect_used)]
pub fn read_reference_with_response(name: &str, response: usize) -> (Array2<f64>, Array1<f64>) {
    let text = std::fs::read_to_string(data_path(name)).expect("reference file");
    let mut lines = text.lines();
    let header = lines.next().expect("header");
    let columns = header.split(',').count();
    let mut ys = Vec::new();
    let mut xs = Vec::new();
    for line in lines.filter(|l| !l.trim().is_empty()) {
        let values: Vec<f64> = line
            .split(',')
            .map(|v| v.trim().parse().expect("number"))
            .collect();
        for (j, v) in values.into_iter().enumerate() {
            if j == response {
                ys.push(v);
            } else {
                xs.push(v);
            }
        }
    }
    let n = ys.len();
    (
        Array2::from_shape_vec((n, columns - 1), xs).expect("shape"),
        Array1::from(ys),
    )
}

/// Log relative error, `-log10(|computed - certified| / |certified|)` (McCullough 1998); 15 when
/// the two agree exactly, and the absolute version when the certified value is 0.
#[must_use]
pub fn lre(computed: f64, certified: f64) -> f64 {
    let err = if certified == 0.0 {
        (computed - certified).abs()
    } else {
        ((computed - certified) / certified).abs()
    };
    if err == 0.0 {
        15.0
    } else {
        (-err.log10()).min(15.0)
    }
}

/// A demo market of `rows` listings imported through the real CSV path.
///
/// # Panics
/// If the generated file fails to import (a bug the checks should surface).
#[must_use]
#[allow(clippy::expect_used)]
pub fn demo_market(rows: usize, seed: u64) -> model::market::Market {
    let bytes = model::demo::demo_csv_bytes(rows, seed);
    let options = model::import::ImportOptions {
        latest_model_year: 2027,
        ..model::import::ImportOptions::default()
    };
    model::import::import_csv_bytes("demo.csv", bytes, &options)
        .expect("demo market imports")
        .0
}

/// Fits the demo segment `make model` with `settings` (as of the demo date).
///
/// # Panics
/// If the segment is missing or the fit fails.
#[must_use]
#[allow(clippy::expect_used)]
pub fn fit_demo(
    market: &model::market::Market,
    make: &str,
    model_name: &str,
    mut settings: model::appraisal::FitSettings,
) -> model::appraisal::MarketFit {
    settings.as_of = Some(model::demo::demo_as_of());
    let segment = model::appraisal::find_segment(market, make, model_name).expect("segment");
    model::appraisal::fit_market(market, segment, &settings, &model::clean::Overrides::new())
        .expect("fit")
}

/// The demo market of `rows` listings from `seed` with its Quellmark Tessel fitted with the
/// default settings (`age_form` aside), made once per test run and shared by every check
/// that reads it.
#[must_use]
#[allow(clippy::expect_used)]
pub fn shared_tessel_fit(
    rows: usize,
    seed: u64,
    age_form: model::hedonic::AgeForm,
) -> &'static (model::market::Market, model::appraisal::MarketFit) {
    type Shared = (model::market::Market, model::appraisal::MarketFit);
    type Key = (usize, u64, model::hedonic::AgeForm);
    static MADE: std::sync::Mutex<Vec<(Key, &'static Shared)>> = std::sync::Mutex::new(Vec::new());
    let mut made = MADE
        .lock()
        .unwrap_or_else(std::sync::PoisonError::into_inner);
    let key = (rows, seed, age_form);
    if let Some((_, shared)) = made.iter().find(|(k, _)| *k == key) {
        return shared;
    }
    let market = demo_market(rows, seed);
    let fit = fit_demo(
        &market,
        "Quellmark",
        "Tessel",
        model::appraisal::FitSettings {
            age_form,
            ..model::appraisal::FitSettings::default()
        },
    );
    let shared: &'static Shared = Box::leak(Box::new((market, fit)));
    made.push((key, shared));
    shared
}

/// The demo's used Quellmark Tessel Ambrel of `model_year` with `miles` on the odometer (the
/// demo subject is the 2022 at 41,000 mi).
#[must_use]
pub fn tessel(model_year: i32, miles: f64) -> model::subject::Subject {
    model::subject::Subject {
        model_year,
        make: "Quellmark".into(),
        model: "Tessel".into(),
        variant: Some("Ambrel".into()),
        miles,
        condition: model::condition::Condition::Used,
        options: None,
        vin: None,
    }
}

/// Path of a file in the repository (`sample-sessions/…`, `assets/…`).
#[must_use]
pub fn repo_path(relative: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("..")
        .join(relative)
}

/// A fresh empty folder under the system's temporary folder, unique to this call.
///
/// # Panics
/// If the folder cannot be created.
#[must_use]
#[allow(clippy::expect_used)]
pub fn scratch_dir(name: &str) -> PathBuf {
    use std::sync::atomic::{AtomicU32, Ordering};
    static NEXT: AtomicU32 = AtomicU32::new(0);
    let dir = std::env::temp_dir().join(format!(
        "comptrail-{name}-{}-{}",
        std::process::id(),
        NEXT.fetch_add(1, Ordering::Relaxed)
    ));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).expect("scratch folder");
    dir
}

/// A demo appraisal of the 2022 Tessel Ambrel, 41,000 mi, used, as the workbench opens with,
/// captured as a session for `purpose` (market: 2,000 demo listings, seed 1).
///
/// # Panics
/// If the demo cannot be appraised.
#[must_use]
#[allow(clippy::expect_used, clippy::needless_pass_by_value)]
pub fn demo_session(
    purpose: model::session::Purpose,
    market_path: Option<&std::path::Path>,
) -> model::session::Session {
    let market = demo_market(2_000, 1);
    let settings = model::appraisal::FitSettings {
        as_of: Some(model::demo::demo_as_of()),
        ..model::appraisal::FitSettings::default()
    };
    let fit = fit_demo(&market, "Quellmark", "Tessel", settings);
    let mut request = model::appraisal::AppraisalRequest::new(tessel(2022, 41_000.0));
    if let model::session::Purpose::Claim { profile, .. } = &purpose {
        request.rules = profile.comparable_rules(&request.rules);
    }
    let appraisal = model::appraisal::appraise(&market, &fit, &request).expect("appraisal");
    test_session(&model::session::Capture {
        market: &market,
        market_path,
        fit: &fit,
        settings: &settings,
        overrides: &model::clean::Overrides::new(),
        request: &request,
        appraisal: &appraisal,
        purpose: &purpose,
        keep_segment: false,
        case: &model::session::CaseDetails::default(),
    })
}

/// The session of `capture`, by the invented test appraiser at a fixed time.
///
/// # Panics
/// If the worksheet cannot be worked out.
#[must_use]
#[allow(clippy::expect_used)]
pub fn test_session(capture: &model::session::Capture<'_>) -> model::session::Session {
    let at = chrono::DateTime::parse_from_rfc3339("2026-12-01T10:00:00Z")
        .expect("time")
        .to_utc();
    model::session::Session::capture(
        capture,
        model::session::Authorship {
            appraiser: "Test Appraiser (invented)".into(),
            created: at,
            saved: at,
            notes: String::new(),
        },
    )
    .expect("session")
}

/// The 4,000-listing demo market (seed 1), its Quellmark Tessel fitted with `settings` as of
/// the demo's date, `subject` appraised on it with `request`'s rules, and the appraisal saved
/// as a value session, written to text and read back; checks that it reproduces.
///
/// # Panics
/// If any step fails or the session read back does not reproduce.
#[must_use]
#[allow(clippy::expect_used, clippy::needless_pass_by_value)]
pub fn saved_and_read_back(
    settings: model::appraisal::FitSettings,
    request: model::appraisal::AppraisalRequest,
) -> model::session::Session {
    let market = demo_market(4_000, 1);
    let settings = model::appraisal::FitSettings {
        as_of: Some(model::demo::demo_as_of()),
        ..settings
    };
    let segment = model::appraisal::find_segment(&market, "Quellmark", "Tessel").expect("segment");
    let overrides = model::clean::Overrides::new();
    let fit =
        model::appraisal::fit_market(&market, segment, &settings, &overrides).expect("the fit");
    let appraisal = model::appraisal::appraise(&market, &fit, &request).expect("the appraisal");
    let session = value_session(&market, &fit, &settings, &overrides, &request, &appraisal);
    let text = model::session::session_to_ron(&session).expect("written");
    let again = model::session::parse_session(&text, "again.ron").expect("read back");
    let replay = model::session::reproduce(&again).expect("replayed");
    assert!(replay.reproduces(), "{:?}", replay.differences);
    again
}

/// The appraisal of `request` on `fit` captured as a value session (no worksheet, no case
/// details, no market path, the segment not kept).
#[must_use]
pub fn value_session(
    market: &model::market::Market,
    fit: &model::appraisal::MarketFit,
    settings: &model::appraisal::FitSettings,
    overrides: &model::clean::Overrides,
    request: &model::appraisal::AppraisalRequest,
    appraisal: &model::appraisal::Appraisal,
) -> model::session::Session {
    test_session(&model::session::Capture {
        market,
        market_path: None,
        fit,
        settings,
        overrides,
        request,
        appraisal,
        purpose: &model::session::Purpose::Value,
        case: &model::session::CaseDetails::default(),
        keep_segment: false,
    })
}

/// A market constructed by a check from CSV `text` (the whole text imported with the default
/// options), and all its rows.
///
/// # Panics
/// If the text does not import.
#[must_use]
#[allow(clippy::expect_used, clippy::needless_pass_by_value)]
pub fn constructed_market(text: String) -> (model::market::Market, Vec<usize>) {
    let (market, _) = model::import::import_csv_bytes(
        "constructed.csv",
        text.into_bytes(),
        &model::import::ImportOptions::default(),
    )
    .expect("the constructed market imports");
    let rows = (0..market.len()).collect();
    (market, rows)
}
