//! `comptrail batch`: many subjects against one market, one value row each.

use std::io::IsTerminal;
use std::time::Instant;

use anyhow::{Context, Result, bail};
use model::batch::{appraise_all, fit_segments, read_subjects, to_csv};
use model::subject::Subject;

use crate::args::BatchArgs;

/// Options of `appraise` that describe one subject's case and have no meaning for many.
fn refuse_single_subject_options(args: &BatchArgs) -> Result<()> {
    let a = &args.appraise;
    let given = [
        ("--subject", a.subject.is_some()),
        ("--session", a.session.is_some()),
        ("--save-session", a.save_session.is_some()),
        ("--trade-in", a.trade_in.is_some()),
        ("--claim", a.claim.is_some()),
        ("--adjust", !a.adjust.is_empty()),
        ("--hold-months", a.hold_months.is_some()),
        ("--claim-number", !a.claim_number.is_empty()),
        ("--date-of-loss", a.date_of_loss.is_some()),
    ];
    if let Some((option, _)) = given.iter().find(|(_, on)| *on) {
        bail!(
            "batch takes each subject from --subjects and values it on the market alone; {option} belongs to one appraisal (use `appraise`)"
        );
    }
    Ok(())
}

/// Runs `batch`.
pub fn run(args: &BatchArgs) -> Result<()> {
    refuse_single_subject_options(args)?;
    let started = Instant::now();
    let text = std::fs::read_to_string(&args.subjects)
        .with_context(|| format!("cannot read the subjects file {}", args.subjects.display()))?;
    let rows = read_subjects(&text).with_context(|| args.subjects.display().to_string())?;
    let market_args = &args.appraise.market;
    // A partitioned Parquet market is read for the subjects' models only.
    let mut wanted: Vec<(String, String)> = rows
        .iter()
        .filter_map(|r| r.subject.as_ref().ok())
        .map(|s| (s.make.clone(), s.model.clone()))
        .collect();
    // Once per model however it is spelled (names are matched by their key).
    let key = |(make, model): &(String, String)| {
        (
            model::vocabulary::name_key(make),
            model::vocabulary::name_key(model),
        )
    };
    wanted.sort_by_cached_key(key);
    wanted.dedup_by(|a, b| key(a) == key(b));
    let loaded = crate::load::load_market(market_args, &wanted)?;
    let settings = crate::load::fit_settings(market_args)?;
    let overrides = crate::load::overrides(market_args);
    // The rules and level every subject is appraised with (the subject is each row's).
    let placeholder = Subject::parse(crate::DEMO_SUBJECT)?;
    let template = crate::appraisal_request(&args.appraise, placeholder)?;
    let fits = fit_segments(&loaded.market, &rows, &settings, &overrides);
    let total = rows.len();
    let terminal = std::io::stderr().is_terminal();
    let step = (total / 100).max(1);
    let appraising = Instant::now();
    let progress = |done: usize| {
        if terminal && (done % step == 0 || done == total) {
            eprint!("\r{}", progress_line(done, total, appraising.elapsed()));
        }
    };
    let folder = args
        .subjects
        .parent()
        .map(std::path::Path::to_path_buf)
        .unwrap_or_default();
    // The profiles are read once, for every claim row.
    let profiles = crate::session::load_profiles(args.appraise.profiles.as_deref());
    let purposes: Vec<model::batch::RowPurpose> = rows
        .iter()
        .map(|r| row_purpose(r, &folder, &profiles))
        .collect();
    let appraised = appraise_all(
        &loaded.market,
        &rows,
        &fits,
        &template,
        &purposes,
        &progress,
    );
    if terminal {
        eprintln!();
    }
    if let Some(dir) = &args.sessions {
        write_sessions(args, dir, &loaded, &appraised)?;
    }
    let results: Vec<model::batch::BatchResult> = appraised.into_iter().map(|a| a.result).collect();
    let failed = results.iter().filter(|r| r.error.is_some()).count();
    if market_args.json {
        let doc = serde_json::json!({
            "subjects": total,
            "valued": total - failed,
            "values": results,
            "cautions": model::cautions::CAUTIONS,
        });
        println!("{}", serde_json::to_string_pretty(&doc)?);
    } else {
        let csv = to_csv(&results);
        match &args.out {
            Some(path) => std::fs::write(path, csv)
                .with_context(|| format!("cannot write {}", path.display()))?,
            None => print!("{csv}"),
        }
    }
    eprintln!(
        "valued {} of {total} subjects in {:.1} s ({failed} with a reason instead of a value){}",
        total - failed,
        started.elapsed().as_secs_f64(),
        args.out
            .as_ref()
            .map(|p| format!("; wrote {}", p.display()))
            .unwrap_or_default()
    );
    eprintln!("{}", model::cautions::CAUTIONS[0]);
    Ok(())
}

/// "appraised 4,200 of 10,000 (42 %), about 3 s left" (padded to overwrite a longer line).
#[must_use]
pub fn progress_line(done: usize, total: usize, elapsed: std::time::Duration) -> String {
    let pct = done * 100 / total.max(1);
    let left = if done > 0 && done < total {
        let secs = elapsed.as_secs_f64() * (total - done) as f64 / done as f64;
        format!(", about {} s left", secs.ceil() as u64)
    } else {
        String::new()
    };
    format!(
        "appraised {} of {} ({pct} %){left}    ",
        model::format::thousands(done as f64),
        model::format::thousands(total as f64)
    )
}

/// A row's purpose: its `worksheet` file read as a claim worksheet (it names a profile) or a
/// trade-in worksheet, relative to the subjects file's folder; a value only without one.
fn row_purpose(
    row: &model::batch::SubjectRow,
    folder: &std::path::Path,
    profiles: &Result<model::worksheet::ProfileFile>,
) -> model::batch::RowPurpose {
    let Some(file) = &row.worksheet else {
        return Ok(model::session::Purpose::Value);
    };
    let path = folder.join(file);
    crate::session::read_worksheet(&path, profiles).map_err(|e| {
        let chain: Vec<String> = e.chain().map(ToString::to_string).collect();
        chain.join(": ")
    })
}

/// One session file per appraised subject, named by its id (characters other than letters,
/// digits, '-' and '_' replaced).
fn write_sessions(
    args: &BatchArgs,
    dir: &std::path::Path,
    loaded: &crate::load::Loaded,
    appraised: &[model::batch::Appraised<'_>],
) -> Result<()> {
    std::fs::create_dir_all(dir).with_context(|| format!("cannot create {}", dir.display()))?;
    let mut written = 0;
    for a in appraised {
        let (Some(fit), Some(request), Some(appraisal), Some(purpose)) =
            (a.fit, &a.request, &a.appraisal, &a.purpose)
        else {
            continue;
        };
        let session = crate::session::capture(
            &args.appraise,
            &crate::session::SaveInputs {
                loaded,
                fit,
                request,
                appraisal,
                purpose,
            },
        )?;
        let name: String = a
            .result
            .id
            .chars()
            .map(|c| {
                if c.is_alphanumeric() || c == '-' || c == '_' {
                    c
                } else {
                    '_'
                }
            })
            .collect();
        model::session::write_session(&dir.join(format!("{name}.ron")), &session)?;
        written += 1;
    }
    eprintln!("wrote {written} session files to {}", dir.display());
    Ok(())
}
