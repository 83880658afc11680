//! The data chooses the age form.
//!
//! Each form (linear, quadratic, per-year) is fitted by least squares where the listings can
//! identify it. A form whose fitted value rises with age anywhere inside the data is set aside:
//! a curve that says older vehicles are worth more is not a depreciation curve, whatever its
//! fit. Among the rest the one with the lowest Bayesian information criterion wins (Schwarz
//! 1978, "Estimating the dimension of a model", Annals of Statistics 6:461-464): BIC charges
//! each term ln(n), so a small market needs clear evidence before a curved form beats a
//! straight one, while a large market with real curvature chooses the curve. BIC rather than
//! AIC (Akaike 1974), whose charge of 2 per term lets a 16-listing market take a quadratic its
//! data cannot support; rather than K-fold cross-validation, because one fit per form is cheap
//! at a million listings and gives the same ranking when the data decide clearly.
//!
//! A market of more than [`CHOICE_SAMPLE`] listings is judged on an evenly spaced sample of
//! that many: that is far more than any real curvature needs to show itself.

use chrono::NaiveDate;
use linfa::ParamGuard;
use serde::{Deserialize, Serialize};

use super::{AgeForm, FitError, HedonicParams};
use crate::market::Market;

/// Most listings the forms are compared on.
pub const CHOICE_SAMPLE: usize = 50_000;

/// Fewest listings per term before a segment is "few" (see `guards`); the automatic form's
/// cleaning fit uses the quadratic only with at least this many per quadratic term.
pub const LISTINGS_PER_TERM: usize = 10;

/// One form as the choice saw it.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct AgeFormCandidate {
    /// The form.
    pub form: AgeForm,
    /// Its BIC, when it could be fitted.
    pub bic: Option<f64>,
    /// Why it was set aside, if it was.
    pub set_aside: Option<String>,
}

/// The age form the data chose, and why.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct AgeFormChoice {
    /// The form fitted.
    pub chosen: AgeForm,
    /// Why, in one line ("linear age: lowest BIC …").
    pub reason: String,
    /// Every form considered.
    pub candidates: Vec<AgeFormCandidate>,
    /// Listings compared on.
    pub listings: usize,
}

/// The form the automatic choice's first (cleaning) fit uses on a segment of `listings`: the
/// quadratic when there are at least [`LISTINGS_PER_TERM`] listings per quadratic term, else
/// the linear.
#[must_use]
pub fn cleaning_form(listings: usize, quadratic_terms: usize) -> AgeForm {
    if listings >= LISTINGS_PER_TERM * quadratic_terms {
        AgeForm::Quadratic
    } else {
        AgeForm::Linear
    }
}

/// Chooses the age form for `rows` of `market` (the cleaned rows) as of `as_of`.
#[must_use]
pub fn choose_age_form(
    market: &Market,
    rows: &[usize],
    as_of: NaiveDate,
    market_time: bool,
    equipment: bool,
) -> AgeFormChoice {
    let step = rows.len().div_ceil(CHOICE_SAMPLE).max(1);
    let sample: Vec<usize> = rows.iter().copied().step_by(step).collect();
    let candidates: Vec<AgeFormCandidate> = AgeForm::FITTED
        .iter()
        .map(|&form| judge(market, &sample, as_of, form, (market_time, equipment)))
        .collect();
    let best = candidates
        .iter()
        .filter(|c| c.set_aside.is_none())
        .filter_map(|c| c.bic.map(|b| (c.form, b)))
        .min_by(|a, b| a.1.total_cmp(&b.1));
    let (chosen, why) = match best {
        Some((form, _)) => {
            let mut fitting: Vec<(AgeForm, f64)> = candidates
                .iter()
                .filter(|c| c.set_aside.is_none())
                .filter_map(|c| c.bic.map(|b| (c.form, b)))
                .collect();
            fitting.sort_by(|a, b| a.1.total_cmp(&b.1));
            let ranking = fitting
                .iter()
                .map(|(f, b)| format!("{f} {}", bic_text(*b)))
                .collect::<Vec<_>>()
                .join(", ");
            (
                form,
                if fitting.len() > 1 {
                    format!("lowest BIC of the forms that fall with age ({ranking})")
                } else {
                    format!("the only form that falls with age (BIC {ranking})")
                },
            )
        }
        // No form both fits and falls: the straight line at least continues at one rate, and
        // the warnings say the curve does not fall.
        None => (
            AgeForm::Linear,
            "no form's value falls with age throughout the data; linear used".to_owned(),
        ),
    };
    let others = candidates
        .iter()
        .filter(|c| c.form != chosen)
        .filter_map(|c| c.set_aside.as_ref().map(|why| format!("{}: {why}", c.form)))
        .collect::<Vec<_>>();
    let reason = if others.is_empty() {
        format!("{chosen} age: {why}")
    } else {
        format!("{chosen} age: {why}; {}", others.join("; "))
    };
    AgeFormChoice {
        chosen,
        reason,
        candidates,
        listings: sample.len(),
    }
}

fn bic_text(bic: f64) -> String {
    let rounded = (bic * 10.0).round() / 10.0;
    let whole = crate::format::thousands(rounded.trunc());
    let tenth = (rounded.fract().abs() * 10.0).round() as u32;
    let sign = if rounded < 0.0 && rounded.trunc() == 0.0 {
        "-"
    } else {
        ""
    };
    format!("{sign}{whole}.{tenth}")
}

/// Fits one form and says whether it can stand.
fn judge(
    market: &Market,
    rows: &[usize],
    as_of: NaiveDate,
    form: AgeForm,
    (market_time, equipment): (bool, bool),
) -> AgeFormCandidate {
    let fitted = HedonicParams::new(as_of)
        .age_form(form)
        .market_time(market_time)
        .equipment(equipment)
        .check()
        .and_then(|p| p.fit(market, rows));
    match fitted {
        Err(FitError::TooFewRows { rows, terms, .. }) => AgeFormCandidate {
            form,
            bic: None,
            set_aside: Some(format!(
                "cannot be fitted ({terms} terms for {rows} listings)"
            )),
        },
        Err(FitError::Collinear { term }) => AgeFormCandidate {
            form,
            bic: None,
            set_aside: Some(format!(
                "cannot be fitted (its term {term} cannot be told apart from the others)"
            )),
        },
        Err(e) => AgeFormCandidate {
            form,
            bic: None,
            set_aside: Some(format!("cannot be fitted ({e})")),
        },
        Ok(model) => {
            let rising = model.rising_steps();
            let set_aside = rising.first().map(|(from, to, pct)| {
                format!("its value rises with age (ages {from} to {to}: {pct:+.1} %)")
            });
            AgeFormCandidate {
                form,
                bic: Some(model.bic()),
                set_aside,
            }
        }
    }
}
