//! The hedonic market fit: ln(asking price) on age, mileage, variant and condition.
//!
//! ln P = b0 + f(age) + b_mi * miles/10,000 + sum g_k D_k + e (Court 1939; Griliches 1961;
//! Rosen 1974). Parameters are checked before a fit ([`HedonicParams`] → [`ValidHedonicParams`],
//! as in linfa) and the fit returns a separate [`HedonicModel`], so an unchecked or unfitted
//! model cannot be used. Ordinary least squares by QR, optionally Huber's M-estimator by
//! iteratively reweighted least squares (Huber 1964; Huber & Ronchetti 2009).

mod design;
mod extrapolation;
mod form_choice;
pub mod market_time;
mod mileage;
pub mod premium_fade;
mod robust;

use chrono::{Datelike, NaiveDate};
use linfa::ParamGuard;
use serde::{Deserialize, Serialize};

use crate::condition::Condition;
use crate::linalg::{QrAccumulator, QrFactor};
use crate::market::Market;
use crate::ols::{Interval, OlsError, OlsFit};
use crate::stats;
use crate::vocabulary::NameId;
use crate::warnings::{Warning, WarningCode};

pub use design::{AgeForm, Design, MILES_UNIT, age_years};
pub use form_choice::{
    AgeFormCandidate, AgeFormChoice, CHOICE_SAMPLE, LISTINGS_PER_TERM, choose_age_form,
    cleaning_form,
};
pub use market_time::{MarketDrift, MarketTimeTerm};
pub use mileage::MileageProfile;
pub use premium_fade::{PremiumFadeTest, VariantSlopes};

/// Why a market fit could not be made.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum FitError {
    /// A setting is out of range.
    #[error("invalid fit setting: {0}")]
    InvalidParams(String),
    /// Too few listings for the terms requested.
    #[error(
        "{rows} usable listings cannot support {terms} terms ({names}); widen the market or use a simpler age form"
    )]
    TooFewRows {
        /// Listings available.
        rows: usize,
        /// Terms requested.
        terms: usize,
        /// Term names.
        names: String,
    },
    /// A term cannot be separated from the others.
    #[error(
        "term '{term}' cannot be separated from the terms before it (for example every listing of that variant is also of one condition or one age); drop it or widen the market"
    )]
    Collinear {
        /// Term name.
        term: String,
    },
    /// Other least-squares failure.
    #[error("least squares: {0}")]
    Ols(String),
}

/// Unchecked fit settings.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct HedonicParams(ValidHedonicParams);

/// Checked fit settings.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct ValidHedonicParams {
    /// How age enters.
    pub age_form: AgeForm,
    /// Huber M-estimation instead of least squares.
    pub robust: bool,
    /// Appraisal date: ages are counted to its year.
    pub as_of: NaiveDate,
    /// Huber tuning constant (1.345 gives 95 % efficiency at the normal).
    pub huber_k: f64,
    /// Iteration limit for the robust fit.
    pub max_iterations: u32,
    /// Whether the market-conditions term may enter (it does when the listing dates allow;
    /// see [`market_time`]).
    #[serde(default = "market_time_default")]
    pub market_time: bool,
    /// Whether each variant has its own age slope (its premium may fade with age).
    #[serde(default)]
    pub variant_slopes: bool,
    /// Whether options stated on enough listings get their own terms (see
    /// [`crate::equipment`]).
    #[serde(default)]
    pub equipment: bool,
}

fn market_time_default() -> bool {
    true
}

impl HedonicParams {
    /// Default settings (quadratic age, least squares) at `as_of`.
    #[must_use]
    pub fn new(as_of: NaiveDate) -> Self {
        Self(ValidHedonicParams {
            age_form: AgeForm::Quadratic,
            robust: false,
            as_of,
            huber_k: 1.345,
            max_iterations: 50,
            market_time: true,
            variant_slopes: false,
            equipment: true,
        })
    }

    /// Gives options stated on enough listings their own terms (`true`, the default).
    #[must_use]
    pub fn equipment(mut self, on: bool) -> Self {
        self.0.equipment = on;
        self
    }

    /// Gives each variant its own age slope (`true`) or one slope for all (`false`, the
    /// default).
    #[must_use]
    pub fn variant_slopes(mut self, on: bool) -> Self {
        self.0.variant_slopes = on;
        self
    }

    /// Lets the market-conditions term enter when the listing dates allow (`true`, the default)
    /// or keeps it out.
    #[must_use]
    pub fn market_time(mut self, on: bool) -> Self {
        self.0.market_time = on;
        self
    }

    /// Sets the age form.
    #[must_use]
    pub fn age_form(mut self, form: AgeForm) -> Self {
        self.0.age_form = form;
        self
    }

    /// Chooses the robust (Huber) fit.
    #[must_use]
    pub fn robust(mut self, robust: bool) -> Self {
        self.0.robust = robust;
        self
    }

    /// Sets Huber's tuning constant.
    #[must_use]
    pub fn huber_k(mut self, k: f64) -> Self {
        self.0.huber_k = k;
        self
    }

    /// Sets the robust iteration limit.
    #[must_use]
    pub fn max_iterations(mut self, n: u32) -> Self {
        self.0.max_iterations = n;
        self
    }
}

impl ParamGuard for HedonicParams {
    type Checked = ValidHedonicParams;
    type Error = FitError;

    fn check_ref(&self) -> Result<&Self::Checked, Self::Error> {
        let p = &self.0;
        if !(p.huber_k.is_finite() && p.huber_k > 0.0) {
            return Err(FitError::InvalidParams(format!(
                "Huber k must be positive, got {}",
                p.huber_k
            )));
        }
        if p.max_iterations == 0 {
            return Err(FitError::InvalidParams(
                "the robust fit needs at least one iteration".into(),
            ));
        }
        if p.age_form == AgeForm::Auto {
            return Err(FitError::InvalidParams(
                "the age form 'auto' is chosen before a fit (choose_age_form); a fit takes linear, quadratic or per-year".into(),
            ));
        }
        Ok(p)
    }

    fn check(self) -> Result<Self::Checked, Self::Error> {
        self.check_ref()?;
        Ok(self.0)
    }
}

/// One estimated term.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Term {
    /// Term name, e.g. `age_years`, `miles_10k`, `variant=Ambrel`.
    pub name: String,
    /// Coefficient on ln(price).
    pub estimate: f64,
    /// Standard error.
    pub std_error: f64,
    /// estimate / std_error.
    pub t_value: f64,
    /// Two-sided p-value.
    pub p_value: f64,
    /// 100 (e^b - 1): the percentage change in price per unit of the term (none for the
    /// intercept, which is a level, not an effect).
    pub percent_effect: Option<f64>,
}

/// Average annual depreciation over a horizon, from the fitted curve.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct AnnualDepreciation {
    /// Years averaged over (from age 0).
    pub horizon_years: u32,
    /// Percent per year from age alone, mileage held fixed: 100 (1 - e^b_age) in the linear form.
    pub age_only_pct: f64,
    /// Percent per year when mileage also grows at the typical rate.
    pub with_typical_miles_pct: f64,
}

/// A value estimate in currency from the fitted market.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct ValueEstimate {
    /// exp(fitted ln price): the market's median price for these attributes.
    pub median: f64,
    /// Median times Duan's smearing factor: the market's mean price.
    pub mean: f64,
    /// Interval for the market's median price at these attributes (the confidence interval for
    /// the mean of ln price, back-transformed).
    pub confidence_interval: Interval,
    /// Interval for one vehicle's price (the prediction interval, back-transformed).
    pub prediction_interval: Interval,
    /// Fitted ln price.
    pub log_fitted: f64,
    /// Standard error of the fitted ln price.
    pub log_se_fit: f64,
    /// Standard error for a new vehicle's ln price.
    pub log_se_prediction: f64,
}

/// What a vehicle is, as far as the fitted market is concerned.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Attributes {
    /// Age in model years (fractional in forecasts).
    pub age_years: f64,
    /// Odometer in miles.
    pub miles: f64,
    /// Variant id in the market's vocabulary.
    pub variant: NameId,
    /// Condition class.
    pub condition: Condition,
}

/// A fitted market: coefficients, their uncertainty and everything needed to predict.
#[derive(Debug, Clone)]
pub struct HedonicModel {
    params: ValidHedonicParams,
    design: Design,
    coefficients: Vec<f64>,
    std_errors: Vec<f64>,
    /// (X'X)^-1 through R, from the unweighted design.
    factor: QrFactor,
    residual_sd: f64,
    /// Scale of the coefficient covariance (equals `residual_sd` for least squares).
    coefficient_sd: f64,
    rows: usize,
    r_squared: f64,
    smearing: f64,
    /// Residual sum of squares of ln price.
    rss: f64,
    robust_report: Option<RobustReport>,
    mileage: MileageProfile,
    /// Lowest and highest odometer among the fitted listings.
    miles_range: (f64, f64),
    /// Whether the market-conditions term is in the fit, and why not.
    market_time: MarketTimeTerm,
}

/// How the robust fit went.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
pub struct RobustReport {
    /// IRLS passes made.
    pub iterations: u32,
    /// The iteration limit.
    pub limit: u32,
    /// Whether the coefficients settled within the limit.
    pub converged: bool,
    /// Whether the residual scale collapsed to rounding noise (the least-squares fit is then
    /// used).
    pub scale_collapsed: bool,
}

impl ValidHedonicParams {
    /// Fits the market over `rows` of `market` (normally one segment's clean rows).
    pub fn fit(&self, market: &Market, rows: &[usize]) -> Result<HedonicModel, FitError> {
        let as_of_year = self.as_of.year();
        let market_time = MarketTimeTerm::decide(market, rows, self.market_time);
        let design = Design::for_rows(
            market,
            rows,
            self.age_form,
            as_of_year,
            self.variant_slopes,
            if self.equipment {
                crate::equipment::fitted_options(market, rows)
            } else {
                Vec::new()
            },
            market_time.in_fit(),
        );
        let p = design.width();
        if rows.len() <= p {
            return Err(FitError::TooFewRows {
                rows: rows.len(),
                terms: p,
                names: design.names.join(", "),
            });
        }
        // ln(price) once per fit: the robust fit's passes reuse it.
        let ln_price: Vec<f64> = rows.iter().map(|&r| market.asking_price[r].ln()).collect();
        let months = market_time
            .in_fit()
            .then(|| market_time::months_of(market, rows, self.as_of));
        let option_columns = option_columns_of(market, rows, &design);
        let fit_rows = FitRows {
            market,
            rows,
            ln_price: &ln_price,
            months: months.as_deref(),
            option_columns: &option_columns,
            design: &design,
            as_of_year,
        };
        let factor = accumulate(&fit_rows, None);
        let ols = OlsFit::from_factor(factor, true, ln_price.iter().copied())
            .map_err(|e| fit_error(e, &design))?;
        let mut coefficients = ols.coefficients().to_vec();
        let mut residuals = residuals(&fit_rows, &coefficients);
        let rss: f64 = residuals.iter().map(|r| r * r).sum();
        let df = (rows.len() - p) as f64;
        let mut residual_sd = (rss / df).sqrt();
        let mut coefficient_sd = residual_sd;
        let mut robust_report = None;
        if self.robust {
            let outcome = robust::huber(self, &fit_rows, coefficients.clone(), residuals.clone())?;
            robust_report = Some(RobustReport {
                iterations: outcome.iterations,
                limit: self.max_iterations,
                converged: outcome.converged,
                scale_collapsed: outcome.scale_collapsed,
            });
            // A collapsed scale cannot weigh residuals or set intervals: the least-squares
            // fit stands, with its own residual SD, and the model says so.
            if !outcome.scale_collapsed {
                coefficients = outcome.coefficients;
                residuals = outcome.residuals;
                residual_sd = outcome.scale;
                coefficient_sd = outcome.coefficient_sd;
            }
        }
        let factor = ols.into_factor();
        let std_errors = factor
            .unscaled_variances()
            .into_iter()
            .map(|v| coefficient_sd * v.sqrt())
            .collect();
        let tss = centred_ss(ln_price.iter().copied());
        let rss: f64 = residuals.iter().map(|r| r * r).sum();
        // Duan (1983): the mean of exp(e) over the residuals converts a median to a mean.
        let smearing = residuals.iter().map(|r| r.exp()).sum::<f64>() / residuals.len() as f64;
        let miles_range = rows
            .iter()
            .map(|&r| market.miles[r])
            .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), m| {
                (lo.min(m), hi.max(m))
            });
        Ok(HedonicModel {
            params: *self,
            mileage: MileageProfile::from_rows(market, rows, as_of_year),
            miles_range,
            design,
            coefficients,
            std_errors,
            factor,
            residual_sd,
            coefficient_sd,
            rows: rows.len(),
            r_squared: 1.0 - rss / tss,
            rss,
            smearing,
            robust_report,
            market_time,
        })
    }
}

/// The option columns of each distinct options cell of `rows` (a market has few).
pub(crate) fn option_columns_of(
    market: &Market,
    rows: &[usize],
    design: &Design,
) -> std::collections::HashMap<NameId, Vec<usize>> {
    if design.options.is_empty() {
        return std::collections::HashMap::new();
    }
    rows.iter()
        .map(|&r| market.options[r])
        .collect::<std::collections::BTreeSet<_>>()
        .into_iter()
        .map(|cell| (cell, design.option_columns(market.names.name(cell))))
        .collect()
}

fn fit_error(e: OlsError, design: &Design) -> FitError {
    match e {
        OlsError::Collinear { column } => FitError::Collinear {
            term: design.names.get(column).cloned().unwrap_or_default(),
        },
        OlsError::TooFewRows { rows, coefficients } => FitError::TooFewRows {
            rows,
            terms: coefficients,
            names: design.names.join(", "),
        },
        other => FitError::Ols(other.to_string()),
    }
}

fn centred_ss(values: impl Iterator<Item = f64>) -> f64 {
    // Welford's update: one pass, no cancellation.
    let (mut n, mut mean, mut m2) = (0.0, 0.0, 0.0);
    for v in values {
        n += 1.0;
        let d = v - mean;
        mean += d / n;
        m2 += d * (v - mean);
    }
    m2
}

/// The rows of one fit with what every pass over them needs.
pub(crate) struct FitRows<'a> {
    pub market: &'a Market,
    pub rows: &'a [usize],
    /// ln(asking price) of each row, in the order of `rows`.
    pub ln_price: &'a [f64],
    /// Months before the appraisal date of each row's listing, when the design has the term.
    pub months: Option<&'a [f64]>,
    /// The option columns each distinct options cell sets (empty without option terms).
    pub option_columns: &'a std::collections::HashMap<NameId, Vec<usize>>,
    pub design: &'a Design,
    pub as_of_year: i32,
}

impl FitRows<'_> {
    /// Fills `x` with the design row of `rows[i]`.
    fn fill(&self, i: usize, x: &mut [f64]) {
        let r = self.rows[i];
        self.design.fill_row(
            age_years(self.market.model_year[r], self.as_of_year),
            self.market.miles[r],
            self.market.variant[r],
            self.market.condition[r],
            x,
        );
        if let (Some(c), Some(months)) = (self.design.time_column(), self.months) {
            x[c] = months[i];
        }
        if let Some(columns) = self.option_columns.get(&self.market.options[r]) {
            for &c in columns {
                x[c] = 1.0;
            }
        }
    }

    /// The row ranges, one per core, for a pass over many rows (one range for a few rows).
    fn parts(&self) -> Vec<std::ops::Range<usize>> {
        let n = self.rows.len();
        let threads = std::thread::available_parallelism().map_or(1, std::num::NonZero::get);
        let threads = if n > 20_000 { threads } else { 1 };
        let per = n.div_ceil(threads).max(1);
        (0..n).step_by(per).map(|s| s..(s + per).min(n)).collect()
    }
}

/// Runs `work` on each part of the rows, on its own core when there are several.
fn each_part<T: Send>(
    parts: Vec<std::ops::Range<usize>>,
    work: &(dyn Fn(std::ops::Range<usize>) -> T + Sync),
) -> Vec<T> {
    if parts.len() < 2 {
        return parts.into_iter().map(work).collect();
    }
    std::thread::scope(|s| {
        let handles: Vec<_> = parts
            .into_iter()
            .map(|part| s.spawn(move || work(part)))
            .collect();
        handles
            .into_iter()
            .map(|h| {
                h.join()
                    .unwrap_or_else(|panic| std::panic::resume_unwind(panic))
            })
            .collect()
    })
}

/// Folds the design rows (optionally weighted) into a QR factor, splitting the rows over the
/// machine's cores.
pub(crate) fn accumulate(rows: &FitRows<'_>, weights: Option<&[f64]>) -> QrFactor {
    let p = rows.design.width();
    let fold = |part: std::ops::Range<usize>| {
        let mut acc = QrAccumulator::new(p);
        let mut x = vec![0.0; p];
        for i in part {
            rows.fill(i, &mut x);
            let mut y = rows.ln_price[i];
            if let Some(w) = weights {
                let s = w[i].sqrt();
                for v in &mut x {
                    *v *= s;
                }
                y *= s;
            }
            acc.push_row(&x, y);
        }
        acc
    };
    let mut total = QrAccumulator::new(p);
    for part in each_part(rows.parts(), &fold) {
        total.merge(part);
    }
    total.finish()
}

/// ln(price) residuals of the rows under `coefficients`.
pub(crate) fn residuals(rows: &FitRows<'_>, coefficients: &[f64]) -> Vec<f64> {
    let part_residuals = |part: std::ops::Range<usize>| {
        let mut x = vec![0.0; rows.design.width()];
        part.map(|i| {
            rows.fill(i, &mut x);
            rows.ln_price[i] - dot(&x, coefficients)
        })
        .collect::<Vec<f64>>()
    };
    each_part(rows.parts(), &part_residuals).concat()
}

fn dot(a: &[f64], b: &[f64]) -> f64 {
    a.iter().zip(b).map(|(x, y)| x * y).sum()
}

impl HedonicModel {
    /// The settings the model was fitted with.
    #[must_use]
    pub fn params(&self) -> &ValidHedonicParams {
        &self.params
    }

    /// The design (levels and term names).
    #[must_use]
    pub fn design(&self) -> &Design {
        &self.design
    }

    /// The typical-mileage profile of the fitted rows.
    #[must_use]
    pub fn mileage(&self) -> &MileageProfile {
        &self.mileage
    }

    /// Coefficients, intercept first, in [`Design::names`] order.
    #[must_use]
    pub fn coefficients(&self) -> &[f64] {
        &self.coefficients
    }

    /// Listings fitted.
    #[must_use]
    pub fn rows(&self) -> usize {
        self.rows
    }

    /// Residual degrees of freedom.
    #[must_use]
    pub fn df_residual(&self) -> usize {
        self.rows - self.coefficients.len()
    }

    /// Residual SD of ln price (robust scale for the Huber fit).
    #[must_use]
    pub fn residual_sd(&self) -> f64 {
        self.residual_sd
    }

    /// R² of ln price.
    #[must_use]
    pub fn r_squared(&self) -> f64 {
        self.r_squared
    }

    /// Schwarz's BIC of the least-squares fit of ln price (see [`crate::ols::bic`]); for a
    /// robust fit, of its residuals against the same formula.
    #[must_use]
    pub fn bic(&self) -> f64 {
        crate::ols::bic(self.rows, self.coefficients.len(), self.rss)
    }

    /// Duan's smearing factor.
    #[must_use]
    pub fn smearing(&self) -> f64 {
        self.smearing
    }

    /// IRLS iterations used (0 for least squares).
    #[must_use]
    pub fn iterations(&self) -> u32 {
        self.robust_report.map_or(0, |r| r.iterations)
    }

    /// How the robust fit went; `None` for least squares.
    #[must_use]
    pub fn robust_report(&self) -> Option<RobustReport> {
        self.robust_report
    }

    /// What the fit itself cannot vouch for: a robust fit that did not settle, or whose scale
    /// collapsed.
    #[must_use]
    pub fn warnings(&self) -> Vec<Warning> {
        let mut out = Vec::new();
        if let Some(d) = self.market_drift().filter(|d| !d.is_distinguishable()) {
            out.push(
                Warning::new(
                    WarningCode::MarketTrendUncertain,
                    format!(
                        "The market's drift over the listing dates ({:+.2} % a month, standard error {:.2} points) cannot be told from no drift at all (p = {:.2}). Each comparable's market-conditions line is still shown at the fitted rate; read those lines as within the noise, or switch the term off and compare.",
                        d.monthly_change_pct(),
                        100.0 * d.std_error,
                        d.p_value
                    ),
                )
                .with("monthly_change_pct", d.monthly_change_pct())
                .with("std_error", d.std_error)
                .with("p_value", d.p_value),
            );
        }
        if let Some(r) = self.robust_report {
            if r.scale_collapsed {
                out.push(
                    Warning::new(
                        WarningCode::RobustScaleCollapsed,
                        "More than half the listings sit exactly on the fitted curve (copies of one listing, or a fit of very few), so the robust fit has no spread to weigh the others by. The least-squares fit is used instead; check the file for repeated rows.",
                    )
                    .with("listings", self.rows as f64),
                );
            } else if !r.converged {
                out.push(
                    Warning::new(
                        WarningCode::RobustFitNotConverged,
                        format!(
                            "The robust fit stopped at its limit of {} passes before its estimates settled, so they may still move. Compare with the least-squares fit (leave out --robust) before relying on the value.",
                            r.limit
                        ),
                    )
                    .with("iterations", f64::from(r.iterations))
                    .with("limit", f64::from(r.limit)),
                );
            }
        }
        out
    }

    /// Appraisal year ages are counted to.
    #[must_use]
    pub fn as_of_year(&self) -> i32 {
        self.params.as_of.year()
    }

    /// Every term with its estimate, standard error, t, p and percentage effect.
    #[must_use]
    pub fn terms(&self) -> Vec<Term> {
        let df = self.df_residual() as f64;
        self.design
            .names
            .iter()
            .zip(&self.coefficients)
            .zip(&self.std_errors)
            .map(|((name, &b), &se)| {
                let t = b / se;
                Term {
                    name: name.clone(),
                    estimate: b,
                    std_error: se,
                    t_value: t,
                    p_value: stats::t_p_value(t, df),
                    percent_effect: (name != "intercept").then(|| 100.0 * (b.exp() - 1.0)),
                }
            })
            .collect()
    }

    /// The design row for `attributes` (continued beyond the data; see
    /// [`Self::prediction_row`]).
    #[must_use]
    pub fn design_row(&self, a: &Attributes) -> Vec<f64> {
        self.prediction_row(a)
    }

    /// `x' b` for a full design row.
    #[must_use]
    pub fn linear_predictor(&self, design_row: &[f64]) -> f64 {
        dot(design_row, &self.coefficients)
    }

    /// `x'(X'X)^-1 x` for a full design row.
    #[must_use]
    pub fn factor_leverage(&self, design_row: &[f64]) -> f64 {
        self.factor.leverage_of(design_row)
    }

    /// Fitted ln price for `attributes` (continued beyond the data).
    #[must_use]
    pub fn log_price(&self, a: &Attributes) -> f64 {
        dot(&self.prediction_row(a), &self.coefficients)
    }

    /// Fitted ln price of market row `row`, at its own listing date when the fit has the
    /// market-conditions term.
    #[must_use]
    pub fn log_price_of_row(&self, market: &Market, row: usize) -> f64 {
        self.log_price(&self.attributes_of_row(market, row)) + self.row_shift(market, row)
    }

    /// Whether the market-conditions term is in the fit, and why not.
    #[must_use]
    pub fn market_time(&self) -> &MarketTimeTerm {
        &self.market_time
    }

    /// The fitted market drift, when the term is in the fit.
    #[must_use]
    pub fn market_drift(&self) -> Option<MarketDrift> {
        let c = self.design.time_column()?;
        let df = self.df_residual() as f64;
        let (b, se) = (self.coefficients[c], self.std_errors[c]);
        Some(MarketDrift {
            per_month_before: b,
            std_error: se,
            p_value: stats::t_p_value(b / se, df),
        })
    }

    /// The age slope of `variant` over the base variant's, per year (0 without variant slopes,
    /// for the base or an unknown variant).
    #[must_use]
    pub fn variant_age_slope(&self, variant: NameId) -> f64 {
        self.design
            .slope_column(variant)
            .map_or(0.0, |c| self.coefficients[c])
    }

    /// The part of `variant`'s premium that changes with age, at `age`: its age slope times the
    /// age, held at the nearest edge of the fitted ages beyond them (as the prediction row).
    #[must_use]
    pub fn variant_slope_effect(&self, variant: NameId, age: f64) -> f64 {
        let slope = self.variant_age_slope(variant);
        if slope == 0.0 {
            return 0.0;
        }
        slope * self.age_edge(age).0
    }

    /// `variant`'s premium over the base at `age` in ln price, with its standard error (0 and
    /// 0 for the base).
    #[must_use]
    pub fn premium(&self, variant: NameId, age: f64) -> (f64, f64) {
        let first = self.design.miles_column() + 1;
        let Some(pos) = self.design.variants.iter().position(|v| *v == variant) else {
            return (0.0, 0.0);
        };
        if pos == 0 {
            return (0.0, 0.0);
        }
        let mut c = vec![0.0; self.design.width()];
        c[first + pos - 1] = 1.0;
        if let Some(col) = self.design.slope_column(variant) {
            c[col] = self.age_edge(age).0;
        }
        let effect = dot(&c, &self.coefficients);
        let se = self.coefficient_sd * self.factor.leverage_of(&c).sqrt();
        (effect, se)
    }

    /// The fitted ln-price effect and standard error of each option with a term: (name shown,
    /// effect, standard error), by name.
    #[must_use]
    pub fn option_effects(&self) -> Vec<(String, f64, f64)> {
        self.design
            .options
            .iter()
            .enumerate()
            .map(|(i, (_, name))| {
                let c = self.design.option_column(i);
                (name.clone(), self.coefficients[c], self.std_errors[c])
            })
            .collect()
    }

    /// The ln-price effect of market row `row`'s own date and options, which a prediction from
    /// its attributes alone (of the appraisal date, without options) leaves out.
    #[must_use]
    pub fn row_shift(&self, market: &Market, row: usize) -> f64 {
        self.row_shifts(market, &[row])[0]
    }

    /// [`Self::row_shift`] of each of `rows`, each options cell's columns worked out once.
    #[must_use]
    pub fn row_shifts(&self, market: &Market, rows: &[usize]) -> Vec<f64> {
        let columns = option_columns_of(market, rows, &self.design);
        rows.iter()
            .map(|&r| {
                let options: f64 = columns
                    .get(&market.options[r])
                    .into_iter()
                    .flatten()
                    .map(|&c| self.coefficients[c])
                    .sum();
                self.market_conditions_effect(market.listed_on[r]) + options
            })
            .collect()
    }

    /// Residual sum of squares of ln price.
    #[must_use]
    pub fn rss(&self) -> f64 {
        self.rss
    }

    /// The ln-price effect of a listing dated `listed_on` relative to the appraisal date (0
    /// without the term or without a date).
    #[must_use]
    pub fn market_conditions_effect(&self, listed_on: Option<NaiveDate>) -> f64 {
        match (self.market_drift(), listed_on) {
            (Some(d), Some(date)) => {
                d.per_month_before * market_time::months_before(self.params.as_of, date)
            }
            _ => 0.0,
        }
    }

    /// The attributes of market row `row`.
    #[must_use]
    pub fn attributes_of_row(&self, market: &Market, row: usize) -> Attributes {
        Attributes {
            age_years: age_years(market.model_year[row], self.as_of_year()),
            miles: market.miles[row],
            variant: market.variant[row],
            condition: market.condition[row],
        }
    }

    /// `x'(X'X)^-1 x` for `attributes`: the leverage a listing with them would have (beyond
    /// the data, of the row continued at the edge's rate; see [`Self::spread_row`]).
    #[must_use]
    pub fn leverage(&self, a: &Attributes) -> f64 {
        self.factor.leverage_of(&self.spread_row(a))
    }

    /// Market value in currency with both intervals at `level` (e.g. 0.8), without options.
    #[must_use]
    pub fn estimate(&self, a: &Attributes, level: f64) -> ValueEstimate {
        self.estimate_equipped(a, "", level)
    }

    /// As [`Self::estimate`], for a vehicle with the options of `options` (a cell of names
    /// separated by [`crate::equipment::SEPARATOR`]; those without a term count for nothing).
    #[must_use]
    pub fn estimate_equipped(&self, a: &Attributes, options: &str, level: f64) -> ValueEstimate {
        let columns = self.design.option_columns(options);
        let with_options = |mut x: Vec<f64>| {
            for &c in &columns {
                x[c] = 1.0;
            }
            x
        };
        let log_fitted = dot(&with_options(self.prediction_row(a)), &self.coefficients);
        let h = self.factor.leverage_of(&with_options(self.spread_row(a)));
        let log_se_fit = self.coefficient_sd * h.sqrt();
        let log_se_prediction = (self.residual_sd.powi(2) + self.coefficient_sd.powi(2) * h).sqrt();
        let t = stats::t_two_sided(level, self.df_residual() as f64);
        let median = log_fitted.exp();
        ValueEstimate {
            median,
            mean: median * self.smearing,
            confidence_interval: Interval {
                lower: (log_fitted - t * log_se_fit).exp(),
                upper: (log_fitted + t * log_se_fit).exp(),
                level,
            },
            prediction_interval: Interval {
                lower: (log_fitted - t * log_se_prediction).exp(),
                upper: (log_fitted + t * log_se_prediction).exp(),
                level,
            },
            log_fitted,
            log_se_fit,
            log_se_prediction,
        }
    }

    /// Coefficient on ln price per mile.
    #[must_use]
    pub fn miles_slope(&self) -> f64 {
        self.coefficients[self.design.miles_column()] / MILES_UNIT
    }

    /// ln-price effect of a variant relative to the base variant (0 for the base or unknown).
    #[must_use]
    pub fn variant_effect(&self, variant: NameId) -> f64 {
        let first = self.design.miles_column() + 1;
        match self.design.variants.iter().position(|v| *v == variant) {
            Some(pos) if pos > 0 => self.coefficients[first + pos - 1],
            _ => 0.0,
        }
    }

    /// ln-price effect of a condition relative to the base condition (0 for the base or unknown).
    #[must_use]
    pub fn condition_effect(&self, condition: Condition) -> f64 {
        let first = self.design.miles_column() + self.design.variants.len();
        match self.design.conditions.iter().position(|c| *c == condition) {
            Some(pos) if pos > 0 => self.coefficients[first + pos - 1],
            _ => 0.0,
        }
    }

    /// Average annual depreciation over ages 0..`horizon`.
    #[must_use]
    pub fn annual_depreciation(&self, horizon_years: u32) -> AnnualDepreciation {
        let h = f64::from(horizon_years.max(1));
        let age_only = (self.age_effect(h) - self.age_effect(0.0)) / h;
        let miles_part = self.miles_slope()
            * (self.mileage.typical_miles(h) - self.mileage.typical_miles(0.0))
            / h;
        AnnualDepreciation {
            horizon_years: horizon_years.max(1),
            age_only_pct: 100.0 * (1.0 - age_only.exp()),
            with_typical_miles_pct: 100.0 * (1.0 - (age_only + miles_part).exp()),
        }
    }
}
