//! What panes ask for, and the one function that changes the document.

use std::path::PathBuf;

use model::adjustment::UserAdjustment;
use model::condition::Condition;
use model::session::Purpose;
use model::subject::Subject;

use crate::document::{AppraisalDocument, MarketSource};

/// A user intent emitted by a pane.
#[derive(Debug, Clone, PartialEq)]
pub enum Command {
    /// Replace the subject (edited in the subject pane, or a listing picked in a chart).
    SetSubject(Subject),
    /// Change the subject's odometer.
    SetSubjectMiles(f64),
    /// Change the subject's model year.
    SetSubjectYear(i32),
    /// Change the subject's variant.
    SetSubjectVariant(Option<String>),
    /// Change the subject's condition.
    SetSubjectCondition(Condition),
    /// Never use the listing on this file line as a comparable.
    ExcludeComparable(u64),
    /// Always use the listing on this file line as a comparable.
    IncludeComparable(u64),
    /// Drop any manual choice on this file line.
    ClearComparableChoice(u64),
    /// Set the interval level.
    SetLevel(f64),
    /// Set how many comparables to keep.
    SetComparableCount(usize),
    /// Open another market.
    OpenMarket(PathBuf),
    /// Add one of the appraiser's own adjustment lines.
    AddUserAdjustment(UserAdjustment),
    /// Remove the appraiser's adjustment line at this index.
    RemoveUserAdjustment(usize),
    /// Override the cleaning rules for the listing on this file line (refits the market).
    SetOverride(u64, model::clean::Override),
    /// Drop the override on this file line.
    ClearOverride(u64),
    /// Switch what the value is for (value, trade-in, claim).
    ChoosePurpose(Purpose),
    /// Edit the worksheet's inputs (a drag settles into one undo step).
    SetPurpose(Purpose),
    /// Set the appraiser's name.
    SetAppraiser(String),
    /// Set the notes.
    SetNotes(String),
    /// Set the case's numbers and names (typing settles into one undo step).
    SetCase(model::session::CaseDetails),
    /// Set the subject's VIN (typing settles into one undo step).
    SetSubjectVin(Option<String>),
    /// Set the appraisal date (`None`: the market's latest date); in a claim it is the date of
    /// loss, and both change together.
    SetAppraisalDate(Option<chrono::NaiveDate>),
    /// Set how age enters the fit (refits the market).
    SetAgeForm(model::hedonic::AgeForm),
    /// Use the robust fit or least squares (refits the market).
    SetRobust(bool),
    /// Let the market-conditions term enter the fit, or keep it out (refits the market).
    SetMarketTime(bool),
    /// Whether each variant gets its own age slope (refits the market).
    SetVariantSlopes(model::hedonic::VariantSlopes),
    /// Whether options stated on enough listings get their own terms (refits the market).
    SetEquipment(bool),
    /// Set the subject's options, names separated by ";" (typing settles into one undo step).
    SetSubjectOptions(Option<String>),
    /// Set aside unsold listings older than this many days (`None` keeps them; refits).
    SetStaleDays(Option<u32>),
    /// Model years either side of the subject's a comparable may be.
    SetYearWindow(i32),
    /// How far a comparable's mileage may be from the subject's.
    SetMileageRule(model::comparables::MileageRule),
    /// Listed at most this many days before the appraisal date (`None`: no limit).
    SetListingAge(Option<u32>),
    /// At most this many miles away (`None`: no limit).
    SetDistance(Option<f64>),
    /// Only the subject's own variant as comparables.
    SetSameVariant(bool),
    /// Replace the whole document (opening a session or recovering unsaved work).
    ReplaceDocument(Box<AppraisalDocument>),
    /// Go back to the market that is loaded after opening another failed or was canceled,
    /// with the hand choices, overrides and date opening it had cleared (taken from this
    /// document).
    RevertOpen(Box<AppraisalDocument>),
}

impl Command {
    /// Whether the command comes from a drag or slider, where many arrive in a row and settle
    /// into one undo step.
    #[must_use]
    pub fn is_continuous(&self) -> bool {
        matches!(
            self,
            Command::SetSubjectMiles(_)
                | Command::SetLevel(_)
                | Command::SetComparableCount(_)
                | Command::SetPurpose(_)
                | Command::SetAppraiser(_)
                | Command::SetNotes(_)
                | Command::SetCase(_)
                | Command::SetSubjectVin(_)
                | Command::SetSubjectOptions(_)
                | Command::SetYearWindow(_)
                | Command::SetListingAge(_)
                | Command::SetDistance(_)
        )
    }
}

/// Applies one of the ground rules' commands (the appraisal date, the fit and the comparable
/// rules); any other command is left alone.
fn apply_ground_rule(document: &mut AppraisalDocument, command: &Command) {
    match *command {
        Command::SetAppraisalDate(date) => {
            document.fit.as_of = date;
            if matches!(document.purpose, Purpose::Claim { .. }) {
                document.case.date_of_loss = date;
            }
        }
        Command::SetAgeForm(form) => document.fit.age_form = form,
        Command::SetRobust(robust) => document.fit.robust = robust,
        Command::SetMarketTime(on) => document.fit.market_time = on,
        Command::SetVariantSlopes(slopes) => document.fit.variant_slopes = slopes,
        Command::SetEquipment(on) => document.fit.equipment = on,
        Command::SetStaleDays(days) => {
            document.fit.cleaning.stale_after_days = days.map(|d| d.clamp(1, 3_650));
        }
        Command::SetYearWindow(years) => document.rules.model_year_window = years.clamp(0, 30),
        Command::SetMileageRule(rule) => document.rules.mileage = rule,
        Command::SetListingAge(days) => {
            document.rules.max_listing_age_days = days.map(|d| d.clamp(1, 3_650));
        }
        Command::SetDistance(miles) => {
            document.rules.max_distance_miles = miles
                .filter(|m| m.is_finite())
                .map(|m| m.clamp(1.0, 25_000.0));
        }
        Command::SetSameVariant(only) => document.rules.same_variant_only = only,
        _ => {}
    }
}

/// Applies `command` to `document`. Returns whether the document changed.
pub fn apply(document: &mut AppraisalDocument, command: Command) -> bool {
    let before = document.clone();
    match command {
        Command::SetSubject(subject) => document.subject = subject,
        Command::SetSubjectMiles(miles) => {
            document.subject.miles = miles.clamp(0.0, model::import::MAX_MILES);
        }
        Command::SetSubjectYear(year) => document.subject.model_year = year,
        Command::SetSubjectVariant(variant) => document.subject.variant = variant,
        Command::SetSubjectCondition(condition) => document.subject.condition = condition,
        Command::ExcludeComparable(line) => {
            document.choices.include.remove(&line);
            document.choices.exclude.insert(line);
        }
        Command::IncludeComparable(line) => {
            document.choices.exclude.remove(&line);
            document.choices.include.insert(line);
        }
        Command::ClearComparableChoice(line) => {
            document.choices.include.remove(&line);
            document.choices.exclude.remove(&line);
        }
        Command::SetLevel(level) => document.level = level.clamp(0.5, 0.99),
        Command::SetComparableCount(count) => document.rules.count = count.clamp(1, 30),
        Command::AddUserAdjustment(line) => {
            if line.amount != model::money::Cents::ZERO && !line.basis.trim().is_empty() {
                document.user_adjustments.push(line);
            }
        }
        Command::RemoveUserAdjustment(index) => {
            if index < document.user_adjustments.len() {
                document.user_adjustments.remove(index);
            }
        }
        Command::SetOverride(line, decision) => {
            document.overrides.insert(line, decision);
        }
        Command::ClearOverride(line) => {
            document.overrides.remove(&line);
        }
        Command::SetPurpose(purpose) | Command::ChoosePurpose(purpose) => {
            // In a claim the appraisal date is the date of loss: whichever is set first
            // becomes the other.
            if matches!(purpose, Purpose::Claim { .. }) {
                match document.case.date_of_loss {
                    Some(date) => document.fit.as_of = Some(date),
                    None => document.case.date_of_loss = document.fit.as_of,
                }
            }
            document.purpose = purpose;
        }
        Command::SetAppraiser(name) => document.appraiser = name,
        Command::SetNotes(notes) => document.notes = notes,
        Command::SetCase(case) => {
            // The date of loss is the claim's appraisal date: it moves only with it.
            let date_of_loss = document.case.date_of_loss;
            document.case = model::session::CaseDetails {
                date_of_loss,
                ..case
            };
        }
        Command::SetSubjectOptions(options) => {
            document.subject.options = options
                .map(|o| o.trim().to_owned())
                .filter(|o| !o.is_empty());
        }
        Command::SetSubjectVin(vin) => {
            document.subject.vin = vin
                .map(|v| v.trim().to_ascii_uppercase())
                .filter(|v| !v.is_empty());
        }
        rule @ (Command::SetAppraisalDate(_)
        | Command::SetAgeForm(_)
        | Command::SetRobust(_)
        | Command::SetMarketTime(_)
        | Command::SetVariantSlopes(_)
        | Command::SetEquipment(_)
        | Command::SetStaleDays(_)
        | Command::SetYearWindow(_)
        | Command::SetMileageRule(_)
        | Command::SetListingAge(_)
        | Command::SetDistance(_)
        | Command::SetSameVariant(_)) => apply_ground_rule(document, &rule),
        Command::ReplaceDocument(replacement) => *document = *replacement,
        Command::RevertOpen(before) => {
            document.market = before.market;
            document.choices = before.choices;
            document.overrides = before.overrides;
            document.fit.as_of = before.fit.as_of;
        }
        Command::OpenMarket(path) => {
            document.market = MarketSource::File(path);
            // Manual choices and overrides name lines of the old file, and a new market is
            // appraised as of its own latest date.
            document.choices = model::comparables::ComparableChoices::default();
            document.overrides.clear();
            document.fit.as_of = None;
        }
    }
    *document != before
}
