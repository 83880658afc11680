//! Ordinary least squares with standard errors and intervals, solved by QR.
//!
//! Follows linfa's pattern: [`OlsParams`] are checked into [`ValidOlsParams`], whose
//! [`linfa::traits::Fit`] implementation returns a separate fitted type, [`OlsFit`]. The
//! hedonic market fit streams its rows into the same QR machinery ([`OlsFit::from_factor`]).

use linfa::ParamGuard;
use linfa::dataset::{AsSingleTargets, DatasetBase};
use linfa::traits::Fit;
use ndarray::{ArrayBase, Data, Ix1, Ix2};
use serde::{Deserialize, Serialize};

use crate::linalg::{QrAccumulator, QrFactor, RankError};
use crate::stats;

/// Why an OLS fit could not be made.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum OlsError {
    /// Fewer observations than coefficients leaves no degrees of freedom for the error.
    #[error(
        "{rows} observations cannot estimate {coefficients} coefficients and an error variance"
    )]
    TooFewRows {
        /// Observations supplied.
        rows: usize,
        /// Coefficients requested.
        coefficients: usize,
    },
    /// The regressors are collinear.
    #[error("regressor {column} is a linear combination of the ones before it")]
    Collinear {
        /// Zero-based index among the coefficients (the intercept, when present, is 0).
        column: usize,
    },
    /// A value is NaN or infinite.
    #[error("row {row} holds a value that is not a finite number")]
    NotFinite {
        /// Zero-based row.
        row: usize,
    },
    /// The interval level is not strictly between 0 and 1.
    #[error("interval level {} must be strictly between 0 and 1", crate::format::number(*.0))]
    BadLevel(f64),
    /// An error raised inside linfa.
    #[error("linfa: {0}")]
    Linfa(String),
}

impl From<linfa::Error> for OlsError {
    fn from(e: linfa::Error) -> Self {
        OlsError::Linfa(e.to_string())
    }
}

/// [`OlsFit::bic`] from its parts: `n` observations, `p` coefficients, residual sum of squares.
#[must_use]
pub fn bic(n: usize, p: usize, rss: f64) -> f64 {
    let n = n as f64;
    let log_likelihood = -0.5 * n * ((2.0 * std::f64::consts::PI * rss / n).ln() + 1.0);
    -2.0 * log_likelihood + p as f64 * n.ln()
}

/// Unchecked OLS settings.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct OlsParams(ValidOlsParams);

/// Checked OLS settings.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct ValidOlsParams {
    /// Whether a constant column is prepended to the regressors.
    pub intercept: bool,
}

impl Default for OlsParams {
    fn default() -> Self {
        Self(ValidOlsParams { intercept: true })
    }
}

impl OlsParams {
    /// OLS with an intercept.
    #[must_use]
    pub fn new() -> Self {
        Self::default()
    }

    /// Sets whether an intercept is fitted.
    #[must_use]
    pub fn intercept(mut self, intercept: bool) -> Self {
        self.0.intercept = intercept;
        self
    }
}

impl ParamGuard for OlsParams {
    type Checked = ValidOlsParams;
    type Error = OlsError;

    fn check_ref(&self) -> Result<&Self::Checked, Self::Error> {
        Ok(&self.0)
    }

    fn check(self) -> Result<Self::Checked, Self::Error> {
        Ok(self.0)
    }
}

/// A fitted least-squares model: coefficients, their standard errors and what intervals need.
#[derive(Debug, Clone)]
pub struct OlsFit {
    coefficients: Vec<f64>,
    std_errors: Vec<f64>,
    rss: f64,
    tss: f64,
    rows: usize,
    factor: QrFactor,
}

impl<D, T> Fit<ArrayBase<D, Ix2>, T, OlsError> for ValidOlsParams
where
    D: Data<Elem = f64>,
    T: AsSingleTargets<Elem = f64>,
{
    type Object = OlsFit;

    fn fit(&self, dataset: &DatasetBase<ArrayBase<D, Ix2>, T>) -> Result<OlsFit, OlsError> {
        let x = dataset.records();
        let y = dataset.as_single_targets();
        fit_arrays(x, &y, self.intercept)
    }
}

fn fit_arrays<D1, D2>(
    x: &ArrayBase<D1, Ix2>,
    y: &ArrayBase<D2, Ix1>,
    intercept: bool,
) -> Result<OlsFit, OlsError>
where
    D1: Data<Elem = f64>,
    D2: Data<Elem = f64>,
{
    let p = x.ncols() + usize::from(intercept);
    let mut acc = QrAccumulator::new(p);
    let mut row = vec![0.0; p];
    for (i, (xi, &yi)) in x.rows().into_iter().zip(y.iter()).enumerate() {
        if !yi.is_finite() || xi.iter().any(|v| !v.is_finite()) {
            return Err(OlsError::NotFinite { row: i });
        }
        fill_row(&mut row, xi.iter().copied(), intercept);
        acc.push_row(&row, yi);
    }
    let mut fit = OlsFit::from_factor(acc.finish(), intercept, y.iter().copied())?;
    // Recompute the residual sum of squares from the data: one more pass, and it keeps the
    // certified residual SD digits on problems where the rotated tail loses a few.
    let mut rss = 0.0;
    for (xi, &yi) in x.rows().into_iter().zip(y.iter()) {
        fill_row(&mut row, xi.iter().copied(), intercept);
        let e = yi - fit.linear_predictor(&row);
        rss += e * e;
    }
    fit.set_rss(rss);
    Ok(fit)
}

fn fill_row(row: &mut [f64], values: impl Iterator<Item = f64>, intercept: bool) {
    let offset = usize::from(intercept);
    if intercept {
        row[0] = 1.0;
    }
    for (slot, v) in row[offset..].iter_mut().zip(values) {
        *slot = v;
    }
}

/// An interval with its level.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct Interval {
    /// Lower bound.
    pub lower: f64,
    /// Upper bound.
    pub upper: f64,
    /// Coverage level, e.g. 0.9.
    pub level: f64,
}

/// A point prediction with its confidence interval for the mean and prediction interval.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct OlsPrediction {
    /// Fitted value `x_h' b`.
    pub fitted: f64,
    /// Standard error of the fitted mean, `s * sqrt(x_h'(X'X)^-1 x_h)`.
    pub se_fit: f64,
    /// Standard error for a new observation, `s * sqrt(1 + x_h'(X'X)^-1 x_h)`.
    pub se_prediction: f64,
    /// Confidence interval for the mean response.
    pub confidence: Interval,
    /// Prediction interval for a new observation.
    pub prediction: Interval,
}

impl OlsFit {
    /// Builds the fit from a finished QR factor; `ys` supplies the responses for the total sum of
    /// squares (centered when an intercept is present, uncentred otherwise).
    pub fn from_factor(
        factor: QrFactor,
        intercept: bool,
        ys: impl Iterator<Item = f64>,
    ) -> Result<Self, OlsError> {
        let p = factor.columns();
        let rows = factor.rows();
        if rows <= p {
            return Err(OlsError::TooFewRows {
                rows,
                coefficients: p,
            });
        }
        let coefficients = factor
            .solve()
            .map_err(|RankError::Deficient { column }| OlsError::Collinear { column })?;
        let tss = total_sum_of_squares(ys, intercept);
        let mut fit = Self {
            coefficients,
            std_errors: Vec::new(),
            rss: factor.rss(),
            tss,
            rows,
            factor,
        };
        fit.set_rss(fit.rss);
        Ok(fit)
    }

    /// Replaces the residual sum of squares (e.g. with one recomputed from the data) and
    /// updates the standard errors that depend on it.
    pub fn set_rss(&mut self, rss: f64) {
        self.rss = rss;
        let s2 = self.mse();
        self.std_errors = self
            .factor
            .unscaled_variances()
            .into_iter()
            .map(|v| (s2 * v).sqrt())
            .collect();
    }

    /// Estimated coefficients (intercept first when fitted).
    #[must_use]
    pub fn coefficients(&self) -> &[f64] {
        &self.coefficients
    }

    /// Standard errors of the coefficients.
    #[must_use]
    pub fn std_errors(&self) -> &[f64] {
        &self.std_errors
    }

    /// Number of observations.
    #[must_use]
    pub fn rows(&self) -> usize {
        self.rows
    }

    /// Residual degrees of freedom, n - p.
    #[must_use]
    pub fn df_residual(&self) -> usize {
        self.rows - self.coefficients.len()
    }

    /// Residual sum of squares.
    #[must_use]
    pub fn rss(&self) -> f64 {
        self.rss
    }

    /// Mean squared error, RSS / (n - p).
    #[must_use]
    pub fn mse(&self) -> f64 {
        self.rss / self.df_residual() as f64
    }

    /// Residual standard deviation, sqrt(MSE).
    #[must_use]
    pub fn residual_sd(&self) -> f64 {
        self.mse().sqrt()
    }

    /// Schwarz's Bayesian information criterion for the Gaussian linear model (Schwarz 1978):
    /// `−2 ln L + p ln n`, with the maximized log-likelihood `ln L = −(n/2)(ln(2π·RSS/n) + 1)`
    /// and `p` the number of coefficients (the error variance is not counted, as in the
    /// general-purpose libraries this is checked against). Lower is better.
    #[must_use]
    pub fn bic(&self) -> f64 {
        bic(self.rows, self.coefficients.len(), self.rss)
    }

    /// Coefficient of determination; uncentred when the model has no intercept.
    #[must_use]
    pub fn r_squared(&self) -> f64 {
        1.0 - self.rss / self.tss
    }

    /// The QR factor, for leverage and covariance computations (consumes the fit).
    #[must_use]
    pub fn into_factor(self) -> QrFactor {
        self.factor
    }

    /// `x' b` for a full design row (including the leading 1 when there is an intercept).
    #[must_use]
    pub fn linear_predictor(&self, design_row: &[f64]) -> f64 {
        design_row
            .iter()
            .zip(&self.coefficients)
            .map(|(x, b)| x * b)
            .sum()
    }

    /// Fitted value with its confidence and prediction intervals at `level`, for a full design
    /// row. Kutner et al. (2005), eqs. 2.33 and 2.38 (simple) and 6.58-6.63 (multiple).
    pub fn predict_interval(
        &self,
        design_row: &[f64],
        level: f64,
    ) -> Result<OlsPrediction, OlsError> {
        self.predict_interval_with_sd(design_row, level, self.residual_sd())
    }

    /// As [`Self::predict_interval`] with a supplied residual scale (robust fits).
    pub fn predict_interval_with_sd(
        &self,
        design_row: &[f64],
        level: f64,
        sd: f64,
    ) -> Result<OlsPrediction, OlsError> {
        if !(level > 0.0 && level < 1.0) {
            return Err(OlsError::BadLevel(level));
        }
        let fitted = self.linear_predictor(design_row);
        let h = self.factor.leverage_of(design_row);
        let se_fit = sd * h.sqrt();
        let se_prediction = sd * (1.0 + h).sqrt();
        let t = stats::t_two_sided(level, self.df_residual() as f64);
        Ok(OlsPrediction {
            fitted,
            se_fit,
            se_prediction,
            confidence: Interval {
                lower: fitted - t * se_fit,
                upper: fitted + t * se_fit,
                level,
            },
            prediction: Interval {
                lower: fitted - t * se_prediction,
                upper: fitted + t * se_prediction,
                level,
            },
        })
    }
}

fn total_sum_of_squares(ys: impl Iterator<Item = f64>, centered: bool) -> f64 {
    let ys: Vec<f64> = ys.collect();
    if centered {
        let mean = ys.iter().sum::<f64>() / ys.len() as f64;
        ys.iter().map(|y| (y - mean).powi(2)).sum()
    } else {
        ys.iter().map(|y| y * y).sum()
    }
}
