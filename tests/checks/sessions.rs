//! Session files: the samples reproduce, a session stands without its market file, damaged or
//! newer files are refused by name, older ones are migrated, and a save cut short by a crash
//! leaves the old file whole.

use acceptance::{data_path, demo_session, repo_path, scratch_dir};
use model::adjustment::AdjustmentKind;
use model::money::Cents;
use model::session::{
    Purpose, SESSION_FORMAT_VERSION, SessionError, WorksheetOutcome, format_version_of,
    parse_session, read_session, reproduce, session_to_ron, write_session,
};
use model::worksheet::{HoldingCost, Line, TradeInInputs};

const SAMPLES: [&str; 3] = [
    "dealer-trade-in",
    "total-loss-claim",
    "near-threshold-claim",
];

fn trade_in() -> Purpose {
    Purpose::TradeIn(TradeInInputs {
        retail_value: Cents::ZERO,
        retail_value_note: None,
        list_to_sale_discount_pct: 4.0,
        recon: vec![Line {
            label: "brakes".into(),
            amount: Cents::whole_dollars(640),
        }],
        transport_and_fees: Cents::whole_dollars(300),
        pack: Cents::whole_dollars(500),
        target_front_gross: Cents::whole_dollars(1_800),
        days_to_sell: 40.0,
        holding: HoldingCost::PerDay {
            amount: Cents::whole_dollars(30),
        },
    })
}

#[test]
fn every_sample_session_reproduces_its_stored_value_to_the_cent() {
    for name in SAMPLES {
        let path = repo_path(&format!("sample-sessions/{name}.ron"));
        let session = read_session(&path).unwrap_or_else(|e| panic!("{name}: {e}"));
        let r = reproduce(&session).unwrap();
        assert!(r.reproduces(), "{name}: {:?}", r.differences);
        assert_eq!(
            (r.outcome.indicated_value * 100.0).round(),
            (session.result.indicated_value * 100.0).round()
        );
        assert!(
            session.result.bottom_line().is_some(),
            "{name} has a worksheet"
        );
        assert!(!session.authorship.appraiser.is_empty());
        assert!(!session.appraisal.comparables.is_empty());
    }
}

#[test]
fn the_samples_cover_a_trade_in_a_total_loss_and_a_claim_near_the_threshold() {
    let read =
        |name: &str| read_session(&repo_path(&format!("sample-sessions/{name}.ron"))).unwrap();
    assert!(matches!(
        read("dealer-trade-in").result.worksheet,
        Some(WorksheetOutcome::TradeIn { .. })
    ));
    let Some(WorksheetOutcome::Claim(total)) = read("total-loss-claim").result.worksheet else {
        panic!("claim sample has no claim");
    };
    assert!(total.verdict.total_loss);
    let Some(WorksheetOutcome::Claim(near)) = read("near-threshold-claim").result.worksheet else {
        panic!("near-threshold sample has no claim");
    };
    // Within one percentage point under the threshold, and so not a total loss.
    assert!(!near.verdict.total_loss);
    assert!(near.verdict.threshold - near.verdict.measure < 1.0);
    assert!(near.verdict.measure < near.verdict.threshold);
}

#[test]
fn a_session_round_trips_through_its_text_unchanged() {
    for name in SAMPLES {
        let path = repo_path(&format!("sample-sessions/{name}.ron"));
        let session = read_session(&path).unwrap();
        let text = session_to_ron(&session).unwrap();
        let again = parse_session(&text, name).unwrap();
        assert_eq!(again, session, "{name}");
    }
}

#[test]
fn a_session_reproduces_after_its_market_file_is_deleted() {
    let dir = scratch_dir("deleted-market");
    let market = dir.join("market.csv");
    std::fs::write(&market, model::demo::demo_csv_bytes(2_000, 1)).unwrap();
    let session = demo_session(trade_in(), Some(&market));
    let path = dir.join("case.ron");
    write_session(&path, &session).unwrap();
    std::fs::remove_file(&market).unwrap();
    let reopened = read_session(&path).unwrap();
    assert_eq!(
        reopened.market.location.from_session.as_deref(),
        Some("market.csv")
    );
    assert!(!reopened.market.location.candidates(&path)[0].exists());
    let r = reproduce(&reopened).unwrap();
    assert!(r.reproduces(), "{:?}", r.differences);
    assert_eq!(
        r.outcome.bottom_line().map(|b| b.1),
        session.result.bottom_line().map(|b| b.1)
    );
}

#[test]
fn a_hand_edited_price_is_named_with_how_much_it_moves_the_value() {
    let session = demo_session(trade_in(), None);
    let mut edited = session.clone();
    edited.appraisal.comparables[0].listing.asking_price += 1_000.0;
    let line = edited.appraisal.comparables[0].listing.line;
    let r = reproduce(&edited).unwrap();
    assert!(!r.reproduces());
    assert!(
        r.differences
            .iter()
            .any(|d| d.what == format!("comparable line {line}, adjusted price")),
        "{:?}",
        r.differences
    );
    let value = r
        .differences
        .iter()
        .find(|d| d.what == "indicated value")
        .unwrap();
    assert!(value.now > value.stored);
}

#[test]
fn a_truncated_session_names_the_line_where_it_stops() {
    let text = session_to_ron(&demo_session(trade_in(), None)).unwrap();
    let cut = &text[..text.len() / 2];
    let e = parse_session(cut, "cut.ron").unwrap_err();
    let message = e.to_string();
    assert!(message.starts_with("cut.ron, line "), "{message}");
    assert!(message.contains("ends too early"), "{message}");
}

#[test]
fn regression_an_error_after_a_character_of_several_bytes_is_reported_not_a_panic() {
    // Found by the fuzz check: naming the field before an error sliced the text one byte after
    // a multi-byte character.
    let e = parse_session("(\n  format_version: 3,\n  é: ]", "x.ron").unwrap_err();
    assert!(e.to_string().contains("x.ron, line 3"), "{e}");
}

#[test]
fn regression_impossible_degrees_of_freedom_are_refused_not_a_hang() {
    // Found by the fuzz check's long run: `df_residual: 1e-320` sent the t quantile's search
    // into an endless loop inside the statistics library.
    let text =
        std::fs::read_to_string(data_path("sessions/format-2-total-loss-claim.ron")).unwrap();
    let edited = text.replacen("df_residual: 541.0,", "df_residual: 1e-320,", 1);
    assert_ne!(edited, text);
    let session = parse_session(&edited, "edited.ron").unwrap();
    let e = reproduce(&session).unwrap_err().to_string();
    assert!(e.contains("df_residual"), "{e}");
    // A report is still built from the saved evidence, without hanging.
    let identity = report::Identity {
        session_file: "edited.ron".into(),
        session_hash: "xxh3:0".into(),
        reproduction: "does not reproduce".into(),
    };
    let doc = report::Report::from_session(&session, &identity);
    assert!(report::html::render(&doc).contains("<html"));
}

#[test]
fn a_garbled_value_is_named_by_line_and_field() {
    let text = session_to_ron(&demo_session(trade_in(), None)).unwrap();
    let garbled = text.replacen("miles: 41000.0", "miles: forty-one thousand", 1);
    let line = garbled
        .lines()
        .position(|l| l.contains("forty-one"))
        .unwrap()
        + 1;
    let e = parse_session(&garbled, "garbled.ron").unwrap_err();
    let SessionError::Syntax {
        line: at, field, ..
    } = &e
    else {
        panic!("{e}");
    };
    assert_eq!(*at, line, "{e}");
    assert_eq!(field, ", field `miles`", "{e}");
}

#[test]
fn a_missing_field_is_named() {
    let text = session_to_ron(&demo_session(trade_in(), None)).unwrap();
    let without = text.replacen("appraiser: \"Test Appraiser (invented)\",", "", 1);
    let e = parse_session(&without, "edited.ron")
        .unwrap_err()
        .to_string();
    assert!(e.contains("appraiser"), "{e}");
}

#[test]
fn a_session_from_a_newer_version_is_refused_with_both_versions() {
    let text = session_to_ron(&demo_session(trade_in(), None)).unwrap();
    let current = format!("format_version: {SESSION_FORMAT_VERSION},");
    assert!(text.contains(&current));
    let newer = text.replacen(&current, "format_version: 70,", 1);
    let e = parse_session(&newer, "new.ron").unwrap_err();
    assert!(matches!(
        e,
        SessionError::NewerVersion {
            found: 70,
            supported: SESSION_FORMAT_VERSION,
            ..
        }
    ));
    assert!(e.to_string().contains("newer comptrail"), "{e}");
}

#[test]
fn a_format_1_session_is_migrated_and_still_reproduces() {
    // Written by comptrail's first session format (commit 7a9526d), which kept only the
    // market file's absolute path. Its optional `segment_listings` (500 KB) were cut to `None`
    // by hand before committing; the evidence the value rests on is as written.
    let session = read_session(&data_path("sessions/format-1-trade-in.ron")).unwrap();
    assert_eq!(session.format_version, SESSION_FORMAT_VERSION);
    assert_eq!(
        session.market.location.absolute.as_deref(),
        Some("/work/main/assets/demo-market.csv")
    );
    assert_eq!(session.market.location.from_session, None);
    let r = reproduce(&session).unwrap();
    assert!(r.reproduces(), "{:?}", r.differences);
}

#[test]
fn format_2_sessions_are_migrated_and_still_reproduce() {
    // Written by session format 2 (the sample sessions before format 3; their optional
    // `segment_listings` cut to `None` by hand). Format 2 kept the trade-in's retail value as
    // the indicated value unrounded (30632.37761410849); format 3 keeps whole cents, and the
    // migration rounds it, as format 2's worksheet did before paying it.
    for name in ["format-2-dealer-trade-in", "format-2-total-loss-claim"] {
        let path = data_path(&format!("sessions/{name}.ron"));
        let text = std::fs::read_to_string(&path).unwrap();
        assert_eq!(format_version_of(&text), Some(2), "{name}");
        let session = read_session(&path).unwrap();
        assert_eq!(session.format_version, SESSION_FORMAT_VERSION);
        let r = reproduce(&session).unwrap();
        assert!(r.reproduces(), "{name}: {:?}", r.differences);
        // Written again, it is a current session that reads back as itself.
        let again = parse_session(&session_to_ron(&session).unwrap(), "again.ron").unwrap();
        assert_eq!(again, session, "{name}");
    }
    // Format 3 (the samples before case details) reads with no case details, and the fitted
    // sale-class line of each comparable, then of kind `condition` like the appraiser's own
    // condition lines, is renamed; the appraiser's lines keep their kind.
    for name in ["format-3-dealer-trade-in", "format-3-total-loss-claim"] {
        let path = data_path(&format!("sessions/{name}.ron"));
        let text = std::fs::read_to_string(&path).unwrap();
        assert_eq!(format_version_of(&text), Some(3), "{name}");
        let session = read_session(&path).unwrap();
        assert_eq!(session.case, model::session::CaseDetails::default());
        let r = reproduce(&session).unwrap();
        assert!(r.reproduces(), "{name}: {:?}", r.differences);
        for c in &session.appraisal.comparables {
            let kinds: Vec<AdjustmentKind> = c.adjustments.iter().map(|l| l.kind).collect();
            assert_eq!(kinds[3], AdjustmentKind::SaleClass, "{name}: {kinds:?}");
            let own = session
                .request
                .user_adjustments
                .iter()
                .filter(|u| u.line.is_none_or(|l| l == c.listing.line))
                .count();
            assert_eq!(kinds.len(), 4 + own, "{name}");
            assert!(kinds[4..].iter().all(|k| *k != AdjustmentKind::SaleClass));
        }
        let again = parse_session(&session_to_ron(&session).unwrap(), "again.ron").unwrap();
        assert_eq!(again, session, "{name}");
    }
    // Format 4 (before the market-conditions term) reads with the term off and no drift, and
    // replays its four fitted lines per comparable unchanged.
    for name in ["format-4-dealer-trade-in", "format-4-total-loss-claim"] {
        let path = data_path(&format!("sessions/{name}.ron"));
        let text = std::fs::read_to_string(&path).unwrap();
        assert_eq!(format_version_of(&text), Some(4), "{name}");
        let session = read_session(&path).unwrap();
        assert!(!session.fit.settings.market_time, "{name}");
        assert_eq!(session.fit.rates.market_drift, None);
        assert_eq!(session.fit.market_time, None);
        assert!(!session.case.number(&session.purpose).is_empty(), "{name}");
        let r = reproduce(&session).unwrap();
        assert!(r.reproduces(), "{name}: {:?}", r.differences);
        for c in &session.appraisal.comparables {
            assert!(
                c.adjustments
                    .iter()
                    .all(|l| l.kind != AdjustmentKind::MarketConditions)
            );
        }
    }
    // The same text, declared as the current format, is refused for its fraction of a cent:
    // only older formats are rounded on reading.
    let text = std::fs::read_to_string(data_path("sessions/format-2-dealer-trade-in.ron")).unwrap();
    let as_current = text.replacen(
        "format_version: 2,",
        &format!("format_version: {SESSION_FORMAT_VERSION},"),
        1,
    );
    let e = parse_session(&as_current, "edited.ron")
        .unwrap_err()
        .to_string();
    assert!(e.contains("fraction of a cent"), "{e}");
}

#[test]
fn a_session_file_that_is_not_text_is_refused_by_line() {
    let dir = scratch_dir("binary-session");
    let path = dir.join("x.ron");
    std::fs::write(&path, b"(\n  format_version: 2,\n\xff\xfe").unwrap();
    let e = read_session(&path).unwrap_err().to_string();
    assert!(e.contains("line 3"), "{e}");
    assert!(e.contains("not UTF-8"), "{e}");
}

mod properties {
    use std::sync::OnceLock;

    use acceptance::demo_session;
    use model::session::{Purpose, Session, parse_session, reproduce, session_to_ron};
    use proptest::prelude::*;

    fn base() -> &'static Session {
        static BASE: OnceLock<Session> = OnceLock::new();
        BASE.get_or_init(|| demo_session(Purpose::Value, None))
    }

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(48))]

        /// Whatever an appraiser types (quotes, backslashes, newlines, any script, RON
        /// syntax), a session reads back exactly as it was written and still reproduces.
        #[test]
        fn free_text_survives_a_save_and_reopen(
            notes in "\\PC{0,80}",
            appraiser in "[\"\\\\(),:\\n a-zA-Zé漢字]{0,30}",
            basis in "\\PC{1,40}",
        ) {
            let mut session = base().clone();
            session.authorship.notes = notes;
            session.authorship.appraiser = appraiser;
            if let Some(line) = session.appraisal.comparables[0].adjustments.first_mut() {
                line.basis = basis;
            }
            let text = session_to_ron(&session).unwrap();
            let again = parse_session(&text, "p.ron").unwrap();
            prop_assert_eq!(&again, &session);
            prop_assert!(reproduce(&again).unwrap().reproduces());
            // And the report prints it: the PDF (WinAnsi text, wrapped) and the HTML (escaped).
            let identity = report::Identity {
                session_file: "p.ron".into(),
                session_hash: "xxh3:0".into(),
                reproduction: "checked".into(),
            };
            let doc = report::Report::from_session(&again, &identity);
            prop_assert!(report::pdf::render(&doc).starts_with(b"%PDF-"));
            let html = report::html::render(&doc);
            prop_assert!(!html.contains("<script"));
        }
    }
}

#[test]
fn a_hand_included_comparable_the_fit_cannot_price_is_refused_and_the_session_reopens() {
    // Every Tolvane listing is dropped from the fit by hand, then one is included as a
    // comparable for a Ambrel subject: the fit has no Tolvane rate. It used to be adjusted
    // silently as the base variant, and the saved session could not be reopened (the saved
    // rates had no Tolvane). Now it is refused with its reason, kept as evidence, and the
    // session reproduces.
    let market = acceptance::demo_market(2_000, 1);
    let segment = market.find_segment("Quellmark", "Tessel").unwrap();
    let tolvane_lines: Vec<u64> = market
        .rows_of(segment)
        .into_iter()
        .filter(|&r| market.variant_name(r) == "Tolvane")
        .map(|r| market.line[r])
        .collect();
    assert!(tolvane_lines.len() > 10);
    let mut overrides = model::clean::Overrides::new();
    for &line in &tolvane_lines {
        overrides.insert(
            line,
            model::clean::Override::Exclude {
                note: "checking the Ambrel market alone".into(),
            },
        );
    }
    let settings = model::appraisal::FitSettings {
        as_of: Some(model::demo::demo_as_of()),
        ..model::appraisal::FitSettings::default()
    };
    let fit = model::appraisal::fit_market(&market, segment, &settings, &overrides).unwrap();
    let mut request = model::appraisal::AppraisalRequest::new(acceptance::tessel(2022, 41_000.0));
    request.choices.include.insert(tolvane_lines[0]);
    let appraisal = model::appraisal::appraise(&market, &fit, &request).unwrap();
    assert_eq!(appraisal.refused.len(), 1);
    assert_eq!(appraisal.refused[0].listing.line, tolvane_lines[0]);
    assert!(
        appraisal.refused[0].reason.contains("'Tolvane'"),
        "{}",
        appraisal.refused[0].reason
    );
    assert!(
        appraisal
            .comparables
            .iter()
            .all(|c| c.listing.line != tolvane_lines[0])
    );
    let session =
        acceptance::value_session(&market, &fit, &settings, &overrides, &request, &appraisal);
    let dir = scratch_dir("refused");
    let path = dir.join("refused.ron");
    write_session(&path, &session).unwrap();
    let reopened = read_session(&path).unwrap();
    assert_eq!(reopened.appraisal.refused, appraisal.refused);
    let r = reproduce(&reopened).unwrap();
    assert!(r.reproduces(), "{:?}", r.differences);
}

/// The session finder lists every sample in a folder with its case number, names the files that
/// are not sessions, and narrows the list by number, name or VIN typed in any case (constructed:
/// the samples' case details are set by `make-samples.sh`).
#[test]
fn the_finder_finds_a_session_by_its_claim_number_customer_or_vin() {
    let dir = scratch_dir("finder");
    for name in SAMPLES {
        std::fs::copy(
            repo_path(&format!("sample-sessions/{name}.ron")),
            dir.join(format!("{name}.ron")),
        )
        .unwrap();
    }
    std::fs::write(dir.join("shopping-list.ron"), "(eggs: 12)").unwrap();
    std::fs::write(dir.join("notes.txt"), "not looked at").unwrap();
    let shelf = model::session::finder::sessions_in(&dir).unwrap();
    assert_eq!(shelf.cards.len(), 3);
    assert_eq!(shelf.unreadable.len(), 1, "{:?}", shelf.unreadable);
    assert!(shelf.unreadable[0].0.ends_with("shopping-list.ron"));

    let found: Vec<_> = shelf.matching("cl-2026-118304").collect();
    assert_eq!(found.len(), 1);
    assert_eq!(found[0].purpose, "Claim");
    assert_eq!(found[0].person, "Maren Oduya (invented)");
    assert!(found[0].bottom_line.starts_with("Settlement payment $"));

    let found: Vec<_> = shelf.matching("castell T-26").collect();
    assert_eq!(found.len(), 1);
    assert_eq!(found[0].number, "T-26-0412");
    assert_eq!(
        found[0].vehicle,
        "2022 Quellmark Tessel Ambrel, 41,000 mi, used"
    );
    assert!(found[0].bottom_line.starts_with("ACV offer $"));

    let trade = model::session::read_session(&dir.join("dealer-trade-in.ron")).unwrap();
    let vin = trade.request.subject.vin.clone().unwrap();
    assert_eq!(shelf.matching(&vin.to_lowercase()).count(), 1);
    assert_eq!(shelf.matching("").count(), 3);
    assert_eq!(shelf.matching("no such case").count(), 0);
    std::fs::remove_dir_all(&dir).ok();
}
