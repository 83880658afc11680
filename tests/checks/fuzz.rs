//! Fuzz-style properties: the loaders and everything downstream of them never panic, whatever
//! bytes they are given. Each property runs over arbitrary bytes and over mutations of a real
//! file (bytes cut, inserted, duplicated; numbers replaced by NaN, infinities, huge, negative
//! and malformed values; the file cut short). A case may fail with an error; it may not panic.
//!
//! `cargo test` runs 10,000 cases of each (about a minute in all on the CI machine). The long
//! run: `COMPTRAIL_FUZZ_CASES=1000000 cargo test --release -p acceptance --test checks fuzz`.

use std::sync::OnceLock;

use model::appraisal::{AppraisalRequest, FitSettings, appraise, fit_market};
use model::clean::Overrides;
use model::import::{ImportOptions, import_csv_bytes};
use model::session::{Purpose, parse_session, reproduce};
use model::subject::Subject;
use model::worksheet::{ClaimInputs, ProfileFile};
use proptest::prelude::*;

/// Cases per property: `COMPTRAIL_FUZZ_CASES`, else 10,000.
fn cases() -> u32 {
    std::env::var("COMPTRAIL_FUZZ_CASES")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(10_000)
}

fn config() -> ProptestConfig {
    ProptestConfig {
        cases: cases(),
        // A failure prints its smallest input; nothing is written beside the sources.
        failure_persistence: None,
        max_shrink_iters: 256,
        // A hang is a failure too (a case normally takes milliseconds).
        timeout: 20_000,
        ..ProptestConfig::default()
    }
}

/// One change to a file.
#[derive(Debug, Clone)]
enum Mutation {
    /// Remove `len` bytes at `at` (a fraction of the length).
    Cut { at: f64, len: usize },
    /// Insert bytes at `at`.
    Insert { at: f64, bytes: Vec<u8> },
    /// Replace the `nth` number in the text with `with`.
    Number { nth: usize, with: &'static str },
    /// Repeat the line at `at`.
    DuplicateLine { at: f64 },
    /// Stop the file at `at`.
    Truncate { at: f64 },
}

/// Numbers that break arithmetic written without care.
const NASTY_NUMBERS: [&str; 20] = [
    "NaN",
    "nan",
    "inf",
    "-inf",
    "1e308",
    "-1e308",
    "1e-320",
    "0",
    "-0",
    "-1",
    "-99999999999",
    "99999999999999999999",
    "2147483647",
    "-2147483648",
    "18446744073709551616",
    "0.0000001",
    "1.5e",
    "--5",
    "",
    "3.14159265358979323846264338327950288",
];

fn mutation() -> impl Strategy<Value = Mutation> {
    prop_oneof![
        (0.0..1.0f64, 1usize..40).prop_map(|(at, len)| Mutation::Cut { at, len }),
        (0.0..1.0f64, prop::collection::vec(any::<u8>(), 1..12))
            .prop_map(|(at, bytes)| Mutation::Insert { at, bytes }),
        (0.0..1.0f64, "[,;\"\\n()\\[\\]: a-z0-9.-]{1,8}").prop_map(|(at, text)| {
            Mutation::Insert {
                at,
                bytes: text.into_bytes(),
            }
        }),
        nasty_number(),
        (0.0..1.0f64).prop_map(|at| Mutation::DuplicateLine { at }),
        (0.0..1.0f64).prop_map(|at| Mutation::Truncate { at }),
    ]
}

fn position(len: usize, at: f64) -> usize {
    ((len as f64 * at) as usize).min(len)
}

/// Spans of the numbers in `text` (runs of digits with an optional sign and decimals).
fn number_spans(text: &[u8]) -> Vec<(usize, usize)> {
    let mut spans = Vec::new();
    let mut i = 0;
    while i < text.len() {
        if text[i].is_ascii_digit() {
            let start = if i > 0 && text[i - 1] == b'-' {
                i - 1
            } else {
                i
            };
            while i < text.len() && (text[i].is_ascii_digit() || text[i] == b'.') {
                i += 1;
            }
            spans.push((start, i));
        } else {
            i += 1;
        }
    }
    spans
}

fn apply(base: &[u8], mutations: &[Mutation]) -> Vec<u8> {
    let mut bytes = base.to_vec();
    for m in mutations {
        match m {
            Mutation::Cut { at, len } => {
                let start = position(bytes.len(), *at);
                let end = (start + len).min(bytes.len());
                bytes.drain(start..end);
            }
            Mutation::Insert { at, bytes: new } => {
                let i = position(bytes.len(), *at);
                bytes.splice(i..i, new.iter().copied());
            }
            Mutation::Number { nth, with } => {
                let spans = number_spans(&bytes);
                if !spans.is_empty() {
                    let (start, end) = spans[nth % spans.len()];
                    bytes.splice(start..end, with.bytes());
                }
            }
            Mutation::DuplicateLine { at } => {
                let i = position(bytes.len(), *at);
                let start = bytes[..i]
                    .iter()
                    .rposition(|&b| b == b'\n')
                    .map_or(0, |p| p + 1);
                let end = bytes[i..]
                    .iter()
                    .position(|&b| b == b'\n')
                    .map_or(bytes.len(), |p| i + p + 1);
                let line = bytes[start..end].to_vec();
                bytes.splice(end..end, line);
            }
            Mutation::Truncate { at } => {
                let i = position(bytes.len(), *at);
                bytes.truncate(i);
            }
        }
    }
    bytes
}

fn nasty_number() -> impl Strategy<Value = Mutation> {
    (0usize..4_000, prop::sample::select(NASTY_NUMBERS.to_vec()))
        .prop_map(|(nth, with)| Mutation::Number { nth, with })
}

/// A file to try: one of `bases` with a few mutations of any kind (most break its syntax, which
/// tests the errors), or with only numbers replaced (which mostly keeps it readable, so the
/// values reach the arithmetic behind the reader), or arbitrary bytes.
fn input(bases: &'static [Vec<u8>]) -> impl Strategy<Value = Vec<u8>> {
    prop_oneof![
        3 => (0..bases.len(), prop::collection::vec(mutation(), 1..5))
            .prop_map(move |(i, ms)| apply(&bases[i], &ms)),
        3 => (0..bases.len(), prop::collection::vec(nasty_number(), 1..6))
            .prop_map(move |(i, ms)| apply(&bases[i], &ms)),
        1 => prop::collection::vec(any::<u8>(), 0..400),
    ]
}

/// Small markets as appraisers bring them: the demo's columns, another header spelling with
/// a kilometre odometer and messy values, and a one-model export with a stray space and case.
fn csv_bases() -> &'static [Vec<u8>] {
    static BASES: OnceLock<Vec<Vec<u8>>> = OnceLock::new();
    BASES.get_or_init(|| {
        vec![
            model::demo::demo_csv_bytes(40, 7),
            b"Year;Brand;Model Name;Trim;Price (USD);Odometer (km);Listed;Sold;Sale price;VIN\n\
2021;Quellmark;Tessel;Ambrel;\"31,500\";64000;2026-10-01;;;QUT4PL22X7M015562\n\
2020;QUELLMARK;tessel ;Veskel;$27,900;81,200;01/10/2026;2026-11-02;27000;\n\
2022;Quellmark;Tessel;Tolvane;39990;22000;2026-11-20;;;\n\
2019;Quellmark;Tessel;;24,250;;2026-09-12;;;\n\
2021;Quellmark;Tessel;Ambrel;n/a;51000;2026-10-15;;;\n\
2023;Quellmark;Tessel;Ambrel;36,000;15000;2026-11-28;;;\n\
2018;Quellmark;Tessel;Veskel;21 400;122000;2026-11-01;;;\n\
2020;Quellmark;Tessel;Ambrel;28,750;90,500;2026-10-20;;;\n\
2022;Quellmark;Tessel;Veskel;33100;30000;2026-11-11;;;\n\
2019;Quellmark;Tessel;Tolvane;29,990;99000;2026-10-02;;;\n\
2021;Quellmark;Tessel;Tolvane;36,500;60000;2026-11-15;;;\n\
2022;Quellmark;Tessel;Ambrel;34,250;41000;2026-11-25;;;\n\
2020;Quellmark;Tessel;Veskel;25,100;75000;2026-09-30;;;\n\
2023;Quellmark;Tessel;Tolvane;44,900;12000;2026-11-29;;;\n"
                .to_vec(),
            b"model_year,make,model,variant,asking_price,miles,condition\n\
2018,Orvane,Kestrel,Halvet,18500,91000,used\n\
2019,Orvane,Kestrel,Halvet,20900,76000,used\n\
2020,Orvane,Kestrel,Halvet,23400,58000,certified\n\
2021,Orvane,Kestrel,Cressin,22100,41000,used\n\
2022,Orvane,Kestrel,Cressin,25900,23000,used\n\
2023,Orvane,Kestrel,Halvet,31200,9000,new\n\
2020,Orvane,Kestrel,Cressin,19800,66000,used\n\
2019,Orvane,Kestrel,Cressin,17900,88000,used\n\
2021,Orvane,Kestrel,Halvet,26400,47000,used\n\
2022,Orvane,Kestrel,Halvet,29100,30500,used\n"
                .to_vec(),
        ]
    })
}

/// Imports, then fits and appraises every model found (a few at most), with a value
/// forecast: the path a file takes from the disk to a number. Returns how many models were
/// appraised.
fn import_and_appraise(bytes: Vec<u8>) -> usize {
    let options = ImportOptions {
        latest_model_year: 2027,
        ..ImportOptions::default()
    };
    let Ok((market, _report)) = import_csv_bytes("fuzz.csv", bytes, &options) else {
        return 0;
    };
    let settings = FitSettings::default();
    let mut appraised = 0;
    for (segment, _) in market.segments().into_iter().take(3) {
        let Ok(fit) = fit_market(&market, segment, &settings, &Overrides::new()) else {
            continue;
        };
        let Some(&row) = fit.cleaning.rows.first() else {
            continue;
        };
        let subject = Subject::from_listing(&market.listing(row));
        let request = AppraisalRequest::new(subject.clone());
        if let Ok(appraisal) = appraise(&market, &fit, &request) {
            appraised += usize::from(
                model::session::work_out(&Purpose::Value, &appraisal, &request).is_ok(),
            );
        }
        let _ = model::forecast::forecast(&market, &fit, &subject, 6.0, None, 0.8);
        let _ = model::depreciation::depreciation_table(&fit.model, &market, 6);
    }
    appraised
}

fn session_bases() -> &'static [Vec<u8>] {
    static BASES: OnceLock<Vec<Vec<u8>>> = OnceLock::new();
    BASES.get_or_init(|| {
        [
            "sessions/format-2-dealer-trade-in.ron",
            "sessions/format-2-total-loss-claim.ron",
            "sessions/format-1-trade-in.ron",
        ]
        .iter()
        .map(|p| std::fs::read(acceptance::data_path(p)).unwrap())
        .chain([
            model::session::session_to_ron(&acceptance::demo_session(Purpose::Value, None))
                .unwrap()
                .into_bytes(),
        ])
        .collect()
    })
}

/// Reads a session; if it reads, recomputes it and builds its report. Whether it reproduced.
fn read_and_reproduce(bytes: &[u8]) -> bool {
    let Ok(text) = std::str::from_utf8(bytes) else {
        return false;
    };
    let Ok(session) = parse_session(text, "fuzz.ron") else {
        return false;
    };
    let reproduced = reproduce(&session).is_ok_and(|r| r.reproduces());
    let identity = report::Identity {
        session_file: "fuzz.ron".into(),
        session_hash: "xxh3:0".into(),
        reproduction: "fuzzed".into(),
    };
    let doc = report::Report::from_session(&session, &identity);
    let _ = report::html::render(&doc);
    let _ = report::pdf::render(&doc);
    reproduced
}

fn profile_bases() -> &'static [Vec<u8>] {
    static BASES: OnceLock<Vec<Vec<u8>>> = OnceLock::new();
    BASES.get_or_init(|| vec![model::worksheet::SHIPPED_PROFILES.as_bytes().to_vec()])
}

/// A saved demo appraisal to work claims on.
fn value_session() -> &'static model::session::Session {
    static SESSION: OnceLock<model::session::Session> = OnceLock::new();
    SESSION.get_or_init(|| acceptance::demo_session(Purpose::Value, None))
}

/// Reads a profile file; if it reads, works a claim under each profile on a saved appraisal.
/// Returns how many claims were worked.
fn read_and_use_profiles(bytes: &[u8]) -> usize {
    let Ok(text) = std::str::from_utf8(bytes) else {
        return 0;
    };
    let Ok(file) = ProfileFile::parse(text, "fuzz-profiles.ron") else {
        return 0;
    };
    let session = value_session();
    let mut worked = 0;
    for profile in file.profiles {
        let mut request = session.request.clone();
        request.rules = profile.comparable_rules(&request.rules);
        let purpose = Purpose::Claim {
            inputs: ClaimInputs::starting(&profile.id),
            profile,
        };
        worked +=
            usize::from(model::session::work_out(&purpose, &session.appraisal, &request).is_ok());
    }
    worked
}

proptest! {
    #![proptest_config(config())]

    #[test]
    fn no_market_file_makes_the_import_or_the_appraisal_panic(bytes in input(csv_bases())) {
        let _ = import_and_appraise(bytes);
    }

    #[test]
    fn no_session_file_makes_reading_reproducing_or_reporting_panic(bytes in input(session_bases())) {
        let _ = read_and_reproduce(&bytes);
    }

    #[test]
    fn no_profile_file_makes_reading_or_a_claim_panic(bytes in input(profile_bases())) {
        let _ = read_and_use_profiles(&bytes);
    }
}

#[test]
fn the_files_mutated_reach_every_stage_as_they_are() {
    // Unchanged, each base goes all the way: a mutation of it tests the deep code, not only
    // the reader's first error.
    for (i, base) in csv_bases().iter().enumerate() {
        assert!(import_and_appraise(base.clone()) >= 1, "market base {i}");
    }
    for (i, base) in session_bases().iter().enumerate() {
        assert!(read_and_reproduce(base), "session base {i}");
    }
    assert!(read_and_use_profiles(&profile_bases()[0]) >= 3);
}

#[test]
fn the_mutations_reach_the_numbers_they_aim_at() {
    // The harness itself: a number replaced is replaced, a cut is a cut.
    let base = b"a,1\nb,22.5\n".to_vec();
    let replaced = apply(
        &base,
        &[Mutation::Number {
            nth: 1,
            with: "NaN",
        }],
    );
    assert_eq!(replaced, b"a,1\nb,NaN\n");
    assert_eq!(apply(&base, &[Mutation::Truncate { at: 0.5 }]).len(), 5);
    assert_eq!(
        apply(&base, &[Mutation::DuplicateLine { at: 0.0 }]),
        b"a,1\na,1\nb,22.5\n"
    );
}
