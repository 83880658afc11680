//! The comptrail command line: the valuation engine without a display. A library under the
//! thin `comptrail` binary, so the command-line tests reach the same parsing and loading code.

pub mod args;
mod batch;
pub mod load;
mod output;
mod render;
mod session;

use std::io::Write;
use std::process::ExitCode;

use anyhow::{Context, Result, bail};
use clap::Parser;
use model::adjustment::{AdjustmentKind, UserAdjustment};
use model::appraisal::{AppraisalRequest, appraise};
use model::backtest::{BacktestSettings, backtest};
use model::comparables::{ComparableRules, MileageRule};
use model::depreciation::{depreciation_table, rank_segments};
use model::forecast::forecast;
use model::gaps::price_gaps;
use model::subject::Subject;
use serde::Serialize;

use crate::args::{AppraiseArgs, Cli, Command, MarketArgs, MileageRuleArg};
use crate::output::{
    AppraisalDocument, BacktestDocument, DepreciationDocument, FitDocument, FitSummary,
    GapsDocument, ImportSummary,
};

pub use batch::progress_line;

/// The subject appraised when none is given on the demo market.
pub const DEMO_SUBJECT: &str =
    "year=2022,make=Quellmark,model=Tessel,variant=Ambrel,miles=41000,condition=used";

/// Runs the command line with the process's arguments: the whole of `comptrail`.
#[must_use]
pub fn main() -> ExitCode {
    let cli = match Cli::try_parse() {
        Ok(cli) => cli,
        Err(e) => return refuse_arguments(&e),
    };
    match run(cli) {
        Ok(code) => code,
        Err(e) => {
            // One line: the outermost context and each cause, most specific last.
            let chain: Vec<String> = e.chain().map(ToString::to_string).collect();
            eprintln!("comptrail: {}", chain.join(": "));
            ExitCode::FAILURE
        }
    }
}

/// Help and version print as clap writes them; any other argument error is one line naming
/// the option and what it allows, with exit status 1 (2 means "does not reproduce").
fn refuse_arguments(e: &clap::Error) -> ExitCode {
    use clap::error::ErrorKind;
    match e.kind() {
        ErrorKind::DisplayHelp
        | ErrorKind::DisplayVersion
        | ErrorKind::DisplayHelpOnMissingArgumentOrSubcommand => {
            let _ = e.print();
            ExitCode::SUCCESS
        }
        _ => {
            eprintln!("comptrail: {}", one_line(e));
            ExitCode::FAILURE
        }
    }
}

/// clap's message without its "error: " prefix, usage and tips.
#[must_use]
pub fn one_line(e: &clap::Error) -> String {
    let text = e.render().to_string();
    let first = text.lines().next().unwrap_or_default();
    let first = first.strip_prefix("error: ").unwrap_or(first);
    let tip = text
        .lines()
        .map(str::trim)
        .find_map(|l| l.strip_prefix("tip: "))
        .map(|t| format!(" ({t})"))
        .unwrap_or_default();
    format!("{first}{tip}; see comptrail --help")
}

fn run(cli: Cli) -> Result<ExitCode> {
    let command = cli.command.unwrap_or_else(|| {
        Command::Appraise(Box::new(AppraiseArgs {
            market: default_market_args(),
            subject: None,
            level: 0.8,
            comps: 8,
            year_window: 1,
            mileage_rule: MileageRuleArg::Pricing,
            max_days: 90,
            max_distance: None,
            same_variant: false,
            include_comp: Vec::new(),
            exclude_comp: Vec::new(),
            adjust: Vec::new(),
            hold_months: Some(6.0),
            hold_miles: None,
            session: None,
            rerun: false,
            save_session: None,
            trade_in: None,
            claim: None,
            profiles: None,
            appraiser: String::new(),
            notes: String::new(),
            keep_segment: false,
            claim_number: String::new(),
            date_of_loss: None,
            insured: String::new(),
            loss_type: None,
            stock_number: String::new(),
            customer: String::new(),
        }))
    });
    match command {
        Command::DemoMarket {
            rows,
            seed,
            out,
            parquet,
        } => demo_market(rows, seed, &out, parquet),
        Command::Fit(args) => fit(&args),
        Command::Batch(args) => batch::run(&args),
        Command::Convert {
            file,
            out,
            delimiter,
            odometer,
            json,
        } => convert(&file, &out, load::import_options(delimiter, odometer), json),
        Command::Appraise(mut args) => {
            date_of_loss_is_the_appraisal_date(&mut args)?;
            if let Some(path) = &args.session {
                // Exit status 2 says "read fine, but does not reproduce".
                return Ok(if session::check(&args, path)? {
                    ExitCode::SUCCESS
                } else {
                    ExitCode::from(2)
                });
            }
            appraise_command(&args)
        }
        Command::Depreciation { market, max_age } => depreciation(&market, max_age),
        Command::Gaps { market, level, top } => gaps(&market, level, top),
        Command::Backtest {
            market,
            folds,
            level,
            comparable_subjects,
        } => backtest_command(&market, folds, level, comparable_subjects),
        Command::Report {
            session: path,
            pdf,
            html,
            customer,
        } => session::report(
            &path,
            pdf.as_deref(),
            html.as_deref(),
            if customer {
                report::Audience::Customer
            } else {
                report::Audience::Full
            },
        ),
        Command::Profiles { profiles, json } => session::profiles(profiles.as_deref(), json),
    }?;
    Ok(ExitCode::SUCCESS)
}

/// `--date-of-loss` sets the appraisal date; an `--as-of` given with it must say the same.
fn date_of_loss_is_the_appraisal_date(args: &mut AppraiseArgs) -> Result<()> {
    let Some(text) = &args.date_of_loss else {
        return Ok(());
    };
    let date = model::import::parse_date(text)
        .ok_or_else(|| anyhow::anyhow!("--date-of-loss '{text}' is not a date (use YYYY-MM-DD)"))?;
    if let Some(as_of) = &args.market.as_of {
        if model::import::parse_date(as_of) != Some(date) {
            bail!(
                "--date-of-loss {date} and --as-of {as_of} disagree: a claim is appraised as of its date of loss (give one of them)"
            );
        }
    }
    args.market.as_of = Some(date.to_string());
    Ok(())
}

/// The case details the options give.
#[must_use]
pub fn case_details(args: &AppraiseArgs) -> model::case::CaseDetails {
    model::case::CaseDetails {
        claim_number: args.claim_number.trim().to_owned(),
        date_of_loss: args
            .date_of_loss
            .as_deref()
            .and_then(model::import::parse_date),
        insured: args.insured.trim().to_owned(),
        loss_type: args.loss_type,
        stock_number: args.stock_number.trim().to_owned(),
        customer: args.customer.trim().to_owned(),
    }
}

fn default_market_args() -> MarketArgs {
    MarketArgs {
        file: None,
        make: None,
        model: None,
        age_form: args::AgeFormArg::Auto,
        robust: false,
        no_market_time: false,
        no_equipment: false,
        variant_slopes: args::VariantSlopesArg::Auto,
        as_of: None,
        delimiter: None,
        odometer: args::OdometerArg::Miles,
        stale_days: 180,
        keep: Vec::new(),
        drop: Vec::new(),
        demo_rows: 20_000,
        json: false,
    }
}

fn print(json: bool, doc: &impl Serialize, human: impl FnOnce() -> String) -> Result<()> {
    let mut out = std::io::stdout().lock();
    if json {
        serde_json::to_writer_pretty(&mut out, doc)?;
        writeln!(out)?;
    } else {
        write!(out, "{}", human())?;
    }
    Ok(())
}

fn demo_market(rows: u64, seed: u64, out: &std::path::Path, parquet: bool) -> Result<()> {
    // --rows is checked to 1..=1,000,000,000 when it is read.
    let rows = rows as usize;
    if parquet {
        let started = std::time::Instant::now();
        let done = model::convert::demo_lake(rows, seed, out)?;
        eprintln!(
            "wrote {} invented listings of {} models to {} in {} Parquet files in {:.1} s (seed {seed}, as of {})",
            model::format::thousands(done.rows_written as f64),
            done.partitions,
            out.display(),
            done.files.len(),
            started.elapsed().as_secs_f64(),
            model::demo::demo_as_of()
        );
        return Ok(());
    }
    if rows > 10_000_000 {
        bail!(
            "--rows {rows}: a CSV demo market holds at most 10,000,000 listings; use --parquet for more"
        );
    }
    let file =
        std::fs::File::create(out).with_context(|| format!("cannot create {}", out.display()))?;
    let mut writer = std::io::BufWriter::new(file);
    model::demo::write_demo_csv(rows, seed, &mut writer)
        .with_context(|| format!("writing {}", out.display()))?;
    writer.flush()?;
    eprintln!(
        "wrote {} invented listings to {} (seed {seed}, as of {})",
        rows,
        out.display(),
        model::demo::demo_as_of()
    );
    Ok(())
}

fn convert(
    file: &std::path::Path,
    out: &std::path::Path,
    options: model::import::ImportOptions,
    json: bool,
) -> Result<()> {
    let done = model::convert::convert_csv(file, out, &options, model::convert::BLOCK_BYTES)?;
    let doc = output::ConversionDocument {
        out: out.display().to_string(),
        rows_written: done.rows_written,
        partitions: done.partitions,
        files: done.files,
        import: ImportSummary::from_report(&done.report),
    };
    print(json, &doc, || render::conversion(&doc))
}

fn fit(args: &MarketArgs) -> Result<()> {
    let loaded = load::load_market(args, &load::wanted(args, None))?;
    let segment = load::choose_segment(&loaded.market, args, None)?;
    let fit = load::fit(&loaded, args, segment)?;
    let doc = FitDocument {
        warnings: fit.warnings(),
        import: ImportSummary::from_report(&loaded.report),
        fit: FitSummary::new(&loaded.market, &fit),
    };
    print(args.json, &doc, || {
        format!(
            "{}{}{}",
            render::import(&doc.import),
            render::fit(&doc.fit),
            render::warnings(&doc.warnings)
        )
    })
}

/// Largest adjustment of the appraiser's own, either way, in dollars.
const MAX_ADJUSTMENT_DOLLARS: f64 = 1e7;

fn parse_adjustment(spec: &str) -> Result<UserAdjustment> {
    // The basis is everything after the second colon, colons included.
    let parts: Vec<&str> = spec.splitn(3, ':').collect();
    let [head, amount, basis] = parts.as_slice() else {
        bail!(
            "--adjust '{spec}': write KIND[@LINE]:AMOUNT:BASIS, e.g. \"options:600:tow package the comparables lack\" or \"condition@260:-400:torn seat\""
        );
    };
    let (kind, line) = match head.split_once('@') {
        Some((kind, line)) => (kind, Some(line)),
        None => (*head, None),
    };
    let kind = AdjustmentKind::parse_user(kind).with_context(|| {
        format!("--adjust '{spec}': kind '{kind}' is not options, prior-damage, condition or other")
    })?;
    let amount = model::import::parse_number(amount)
        .filter(|a| a.abs() <= MAX_ADJUSTMENT_DOLLARS)
        .and_then(|a| model::money::Cents::from_dollars(a).ok())
        .with_context(|| {
            format!(
                "--adjust '{spec}': amount '{amount}' must be dollars and cents from -10,000,000 to 10,000,000"
            )
        })?;
    if basis.trim().is_empty() {
        bail!("--adjust '{spec}': every adjustment needs its basis");
    }
    let line = line
        .map(|l| {
            l.trim()
                .parse::<u64>()
                .with_context(|| format!("--adjust '{spec}': line '{l}' is not a line number"))
        })
        .transpose()?;
    Ok(UserAdjustment {
        line,
        kind,
        amount,
        basis: basis.trim().to_owned(),
    })
}

fn comparable_rules(args: &AppraiseArgs) -> ComparableRules {
    ComparableRules {
        model_year_window: args.year_window.max(0),
        mileage: match args.mileage_rule {
            MileageRuleArg::Pricing => MileageRule::default_pricing(),
            MileageRuleArg::NewYork => MileageRule::new_york(),
            MileageRuleArg::None => MileageRule {
                max_over: None,
                max_under: None,
            },
        },
        max_listing_age_days: (args.max_days > 0).then_some(args.max_days),
        max_distance_miles: args.max_distance,
        same_variant_only: args.same_variant,
        count: args.comps as usize,
        ..ComparableRules::default()
    }
}

/// The appraisal request the options describe for `subject` (before a claim's profile).
pub fn appraisal_request(args: &AppraiseArgs, subject: Subject) -> Result<AppraisalRequest> {
    let mut request = AppraisalRequest::new(subject);
    request.rules = comparable_rules(args);
    request.level = args.level;
    request.choices.include = args.include_comp.iter().copied().collect();
    request.choices.exclude = args.exclude_comp.iter().copied().collect();
    request.user_adjustments = args
        .adjust
        .iter()
        .map(|s| parse_adjustment(s))
        .collect::<Result<_>>()?;
    Ok(request)
}

fn appraise_command(args: &AppraiseArgs) -> Result<()> {
    let subject_text = match (&args.subject, &args.market.file) {
        (Some(s), _) => s.clone(),
        (None, None) => DEMO_SUBJECT.to_owned(),
        (None, Some(_)) => {
            bail!("--subject is required with a market file, e.g. --subject \"{DEMO_SUBJECT}\"")
        }
    };
    let subject = Subject::parse(&subject_text)?;
    let loaded = load::load_market(
        &args.market,
        &load::wanted(&args.market, Some((&subject.make, &subject.model))),
    )?;
    let segment = load::choose_segment(
        &loaded.market,
        &args.market,
        Some((&subject.make, &subject.model)),
    )?;
    let fit = load::fit(&loaded, &args.market, segment)?;
    let mut request = appraisal_request(args, subject.clone())?;
    let purpose = session::purpose(args, &mut request)?;
    let mut appraisal = appraise(&loaded.market, &fit, &request)?;
    let market_accuracy = quick_backtest(&loaded.market, &fit, &mut appraisal);
    let worked = model::session::work_out(&purpose, &appraisal, &request)?;
    if let Some(out) = &args.save_session {
        session::save(
            args,
            out,
            &session::SaveInputs {
                loaded: &loaded,
                fit: &fit,
                request: &request,
                appraisal: &appraisal,
                purpose: &purpose,
            },
        )?;
    }
    let forecast = args
        .hold_months
        .map(|months| {
            forecast(
                &loaded.market,
                &fit,
                &subject,
                months,
                args.hold_miles,
                args.level,
            )
        })
        .transpose()?;
    if let Some(f) = &forecast {
        appraisal.warnings.extend(f.warnings.iter().cloned());
    }
    let case = case_details(args);
    let doc = AppraisalDocument {
        case_line: case.line(&purpose),
        case,
        market_accuracy,
        import: ImportSummary::from_report(&loaded.report),
        fit: FitSummary::new(&loaded.market, &fit),
        indicated_value: appraisal.reconciliation.indicated_value,
        value_band: appraisal.reconciliation.value_band,
        appraisal,
        segment_supply: matches!(purpose, model::session::Purpose::TradeIn(_))
            .then(|| {
                model::supply::segment_supply(
                    &loaded.market,
                    &fit.cleaning.rows,
                    fit.as_of,
                    model::session::SUPPLY_WINDOW_DAYS,
                    load::fit_settings(&args.market)
                        .ok()
                        .and_then(|s| s.cleaning.stale_after_days),
                )
            })
            .flatten(),
        worksheet_rows: model::session::worksheet_rows(&purpose, worked.worksheet.as_ref()),
        worksheet: worked.worksheet,
        forecast,
        cautions: model::cautions::CAUTIONS.to_vec(),
    };
    print(args.market.json, &doc, || render::appraisal(&doc))
}

/// On a market of the model small enough to test quickly, backtests it, adds the warning when
/// its typical error exceeds the band, and returns the result in words.
fn quick_backtest(
    market: &model::market::Market,
    fit: &model::appraisal::MarketFit,
    appraisal: &mut model::appraisal::Appraisal,
) -> Option<String> {
    if fit.cleaning.rows.len() > model::guards::QUICK_BACKTEST_LISTINGS {
        return None;
    }
    let Ok(b) = backtest(
        market,
        fit,
        &ComparableRules::default(),
        &BacktestSettings::default(),
    ) else {
        return Some(
            "the market is too small to test its own accuracy (a fold could not be fitted)".into(),
        );
    };
    let r = &appraisal.reconciliation;
    if let Some(w) = model::guards::backtest_warning(&b, &r.value_band, r.indicated_value) {
        appraisal.warnings.push(w);
    }
    Some(model::guards::accuracy_in_words(&b))
}

fn depreciation(args: &MarketArgs, max_age: u32) -> Result<()> {
    // The ranking compares every model: the whole market is read.
    let loaded = load::load_market(args, &[])?;
    let segment = load::choose_segment(&loaded.market, args, None).or_else(|e| {
        // Several models and none chosen: describe the largest, rank them all.
        loaded.market.segments().first().map(|s| s.0).ok_or(e)
    })?;
    let fit = load::fit(&loaded, args, segment)?;
    let settings = load::fit_settings(args)?;
    let doc = DepreciationDocument {
        warnings: fit.warnings(),
        import: ImportSummary::from_report(&loaded.report),
        fit: FitSummary::new(&loaded.market, &fit),
        table: depreciation_table(&fit.model, &loaded.market, max_age),
        ranking: rank_segments(&loaded.market, &settings, 40),
    };
    print(args.json, &doc, || render::depreciation(&doc))
}

fn gaps(args: &MarketArgs, level: f64, top: usize) -> Result<()> {
    if !(level > 0.0 && level < 1.0) {
        bail!("--level {level} must be strictly between 0 and 1");
    }
    let loaded = load::load_market(args, &load::wanted(args, None))?;
    let segment = load::choose_segment(&loaded.market, args, None)?;
    let fit = load::fit(&loaded, args, segment)?;
    let doc = GapsDocument {
        warnings: fit.warnings(),
        import: ImportSummary::from_report(&loaded.report),
        fit: FitSummary::new(&loaded.market, &fit),
        level,
        gaps: price_gaps(&loaded.market, &fit, level),
    };
    print(args.json, &doc, || render::gaps(&doc, top))
}

fn backtest_command(
    args: &MarketArgs,
    folds: u64,
    level: f64,
    comparable_subjects: u64,
) -> Result<()> {
    let loaded = load::load_market(args, &load::wanted(args, None))?;
    let segment = load::choose_segment(&loaded.market, args, None)?;
    let fit = load::fit(&loaded, args, segment)?;
    let settings = BacktestSettings {
        folds: folds as usize,
        level,
        comparable_subjects_per_fold: comparable_subjects as usize,
        ..BacktestSettings::default()
    };
    let result = backtest(&loaded.market, &fit, &ComparableRules::default(), &settings)?;
    let doc = BacktestDocument {
        warnings: fit.warnings(),
        import: ImportSummary::from_report(&loaded.report),
        fit: FitSummary::new(&loaded.market, &fit),
        backtest: result,
    };
    print(args.json, &doc, || render::backtest(&doc))
}
