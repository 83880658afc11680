//! Huber's M-estimator by iteratively reweighted least squares.
//!
//! Weights w = min(1, k / |r/s|) with k = 1.345 and scale s = median|r| / 0.6745 re-estimated
//! each pass (Huber 1964; Huber & Ronchetti 2009, ch. 7). The coefficient covariance is Huber's
//! asymptotic form κ² [Σψ²/(n-p)] / [mean ψ']² · s² (X'X)^-1 with the small-sample correction
//! κ = 1 + (p/n) var(ψ')/mean(ψ')² (Huber 1981, §7.6; the same form R's MASS::rlm reports —
//! stated from memory, checked here only by the properties in the test suite).

use super::{FitError, FitRows, ValidHedonicParams, accumulate, residuals};

/// MAD to normal-SD factor.
const MAD_TO_SD: f64 = 0.674_489_750_196_081_7;

/// A residual scale below this fraction of the ln-price level is rounding noise, not a spread:
/// more than half the listings sit exactly on the fit (a perfect fit of a tiny segment, or
/// copies of one listing). Real markets have scales of 0.01 to 0.3 in ln price (a level near
/// 10); rounding leaves about 1e-15. Scoring outliers against such a scale would flag nearly
/// every other listing.
pub const RELATIVE_SCALE_FLOOR: f64 = 1e-9;

/// Change in the coefficients (relative) below which the iteration has settled.
const TOLERANCE: f64 = 1e-8;

/// Whether `scale` counts as collapsed for ln prices around `level`.
#[must_use]
pub fn scale_collapsed(scale: f64, level: f64) -> bool {
    scale.is_nan() || scale <= RELATIVE_SCALE_FLOOR * level.abs().max(1.0)
}

/// The converged robust fit.
pub(super) struct RobustOutcome {
    pub coefficients: Vec<f64>,
    pub residuals: Vec<f64>,
    /// Robust residual scale s.
    pub scale: f64,
    /// Scale for the coefficient covariance.
    pub coefficient_sd: f64,
    pub iterations: u32,
    /// Whether the coefficients settled within the iteration limit.
    pub converged: bool,
    /// Whether the scale collapsed (see [`RELATIVE_SCALE_FLOOR`]).
    pub scale_collapsed: bool,
}

pub(super) fn huber(
    params: &ValidHedonicParams,
    rows: &FitRows<'_>,
    mut coefficients: Vec<f64>,
    mut resid: Vec<f64>,
) -> Result<RobustOutcome, FitError> {
    let k = params.huber_k;
    let level =
        rows.ln_price.iter().map(|p| p.abs()).sum::<f64>() / rows.ln_price.len().max(1) as f64;
    let mut scale = robust_scale(&resid);
    let mut iterations = 0;
    let mut converged = false;
    while iterations < params.max_iterations {
        if scale_collapsed(scale, level) {
            // A perfect fit of at least half the rows: nothing to down-weight, and the least
            // squares fit stands.
            converged = true;
            break;
        }
        iterations += 1;
        let weights: Vec<f64> = resid
            .iter()
            .map(|r| {
                let u = (r / scale).abs();
                if u <= k { 1.0 } else { k / u }
            })
            .collect();
        let factor = accumulate(rows, Some(&weights));
        let next = factor
            .solve()
            .map_err(
                |crate::linalg::RankError::Deficient { column }| FitError::Collinear {
                    term: rows.design.names.get(column).cloned().unwrap_or_default(),
                },
            )?;
        let change = next
            .iter()
            .zip(&coefficients)
            .map(|(a, b)| (a - b).abs() / (1.0 + b.abs()))
            .fold(0.0, f64::max);
        coefficients = next;
        resid = residuals(rows, &coefficients);
        scale = robust_scale(&resid);
        if change < TOLERANCE {
            converged = true;
            break;
        }
    }
    let scale_collapsed = scale_collapsed(scale, level);
    let coefficient_sd = huber_coefficient_sd(&resid, scale, k, rows.design.width());
    Ok(RobustOutcome {
        coefficients,
        residuals: resid,
        scale,
        coefficient_sd,
        iterations,
        converged,
        scale_collapsed,
    })
}

/// median(|r|) / 0.6745.
fn robust_scale(resid: &[f64]) -> f64 {
    let mut abs: Vec<f64> = resid.iter().map(|r| r.abs()).collect();
    if abs.is_empty() {
        return 0.0;
    }
    let mid = abs.len() / 2;
    let (_, m, _) = abs.select_nth_unstable_by(mid, f64::total_cmp);
    *m / MAD_TO_SD
}

fn huber_coefficient_sd(resid: &[f64], scale: f64, k: f64, p: usize) -> f64 {
    let n = resid.len() as f64;
    if scale.is_nan() || scale <= 0.0 || n <= p as f64 {
        return 0.0;
    }
    let mut sum_psi2 = 0.0;
    let mut inside = 0.0;
    for r in resid {
        let u = r / scale;
        let psi = u.clamp(-k, k);
        sum_psi2 += psi * psi;
        if u.abs() <= k {
            inside += 1.0;
        }
    }
    let mean_dpsi = inside / n;
    if mean_dpsi == 0.0 {
        return f64::NAN;
    }
    let var_dpsi = mean_dpsi * (1.0 - mean_dpsi);
    let kappa = 1.0 + (p as f64 / n) * var_dpsi / (mean_dpsi * mean_dpsi);
    scale * (sum_psi2 / (n - p as f64)).sqrt() * kappa / mean_dpsi
}
