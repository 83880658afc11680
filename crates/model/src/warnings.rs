//! Warnings are results: what the market cannot support, said as loudly as the number.
//!
//! Every fit and every appraisal returns its warnings. Each has a stable snake_case code (for
//! `--json` and for tests), a message for the appraiser (what is wrong, what it does to the
//! number, what to do), and the figures behind it. The command line prints them before the
//! value, the workbench beside it, the report in a box on its first page, and sessions keep
//! them.

use std::collections::BTreeMap;

use serde::{Deserialize, Serialize};

/// What a warning is about. The snake_case name is the stable code.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum WarningCode {
    /// The robust fit stopped at its iteration limit before its coefficients settled.
    RobustFitNotConverged,
    /// The robust residual scale is rounding noise: most listings sit exactly on the fit.
    RobustScaleCollapsed,
    /// Cleaning could not check for outliers and implausibly cheap listings.
    OutliersNotChecked,
    /// A comparable included by hand has a variant or condition the fit cannot price.
    ComparableNotAdjustable,
}

impl WarningCode {
    /// The stable code, as in JSON.
    #[must_use]
    pub fn as_str(self) -> &'static str {
        match self {
            Self::RobustFitNotConverged => "robust_fit_not_converged",
            Self::RobustScaleCollapsed => "robust_scale_collapsed",
            Self::OutliersNotChecked => "outliers_not_checked",
            Self::ComparableNotAdjustable => "comparable_not_adjustable",
        }
    }
}

impl std::fmt::Display for WarningCode {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.as_str())
    }
}

/// One warning with the figures behind it.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Warning {
    /// Stable code.
    pub code: WarningCode,
    /// What is wrong, what it does to the number, what to do.
    pub message: String,
    /// The figures behind it, by name (e.g. `iterations`, `limit`).
    #[serde(default)]
    pub figures: BTreeMap<String, f64>,
}

impl Warning {
    /// A warning with its message and no figures.
    #[must_use]
    pub fn new(code: WarningCode, message: impl Into<String>) -> Self {
        Self {
            code,
            message: message.into(),
            figures: BTreeMap::new(),
        }
    }

    /// Adds a figure behind the warning.
    #[must_use]
    pub fn with(mut self, name: &str, value: f64) -> Self {
        self.figures.insert(name.to_owned(), value);
        self
    }
}

/// Whether `warnings` holds one with `code`.
#[must_use]
pub fn has(warnings: &[Warning], code: WarningCode) -> bool {
    warnings.iter().any(|w| w.code == code)
}
