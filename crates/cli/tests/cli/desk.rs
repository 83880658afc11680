//! The two desks on the command line: case details and the date of loss, the appraiser's own
//! lines with a basis in their own words, the customer's copy of a trade-in report, and words
//! instead of codes.

use crate::common::{comptrail, repo, succeeded};

const SUBJECT: &str =
    "year=2022,make=Quellmark,model=Tessel,variant=Ambrel,miles=41000,condition=used";

fn json(args: &[&str]) -> serde_json::Value {
    let out = succeeded(args);
    serde_json::from_slice(&out.stdout).expect("JSON")
}

/// The error output of appraising the demo subject on the demo market with `extra`, which must
/// fail.
fn refused(extra: &[&str]) -> String {
    let market = repo("assets/demo-market.csv");
    let args = [&["appraise", &market, "--subject", SUBJECT][..], extra].concat();
    let out = comptrail(&args);
    assert_ne!(out.status.code(), Some(0), "{args:?} should fail");
    String::from_utf8_lossy(&out.stderr).into_owned()
}

#[test]
fn the_date_of_loss_is_the_appraisal_date_and_the_case_is_carried() {
    let market = repo("assets/demo-market.csv");
    let claim = [
        "appraise",
        &market,
        "--subject",
        SUBJECT,
        "--date-of-loss",
        "2026-10-20",
        "--claim-number",
        "CL-55-0101",
        "--insured",
        "Ilka Sorrow (invented)",
        "--loss-type",
        "Hail",
    ];
    let doc = json(&[&claim[..], &["--json"]].concat());
    assert_eq!(doc["as_of"], "2026-10-20");
    assert_eq!(doc["case"]["claim_number"], "CL-55-0101");
    assert_eq!(doc["case"]["date_of_loss"], "2026-10-20");
    assert_eq!(doc["case"]["loss_type"], "hail");
    // Every comparable was on the market on the date of loss.
    for c in doc["comparables"].as_array().unwrap() {
        let listed = c["listing"]["listed_on"].as_str().unwrap();
        assert!(listed <= "2026-10-20", "{listed}");
        assert!(c["days_listed"].as_i64().unwrap() >= 0);
    }
    // The text output names the case and says why later listings were left out, in words.
    let out = succeeded(&claim);
    let shown = String::from_utf8_lossy(&out.stdout);
    assert!(shown.contains("Claim number CL-55-0101"), "{shown}");
    assert!(shown.contains("listed after the appraisal date"), "{shown}");
    assert!(!shown.contains("listed_after_appraisal_date"), "{shown}");
    assert!(!shown.contains("model_year_outside_window"), "{shown}");
}

#[test]
fn a_date_of_loss_that_disagrees_with_the_appraisal_date_is_refused() {
    let out = comptrail(&[
        "appraise",
        &repo("assets/demo-market.csv"),
        "--subject",
        SUBJECT,
        "--date-of-loss",
        "2026-10-20",
        "--as-of",
        "2026-11-30",
    ]);
    assert_eq!(out.status.code(), Some(1));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        err.contains("--date-of-loss 2026-10-20 and --as-of 2026-11-30 disagree"),
        "{err}"
    );
    // The same date given twice is fine.
    succeeded(&[
        "appraise",
        &repo("assets/demo-market.csv"),
        "--subject",
        SUBJECT,
        "--date-of-loss",
        "2026-11-30",
        "--as-of",
        "2026-11-30",
    ]);
    let err = refused(&["--loss-type", "meteor"]);
    assert!(err.contains("\"meteor\" is not a type of loss"), "{err}");
}

#[test]
fn an_adjustment_on_one_line_keeps_a_basis_with_colons() {
    let market = repo("assets/demo-market.csv");
    let plain = json(&["appraise", &market, "--subject", SUBJECT, "--json"]);
    let line = plain["comparables"][1]["listing"]["line"].as_u64().unwrap();
    let spec = format!("condition@{line}:-400:seat torn: driver side, 3 in");
    let doc = json(&[
        "appraise",
        &market,
        "--subject",
        SUBJECT,
        "--adjust",
        &spec,
        "--json",
    ]);
    let mut found = 0;
    for c in doc["comparables"].as_array().unwrap() {
        let mine: Vec<&serde_json::Value> = c["adjustments"]
            .as_array()
            .unwrap()
            .iter()
            .filter(|a| a["kind"] == "condition")
            .collect();
        if c["listing"]["line"].as_u64() == Some(line) {
            assert_eq!(mine.len(), 1, "{c}");
            assert_eq!(mine[0]["amount"], -400.0);
            assert!(
                mine[0]["basis"]
                    .as_str()
                    .unwrap()
                    .starts_with("seat torn: driver side, 3 in"),
                "{c}"
            );
            found += 1;
        } else {
            assert!(mine.is_empty(), "only line {line} carries it: {c}");
        }
    }
    assert_eq!(found, 1);
    // Without @LINE it applies to every comparable.
    let doc = json(&[
        "appraise",
        &market,
        "--subject",
        SUBJECT,
        "--adjust",
        "options:250:heated seats: front only",
        "--json",
    ]);
    for c in doc["comparables"].as_array().unwrap() {
        assert!(
            c["adjustments"]
                .as_array()
                .unwrap()
                .iter()
                .any(|a| a["kind"] == "options"
                    && a["basis"]
                        .as_str()
                        .unwrap()
                        .starts_with("heated seats: front only")),
            "{c}"
        );
    }
    // A kind it does not know is named with the kinds it does.
    let err = refused(&["--adjust", "paint:100:new paint"]);
    assert!(err.contains("paint") && err.contains("condition"), "{err}");
}

#[test]
fn the_customers_copy_of_a_trade_in_report_leaves_out_the_dealers_margin() {
    let dir = std::env::temp_dir().join(format!("comptrail-cli-customer-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    let session = repo("sample-sessions/dealer-trade-in.ron");
    let full = dir.join("full.html");
    let customer = dir.join("customer.html");
    let customer_pdf = dir.join("customer.pdf");
    succeeded(&["report", &session, "--html", full.to_str().unwrap()]);
    succeeded(&[
        "report",
        &session,
        "--customer",
        "--html",
        customer.to_str().unwrap(),
        "--pdf",
        customer_pdf.to_str().unwrap(),
    ]);
    let full = std::fs::read_to_string(full).unwrap();
    let customer = std::fs::read_to_string(customer).unwrap();
    assert!(std::fs::read(customer_pdf).unwrap().starts_with(b"%PDF-"));
    for html in [&full, &customer] {
        assert!(html.contains("ACV offer"));
        assert!(html.contains("T-26-0412"), "the stock number is printed");
    }
    for internal in ["less pack", "less target front gross", "less holding"] {
        assert!(full.contains(internal), "{internal}");
        assert!(
            !customer.contains(internal),
            "{internal} reached the customer"
        );
    }
    assert!(customer.contains("Your trade-in"));
    assert!(customer.contains(model::worksheet::rows::CUSTOMER_OFFER_NOTE));
    std::fs::remove_dir_all(&dir).ok();
}

#[test]
fn market_conditions_are_a_term_a_grid_line_and_an_index_and_can_be_switched_off() {
    let market = repo("assets/demo-market.csv");
    let doc = json(&["appraise", &market, "--subject", SUBJECT, "--json"]);
    let fit = &doc["fit"];
    assert_eq!(fit["market_time"]["status"], "in_fit");
    assert!(
        fit["terms"]
            .as_array()
            .unwrap()
            .iter()
            .any(|t| t["name"] == "months_before_as_of")
    );
    assert!(fit["market_drift"]["per_month_before"].is_f64());
    assert!(fit["market_index"]["months"].as_array().unwrap().len() >= 3);
    for c in doc["comparables"].as_array().unwrap() {
        assert!(
            c["adjustments"]
                .as_array()
                .unwrap()
                .iter()
                .any(|a| a["kind"] == "market_conditions"),
            "{c}"
        );
    }
    let off = json(&[
        "appraise",
        &market,
        "--subject",
        SUBJECT,
        "--no-market-time",
        "--json",
    ]);
    assert_eq!(off["fit"]["market_time"]["status"], "not_in_fit");
    assert_eq!(
        off["fit"]["market_time"]["reason"],
        "switched off in the fit settings"
    );
    assert!(off["fit"]["market_drift"].is_null());
    assert!(off["fit"]["market_index"].is_null());
    // The depreciation view prints the market's level by month.
    let out = succeeded(&[
        "depreciation",
        &market,
        "--make",
        "Quellmark",
        "--model",
        "Tessel",
    ]);
    let shown = String::from_utf8_lossy(&out.stdout);
    assert!(shown.contains("The market's level by month"), "{shown}");
    assert!(shown.contains("(the base;"), "{shown}");
}

#[test]
fn a_fading_premium_is_tested_named_and_can_be_switched_off() {
    // The demo's top variant's premium fades (invented data).
    let doc = json(&["fit", "--make", "Quellmark", "--model", "Tessel", "--json"]);
    let fit = &doc["fit"];
    assert_eq!(fit["variant_slopes"], true);
    assert!(fit["premium_fade_test"]["p_value"].as_f64().unwrap() < 0.05);
    assert_eq!(fit["premium_fade_test"]["df1"], 2);
    assert!(
        fit["terms"]
            .as_array()
            .unwrap()
            .iter()
            .any(|t| t["name"] == "variant=Tolvane:age_years")
    );
    let words = fit["premiums"].as_array().unwrap();
    assert!(
        words.iter().any(|w| w
            .as_str()
            .unwrap()
            .starts_with("Tolvane's premium over Veskel falls")),
        "{words:?}"
    );
    let never = json(&[
        "fit",
        "--make",
        "Quellmark",
        "--model",
        "Tessel",
        "--variant-slopes",
        "never",
        "--json",
    ]);
    assert_eq!(never["fit"]["variant_slopes"], false);
    assert!(never["fit"]["premium_fade_test"].is_null());
    assert!(
        !never["fit"]["terms"]
            .as_array()
            .unwrap()
            .iter()
            .any(|t| t["name"].as_str().unwrap().ends_with(":age_years"))
    );
}

#[test]
fn options_are_counted_priced_and_lined_and_can_be_left_out() {
    let market = repo("assets/demo-market.csv");
    let subject = format!("{SUBJECT},options=Driver Assist;sunroof");
    let doc = json(&["appraise", &market, "--subject", &subject, "--json"]);
    let found = doc["import"]["options_found"].as_array().unwrap();
    assert_eq!(found.len(), 5, "{found:?}");
    assert!(
        doc["fit"]["terms"]
            .as_array()
            .unwrap()
            .iter()
            .any(|t| t["name"] == "option=driver assist")
    );
    assert!(doc["comparables"].as_array().unwrap().iter().any(|c| {
        c["adjustments"]
            .as_array()
            .unwrap()
            .iter()
            .any(|a| a["kind"] == "equipment")
    }));
    let off = json(&[
        "appraise",
        &market,
        "--subject",
        &subject,
        "--no-equipment",
        "--json",
    ]);
    assert!(
        !off["fit"]["terms"]
            .as_array()
            .unwrap()
            .iter()
            .any(|t| t["name"].as_str().unwrap().starts_with("option="))
    );
    let out = succeeded(&["appraise", &market, "--subject", &subject]);
    let shown = String::from_utf8_lossy(&out.stdout);
    assert!(shown.contains("options stated: "), "{shown}");
    assert!(shown.contains("equipment: fitted option"), "{shown}");
}

#[test]
fn a_batch_values_each_subject_as_appraise_does_and_names_the_rows_it_cannot() {
    let dir = std::env::temp_dir().join(format!("comptrail-cli-batch-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    let subjects = dir.join("subjects.csv");
    // The market's header spellings (Year, Trim, Odometer), an options cell with its separator,
    // and three rows that cannot be valued.
    std::fs::write(
        &subjects,
        "id,Year,Make,Model,Trim,Odometer,Condition,Options\n\
         T-1,2022,Quellmark,Tessel,Ambrel,41000,used,sunroof;tow package\n\
         T-2,2019,quellmark,TESSEL,Tolvane,70500,certified,\n\
         T-3,19x5,Quellmark,Tessel,Ambrel,40000,used,\n\
         T-4,2021,Nobody,Nothing,,40000,used,\n\
         ,2021,Quellmark,Tessel,Ambrel,40000,used,\n",
    )
    .unwrap();
    let market = repo("assets/demo-market.csv");
    let out = dir.join("values.csv");
    let sessions = dir.join("sessions");
    succeeded(&[
        "batch",
        &market,
        "--subjects",
        subjects.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
        "--sessions",
        sessions.to_str().unwrap(),
    ]);
    let values = std::fs::read_to_string(&out).unwrap();
    let lines: Vec<&str> = values.lines().collect();
    assert_eq!(lines[0], model::batch::CSV_HEADER);
    assert_eq!(lines.len(), 6, "{values}");
    // The first subject's value is the one `appraise` gives it, to the cent.
    let one = json(&[
        "appraise",
        &market,
        "--subject",
        "year=2022,make=Quellmark,model=Tessel,variant=Ambrel,miles=41000,condition=used,options=sunroof;tow package",
        "--json",
    ]);
    let value = one["indicated_value"].as_f64().unwrap();
    assert!(
        lines[1].contains(&format!(",{value:.2},")),
        "{} vs {value}",
        lines[1]
    );
    assert!(
        lines[2].starts_with("T-2,3,\"2019 quellmark TESSEL Tolvane"),
        "{}",
        lines[2]
    );
    assert!(lines[3].contains("is not a number"), "{}", lines[3]);
    assert!(
        lines[4].contains("the market has no Nobody Nothing"),
        "{}",
        lines[4]
    );
    assert!(lines[5].ends_with("no id"), "{}", lines[5]);
    // One session per valued subject, each reproducing.
    for id in ["T-1", "T-2"] {
        let session = model::session::read_session(&sessions.join(format!("{id}.ron"))).unwrap();
        assert!(model::session::reproduce(&session).unwrap().reproduces());
    }
    assert_eq!(std::fs::read_dir(&sessions).unwrap().count(), 2);
    // JSON, and the options of one appraisal refused.
    let doc = json(&[
        "batch",
        &market,
        "--subjects",
        subjects.to_str().unwrap(),
        "--json",
    ]);
    assert_eq!(doc["subjects"], 5);
    assert_eq!(doc["valued"], 2);
    assert!(
        doc["values"][3]["error"]
            .as_str()
            .unwrap()
            .contains("Nobody")
    );
    let refused = comptrail(&[
        "batch",
        &market,
        "--subjects",
        subjects.to_str().unwrap(),
        "--claim-number",
        "CL-1",
    ]);
    assert_eq!(refused.status.code(), Some(1));
    std::fs::remove_dir_all(&dir).ok();
}

#[test]
fn a_batch_row_with_a_worksheet_gets_its_offer_or_settlement_as_appraise_gives_it() {
    let dir = std::env::temp_dir().join(format!("comptrail-cli-batch-ws-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(dir.join("sheets")).unwrap();
    let trade_in = repo("sample-sessions/worksheets/dealer-trade-in.ron");
    let claim = repo("sample-sessions/worksheets/total-loss-claim.ron");
    std::fs::copy(&trade_in, dir.join("sheets/trade.ron")).unwrap();
    std::fs::copy(&claim, dir.join("sheets/claim.ron")).unwrap();
    std::fs::write(dir.join("sheets/broken.ron"), "(retail_value: ").unwrap();
    let subjects = dir.join("subjects.csv");
    // Worksheet paths are from the subjects file's folder.
    std::fs::write(
        &subjects,
        "id,year,make,model,variant,miles,condition,worksheet\n\
         D-1,2022,Quellmark,Tessel,Ambrel,41000,used,sheets/trade.ron\n\
         C-1,2021,Quellmark,Brindle,Durnow,52300,used,sheets/claim.ron\n\
         V-1,2022,Quellmark,Tessel,Ambrel,41000,used,\n\
         X-1,2022,Quellmark,Tessel,Ambrel,41000,used,sheets/broken.ron\n\
         X-2,2022,Quellmark,Tessel,Ambrel,41000,used,sheets/nowhere.ron\n",
    )
    .unwrap();
    let market = repo("assets/demo-market.csv");
    let sessions = dir.join("sessions");
    let doc = json(&[
        "batch",
        &market,
        "--as-of",
        "2026-11-30",
        "--subjects",
        subjects.to_str().unwrap(),
        "--sessions",
        sessions.to_str().unwrap(),
        "--json",
    ]);
    let values = doc["values"].as_array().unwrap();
    let one = |subject: &str, purpose: &str, file: &str| {
        json(&[
            "appraise",
            &market,
            "--as-of",
            "2026-11-30",
            "--subject",
            subject,
            purpose,
            file,
            "--json",
        ])
    };
    let dealer = one(
        "year=2022,make=Quellmark,model=Tessel,variant=Ambrel,miles=41000,condition=used",
        "--trade-in",
        &trade_in,
    );
    let offer = dealer["worksheet"]["trade_in"]["offer"]["offer"]
        .as_f64()
        .or_else(|| dealer["worksheet"]["trade_in"]["offer"].as_f64());
    assert_eq!(values[0]["purpose"], "Trade-in offer");
    assert!(offer.is_some(), "{}", dealer["worksheet"]);
    assert_eq!(values[0]["bottom_line"].as_f64(), offer);
    let adjuster = one(
        "year=2021,make=Quellmark,model=Brindle,variant=Durnow,miles=52300,condition=used",
        "--claim",
        &claim,
    );
    assert_eq!(values[1]["purpose"], "Total-loss claim");
    assert_eq!(
        values[1]["indicated_value"].as_f64(),
        adjuster["indicated_value"].as_f64(),
        "the profile's comparable rules apply in a batch too"
    );
    assert!(values[1]["bottom_line"].as_f64().is_some());
    assert_eq!(
        values[1]["bottom_line"].as_f64(),
        adjuster["worksheet"]["claim"]["settlement"]["payment"].as_f64(),
        "{}",
        adjuster["worksheet"]["claim"]["settlement"]
    );
    assert_eq!(
        values[1]["total_loss"].as_bool(),
        adjuster["worksheet"]["claim"]["verdict"]["total_loss"].as_bool()
    );
    assert_eq!(values[2]["purpose"], "Market value");
    assert!(values[2]["bottom_line"].is_null());
    for (row, why) in [(3, "trade-in worksheet"), (4, "cannot read")] {
        let error = values[row]["error"].as_str().unwrap();
        assert!(error.contains(why), "{error}");
        assert!(values[row]["indicated_value"].is_null());
    }
    // The claim's session is a claim and reproduces.
    let session = model::session::read_session(&sessions.join("C-1.ron")).unwrap();
    assert!(matches!(
        session.purpose,
        model::session::Purpose::Claim { .. }
    ));
    assert!(model::session::reproduce(&session).unwrap().reproduces());
    std::fs::remove_dir_all(&dir).ok();
}

#[test]
fn the_batch_progress_line_counts_and_estimates_what_is_left() {
    use std::time::Duration;
    assert_eq!(
        cli::progress_line(2_500, 10_000, Duration::from_secs(1)),
        "appraised 2,500 of 10,000 (25 %), about 3 s left    "
    );
    assert_eq!(
        cli::progress_line(10_000, 10_000, Duration::from_secs(4)),
        "appraised 10,000 of 10,000 (100 %)    "
    );
    assert_eq!(
        cli::progress_line(0, 0, Duration::ZERO),
        "appraised 0 of 0 (0 %)    "
    );
}
