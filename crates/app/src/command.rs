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
        )
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
            document.purpose = purpose;
        }
        Command::SetAppraiser(name) => document.appraiser = name,
        Command::SetNotes(notes) => document.notes = notes,
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
