//! What the report says, built from a saved session.

use model::format::{cents, money, signed_money, thousands};
use model::reconcile::{BandSource, GROSS_PENALTY};
use model::session::{Purpose, Session, WorksheetOutcome};
use model::worksheet::{ClaimWorksheet, OfferSensitivity, TradeInOffer, rows};

use crate::blocks::{Block, Column, Report};
use crate::figure;

/// Where the report's session came from, for its identity block.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Identity {
    /// The session file's name.
    pub session_file: String,
    /// XXH3-64 of the session file's bytes.
    pub session_hash: String,
    /// What reopening the session found (`Reproduction::summary`).
    pub reproduction: String,
}

impl Identity {
    /// The identity of a session saved at `path` whose file holds `bytes` (`None` for a
    /// session not saved, or changed since: the report then says so), with what reopening it
    /// found.
    #[must_use]
    pub fn of(path: Option<&std::path::Path>, bytes: Option<&[u8]>, reproduction: String) -> Self {
        Self {
            session_file: path.map_or_else(
                || "(not saved)".to_owned(),
                |p| {
                    p.file_name().map_or_else(
                        || p.display().to_string(),
                        |n| n.to_string_lossy().into_owned(),
                    )
                },
            ),
            session_hash: bytes.map_or_else(
                || "(unsaved changes: save the session to give the report its identity)".into(),
                model::market::content_hash,
            ),
            reproduction,
        }
    }
}

fn pct(x: f64) -> String {
    format!("{x:.1} %")
}

/// Who a report is for.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Audience {
    /// The file's own copy: every line of the worksheet. A claim's report is always this (the
    /// claimant is owed the itemization).
    #[default]
    Full,
    /// The customer trading a vehicle in: the market evidence, the value and the offer, without
    /// the dealer's internal margin lines (pack, target front gross, holding cost) or the
    /// offer's sensitivity to them.
    Customer,
}

impl Report {
    /// The full report for `session`.
    #[must_use]
    pub fn from_session(session: &Session, identity: &Identity) -> Self {
        Self::for_audience(session, identity, Audience::Full)
    }

    /// The report for `session` as `audience` should read it (a customer report of anything
    /// but a trade-in is the full report).
    #[must_use]
    pub fn for_audience(session: &Session, identity: &Identity, audience: Audience) -> Self {
        let audience = match session.purpose {
            Purpose::TradeIn(_) => audience,
            _ => Audience::Full,
        };
        let subject = &session.request.subject;
        let mut blocks = Vec::new();
        headline(session, &mut blocks);
        if !session.appraisal.warnings.is_empty() {
            blocks.push(Block::Warnings(
                session
                    .appraisal
                    .warnings
                    .iter()
                    .map(|w| w.message.clone())
                    .collect(),
            ));
        }
        // The case's numbers after the warnings: a warning stands right beside the value.
        let case = case_facts(session);
        if !case.is_empty() {
            blocks.push(Block::Facts(case));
        }
        blocks.push(Block::Heading("The vehicle appraised".into()));
        blocks.push(Block::Facts(subject_facts(session)));
        blocks.push(Block::Heading("The market".into()));
        blocks.push(Block::Facts(market_facts(session)));
        blocks.push(Block::Chart(figure::price_by_year(session)));
        blocks.push(Block::Chart(figure::price_by_mileage(session)));
        comparables(session, &mut blocks);
        reconciliation(session, &mut blocks);
        match (&session.purpose, &session.result.worksheet) {
            (Purpose::TradeIn(inputs), Some(WorksheetOutcome::TradeIn { offer, sensitivity })) => {
                trade_in(inputs, offer, sensitivity, audience, &mut blocks);
                blocks.push(Block::Paragraph(session.segment_supply.map_or_else(
                    || "Days' supply: the market file has no sale dates.".to_owned(),
                    |s| s.describe(),
                )));
            }
            (Purpose::Claim { profile, .. }, Some(WorksheetOutcome::Claim(worked))) => {
                claim(session, profile, worked, &mut blocks);
            }
            _ => {}
        }
        method(session, &mut blocks);
        // The appraiser's notes are the file's, not the customer's.
        if audience == Audience::Full && !session.authorship.notes.trim().is_empty() {
            blocks.push(Block::Heading("Notes".into()));
            blocks.push(Block::Paragraph(session.authorship.notes.clone()));
        }
        blocks.push(Block::Heading("Cautions".into()));
        blocks.push(Block::Cautions(
            model::cautions::CAUTIONS
                .iter()
                .map(|c| (*c).to_owned())
                .collect(),
        ));
        blocks.push(Block::Heading("This report's identity".into()));
        blocks.push(Block::Facts(identity_facts(session, identity)));
        Report {
            title: match audience {
                Audience::Full => format!("{}: {}", session.purpose.title(), subject.describe()),
                Audience::Customer => format!("Your trade-in: {}", subject.describe()),
            },
            subtitle: format!(
                "Prepared by {} · value as of {} · {}",
                session.authorship.appraiser,
                session.appraisal.as_of,
                session.authorship.saved.format("%Y-%m-%d")
            ),
            footer: format!(
                "comptrail · {} · session {} · an estimate, not a certified appraisal",
                identity.session_file, identity.session_hash
            ),
            blocks,
        }
    }
}

/// Where the report's session and market came from, who made it and with what.
fn identity_facts(session: &Session, identity: &Identity) -> Vec<(String, String)> {
    vec![
        ("Session file".into(), identity.session_file.clone()),
        (
            "Session file hash (XXH3-64)".into(),
            identity.session_hash.clone(),
        ),
        ("Reopened".into(), identity.reproduction.clone()),
        (
            "Market file".into(),
            session.market.source.file_name.clone(),
        ),
        (
            "Market file hash (XXH3-64)".into(),
            session.market.source.content_hash.clone(),
        ),
        ("Appraiser".into(), session.authorship.appraiser.clone()),
        (
            "Saved".into(),
            session
                .authorship
                .saved
                .format("%Y-%m-%d %H:%M UTC")
                .to_string(),
        ),
        (
            "Program".into(),
            format!(
                "comptrail {} (session format {})",
                env!("CARGO_PKG_VERSION"),
                session.format_version
            ),
        ),
    ]
}

/// The case's filled-in numbers and names, for the top of the report.
fn case_facts(session: &Session) -> Vec<(String, String)> {
    session
        .case
        .filled(&session.purpose)
        .into_iter()
        .map(|f| (f.label.to_owned(), f.value))
        .collect()
}

fn headline(session: &Session, blocks: &mut Vec<Block>) {
    let r = &session.result;
    let band = &r.value_band;
    let mut items = vec![
        ("Indicated value".to_owned(), money(r.indicated_value)),
        (
            format!("Value band ({:.0} %)", 100.0 * band.level),
            format!("{} to {}", money(band.lower), money(band.upper)),
        ),
    ];
    if let Some((label, amount)) = r.bottom_line() {
        items.push((model::format::sentence_case(label), cents(amount)));
    }
    if let Some(WorksheetOutcome::Claim(c)) = &r.worksheet {
        items.push((
            "Total loss".into(),
            if c.verdict.total_loss { "yes" } else { "no" }.into(),
        ));
    }
    blocks.push(Block::Headline(items));
}

fn subject_facts(session: &Session) -> Vec<(String, String)> {
    let s = &session.request.subject;
    let mut facts = vec![
        ("Model year".into(), s.model_year.to_string()),
        ("Make and model".into(), format!("{} {}", s.make, s.model)),
        (
            "Variant".into(),
            s.variant.clone().unwrap_or_else(|| "(none)".into()),
        ),
        ("Odometer".into(), format!("{} mi", thousands(s.miles))),
        ("Sold as".into(), s.condition.to_string()),
    ];
    if let Some(vin) = &s.vin {
        let problems = model::vin::problems(vin, s.model_year);
        facts.push((
            "VIN".into(),
            if problems.is_empty() {
                format!(
                    "{vin} (checks: check digit and model year, {})",
                    model::vin::SOURCE
                )
            } else {
                format!(
                    "{vin}: DOES NOT CHECK, {} ({})",
                    model::vin::problems_text(&problems),
                    model::vin::SOURCE
                )
            },
        ));
    }
    if let Some(options) = &s.options {
        facts.push(("Options".into(), options.clone()));
    }
    facts
}

fn market_facts(session: &Session) -> Vec<(String, String)> {
    let m = &session.market;
    let f = &session.fit;
    let a = &session.appraisal;
    vec![
        (
            "Market file".into(),
            format!(
                "{} ({} rows)",
                m.source.file_name,
                thousands(m.source.rows_read as f64)
            ),
        ),
        (
            "Segment".into(),
            format!(
                "{}: {} listings, {} used in the fit after cleaning",
                m.segment,
                thousands(m.segment_rows as f64),
                thousands(f.rows_used as f64)
            ),
        ),
        ("Value as of".into(), a.as_of.to_string()),
        (
            "Fit".into(),
            format!(
                "log-price hedonic regression{}; R² {:.3}, residual SD {:.3} in ln price",
                if f.settings.robust {
                    ", Huber robust"
                } else {
                    ""
                },
                f.r_squared,
                f.residual_sd
            ),
        ),
        (
            "Age form".into(),
            f.age_form_choice.as_ref().map_or_else(
                || format!("{} (as set)", f.settings.age_form),
                |c| c.reason.clone(),
            ),
        ),
        (
            "Depreciation".into(),
            format!(
                "{} per year over the first {} years from age alone; {} with typical mileage",
                pct(f.annual_depreciation.age_only_pct),
                f.annual_depreciation.horizon_years,
                pct(f.annual_depreciation.with_typical_miles_pct)
            ),
        ),
        (
            "Market conditions".into(),
            f.market_time.as_ref().map_or_else(
                || "no term for the market's drift (a session before format 5)".to_owned(),
                |t| {
                    model::hedonic::market_time::summary(
                        t,
                        f.rates
                            .market_drift
                            .map(|d| (d.per_month_before, d.distinguishable)),
                    )
                },
            ),
        ),
        (
            "Variant premiums".into(),
            if f.premiums.is_empty() {
                "one premium per variant at every age".to_owned()
            } else {
                f.premiums.join("; ")
            },
        ),
        (
            "Model's own estimate".into(),
            format!(
                "{} (median); {:.0} % prediction interval {} to {}",
                money(a.model_estimate.median),
                100.0 * a.model_estimate.prediction_interval.level,
                money(a.model_estimate.prediction_interval.lower),
                money(a.model_estimate.prediction_interval.upper)
            ),
        ),
        (
            "Comparable search".into(),
            format!(
                "{} listings considered, {} passed the filters, {} used",
                thousands(a.candidates_considered as f64),
                thousands(a.candidates_passed as f64),
                a.comparables.len()
            ),
        ),
    ]
}

fn comparables(session: &Session, blocks: &mut Vec<Block>) {
    let a = &session.appraisal;
    blocks.push(Block::Heading("Comparables".into()));
    if a.comparables.is_empty() {
        blocks.push(Block::Paragraph(
            "No listing passed the filters: the value rests on the model's estimate alone.".into(),
        ));
        return;
    }
    blocks.push(Block::Paragraph(
        "Each comparable as listed, with its source, and its price adjusted to the subject. The numbers match the charts.".into(),
    ));
    let rows = a
        .comparables
        .iter()
        .enumerate()
        .map(|(i, c)| {
            let l = &c.listing;
            let vin = model::vin::listing_problems(l);
            vec![
                format!("{}", i + 1),
                format!(
                    "{} {} {} {}, {} mi, sold as {}",
                    l.model_year,
                    l.make,
                    l.model,
                    model::vocabulary::variant_text(l.variant.as_deref()),
                    thousands(l.miles),
                    l.condition
                ),
                format!(
                    "{} (market line {}{}){}",
                    l.source(),
                    l.line,
                    c.days_listed
                        .map(|d| format!(", {d} days listed"))
                        .unwrap_or_default(),
                    if vin.is_empty() {
                        String::new()
                    } else {
                        format!(
                            ". VIN DOES NOT CHECK: {} ({})",
                            model::vin::problems_text(&vin),
                            model::vin::SOURCE
                        )
                    }
                ),
                money(l.asking_price),
                money(c.adjusted_price),
                format!("{:+.1} %", c.net_pct),
                format!("{:.1} %", c.gross_pct),
                format!("{:.1} %", 100.0 * c.weight),
            ]
        })
        .collect();
    blocks.push(Block::Table {
        columns: vec![
            Column::number("#", 0.3),
            Column::text("Vehicle", 2.2),
            Column::text("Source", 3.6),
            Column::number("Asking", 1.0),
            Column::number("Adjusted", 1.0),
            Column::number("Net", 0.7),
            Column::number("Gross", 0.7),
            Column::number("Weight", 0.8),
        ],
        rows,
    });
    adjustments(session, blocks);
}

fn adjustments(session: &Session, blocks: &mut Vec<Block>) {
    let a = &session.appraisal;
    blocks.push(Block::Heading("Adjustments, line by line".into()));
    let rows = a
        .comparables
        .iter()
        .enumerate()
        .flat_map(|(i, c)| {
            c.adjustments.iter().map(move |line| {
                vec![
                    format!("{}", i + 1),
                    line.kind.label().to_owned(),
                    signed_money(line.amount),
                    line.basis.clone(),
                ]
            })
        })
        .collect();
    blocks.push(Block::Table {
        columns: vec![
            Column::number("#", 0.3),
            Column::text("For", 1.1),
            Column::number("Amount", 1.0),
            Column::text("Basis", 7.0),
        ],
        rows,
    });
    let breaking: Vec<String> = a
        .comparables
        .iter()
        .enumerate()
        .filter(|(_, c)| !c.rule_breaks.is_empty())
        .map(|(i, c)| {
            format!(
                "Comparable {} was included by hand although it breaks the search filters: {}.",
                i + 1,
                c.rule_breaks
                    .iter()
                    .map(ToString::to_string)
                    .collect::<Vec<_>>()
                    .join("; ")
            )
        })
        .collect();
    if !breaking.is_empty() {
        blocks.push(Block::List(breaking));
    }
}

fn reconciliation(session: &Session, blocks: &mut Vec<Block>) {
    let r = &session.appraisal.reconciliation;
    blocks.push(Block::Heading("Reconciliation".into()));
    let band = match r.band_source {
        BandSource::Comparables => format!(
            "The band comes from the spread of the adjusted comparables ({:.3} in ln price, wider than the model's {:.3}).",
            r.comparables_sigma.unwrap_or(f64::NAN),
            r.model_sigma
        ),
        BandSource::Model => format!(
            "The band comes from the model's prediction interval ({:.3} in ln price), which is wider than the comparables' spread.",
            r.model_sigma
        ),
        BandSource::ModelOnly => {
            "With no comparables, the value and band are the model's own estimate and prediction interval.".to_owned()
        }
    };
    blocks.push(Block::Paragraph(format!(
        "The indicated value {} is the weighted mean of the adjusted comparable prices. Each comparable's weight is its similarity to the subject (1 − Gower distance) divided by (1 + {GROSS_PENALTY} × its gross adjustment as a fraction of its price), so comparables that needed less adjustment and are more alike count more; the weights add to 100 % and are shown in the table above. The weights amount to {:.1} equally weighted comparables. {band} The indicated value is {:+.1} % from the model's own estimate.",
        money(r.indicated_value),
        r.effective_count,
        r.model_gap_pct
    )));
}

fn trade_in(
    inputs: &model::worksheet::TradeInInputs,
    offer: &TradeInOffer,
    sensitivity: &OfferSensitivity,
    audience: Audience,
    blocks: &mut Vec<Block>,
) {
    blocks.push(Block::Heading("Trade-in offer".into()));
    let mut worked = rows::trade_in_rows(inputs, offer);
    if audience == Audience::Customer {
        worked.retain(|r| !r.internal);
        worksheet_table(&worked, blocks);
        blocks.push(Block::Paragraph(rows::CUSTOMER_OFFER_NOTE.into()));
        return;
    }
    worksheet_table(&worked, blocks);
    blocks.push(Block::Paragraph(format!(
        "Holding cost: {}. The offer at other days to sell and across the value band:",
        rows::holding_text(inputs)
    )));
    let mut rows: Vec<Vec<String>> = sensitivity
        .by_days
        .iter()
        .map(|(d, o)| vec![format!("{d:.0} days to sell"), money(*o)])
        .collect();
    for ((v, o), name) in sensitivity
        .by_value
        .iter()
        .zip(["band low", "indicated", "band high"])
    {
        rows.push(vec![format!("retail {} ({name})", money(*v)), money(*o)]);
    }
    blocks.push(Block::Table {
        columns: vec![Column::text("If", 5.0), Column::number("Offer", 1.2)],
        rows,
    });
}

/// A worked worksheet's rows as a two-column table, the amounts included in the one above
/// indented beneath it.
fn worksheet_table(worked: &[rows::Row], blocks: &mut Vec<Block>) {
    let rows = worked
        .iter()
        .map(|r| {
            let label = if r.kind == rows::RowKind::Included {
                format!("   {}", r.label)
            } else {
                r.label.clone()
            };
            vec![label, r.amount_text()]
        })
        .collect();
    blocks.push(Block::Table {
        columns: vec![Column::text("", 5.0), Column::number("Amount", 1.2)],
        rows,
    });
}

fn claim(
    session: &Session,
    profile: &model::worksheet::JurisdictionProfile,
    worked: &ClaimWorksheet,
    blocks: &mut Vec<Block>,
) {
    blocks.push(Block::Heading(format!(
        "Total-loss settlement under the {} profile",
        profile.name
    )));
    worksheet_table(&rows::claim_rows(worked), blocks);
    let not_paid = rows::not_paid_lines(worked);
    if !not_paid.is_empty() {
        blocks.push(Block::List(not_paid));
    }
    blocks.push(Block::Heading("Total-loss test".into()));
    blocks.push(Block::Paragraph(format!(
        "{}. {}. Rule: {}.",
        rows::verdict_heading(worked),
        worked.verdict.explanation,
        worked.total_loss_citation
    )));
    blocks.push(Block::Heading("Comparables against the profile".into()));
    blocks.push(Block::Paragraph(worked.check.summary()));
    let breaks = rows::rule_break_lines(&worked.check);
    if !breaks.is_empty() {
        blocks.push(Block::List(breaks));
    }
    profile_rules(session, profile, blocks);
}

fn profile_rules(
    session: &Session,
    profile: &model::worksheet::JurisdictionProfile,
    blocks: &mut Vec<Block>,
) {
    blocks.push(Block::Heading(rows::PROFILE_RULES_HEADING.into()));
    let rows = profile
        .rule_rows()
        .into_iter()
        .map(|r| vec![r.rule.to_owned(), r.value, r.source])
        .collect();
    blocks.push(Block::Table {
        columns: vec![
            Column::text("Rule", 1.3),
            Column::text("Value", 1.8),
            Column::text("Source", 4.5),
        ],
        rows,
    });
    blocks.push(Block::Paragraph(format!(
        "Profile reviewed {}. The policy and the jurisdiction's current rules govern; check them before relying on this settlement. Appraiser: {}.",
        profile.reviewed, session.authorship.appraiser
    )));
}

fn method(session: &Session, blocks: &mut Vec<Block>) {
    let level = 100.0 * session.request.level;
    blocks.push(Block::Heading("How the value was reached".into()));
    blocks.push(Block::Paragraph(format!(
        "The market file's listings of the same make and model were cleaned (duplicates, old model years still listed as new, robust outliers and implausibly cheap listings set aside, each with its reason) and a hedonic regression was fitted: the logarithm of asking price against age, mileage, variant and condition class. The fit gives the rate at which price falls with each, and the model's own estimate for the subject with a {level:.0} % prediction interval."
    )));
    blocks.push(Block::Paragraph(
        "Comparables are listings of the same make and model that pass the filters (model-year window, mileage rule, listing age, distance), ranked by Gower similarity to the subject. Each is adjusted to the subject line by line, as in a sales-comparison grid: a fitted effect b for a difference d changes the price P by P × (exp(b × d) − 1); a comparable better than the subject takes a minus adjustment. The appraiser's own lines carry their stated basis.".into(),
    ));
    blocks.push(Block::Paragraph(
        "Asking prices are not sale prices: the value is a market asking value unless the worksheet says otherwise.".into(),
    ));
}
