//! The report: the PDF opens and its text carries the value, the comparables and the cautions;
//! the HTML page is self-contained and says the same.

use acceptance::repo_path;
use model::format::money;
use model::session::read_session;

fn sample(name: &str) -> (model::session::Session, report::Report) {
    let path = repo_path(&format!("sample-sessions/{name}.ron"));
    let session = read_session(&path).unwrap();
    let identity = report::Identity {
        session_file: format!("{name}.ron"),
        session_hash: model::market::content_hash(&std::fs::read(&path).unwrap()),
        reproduction: "recomputed from the saved evidence: every number matches to the cent".into(),
    };
    let doc = report::Report::from_session(&session, &identity);
    (session, doc)
}

fn pdf_text(bytes: &[u8]) -> String {
    let doc = lopdf::Document::load_mem(bytes).unwrap();
    let pages: Vec<u32> = doc.get_pages().keys().copied().collect();
    assert!(!pages.is_empty());
    doc.extract_text(&pages).unwrap()
}

#[test]
fn the_pdf_opens_and_carries_the_value_the_comparables_and_the_cautions() {
    for name in ["dealer-trade-in", "total-loss-claim"] {
        let (session, doc) = sample(name);
        let bytes = report::pdf::render(&doc);
        assert!(bytes.starts_with(b"%PDF-"));
        let text = pdf_text(&bytes);
        assert!(
            text.contains(&money(session.result.indicated_value)),
            "{name}"
        );
        for c in &session.appraisal.comparables {
            let vin = c.listing.vin.as_deref().unwrap();
            assert!(text.contains(vin), "{name}: VIN {vin} missing");
        }
        for caution in model::cautions::CAUTIONS {
            // The PDF wraps lines; every caution's opening words are on its first line.
            let start: String = caution.split(' ').take(5).collect::<Vec<_>>().join(" ");
            assert!(text.contains(&start), "{name}: {start}");
        }
        let (label, amount) = session.result.bottom_line().unwrap();
        assert!(
            text.contains(&model::format::cents(amount)),
            "{name}: {label}"
        );
        assert!(text.contains(&session.market.source.content_hash), "{name}");
    }
}

#[test]
fn the_claim_report_names_the_profile_rules_and_the_total_loss_test() {
    let (session, doc) = sample("total-loss-claim");
    let text = pdf_text(&report::pdf::render(&doc));
    assert!(text.contains("Total-loss test"));
    assert!(text.contains("11 NYCRR 216.7"));
    assert!(text.contains("Settlement payment"));
    let html = report::html::render(&doc);
    assert!(html.contains("11 NYCRR 216.7"));
    assert!(html.contains(&model::format::cents(
        session.result.bottom_line().unwrap().1
    )));
}

#[test]
fn the_html_report_is_self_contained() {
    let (session, doc) = sample("dealer-trade-in");
    let html = report::html::render(&doc);
    assert!(html.starts_with("<!DOCTYPE html>"));
    // No scripts, no fetched resources: the only URL is the SVG namespace.
    assert!(!html.contains("<script"));
    assert!(!html.contains("src="));
    assert!(!html.contains("href="));
    assert_eq!(
        html.matches("http").count(),
        html.matches("xmlns=\"http://www.w3.org/2000/svg\"").count()
    );
    assert_eq!(html.matches("<figure>").count(), 2);
    assert!(html.contains(&money(session.result.indicated_value)));
    for caution in model::cautions::CAUTIONS {
        assert!(html.contains(&caution.replace('&', "&amp;")), "{caution}");
    }
}

#[test]
fn the_warnings_stand_in_a_box_beside_the_value_on_the_first_page() {
    let (mut session, _) = sample("dealer-trade-in");
    session.appraisal.warnings = vec![model::warnings::Warning::new(
        model::warnings::WarningCode::FewListings,
        "Only 16 listings for the 4 terms of the fit.",
    )];
    let identity = report::Identity {
        session_file: "x.ron".into(),
        session_hash: "xxh3:0".into(),
        reproduction: "checked".into(),
    };
    let doc = report::Report::from_session(&session, &identity);
    // Right after the headline figures, before anything else.
    assert!(matches!(doc.blocks[0], report::blocks::Block::Headline(_)));
    assert!(matches!(&doc.blocks[1], report::blocks::Block::Warnings(w) if w.len() == 1));
    let bytes = report::pdf::render(&doc);
    let pdf = lopdf::Document::load_mem(&bytes).unwrap();
    let first = *pdf.get_pages().keys().next().unwrap();
    let text = pdf.extract_text(&[first]).unwrap();
    assert!(
        text.contains("Warnings: what the market cannot support"),
        "{text}"
    );
    assert!(text.contains("Only 16 listings"), "{text}");
    let html = report::html::render(&doc);
    assert!(html.contains("class=\"warnings\"") && html.contains("Only 16 listings"));
    // Without warnings there is no box.
    session.appraisal.warnings.clear();
    let plain = report::Report::from_session(&session, &identity);
    assert!(
        !plain
            .blocks
            .iter()
            .any(|b| matches!(b, report::blocks::Block::Warnings(_)))
    );
}
