//! The appraisal document: everything that defines one appraisal and nothing that can be
//! recomputed. Cloned into the undo history on every change.

use std::path::PathBuf;

use model::adjustment::UserAdjustment;
use model::appraisal::{AppraisalRequest, FitSettings};
use model::clean::Overrides;
use model::comparables::{ComparableChoices, ComparableRules};
use model::session::{CaseDetails, Purpose, Session};
use model::subject::Subject;
use model::worksheet::{ClaimInputs, JurisdictionProfile, TradeInInputs};
use serde::{Deserialize, Serialize};

/// Where the market comes from.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub enum MarketSource {
    /// The built-in invented market with this many listings (seed 1).
    Demo {
        /// Listings.
        rows: usize,
    },
    /// A CSV file.
    File(PathBuf),
}

impl MarketSource {
    /// Short description for the title bar and status line.
    #[must_use]
    pub fn describe(&self) -> String {
        match self {
            MarketSource::Demo { rows } => model::demo::demo_name(*rows),
            MarketSource::File(path) => path.display().to_string(),
        }
    }
}

/// One appraisal.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct AppraisalDocument {
    /// The market.
    pub market: MarketSource,
    /// The subject vehicle.
    pub subject: Subject,
    /// Fit and cleaning settings.
    pub fit: FitSettings,
    /// Manual overrides of the cleaning rules, by file line.
    pub overrides: Overrides,
    /// Comparable filters and ranking.
    pub rules: ComparableRules,
    /// Manual comparable includes and excludes.
    pub choices: ComparableChoices,
    /// The appraiser's own adjustment lines.
    pub user_adjustments: Vec<UserAdjustment>,
    /// Level of the intervals and the value band.
    pub level: f64,
    /// What the value is for, with the worksheet's inputs.
    pub purpose: Purpose,
    /// The appraiser's name.
    pub appraiser: String,
    /// Free notes kept with the appraisal.
    pub notes: String,
    /// The case's numbers and names (claim number, date of loss, stock number, …). Missing
    /// from recovery files written before it existed.
    #[serde(default)]
    pub case: CaseDetails,
}

/// The subject shown when the workbench starts on the demo market.
#[must_use]
pub fn demo_subject() -> Subject {
    Subject {
        model_year: 2022,
        make: "Quellmark".into(),
        model: "Tessel".into(),
        variant: Some("Ambrel".into()),
        miles: 41_000.0,
        condition: model::condition::Condition::Used,
        options: None,
        vin: None,
    }
}

impl AppraisalDocument {
    /// The demo appraisal the workbench opens with.
    #[must_use]
    pub fn demo(rows: usize) -> Self {
        Self {
            market: MarketSource::Demo { rows },
            subject: demo_subject(),
            fit: FitSettings {
                as_of: Some(model::demo::demo_as_of()),
                ..FitSettings::default()
            },
            overrides: Overrides::new(),
            rules: ComparableRules::default(),
            choices: ComparableChoices::default(),
            user_adjustments: Vec::new(),
            level: 0.8,
            purpose: Purpose::Value,
            appraiser: String::new(),
            notes: String::new(),
            case: CaseDetails::default(),
        }
    }

    /// The appraisal request the document describes; a claim searches with its profile's
    /// filters.
    #[must_use]
    pub fn request(&self) -> AppraisalRequest {
        let rules = match &self.purpose {
            Purpose::Claim { profile, .. } => profile.comparable_rules(&self.rules),
            _ => self.rules,
        };
        AppraisalRequest {
            subject: self.subject.clone(),
            rules,
            choices: self.choices.clone(),
            user_adjustments: self.user_adjustments.clone(),
            level: self.level,
        }
    }

    /// The document a saved session describes, on `market`.
    #[must_use]
    pub fn from_session(session: &Session, market: MarketSource) -> Self {
        Self {
            market,
            subject: session.request.subject.clone(),
            fit: session.fit.settings,
            overrides: session.fit.overrides.clone(),
            // A claim's saved rules already carry its profile's filters; applying the profile
            // again gives the same rules.
            rules: session.request.rules,
            choices: session.request.choices.clone(),
            user_adjustments: session.request.user_adjustments.clone(),
            level: session.request.level,
            purpose: session.purpose.clone(),
            appraiser: session.authorship.appraiser.clone(),
            notes: session.authorship.notes.clone(),
            case: session.case.clone(),
        }
    }
}

/// A trade-in worksheet with the usual starting figures (see [`TradeInInputs::usual`]).
#[must_use]
pub fn default_trade_in() -> TradeInInputs {
    TradeInInputs::usual()
}

/// A claim worksheet under `profile`, with zero amounts for the adjuster to fill in.
#[must_use]
pub fn default_claim(profile: JurisdictionProfile) -> Purpose {
    Purpose::Claim {
        inputs: default_claim_inputs(&profile),
        profile,
    }
}

/// The claim inputs a new claim worksheet under `profile` starts from (see
/// [`ClaimInputs::starting`]).
#[must_use]
pub fn default_claim_inputs(profile: &JurisdictionProfile) -> ClaimInputs {
    ClaimInputs::starting(&profile.id)
}
