//! Session files from the command line: save an appraisal, re-run a saved one, print its
//! report, list the jurisdiction profiles.

use std::fmt::Write;
use std::path::{Path, PathBuf};

use anyhow::{Context, Result, anyhow, bail};
use chrono::{DateTime, Utc};
use model::appraisal::{AppraisalRequest, appraise, find_segment, fit_market};
use model::format::{money, signed_money};
use model::session::{
    Authorship, Capture, Difference, MarketFile, Outcome, Purpose, Session, find_market_file,
    read_session, reproduce, work_out, write_session,
};
use model::worksheet::{ClaimInputs, ProfileFile, TradeInInputs, shipped_profiles};
use serde::Serialize;

use crate::args::AppraiseArgs;
use crate::load::Loaded;

/// The shipped profiles, or the user's file.
pub fn load_profiles(path: Option<&Path>) -> Result<ProfileFile> {
    match path {
        None => Ok(shipped_profiles()?),
        Some(p) => {
            let text = std::fs::read_to_string(p)
                .with_context(|| format!("cannot read {}", p.display()))?;
            Ok(ProfileFile::parse(&text, &p.display().to_string())?)
        }
    }
}

fn read_ron<T: serde::de::DeserializeOwned>(path: &Path, what: &str) -> Result<T> {
    let text =
        std::fs::read_to_string(path).with_context(|| format!("cannot read {}", path.display()))?;
    parse_ron(&text, path, what)
}

/// RON text read from `path`, its errors naming the file, line and column.
fn parse_ron<T: serde::de::DeserializeOwned>(text: &str, path: &Path, what: &str) -> Result<T> {
    ron::from_str(text).map_err(|e| {
        anyhow!(
            "{what} {}:{}:{}: {}",
            path.display(),
            e.span.start.line,
            e.span.start.col,
            e.code
        )
    })
}

/// The purpose the arguments ask for; a claim also tightens the comparable rules to its
/// profile's.
pub fn purpose(args: &AppraiseArgs, request: &mut AppraisalRequest) -> Result<Purpose> {
    if let Some(path) = &args.trade_in {
        let inputs: TradeInInputs = read_ron(path, "trade-in worksheet")?;
        return Ok(Purpose::TradeIn(inputs));
    }
    if let Some(path) = &args.claim {
        let inputs: ClaimInputs = read_ron(path, "claim worksheet")?;
        let profiles = load_profiles(args.profiles.as_deref())?;
        let purpose = claim_purpose(path, inputs, &profiles)?;
        if let Purpose::Claim { profile, .. } = &purpose {
            request.rules = profile.comparable_rules(&request.rules);
        }
        return Ok(purpose);
    }
    Ok(Purpose::Value)
}

/// A claim worksheet's purpose with its profile, or an error naming the profiles there are.
fn claim_purpose(path: &Path, inputs: ClaimInputs, profiles: &ProfileFile) -> Result<Purpose> {
    let profile = profiles.get(&inputs.profile_id).cloned().ok_or_else(|| {
        anyhow!(
            "claim worksheet {}: no profile \"{}\"; the profiles are {}",
            path.display(),
            inputs.profile_id,
            profiles
                .profiles
                .iter()
                .map(|p| p.id.as_str())
                .collect::<Vec<_>>()
                .join(", ")
        )
    })?;
    Ok(Purpose::Claim { profile, inputs })
}

/// A worksheet file read as the purpose it states: a claim worksheet (it names its profile,
/// looked up in `profiles`) or else a trade-in worksheet. When it reads as neither, the error
/// is the claim's if the text names a profile, the trade-in's otherwise.
pub fn read_worksheet(path: &Path, profiles: &Result<ProfileFile>) -> Result<Purpose> {
    let text =
        std::fs::read_to_string(path).with_context(|| format!("cannot read {}", path.display()))?;
    match parse_ron::<ClaimInputs>(&text, path, "claim worksheet") {
        Ok(inputs) => {
            let profiles = profiles
                .as_ref()
                .map_err(|e| anyhow!("the jurisdiction profiles cannot be read: {e:#}"))?;
            claim_purpose(path, inputs, profiles)
        }
        Err(claim_error) => match parse_ron(&text, path, "trade-in worksheet") {
            Ok(inputs) => Ok(Purpose::TradeIn(inputs)),
            Err(_) if text.contains("profile_id") => Err(claim_error),
            Err(trade_in_error) => Err(trade_in_error),
        },
    }
}

fn now() -> DateTime<Utc> {
    DateTime::<Utc>::from(std::time::SystemTime::now())
}

/// Everything needed to save a session from the `appraise` command.
pub struct SaveInputs<'a> {
    pub loaded: &'a Loaded,
    pub fit: &'a model::appraisal::MarketFit,
    pub request: &'a AppraisalRequest,
    pub appraisal: &'a model::appraisal::Appraisal,
    pub purpose: &'a Purpose,
}

/// Saves the appraisal as a session file.
pub fn save(args: &AppraiseArgs, out: &Path, s: &SaveInputs<'_>) -> Result<Session> {
    let session = capture(args, s)?;
    write_session(out, &session)?;
    eprintln!("saved the session to {}", out.display());
    Ok(session)
}

/// The session of an appraisal made with `args`, not yet written.
pub fn capture(args: &AppraiseArgs, s: &SaveInputs<'_>) -> Result<Session> {
    let settings = crate::load::fit_settings(&args.market)?;
    let overrides = crate::load::overrides(&args.market);
    let at = now();
    let session = Session::capture(
        &Capture {
            market: &s.loaded.market,
            market_path: args.market.file.as_deref(),
            fit: s.fit,
            settings: &settings,
            overrides: &overrides,
            request: s.request,
            appraisal: s.appraisal,
            purpose: s.purpose,
            keep_segment: args.keep_segment,
            case: &crate::case_details(args),
        },
        Authorship {
            appraiser: args.appraiser.clone(),
            created: at,
            saved: at,
            notes: args.notes.clone(),
        },
    )?;
    Ok(session)
}

/// The market file as it is now against the one the session was made on.
#[derive(Debug, Serialize)]
#[serde(rename_all = "snake_case", tag = "status")]
pub enum MarketFileStatus {
    /// Same bytes.
    Unchanged { path: String },
    /// Different bytes.
    Changed { path: String, content_hash: String },
    /// Not where it was.
    Missing { path: Option<String> },
}

/// A bottom line in JSON.
#[derive(Debug, Serialize)]
pub struct Numbers {
    pub indicated_value: f64,
    pub value_band: model::ols::Interval,
    pub bottom_line: Option<(&'static str, model::money::Cents)>,
    pub total_loss: Option<bool>,
}

impl Numbers {
    fn of(o: &Outcome) -> Self {
        Self {
            indicated_value: o.indicated_value,
            value_band: o.value_band,
            bottom_line: o.bottom_line(),
            total_loss: match &o.worksheet {
                Some(model::session::WorksheetOutcome::Claim(c)) => Some(c.verdict.total_loss),
                _ => None,
            },
        }
    }
}

/// What `appraise --session` reports.
#[derive(Debug, Serialize)]
pub struct SessionCheck {
    /// The warnings saved with the appraisal (none in sessions before format 3).
    pub warnings: Vec<model::warnings::Warning>,
    pub session: String,
    pub format_version: u32,
    pub purpose: &'static str,
    pub appraiser: String,
    pub saved: DateTime<Utc>,
    pub subject: String,
    pub market_file: String,
    pub market_content_hash: String,
    pub market_file_status: MarketFileStatus,
    pub reproduces: bool,
    pub stored: Numbers,
    pub recomputed: Numbers,
    pub differences: Vec<Difference>,
    pub rerun_on_current_market: Option<Numbers>,
    pub cautions: Vec<&'static str>,
}

fn market_status(
    session: &Session,
    session_path: &Path,
    given: Option<&PathBuf>,
) -> MarketFileStatus {
    match find_market_file(session, session_path, given.map(PathBuf::as_path)) {
        MarketFile::Unchanged(p) => MarketFileStatus::Unchanged {
            path: p.display().to_string(),
        },
        MarketFile::Changed { path, content_hash } => MarketFileStatus::Changed {
            path: path.display().to_string(),
            content_hash,
        },
        MarketFile::Missing { looked_at } => MarketFileStatus::Missing {
            path: looked_at.map(|p| p.display().to_string()),
        },
    }
}

/// Appraises the saved request again on the market file as it is now, read with the same
/// import options (separator, odometer unit) the command line was given.
fn rerun(args: &AppraiseArgs, session: &Session, path: &str) -> Result<Outcome> {
    let market_args = crate::args::MarketArgs {
        file: Some(PathBuf::from(path)),
        ..args.market.clone()
    };
    let subject = &session.request.subject;
    let wanted = [(subject.make.clone(), subject.model.clone())];
    let loaded = crate::load::load_market(&market_args, &wanted)
        .with_context(|| format!("re-running on {path}"))?;
    let market = &loaded.market;
    let segment = find_segment(
        market,
        &session.request.subject.make,
        &session.request.subject.model,
    )?;
    let fit = fit_market(
        market,
        segment,
        &session.fit.settings,
        &session.fit.overrides,
    )?;
    let appraisal = appraise(market, &fit, &session.request)?;
    Ok(work_out(&session.purpose, &appraisal, &session.request)?)
}

/// `appraise --session`: recompute, compare, and say so. Returns whether it reproduced.
pub fn check(args: &AppraiseArgs, path: &Path) -> Result<bool> {
    let session = read_session(path)?;
    let on_disk = std::fs::read_to_string(path)
        .ok()
        .and_then(|t| model::session::format_version_of(&t))
        .unwrap_or(session.format_version);
    let reproduction = reproduce(&session).with_context(|| {
        format!(
            "{}: the saved evidence cannot be recomputed",
            path.display()
        )
    })?;
    let status = market_status(&session, path, args.market.file.as_ref());
    let rerun_numbers = if args.rerun {
        match &status {
            MarketFileStatus::Unchanged { path } | MarketFileStatus::Changed { path, .. } => {
                Some(Numbers::of(&rerun(args, &session, path)?))
            }
            MarketFileStatus::Missing { path } => bail!(
                "--rerun: the market file {} is not there; give its new place as FILE",
                path.as_deref().unwrap_or("(no path saved)")
            ),
        }
    } else {
        None
    };
    let doc = SessionCheck {
        warnings: session.appraisal.warnings.clone(),
        session: path.display().to_string(),
        format_version: on_disk,
        purpose: session.purpose.title(),
        appraiser: session.authorship.appraiser.clone(),
        saved: session.authorship.saved,
        subject: session.request.subject.describe(),
        market_file: session.market.source.file_name.clone(),
        market_content_hash: session.market.source.content_hash.clone(),
        market_file_status: status,
        reproduces: reproduction.reproduces(),
        stored: Numbers::of(&session.result),
        recomputed: Numbers::of(&reproduction.outcome),
        differences: reproduction.differences.clone(),
        rerun_on_current_market: rerun_numbers,
        cautions: model::cautions::CAUTIONS.to_vec(),
    };
    crate::print(args.market.json, &doc, || render_check(&doc))?;
    Ok(doc.reproduces)
}

fn bottom(n: &Numbers) -> String {
    let mut s = format!(
        "value {} (band {} to {})",
        money(n.indicated_value),
        money(n.value_band.lower),
        money(n.value_band.upper)
    );
    if let Some((label, amount)) = n.bottom_line {
        let _ = write!(s, ", {label} {}", money(amount));
    }
    if let Some(t) = n.total_loss {
        s.push_str(if t {
            ", total loss"
        } else {
            ", not a total loss"
        });
    }
    s
}

fn render_check(d: &SessionCheck) -> String {
    let mut out = format!(
        "{} (session format {}{}): {} for {}, by {} on {}\n",
        d.session,
        d.format_version,
        if d.format_version < model::session::SESSION_FORMAT_VERSION {
            format!(
                ", read as format {}; saving it again writes the new format",
                model::session::SESSION_FORMAT_VERSION
            )
        } else {
            String::new()
        },
        d.purpose,
        d.subject,
        if d.appraiser.is_empty() {
            "(no name)"
        } else {
            &d.appraiser
        },
        d.saved.format("%Y-%m-%d %H:%M UTC")
    );
    out.push_str(&crate::render::warnings(&d.warnings));
    let _ = writeln!(
        out,
        "market: {} (hash {}): {}",
        d.market_file,
        d.market_content_hash,
        match &d.market_file_status {
            MarketFileStatus::Unchanged { path } => format!("unchanged at {path}"),
            MarketFileStatus::Changed { path, content_hash } => format!(
                "CHANGED at {path} (hash now {content_hash}); the saved evidence still stands, --rerun appraises again on the new data"
            ),
            MarketFileStatus::Missing { path } => format!(
                "not found{}; the saved evidence is enough to reproduce the value",
                path.as_ref()
                    .map(|p| format!(" at {p}"))
                    .unwrap_or_default()
            ),
        }
    );
    if d.reproduces {
        let _ = writeln!(
            out,
            "reproduces from the saved evidence ({}): {}",
            model::session::REPRODUCTION_RULE,
            bottom(&d.recomputed)
        );
    } else {
        let _ = writeln!(
            out,
            "DOES NOT REPRODUCE: saved {}\n            recomputed {}",
            bottom(&d.stored),
            bottom(&d.recomputed)
        );
        for diff in &d.differences {
            let _ = writeln!(
                out,
                "  {}: saved {:.2}, recomputed {:.2} (differs by {})",
                diff.what,
                diff.stored,
                diff.now,
                signed_money(diff.now - diff.stored)
            );
        }
    }
    if let Some(n) = &d.rerun_on_current_market {
        let _ = writeln!(
            out,
            "appraised again on the current market file: {} ({} against the saved value)",
            bottom(n),
            signed_money(n.indicated_value - d.stored.indicated_value)
        );
    }
    out.push_str("\nCautions:\n");
    for c in &d.cautions {
        let _ = writeln!(out, "- {c}");
    }
    out
}

/// `report SESSION --pdf --html`.
pub fn report(
    path: &Path,
    pdf: Option<&Path>,
    html: Option<&Path>,
    audience: report::Audience,
) -> Result<()> {
    if pdf.is_none() && html.is_none() {
        bail!("say where to write the report: --pdf OUT.pdf and/or --html OUT.html");
    }
    let bytes = std::fs::read(path).with_context(|| format!("cannot read {}", path.display()))?;
    let session = read_session(path)?;
    let reproduction = reproduce(&session).with_context(|| {
        format!(
            "{}: the saved evidence cannot be recomputed",
            path.display()
        )
    })?;
    let identity = report::Identity::of(Some(path), Some(&bytes), reproduction.summary());
    if audience == report::Audience::Customer && !matches!(session.purpose, Purpose::TradeIn(_)) {
        eprintln!(
            "{}: --customer applies to trade-ins; a claim's report is always whole",
            path.display()
        );
    }
    let doc = report::Report::for_audience(&session, &identity, audience);
    if let Some(out) = pdf {
        model::session::write_atomically(out, &report::pdf::render(&doc))?;
        eprintln!("wrote {}", out.display());
    }
    if let Some(out) = html {
        model::session::write_atomically(out, report::html::render(&doc).as_bytes())?;
        eprintln!("wrote {}", out.display());
    }
    Ok(())
}

/// `profiles`.
pub fn profiles(path: Option<&Path>, json: bool) -> Result<()> {
    let file = load_profiles(path)?;
    crate::print(json, &file, || {
        let mut out = String::new();
        for p in &file.profiles {
            let _ = writeln!(out, "{} ({}), reviewed {}", p.name, p.id, p.reviewed);
            for r in p.rule_rows() {
                let _ = writeln!(
                    out,
                    "  {:<24} {}\n  {:<24} source: {}",
                    r.rule, r.value, "", r.source
                );
            }
            out.push('\n');
        }
        out
    })
}
