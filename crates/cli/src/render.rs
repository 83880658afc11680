//! Human-readable tables for the terminal.

use std::fmt::Write;

use model::adjustment::describe;
use model::format::{money, signed_money, thousands};

use crate::output::{
    AppraisalDocument, BacktestDocument, ConversionDocument, DepreciationDocument, FitSummary,
    GapsDocument, ImportSummary,
};

pub fn conversion(d: &ConversionDocument) -> String {
    let mut o = import(&d.import);
    let _ = writeln!(
        o,
        "Wrote {} listings of {} {} to {} in {} Parquet {} (make=…/model=…/ folders).",
        thousands(d.rows_written as f64),
        thousands(d.partitions as f64),
        if d.partitions == 1 { "model" } else { "models" },
        d.out,
        thousands(d.files.len() as f64),
        if d.files.len() == 1 { "file" } else { "files" },
    );
    o
}

/// "Parquet, 3 files read, 6 of other models not opened" or "comma separated".
fn source_form(s: &ImportSummary) -> String {
    if s.parquet_files_read > 0 {
        format!(
            "Parquet, {} {} read{}",
            thousands(s.parquet_files_read as f64),
            if s.parquet_files_read == 1 {
                "file"
            } else {
                "files"
            },
            if s.parquet_files_skipped > 0 {
                format!(
                    ", {} of other models not opened",
                    thousands(s.parquet_files_skipped as f64)
                )
            } else {
                String::new()
            }
        )
    } else {
        format!("{} separated", s.delimiter)
    }
}

pub fn import(s: &ImportSummary) -> String {
    let mut o = String::new();
    let form = source_form(s);
    let _ = writeln!(
        o,
        "Market: {} ({form}, odometer in {}): {} rows read, {} used, {} rejected",
        s.file,
        s.odometer_unit,
        thousands(s.rows_read as f64),
        thousands(s.rows_used as f64),
        thousands(s.rows_rejected as f64)
    );
    for (code, n) in &s.rejected_by_reason {
        let _ = writeln!(
            o,
            "  rejected, {}: {}",
            model::import::reason_in_words(code),
            thousands(*n as f64)
        );
    }
    for r in s.rejected.iter().take(5) {
        let _ = writeln!(o, "    {}: {}", r.where_found(), r.reason);
    }
    if s.rows_rejected > 5 {
        let _ = writeln!(
            o,
            "    … {} more (all listed with --json)",
            s.rows_rejected - 5
        );
    }
    if s.dropped_values_count > 0 {
        let _ = writeln!(o, "  values dropped, row kept: {}", s.dropped_values_count);
        for d in s.dropped_values.iter().take(3) {
            let _ = writeln!(
                o,
                "    {}: {} = '{}': {}",
                d.where_found(),
                d.column,
                d.value,
                d.note
            );
        }
    }
    if s.condition_inferred > 0 {
        let _ = writeln!(
            o,
            "  condition missing on {} rows: taken as used (≥ 1,000 mi) or new",
            s.condition_inferred
        );
    }
    if s.blank_lines > 0 {
        let _ = writeln!(
            o,
            "  blank lines passed over: {}",
            thousands(s.blank_lines as f64)
        );
    }
    for m in &s.merged_spellings {
        let spellings = m
            .spellings
            .iter()
            .map(|(text, n)| format!("\"{text}\" ({n})"))
            .collect::<Vec<_>>()
            .join(", ");
        let _ = writeln!(
            o,
            "  {} spellings read as one, shown as \"{}\": {spellings}",
            m.field, m.shown
        );
    }
    if !s.ignored_columns.is_empty() {
        let _ = writeln!(o, "  ignored columns: {}", s.ignored_columns.join(", "));
    }
    if !s.options_found.is_empty() {
        let found = s
            .options_found
            .iter()
            .map(|f| {
                let spellings = if f.spellings.is_empty() {
                    String::new()
                } else {
                    format!(
                        ", spelled {}",
                        f.spellings
                            .iter()
                            .map(|(t, n)| format!("\"{t}\" ({n})"))
                            .collect::<Vec<_>>()
                            .join(", ")
                    )
                };
                format!("{} ({}{spellings})", f.name, thousands(f.listings as f64))
            })
            .collect::<Vec<_>>()
            .join("; ");
        let _ = writeln!(o, "  options stated: {found}");
    }
    o
}

pub fn fit(f: &FitSummary) -> String {
    let mut o = String::new();
    let _ = writeln!(
        o,
        "\n{} as of {}: {} listings, {} used in the fit",
        f.segment,
        f.as_of,
        thousands(f.cleaning.listings as f64),
        thousands(f.cleaning.used as f64)
    );
    for (code, n) in &f.cleaning.excluded_by_rule {
        let _ = writeln!(
            o,
            "  set aside, {}: {}",
            model::clean::rule_in_words(code),
            thousands(*n as f64)
        );
    }
    if let Some(why) = &f.cleaning.outlier_check_skipped {
        let _ = writeln!(o, "  outlier check skipped: {why}");
    }
    let _ = writeln!(
        o,
        "\nln(asking price) fit, {} age, {}: n = {}, residual SD {:.4}, R² {:.4}, smearing {:.4}",
        f.age_form,
        if f.robust {
            "Huber robust"
        } else {
            "least squares"
        },
        thousands(f.n as f64),
        f.residual_sd,
        f.r_squared,
        f.smearing_factor
    );
    let _ = writeln!(o, "  age form: {}", f.age_form_reason);
    let _ = writeln!(o, "  market conditions: {}", f.market_conditions);
    for (i, words) in f.premiums.iter().enumerate() {
        let _ = writeln!(
            o,
            "  {}{words}",
            if i == 0 { "variant premiums: " } else { "    " }
        );
    }
    let _ = writeln!(
        o,
        "  {:<26} {:>12} {:>11} {:>9} {:>10}",
        "term", "estimate", "std error", "t", "effect %"
    );
    for t in &f.terms {
        let _ = writeln!(
            o,
            "  {:<26} {:>12.6} {:>11.6} {:>9.2} {:>10}",
            t.name,
            t.estimate,
            t.std_error,
            t.t_value,
            t.percent_effect
                .map(|p| format!("{p:+.2}"))
                .unwrap_or_default()
        );
    }
    let d = &f.annual_depreciation;
    let _ = writeln!(
        o,
        "  annual depreciation over {} years: {:.1} % from age alone, {:.1} % with typical mileage ({} mi a year)",
        d.horizon_years,
        d.age_only_pct,
        d.with_typical_miles_pct,
        thousands(f.typical_annual_miles)
    );
    o
}

/// Each warning on its own line, in words (the codes are in `--json`).
pub fn warnings(warnings: &[model::warnings::Warning]) -> String {
    let mut o = String::new();
    for w in warnings {
        let _ = writeln!(o, "WARNING: {}", w.message);
    }
    o
}

/// The subject, and whether its VIN checks.
fn subject_lines(o: &mut String, subject: &model::subject::Subject) {
    let _ = writeln!(o, "\nSubject: {}", subject.describe());
    if let Some(vin) = &subject.vin {
        let problems = model::vin::problems(vin, subject.model_year);
        let _ = writeln!(
            o,
            "VIN {vin}: {}",
            if problems.is_empty() {
                "checks (check digit and model year)".to_owned()
            } else {
                format!("does not check, {}", model::vin::problems_text(&problems))
            }
        );
    }
}

pub fn appraisal(doc: &AppraisalDocument) -> String {
    let a = &doc.appraisal;
    let mut o = import(&doc.import);
    o.push_str(&fit(&doc.fit));
    let level = 100.0 * a.reconciliation.value_band.level;
    if !doc.case_line.is_empty() {
        let _ = writeln!(o, "\n{}", doc.case_line);
    }
    subject_lines(&mut o, &a.subject);
    let _ = writeln!(
        o,
        "Comparables: {} of {} listings of this model passed the filters; {} kept",
        thousands(a.candidates_passed as f64),
        thousands(a.candidates_considered as f64),
        a.comparables.len()
    );
    for (code, n) in &a.stopped_by {
        let _ = writeln!(
            o,
            "  left out, {}: {}",
            model::comparables::filter_in_words(code),
            thousands(*n as f64)
        );
    }
    for (i, c) in a.comparables.iter().enumerate() {
        comparable(&mut o, i + 1, c);
    }
    let r = &a.reconciliation;
    let m = &a.model_estimate;
    o.push('\n');
    o.push_str(&warnings(&a.warnings));
    let _ = writeln!(o, "Indicated value: {}", money(r.indicated_value));
    let _ = writeln!(
        o,
        "Value band ({level:.0} %): {} to {}  (width set by the {})",
        money(r.value_band.lower),
        money(r.value_band.upper),
        match r.band_source {
            model::reconcile::BandSource::Comparables => "spread of the adjusted comparables",
            model::reconcile::BandSource::Model => "model's prediction interval",
            model::reconcile::BandSource::ModelOnly =>
                "model alone: no comparables passed the filters",
        }
    );
    if let Some(words) = &doc.market_accuracy {
        let _ = writeln!(o, "Accuracy: {words}");
    }
    let _ = writeln!(
        o,
        "Model's own estimate: median {}, mean {}; {level:.0} % prediction interval {} to {}; {level:.0} % confidence interval for the market median {} to {}",
        money(m.median),
        money(m.mean),
        money(m.prediction_interval.lower),
        money(m.prediction_interval.upper),
        money(m.confidence_interval.lower),
        money(m.confidence_interval.upper)
    );
    let _ = writeln!(
        o,
        "Comparables vs model: {:+.1} %; effective number of comparables {:.1}",
        r.model_gap_pct, r.effective_count
    );
    if let Some(f) = &doc.forecast {
        let _ = writeln!(
            o,
            "Forecast after {:.0} months and {} more miles: {} ({}, {:+.1} %), {level:.0} % prediction interval {} to {}{}",
            f.months,
            thousands(f.added_miles),
            money(f.then.median),
            signed_money(f.change),
            f.change_pct,
            money(f.then.prediction_interval.lower),
            money(f.then.prediction_interval.upper),
            if f.extrapolated {
                " (beyond the oldest age in the market: an extrapolation)"
            } else {
                ""
            }
        );
    }
    if let Some(w) = &doc.worksheet {
        worksheet(&mut o, w, &doc.worksheet_rows);
    }
    if let Some(s) = &doc.segment_supply {
        let _ = writeln!(o, "  {}", s.describe());
    }
    let _ = writeln!(o);
    for c in &doc.cautions {
        let _ = writeln!(o, "Caution: {c}");
    }
    o
}

/// The trade-in offer or the claim, every part on its own line.
fn worksheet(
    o: &mut String,
    w: &model::session::WorksheetOutcome,
    rows: &[model::worksheet::rows::Row],
) {
    use model::session::WorksheetOutcome;
    use model::worksheet::rows::{not_paid_lines, rule_break_lines, verdict_heading};
    let _ = writeln!(o);
    match w {
        WorksheetOutcome::TradeIn { .. } => {
            let _ = writeln!(o, "Trade-in offer");
        }
        WorksheetOutcome::Claim(c) => {
            let _ = writeln!(o, "Total-loss settlement ({})", c.check.profile_id);
        }
    }
    for r in rows {
        let _ = writeln!(o, "  {:<58} {:>12}", r.label, r.amount_text());
    }
    match w {
        WorksheetOutcome::TradeIn { sensitivity, .. } => {
            let _ = writeln!(o, "  offer by days to sell: {}", sensitivity.by_days_text());
            let _ = writeln!(
                o,
                "  offer across the value band: {}",
                sensitivity.by_value_text()
            );
        }
        WorksheetOutcome::Claim(c) => {
            for line in not_paid_lines(c) {
                let _ = writeln!(o, "  {line}");
            }
            let _ = writeln!(o, "{}: {}", verdict_heading(c), c.verdict.explanation);
            let _ = writeln!(o, "  rule: {}", c.total_loss_citation);
            let _ = writeln!(o, "Comparables against the profile: {}", c.check.summary());
            for line in rule_break_lines(&c.check) {
                let _ = writeln!(o, "  {line}");
            }
        }
    }
}

/// One comparable: identity and source, broken rules, every adjustment line, totals and weight.
fn comparable(o: &mut String, number: usize, c: &model::appraisal::AdjustedComparable) {
    let l = &c.listing;
    let _ = writeln!(
        o,
        "\n#{} line {}: {} {} {}, {} mi, {}, asking {}{}",
        number,
        l.line,
        l.model_year,
        l.model,
        model::vocabulary::variant_text(l.variant.as_deref()),
        thousands(l.miles),
        l.condition,
        money(l.asking_price),
        if c.manual { "  [included by hand]" } else { "" }
    );
    let _ = writeln!(
        o,
        "   source: {}{}",
        l.source(),
        c.days_listed
            .map(|d| format!(" ({d} day{})", if d == 1 { "" } else { "s" }))
            .unwrap_or_default()
    );
    for b in &c.rule_breaks {
        let _ = writeln!(o, "   breaks rule: {b}");
    }
    for line in &c.adjustments {
        let _ = writeln!(o, "   {}", describe(line));
    }
    let _ = writeln!(
        o,
        "   net {} ({:.1} %), gross {} ({:.1} %) → adjusted {}; similarity {:.2}, weight {:.1} %",
        signed_money(c.net_adjustment),
        c.net_pct,
        money(c.gross_adjustment),
        c.gross_pct,
        money(c.adjusted_price),
        c.similarity,
        100.0 * c.weight
    );
}

/// The market's monthly index, or why there is none.
fn market_index(o: &mut String, f: &FitSummary) {
    let _ = writeln!(
        o,
        "\nThe market's level by month (latest month = 100, attributes held fixed):"
    );
    match (&f.market_index, &f.market_index_missing) {
        (Some(index), _) => {
            let last = index.months.len().saturating_sub(1);
            for (i, m) in index.months.iter().enumerate() {
                let band = if i == last {
                    "the base".to_owned()
                } else {
                    format!(
                        "{:.0} % band {:.1} to {:.1}",
                        100.0 * index.level,
                        m.lower,
                        m.upper
                    )
                };
                let _ = writeln!(
                    o,
                    "  {:<18} {:>6.1}  ({band}; {} listings)",
                    m.month,
                    m.index,
                    thousands(m.listings as f64)
                );
            }
        }
        (None, Some(why)) => {
            let _ = writeln!(o, "  no monthly index: {why}");
        }
        (None, None) => {
            let _ = writeln!(o, "  no monthly index: {}", f.market_conditions);
        }
    }
}

pub fn depreciation(doc: &DepreciationDocument) -> String {
    let mut o = import(&doc.import);
    o.push_str(&fit(&doc.fit));
    o.push_str(&warnings(&doc.warnings));
    for curve in &doc.table.curves {
        let _ = writeln!(
            o,
            "\n{}: value at typical mileage (used unless marked new)",
            curve.variant
        );
        let _ = writeln!(
            o,
            "  {:>5} {:>10} {:>10} {:>10} {:>7} {:>11} {:>7}",
            "age", "miles", "value", "loss", "loss %", "cumulative", "cum %"
        );
        for r in &curve.rows {
            let _ = writeln!(
                o,
                "  {:>5} {:>10} {:>10} {:>10} {:>7.1} {:>11} {:>7.1}",
                r.age_years
                    .map_or_else(|| "new".to_owned(), |a| a.to_string()),
                thousands(r.typical_miles),
                money(r.value),
                money(r.loss),
                r.loss_pct,
                money(r.cumulative_loss),
                r.cumulative_loss_pct
            );
        }
    }
    for p in &doc.table.premiums {
        let _ = writeln!(o, "\nPremium of {} over {} by age:", p.variant, p.base);
        for r in &p.by_age {
            let _ = writeln!(
                o,
                "  age {:>2}: {:>9} ({:.1} %; 80 % band {:.1} % to {:.1} %)",
                r.age_years,
                money(r.premium),
                r.premium_pct,
                r.lower_pct,
                r.upper_pct
            );
        }
    }
    market_index(&mut o, &doc.fit);
    let _ = writeln!(
        o,
        "\nModels in the file by fitted annual decline (linear age, 5 years):"
    );
    for r in &doc.ranking {
        match &r.skipped {
            None => {
                let _ = writeln!(
                    o,
                    "  {:<24} {:>5.1} %/yr with typical miles, {:>5.1} %/yr from age alone ({} listings)",
                    r.segment,
                    r.with_typical_miles_pct,
                    r.age_only_pct,
                    thousands(r.listings as f64)
                );
            }
            Some(why) => {
                let _ = writeln!(o, "  {:<24} not ranked: {why}", r.segment);
            }
        }
    }
    o
}

pub fn gaps(doc: &GapsDocument, top: usize) -> String {
    let mut o = import(&doc.import);
    o.push_str(&fit(&doc.fit));
    o.push_str(&warnings(&doc.warnings));
    let line = |o: &mut String, g: &model::gaps::PriceGap| {
        let _ = writeln!(
            o,
            "  line {:>8}  {:<34} asking {:>9}  market {:>9}  gap {:>9} ({:+6.1} %)  {}{}",
            g.line,
            g.description,
            money(g.asking_price),
            money(g.expected),
            signed_money(g.gap),
            g.gap_pct,
            match g.flag {
                model::gaps::GapFlag::Within => "within the band",
                model::gaps::GapFlag::BelowMarket => "below the band",
                model::gaps::GapFlag::AboveMarket => "above the band",
            },
            g.exclusion
                .as_deref()
                .map(|e| format!(" [set aside: {}]", model::clean::rule_in_words(e)))
                .unwrap_or_default()
        );
    };
    let _ = writeln!(
        o,
        "\nFurthest below the market (possible deals or possible problems: look before use):"
    );
    for g in doc.gaps.iter().take(top) {
        line(&mut o, g);
    }
    let _ = writeln!(o, "\nFurthest above the market:");
    for g in doc.gaps.iter().rev().take(top) {
        line(&mut o, g);
    }
    o
}

pub fn backtest(doc: &BacktestDocument) -> String {
    let mut o = import(&doc.import);
    o.push_str(&fit(&doc.fit));
    o.push_str(&warnings(&doc.warnings));
    let b = &doc.backtest;
    let _ = writeln!(
        o,
        "\n{}-fold backtest (asking prices stand in for values):",
        b.folds
    );
    for (name, m) in [("model", &b.model), ("comparables", &b.comparables)] {
        let _ = writeln!(
            o,
            "  {:<12} {} valued, median absolute error {:.1} %, {:.1} % inside the {:.0} % band",
            name,
            thousands(m.evaluated as f64),
            m.median_abs_pct_error,
            m.band_coverage_pct,
            100.0 * m.level
        );
    }
    if b.not_valued > 0 {
        let _ = writeln!(
            o,
            "  not valued: {} (variant or condition missing from the training part, or no comparables)",
            b.not_valued
        );
    }
    o
}
