//! Reopening a session: recompute the grid, the reconciliation and the worksheet from the saved
//! evidence and say whether they match what was saved.

use serde::{Deserialize, Serialize};

use super::Session;
use super::outcome::{Outcome, WorksheetOutcome, work_out};
use crate::adjustment::user_lines;
use crate::appraisal::{AdjustedComparable, Appraisal, reconcile_comparables};
use crate::money::Cents;
use crate::rates::RatesError;
use crate::worksheet::Line;
use crate::worksheet::WorksheetError;

/// Why a session's evidence cannot be recomputed.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum ReplayError {
    /// A comparable cannot be adjusted with the saved rates.
    #[error("comparable on market line {line}: {source}")]
    Rates {
        /// The comparable's market line.
        line: u64,
        /// What is missing.
        source: RatesError,
    },
    /// A comparable's price is not a positive amount.
    #[error("comparable on market line {line}: asking price {} is not a positive amount", crate::format::number(*.price))]
    BadPrice {
        /// The comparable's market line.
        line: u64,
        /// Its price.
        price: f64,
    },
    /// The interval level is outside (0, 1).
    #[error("request.level = {} is not between 0 and 1", crate::format::number(*.0))]
    BadLevel(f64),
    /// The saved fit's residual degrees of freedom are not a count of at least one.
    #[error("fit.rates.df_residual = {} is not a count of at least 1", crate::format::number(*.0))]
    BadDegreesOfFreedom(f64),
    /// The worksheet's inputs are not valid.
    #[error("worksheet: {0}")]
    Worksheet(#[from] WorksheetError),
}

/// A number that did not come out as saved.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Difference {
    /// What it is.
    pub what: String,
    /// As saved.
    pub stored: f64,
    /// As recomputed.
    pub now: f64,
}

/// The recomputed appraisal and how it compares with the saved one.
#[derive(Debug, Clone, PartialEq)]
pub struct Reproduction {
    /// The appraisal recomputed from the evidence.
    pub appraisal: Appraisal,
    /// Its outcome.
    pub outcome: Outcome,
    /// Every saved number that does not reproduce: a worksheet amount that is not the same
    /// whole number of cents, a statistical amount that fails [`reproduces_to_the_cent`], a
    /// weight that differs by 1e-9 or more.
    pub differences: Vec<Difference>,
}

/// What "reproduces" means, in words for the banner, the command line and the report.
pub const REPRODUCTION_RULE: &str =
    "every worksheet amount to the cent, every value within half a cent of the saved one";

impl Reproduction {
    /// Whether every number came out as saved.
    #[must_use]
    pub fn reproduces(&self) -> bool {
        self.differences.is_empty()
    }

    /// One sentence on what recomputing the saved evidence found, with the rule it was held to.
    #[must_use]
    pub fn summary(&self) -> String {
        match self.differences.first() {
            None => {
                format!("recomputed from the saved evidence, it reproduces ({REPRODUCTION_RULE})")
            }
            Some(first) => format!(
                "recomputed from the saved evidence, it does not reproduce: {} number{} differ{} ({REPRODUCTION_RULE} is required), first {}: saved {}, now {}",
                self.differences.len(),
                if self.differences.len() == 1 { "" } else { "s" },
                if self.differences.len() == 1 { "s" } else { "" },
                first.what,
                crate::format::cents(first.stored),
                crate::format::cents(first.now)
            ),
        }
    }
}

/// Whether a recomputed statistical amount (`now`, in dollars) reproduces a stored one: it
/// rounds to the same cent, or differs by less than half a cent before rounding. The second
/// rule keeps a difference of 1e-12 that straddles a half cent (from another platform or
/// library version) from reading as a failure; together they never pass a difference of a
/// whole cent. A number that is not finite never reproduces.
#[must_use]
pub fn reproduces_to_the_cent(stored: f64, now: f64) -> bool {
    if !(stored.is_finite() && now.is_finite()) {
        return false;
    }
    // Rounded cents are whole numbers far inside f64's exact range: equality is exact.
    #[allow(clippy::float_cmp)]
    let same_cent = (stored * 100.0).round() == (now * 100.0).round();
    same_cent || (stored - now).abs() < 0.005
}

struct Comparer(Vec<Difference>);

impl Comparer {
    fn money(&mut self, what: impl Into<String>, stored: f64, now: f64) {
        if !reproduces_to_the_cent(stored, now) {
            self.0.push(Difference {
                what: what.into(),
                stored,
                now,
            });
        }
    }

    /// Worksheet amounts are whole cents: they reproduce only when equal.
    fn cents(&mut self, what: impl Into<String>, stored: Cents, now: Cents) {
        if stored != now {
            self.0.push(Difference {
                what: what.into(),
                stored: stored.dollars(),
                now: now.dollars(),
            });
        }
    }

    fn lines(&mut self, what: &str, stored: &[Line], now: &[Line]) {
        if stored.len() != now.len() {
            self.fraction(
                format!("{what}: number of lines"),
                stored.len() as f64,
                now.len() as f64,
            );
        }
        for (s, n) in stored.iter().zip(now) {
            self.cents(format!("{what}: {}", s.label), s.amount, n.amount);
        }
    }

    fn fraction(&mut self, what: impl Into<String>, stored: f64, now: f64) {
        if (stored - now).abs().partial_cmp(&1e-9) != Some(std::cmp::Ordering::Less) {
            self.0.push(Difference {
                what: what.into(),
                stored,
                now,
            });
        }
    }
}

/// Recomputes `session` from its evidence and compares it with its saved result.
pub fn reproduce(session: &Session) -> Result<Reproduction, ReplayError> {
    let request = &session.request;
    if !(request.level > 0.0 && request.level < 1.0) {
        return Err(ReplayError::BadLevel(request.level));
    }
    let rates = &session.fit.rates;
    if !(rates.df_residual.is_finite() && rates.df_residual >= 1.0) {
        return Err(ReplayError::BadDegreesOfFreedom(rates.df_residual));
    }
    let mut comparables = session
        .appraisal
        .comparables
        .iter()
        .map(|c| {
            let line = c.listing.line;
            if !(c.listing.asking_price.is_finite() && c.listing.asking_price > 0.0) {
                return Err(ReplayError::BadPrice {
                    line,
                    price: c.listing.asking_price,
                });
            }
            let mut lines = rates
                .lines(&request.subject, &c.listing)
                .map_err(|source| ReplayError::Rates { line, source })?;
            lines.extend(user_lines(&request.user_adjustments, line));
            Ok(AdjustedComparable::new(
                c.listing.clone(),
                c.days_listed,
                c.gower_distance,
                c.manual,
                c.rule_breaks.clone(),
                lines,
            ))
        })
        .collect::<Result<Vec<_>, _>>()?;
    let reconciliation = reconcile_comparables(
        &mut comparables,
        &session.appraisal.model_estimate,
        rates.df_residual,
        request.level,
        session.appraisal.reconciliation.band_rule,
    );
    let appraisal = Appraisal {
        // The subject as the market spelled it when saved; the grid reads `request.subject`.
        comparables,
        reconciliation,
        ..session.appraisal.clone()
    };
    let outcome = work_out(&session.purpose, &appraisal, request)?;
    let differences = compare(session, &appraisal, &outcome);
    Ok(Reproduction {
        appraisal,
        outcome,
        differences,
    })
}

/// Every worksheet line, to the cent.
fn compare_worksheets(d: &mut Comparer, stored: &Outcome, now: &Outcome) {
    match (&stored.worksheet, &now.worksheet) {
        (
            Some(WorksheetOutcome::TradeIn { offer: s, .. }),
            Some(WorksheetOutcome::TradeIn { offer: n, .. }),
        ) => {
            d.cents("retail value", s.retail_value, n.retail_value);
            d.cents("expected sale", s.expected_sale, n.expected_sale);
            d.lines("trade-in deductions", &s.deductions, &n.deductions);
        }
        (Some(WorksheetOutcome::Claim(s)), Some(WorksheetOutcome::Claim(n))) => {
            d.cents("ACV", s.acv, n.acv);
            d.lines(
                "settlement additions",
                &s.settlement.additions,
                &n.settlement.additions,
            );
            d.lines(
                "settlement deductions",
                &s.settlement.deductions,
                &n.settlement.deductions,
            );
        }
        _ => {}
    }
}

fn compare(session: &Session, appraisal: &Appraisal, outcome: &Outcome) -> Vec<Difference> {
    let mut d = Comparer(Vec::new());
    let saved = &session.appraisal;
    if saved.comparables.len() != appraisal.comparables.len() {
        d.fraction(
            "number of comparables",
            saved.comparables.len() as f64,
            appraisal.comparables.len() as f64,
        );
    }
    for (s, n) in saved.comparables.iter().zip(&appraisal.comparables) {
        let line = s.listing.line;
        for (i, (ls, ln)) in s.adjustments.iter().zip(&n.adjustments).enumerate() {
            d.money(
                format!(
                    "comparable line {line}, adjustment {} ({})",
                    i + 1,
                    ls.kind.label()
                ),
                ls.amount,
                ln.amount,
            );
        }
        if s.adjustments.len() != n.adjustments.len() {
            d.fraction(
                format!("comparable line {line}, number of adjustment lines"),
                s.adjustments.len() as f64,
                n.adjustments.len() as f64,
            );
        }
        d.money(
            format!("comparable line {line}, adjusted price"),
            s.adjusted_price,
            n.adjusted_price,
        );
        d.fraction(
            format!("comparable line {line}, weight"),
            s.weight,
            n.weight,
        );
    }
    let stored = &session.result;
    d.money(
        "indicated value",
        stored.indicated_value,
        outcome.indicated_value,
    );
    d.money(
        "value band, low",
        stored.value_band.lower,
        outcome.value_band.lower,
    );
    d.money(
        "value band, high",
        stored.value_band.upper,
        outcome.value_band.upper,
    );
    compare_worksheets(&mut d, stored, outcome);
    match (stored.bottom_line(), outcome.bottom_line()) {
        (Some((label, s)), Some((_, n))) => d.cents(label, s, n),
        (None, None) => {}
        (s, n) => d.fraction(
            "worksheet present",
            f64::from(u8::from(s.is_some())),
            f64::from(u8::from(n.is_some())),
        ),
    }
    if let (Some(WorksheetOutcome::Claim(s)), Some(WorksheetOutcome::Claim(n))) =
        (&stored.worksheet, &outcome.worksheet)
    {
        if s.verdict.total_loss != n.verdict.total_loss {
            d.fraction(
                "total loss (1 = yes)",
                f64::from(u8::from(s.verdict.total_loss)),
                f64::from(u8::from(n.verdict.total_loss)),
            );
        }
    }
    d.0
}
