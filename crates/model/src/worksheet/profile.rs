//! Jurisdiction profiles: the claim rules of one place as data, each value with its citation.
//!
//! Rules differ by jurisdiction and change, so they live in an editable RON file
//! (`assets/jurisdictions.ron`), never in code. A profile sets the comparable filters a claim
//! must meet, which taxes and fees the settlement pays and the total-loss rule.

use serde::{Deserialize, Serialize};

use super::total_loss::TotalLossRule;
use crate::appraisal::AdjustedComparable;
use crate::comparables::{ComparableRules, MileageRule};
use crate::format::thousands;
use crate::subject::Subject;

/// Format version of the profile file this build reads.
pub const PROFILES_FORMAT_VERSION: u32 = 1;

/// One value of a profile with where it comes from.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Cited<T> {
    /// The value.
    pub value: T,
    /// The rule it comes from (statute, regulation and section), or why none is set.
    pub citation: String,
    /// The date the cited text took effect, when checked.
    #[serde(default)]
    pub effective: Option<chrono::NaiveDate>,
    /// Whether the value was filled from memory and not checked against the published text.
    #[serde(default)]
    pub from_memory: bool,
}

impl<T> Cited<T> {
    /// "citation (effective 2020-01-01)" or "citation (effective date not checked)", with a
    /// warning when the value was filled from memory.
    #[must_use]
    pub fn source(&self) -> String {
        let date = self.effective.map_or_else(
            || "effective date not checked".to_owned(),
            |d| format!("effective {d}"),
        );
        let memory = if self.from_memory {
            "; from memory, verify before use"
        } else {
            ""
        };
        format!("{} ({date}{memory})", self.citation)
    }
}

/// How the settlement treats the registration fee.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum RegistrationPaid {
    /// The unused months of the annual fee are paid.
    Prorated,
    /// Not part of the settlement.
    NotPaid,
}

/// The claim rules of one jurisdiction.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct JurisdictionProfile {
    /// Short stable id (`ny`, `naic-model`).
    pub id: String,
    /// Name shown to the user.
    pub name: String,
    /// When the profile was last compared with the cited rules.
    pub reviewed: chrono::NaiveDate,
    /// Fewest comparables the valuation must rest on.
    pub min_comparables: Cited<usize>,
    /// Oldest a comparable's listing may be, in days before the date of loss.
    pub max_listing_age_days: Cited<Option<u32>>,
    /// Farthest a comparable may be, in miles.
    pub max_distance_miles: Cited<Option<f64>>,
    /// How far a comparable's mileage may be from the insured vehicle's.
    pub mileage_rule: Cited<Option<MileageRule>>,
    /// Whether sales tax on the ACV is paid (the rate is the claim's, from where the vehicle
    /// was registered).
    pub sales_tax_paid: Cited<bool>,
    /// Whether title and transfer fees are paid.
    pub title_and_transfer_fees_paid: Cited<bool>,
    /// How registration is paid.
    pub registration: Cited<RegistrationPaid>,
    /// What makes a vehicle a total loss.
    pub total_loss_rule: Cited<TotalLossRule>,
    /// What each comparable's record must show (source, date, identifier, location).
    #[serde(default)]
    pub documentation: Option<Cited<String>>,
}

/// A profile file: a version and a list of profiles.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ProfileFile {
    /// Format version; this build reads [`PROFILES_FORMAT_VERSION`].
    pub format_version: u32,
    /// The profiles.
    pub profiles: Vec<JurisdictionProfile>,
}

/// Why a profile file cannot be used.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum ProfileError {
    /// The text is not a profile file; names the line and column.
    #[error("{source_name}:{line}:{column}: {message}")]
    Syntax {
        /// File name.
        source_name: String,
        /// Line, from 1.
        line: usize,
        /// Column, from 1.
        column: usize,
        /// What the parser expected.
        message: String,
    },
    /// Written by a newer comptrail.
    #[error(
        "{source_name}: profile format version {found} is newer than this build reads ({supported}); update comptrail"
    )]
    NewerVersion {
        /// File name.
        source_name: String,
        /// Version in the file.
        found: u32,
        /// Version this build reads.
        supported: u32,
    },
    /// Two profiles share an id, or a value is out of range.
    #[error("{source_name}: profile \"{id}\": {message}")]
    Invalid {
        /// File name.
        source_name: String,
        /// The profile.
        id: String,
        /// What is wrong.
        message: String,
    },
}

impl ProfileFile {
    /// Reads profiles from RON text; `source_name` names the file in errors.
    pub fn parse(text: &str, source_name: &str) -> Result<Self, ProfileError> {
        let file: ProfileFile = ron::from_str(text).map_err(|e| ProfileError::Syntax {
            source_name: source_name.to_owned(),
            line: e.span.start.line,
            column: e.span.start.col,
            message: e.code.to_string(),
        })?;
        if file.format_version > PROFILES_FORMAT_VERSION {
            return Err(ProfileError::NewerVersion {
                source_name: source_name.to_owned(),
                found: file.format_version,
                supported: PROFILES_FORMAT_VERSION,
            });
        }
        let mut seen = std::collections::BTreeSet::new();
        for p in &file.profiles {
            let invalid = |message: String| ProfileError::Invalid {
                source_name: source_name.to_owned(),
                id: p.id.clone(),
                message,
            };
            if !seen.insert(p.id.as_str()) {
                return Err(invalid("the id is used twice".into()));
            }
            if p.min_comparables.value == 0 {
                return Err(invalid("min_comparables must be at least 1".into()));
            }
            if p.max_distance_miles
                .value
                .is_some_and(|d| d.partial_cmp(&0.0) != Some(std::cmp::Ordering::Greater))
            {
                return Err(invalid("max_distance_miles must be positive".into()));
            }
            if let TotalLossRule::Percentage { threshold_pct, .. } = p.total_loss_rule.value {
                if !(threshold_pct > 0.0 && threshold_pct <= 100.0) {
                    return Err(invalid(format!(
                        "total-loss threshold {threshold_pct} % is not between 0 and 100"
                    )));
                }
            }
        }
        Ok(file)
    }

    /// The profile with this id.
    #[must_use]
    pub fn get(&self, id: &str) -> Option<&JurisdictionProfile> {
        self.profiles.iter().find(|p| p.id == id)
    }
}

/// The profiles shipped with comptrail (`assets/jurisdictions.ron`, compiled in so the
/// workbench and command line always have them; a user's own file replaces them).
pub const SHIPPED_PROFILES: &str = include_str!("../../../../assets/jurisdictions.ron");

/// Reads the shipped profiles.
pub fn shipped_profiles() -> Result<ProfileFile, ProfileError> {
    ProfileFile::parse(SHIPPED_PROFILES, "assets/jurisdictions.ron")
}

/// One comparable against the profile.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ComparableCheck {
    /// The comparable's file line.
    pub line: u64,
    /// Each rule it breaks, in words with the citation.
    pub breaks: Vec<String>,
}

/// All comparables against the profile.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ProfileCheck {
    /// The profile's id.
    pub profile_id: String,
    /// One entry per comparable, in the appraisal's order.
    pub comparables: Vec<ComparableCheck>,
    /// Comparables that break no rule.
    pub complying: usize,
    /// Fewest the profile requires.
    pub required: usize,
}

impl ProfileCheck {
    /// Whether enough comparables comply.
    #[must_use]
    pub fn enough(&self) -> bool {
        self.complying >= self.required
    }

    /// One plain sentence for the claim screen and the report.
    #[must_use]
    pub fn summary(&self) -> String {
        // Saturating: a check read back from an edited session may claim more complying
        // comparables than it lists.
        let breaking = self.comparables.len().saturating_sub(self.complying);
        if self.enough() {
            format!(
                "{} of {} comparables meet every rule of the profile; it requires at least {}.",
                self.complying,
                self.comparables.len(),
                self.required
            )
        } else {
            format!(
                "Too few comparables: {} meet every rule, the profile requires at least {}{}.",
                self.complying,
                self.required,
                if breaking > 0 {
                    format!(" ({breaking} break a rule, listed below)")
                } else {
                    String::new()
                }
            )
        }
    }
}

/// One of a profile's rules as every front end lists it: what it governs, its value in
/// words and where it comes from.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct RuleRow {
    /// What the rule governs ("Listing age").
    pub rule: &'static str,
    /// Its value in words ("at most 90 days").
    pub value: String,
    /// The citation and its date.
    pub source: String,
}

fn paid(yes: bool) -> String {
    if yes { "paid" } else { "not paid" }.to_owned()
}

impl JurisdictionProfile {
    /// Every rule of the profile with its source, worded once for the command line, the
    /// workbench and the report.
    #[must_use]
    pub fn rule_rows(&self) -> Vec<RuleRow> {
        fn row<T>(rule: &'static str, value: String, cited: &Cited<T>) -> RuleRow {
            RuleRow {
                rule,
                value,
                source: cited.source(),
            }
        }
        let mut rows = vec![
            row(
                "Fewest comparables",
                self.min_comparables.value.to_string(),
                &self.min_comparables,
            ),
            row(
                "Listing age",
                self.max_listing_age_days
                    .value
                    .map_or("no limit".into(), |d| format!("at most {d} days")),
                &self.max_listing_age_days,
            ),
            row(
                "Distance",
                self.max_distance_miles
                    .value
                    .map_or("no limit".into(), |d| format!("at most {d:.0} mi")),
                &self.max_distance_miles,
            ),
            row(
                "Mileage",
                self.mileage_rule
                    .value
                    .map_or("no rule".into(), |m| m.to_string()),
                &self.mileage_rule,
            ),
            row(
                "Sales tax",
                paid(self.sales_tax_paid.value),
                &self.sales_tax_paid,
            ),
            row(
                "Title and transfer fees",
                paid(self.title_and_transfer_fees_paid.value),
                &self.title_and_transfer_fees_paid,
            ),
            row(
                "Total-loss rule",
                self.total_loss_rule.value.to_string(),
                &self.total_loss_rule,
            ),
            row(
                "Registration",
                self.registration.value.to_string(),
                &self.registration,
            ),
        ];
        if let Some(doc) = &self.documentation {
            rows.push(row("Records", doc.value.clone(), doc));
        }
        rows
    }

    /// `base` with the profile's filters (listing age, distance, mileage rule) in place, so the
    /// comparable search finds complying listings first.
    #[must_use]
    pub fn comparable_rules(&self, base: &ComparableRules) -> ComparableRules {
        ComparableRules {
            max_listing_age_days: self.max_listing_age_days.value,
            max_distance_miles: self.max_distance_miles.value,
            mileage: self.mileage_rule.value.unwrap_or(base.mileage),
            count: base.count.max(self.min_comparables.value),
            ..*base
        }
    }

    /// Checks each comparable against the profile's rules.
    #[must_use]
    pub fn check(&self, subject: &Subject, comparables: &[AdjustedComparable]) -> ProfileCheck {
        let checks: Vec<ComparableCheck> = comparables
            .iter()
            .map(|c| ComparableCheck {
                line: c.listing.line,
                breaks: self.breaks(subject, c),
            })
            .collect();
        ProfileCheck {
            profile_id: self.id.clone(),
            complying: checks.iter().filter(|c| c.breaks.is_empty()).count(),
            comparables: checks,
            required: self.min_comparables.value,
        }
    }

    fn breaks(&self, subject: &Subject, c: &AdjustedComparable) -> Vec<String> {
        let mut breaks = Vec::new();
        if let Some(limit) = self.max_listing_age_days.value {
            let rule = self.max_listing_age_days.source();
            match c.days_listed {
                Some(days) if days > i64::from(limit) => breaks.push(format!(
                    "listed {days} days before the date of loss; at most {limit} allowed by {rule}"
                )),
                None => breaks.push(format!(
                    "no listing date, so it cannot be shown to be within {limit} days ({rule})"
                )),
                Some(_) => {}
            }
        }
        if let Some(limit) = self.max_distance_miles.value {
            let rule = self.max_distance_miles.source();
            match c.listing.distance_miles {
                Some(d) if f64::from(d) > limit => breaks.push(format!(
                    "{d:.0} mi away; at most {limit:.0} mi allowed by {rule}"
                )),
                None => breaks.push(format!(
                    "no distance, so it cannot be shown to be within {limit:.0} mi ({rule})"
                )),
                Some(_) => {}
            }
        }
        if let Some(mileage) = self.mileage_rule.value {
            if let Some(b) = mileage.check(subject.miles, c.listing.miles) {
                breaks.push(format!(
                    "{} mi against the insured vehicle's {} mi: {b} under {}",
                    thousands(c.listing.miles),
                    thousands(subject.miles),
                    self.mileage_rule.source()
                ));
            }
        }
        if !(c.listing.make.eq_ignore_ascii_case(&subject.make)
            && c.listing.model.eq_ignore_ascii_case(&subject.model))
        {
            breaks.push(format!(
                "a {} {}, not the insured vehicle's make and model",
                c.listing.make, c.listing.model
            ));
        }
        breaks
    }
}

impl std::fmt::Display for RegistrationPaid {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(match self {
            RegistrationPaid::Prorated => "prorated to the remaining months",
            RegistrationPaid::NotPaid => "not paid",
        })
    }
}
