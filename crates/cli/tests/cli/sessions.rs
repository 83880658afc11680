//! Session files from the command line: save, re-run, report, and a save killed midway.

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

use crate::common::{comptrail, repo, succeeded};

fn scratch(name: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("comptrail-cli-{name}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    dir
}

fn text(out: &Output) -> String {
    String::from_utf8_lossy(&out.stdout).into_owned()
}

#[test]
fn a_saved_trade_in_reopens_to_the_same_numbers_and_prints_a_report() {
    let dir = scratch("trade-in");
    let session = dir.join("case.ron");
    let out = succeeded(&[
        "appraise",
        &repo("assets/demo-market.csv"),
        "--subject",
        "year=2022,make=Quellmark,model=Tessel,variant=Ambrel,miles=41000,condition=used",
        "--as-of",
        "2026-11-30",
        "--trade-in",
        &repo("sample-sessions/worksheets/dealer-trade-in.ron"),
        "--appraiser",
        "Test Manager (invented)",
        "--save-session",
        session.to_str().unwrap(),
    ]);
    let shown = text(&out);
    let offer_line = shown
        .lines()
        .find(|l| l.contains("ACV offer"))
        .unwrap()
        .to_owned();
    let out = comptrail(&["appraise", "--session", session.to_str().unwrap(), "--json"]);
    assert!(out.status.success());
    let doc: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(doc["reproduces"], true);
    assert_eq!(doc["market_file_status"]["status"], "unchanged");
    assert!(
        doc["warnings"].is_array(),
        "the saved warnings, an empty list when none"
    );
    let offer = doc["recomputed"]["bottom_line"][1].as_f64().unwrap();
    assert!(
        offer_line.contains(&model::format::cents(offer)),
        "{offer_line} vs {offer}"
    );

    let pdf = dir.join("case.pdf");
    let html = dir.join("case.html");
    succeeded(&[
        "report",
        session.to_str().unwrap(),
        "--pdf",
        pdf.to_str().unwrap(),
        "--html",
        html.to_str().unwrap(),
    ]);
    assert!(std::fs::read(&pdf).unwrap().starts_with(b"%PDF-"));
    assert!(
        std::fs::read_to_string(&html)
            .unwrap()
            .contains("ACV offer")
    );
}

#[test]
fn an_edited_session_exits_2_and_says_by_how_much_it_differs() {
    let dir = scratch("edited");
    let sample = std::fs::read_to_string(repo("sample-sessions/dealer-trade-in.ron")).unwrap();
    // Raise the first comparable's asking price by $1,000 by hand.
    let at = sample.find("asking_price: ").unwrap();
    let end = at + sample[at..].find(',').unwrap();
    let price: f64 = sample[at + "asking_price: ".len()..end].parse().unwrap();
    let edited = format!(
        "{}asking_price: {:.1}{}",
        &sample[..at],
        price + 1_000.0,
        &sample[end..]
    );
    let path = dir.join("edited.ron");
    std::fs::write(&path, edited).unwrap();
    let out = comptrail(&["appraise", "--session", path.to_str().unwrap()]);
    assert_eq!(
        out.status.code(),
        Some(2),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let shown = text(&out);
    assert!(shown.contains("DOES NOT REPRODUCE"), "{shown}");
    assert!(shown.contains("indicated value: saved"), "{shown}");
}

#[test]
fn a_moved_market_file_is_reported_and_the_evidence_still_reproduces() {
    let dir = scratch("moved");
    let market = dir.join("market.csv");
    std::fs::copy(repo("assets/demo-market.csv"), &market).unwrap();
    let session = dir.join("case.ron");
    succeeded(&[
        "appraise",
        market.to_str().unwrap(),
        "--subject",
        "year=2022,make=Quellmark,model=Tessel,variant=Ambrel,miles=41000,condition=used",
        "--as-of",
        "2026-11-30",
        "--save-session",
        session.to_str().unwrap(),
    ]);
    // Changed: one more listing appended.
    let mut bytes = std::fs::read(&market).unwrap();
    bytes.extend_from_slice(
        b"2022,Quellmark,Tessel,Ambrel,29990,40000,used,2026-11-28,,,,,,,clean,\n",
    );
    std::fs::write(&market, bytes).unwrap();
    let out = succeeded(&[
        "appraise",
        "--session",
        session.to_str().unwrap(),
        "--rerun",
    ]);
    let shown = text(&out);
    assert!(shown.contains("CHANGED"), "{shown}");
    assert!(shown.contains(model::session::REPRODUCTION_RULE), "{shown}");
    assert!(
        shown.contains("appraised again on the current market file"),
        "{shown}"
    );
    // Gone.
    std::fs::remove_file(&market).unwrap();
    let out = comptrail(&["appraise", "--session", session.to_str().unwrap()]);
    assert!(out.status.success());
    assert!(text(&out).contains("not found"), "{}", text(&out));
}

#[test]
fn a_damaged_or_newer_session_gives_one_clear_line() {
    let dir = scratch("damaged");
    let sample = std::fs::read_to_string(repo("sample-sessions/total-loss-claim.ron")).unwrap();
    let newer = dir.join("newer.ron");
    let current = format!(
        "format_version: {},",
        model::session::SESSION_FORMAT_VERSION
    );
    assert!(
        sample.contains(&current),
        "the sample is in the current format"
    );
    std::fs::write(&newer, sample.replacen(&current, "format_version: 9,", 1)).unwrap();
    let out = comptrail(&["appraise", "--session", newer.to_str().unwrap()]);
    assert_eq!(out.status.code(), Some(1));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        err.contains("newer comptrail") && err.contains('9'),
        "{err}"
    );
    assert_eq!(err.trim().lines().count(), 1, "{err}");

    let cut = dir.join("cut.ron");
    std::fs::write(&cut, &sample[..sample.len() / 3]).unwrap();
    let out = comptrail(&["appraise", "--session", cut.to_str().unwrap()]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("line ") && err.contains("cut short"), "{err}");
}

fn wait_for(path: &Path, child: &mut std::process::Child) -> bool {
    // Up to a minute: a debug build on a busy machine takes several seconds to get there.
    for _ in 0..300_000 {
        if path.exists() {
            return true;
        }
        if child.try_wait().unwrap().is_some() {
            return false;
        }
        std::thread::sleep(std::time::Duration::from_micros(200));
    }
    false
}

#[test]
fn a_save_killed_midway_leaves_the_old_session_intact() {
    let dir = scratch("killed");
    let session = dir.join("case.ron");
    let old = std::fs::read(repo("sample-sessions/dealer-trade-in.ron")).unwrap();
    let mut caught = 0;
    for _ in 0..5 {
        std::fs::write(&session, &old).unwrap();
        // A large session (every listing of a 60,000-row segment kept) takes long enough to
        // write that the kill lands while the temporary file is being filled.
        let mut child = Command::new(env!("CARGO_BIN_EXE_comptrail"))
            .args([
                "appraise",
                "--demo-rows",
                "120000",
                "--keep-segment",
                "--save-session",
                session.to_str().unwrap(),
            ])
            .stdout(std::process::Stdio::null())
            .stderr(std::process::Stdio::null())
            .spawn()
            .unwrap();
        let temporary = dir.join(format!(".case.ron.{}.tmp", child.id()));
        let seen = wait_for(&temporary, &mut child);
        let _ = child.kill();
        let _ = child.wait();
        let now = std::fs::read(&session).unwrap();
        // Killed while the temporary file was still there: the save was cut short.
        if seen && temporary.exists() {
            caught += 1;
            assert!(now == old, "the old session was damaged by a killed save");
            assert!(model::session::read_session(&session).is_ok());
        } else {
            // The save finished (renamed) before the kill landed: the new file must be whole.
            assert!(model::session::read_session(&session).is_ok());
        }
        let _ = std::fs::remove_file(&temporary);
        if caught >= 2 {
            break;
        }
    }
    eprintln!("caught {caught} saves in progress");
    assert!(caught >= 1, "never caught a save in progress");
}

#[test]
fn a_claim_in_json_has_the_documented_keys() {
    let out = succeeded(&[
        "appraise",
        &repo("assets/demo-market.csv"),
        "--subject",
        "year=2021,make=Quellmark,model=Brindle,variant=Durnow,miles=52300,condition=used",
        "--as-of",
        "2026-11-30",
        "--claim",
        &repo("sample-sessions/worksheets/total-loss-claim.ron"),
        "--json",
    ]);
    let doc: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let claim = &doc["worksheet"]["claim"];
    for key in [
        "acv",
        "itemized_in_acv",
        "settlement",
        "not_paid",
        "verdict",
        "total_loss_citation",
        "check",
    ] {
        assert!(!claim[key].is_null(), "worksheet.claim.{key} missing");
    }
    // The claim searched with the New York profile's mileage rule: no comparable is more than
    // the greater of 4,000 miles or 10 % above the insured vehicle (11 NYCRR 216.7).
    for c in doc["comparables"].as_array().unwrap() {
        assert!(c["listing"]["miles"].as_f64().unwrap() <= 52_300.0 + 5_230.0);
    }
    assert_eq!(claim["check"]["profile_id"], "ny");
    let payment = claim["settlement"]["payment"].as_f64().unwrap();
    assert_eq!(
        (payment * 100.0).round() / 100.0,
        payment,
        "paid to the cent"
    );
}

/// `text` with the characters HTML escapes escaped, as the report writes it.
fn as_html(text: &str) -> String {
    text.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
        .replace('"', "&quot;")
}

#[test]
fn the_command_line_and_the_report_word_a_worksheet_alike() {
    // One trade-in and one claim, appraised and saved on the command line; the worksheet's
    // rows are worded once (model::worksheet::rows) and both front ends print every one of
    // them, label and amount, as they are.
    let cases = [
        (
            "trade-in",
            "year=2022,make=Quellmark,model=Tessel,variant=Ambrel,miles=41000,condition=used",
            "--trade-in",
            "sample-sessions/worksheets/dealer-trade-in.ron",
        ),
        (
            "claim",
            "year=2021,make=Quellmark,model=Brindle,variant=Durnow,miles=52300,condition=used",
            "--claim",
            "sample-sessions/worksheets/total-loss-claim.ron",
        ),
    ];
    let dir = scratch("worded-alike");
    for (name, subject, flag, worksheet) in cases {
        let session = dir.join(format!("{name}.ron"));
        let html = dir.join(format!("{name}.html"));
        let out = succeeded(&[
            "appraise",
            &repo("assets/demo-market.csv"),
            "--subject",
            subject,
            "--as-of",
            "2026-11-30",
            flag,
            &repo(worksheet),
            "--save-session",
            session.to_str().unwrap(),
        ]);
        let shown = text(&out);
        succeeded(&[
            "report",
            session.to_str().unwrap(),
            "--html",
            html.to_str().unwrap(),
        ]);
        let page = std::fs::read_to_string(&html).unwrap();
        let saved = model::session::read_session(&session).unwrap();
        let rows = model::session::worksheet_rows(&saved.purpose, saved.result.worksheet.as_ref());
        assert!(rows.len() >= 3, "{name}: {rows:?}");
        for r in &rows {
            let line = shown
                .lines()
                .find(|l| l.contains(&r.label))
                .unwrap_or_else(|| panic!("{name}: \"{}\" not printed:\n{shown}", r.label));
            assert!(line.contains(&r.amount_text()), "{name}: {line} vs {r:?}");
            let cell = format!(
                "{}</td><td class=\"r\">{}</td>",
                as_html(&r.label),
                as_html(&r.amount_text())
            );
            assert!(page.contains(&cell), "{name}: report lacks {cell}");
        }
    }
}
