//! Gower's general similarity coefficient (Gower 1971, Biometrics 27:857-871).
//!
//! Numeric parts contribute |x_i - x_j| / range, categorical parts 0 when equal and 1 otherwise;
//! the distance is their weighted mean over the parts present on both sides. Similarity is
//! 1 - distance.

use serde::{Deserialize, Serialize};

/// One attribute's contribution to a Gower distance.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum GowerPart {
    /// A numeric attribute: the two values (either may be missing) and the sample range.
    Numeric {
        /// Subject's value.
        a: Option<f64>,
        /// Comparable's value.
        b: Option<f64>,
        /// Range of the attribute over the sample.
        range: f64,
    },
    /// A categorical attribute: whether the two agree (`None` when either is missing).
    Categorical(Option<bool>),
}

/// Weighted Gower distance; `None` when no part is present on both sides.
#[must_use]
pub fn gower_distance(parts: &[(GowerPart, f64)]) -> Option<f64> {
    let mut sum = 0.0;
    let mut weight = 0.0;
    for &(part, w) in parts {
        if w <= 0.0 {
            continue;
        }
        let d = match part {
            GowerPart::Numeric {
                a: Some(a),
                b: Some(b),
                range,
            } => {
                if range > 0.0 {
                    ((a - b).abs() / range).min(1.0)
                } else {
                    0.0
                }
            }
            GowerPart::Categorical(Some(equal)) => {
                if equal {
                    0.0
                } else {
                    1.0
                }
            }
            _ => continue,
        };
        sum += w * d;
        weight += w;
    }
    (weight > 0.0).then(|| sum / weight)
}

/// Weights of the attributes compared when ranking comparables.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct GowerWeights {
    /// Model year.
    pub model_year: f64,
    /// Mileage.
    pub miles: f64,
    /// Variant.
    pub variant: f64,
    /// Condition class.
    pub condition: f64,
    /// Distance from the appraiser (when the feed gives it).
    pub distance: f64,
    /// Days since listed (recent evidence preferred).
    pub days_listed: f64,
}

impl Default for GowerWeights {
    /// Equal weight on year, mileage, variant and condition; half weight on distance and
    /// recency, which matter less once the hard filters have run. A choice of ours, documented
    /// in the README's method section (common practice, no source).
    fn default() -> Self {
        Self {
            model_year: 1.0,
            miles: 1.0,
            variant: 1.0,
            condition: 1.0,
            distance: 0.5,
            days_listed: 0.5,
        }
    }
}
