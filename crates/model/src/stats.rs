//! Small statistics helpers: Student t quantiles (via statrs), medians, MAD, weighted moments.

use statrs::distribution::{ContinuousCDF, Normal, StudentsT};

/// Two-sided critical value `t(1 - (1 - level)/2; df)` for a central interval at `level`.
///
/// Falls back to the normal quantile for very large `df`, where the two agree to many digits
/// and the t inverse CDF is slow.
#[must_use]
pub fn t_two_sided(level: f64, df: f64) -> f64 {
    t_quantile(1.0 - (1.0 - level) / 2.0, df)
}

/// Fewest degrees of freedom a t quantile or p-value is computed for. Nothing here uses fewer
/// than half a degree (the band needs `n_eff > 1.5`); far below it the library's quantile
/// search runs without end (a session edited to `df_residual: 1e-320` hung it).
pub const MIN_DF: f64 = 0.5;

/// Quantile `t(p; df)` of Student's t distribution; NaN unless `0 < p < 1` and
/// `df ≥ MIN_DF` (the library's own routines are never handed a value they may panic or hang
/// on).
#[must_use]
pub fn t_quantile(p: f64, df: f64) -> f64 {
    if !(p > 0.0 && p < 1.0) || df.is_nan() || df < MIN_DF {
        return f64::NAN;
    }
    if df > 1.0e7 {
        return normal_quantile(p);
    }
    match StudentsT::new(0.0, 1.0, df) {
        Ok(dist) => dist.inverse_cdf(p),
        Err(_) => f64::NAN,
    }
}

/// Two-sided p-value of a t statistic with `df` degrees of freedom: 0 for an infinite t, NaN
/// for a NaN t (a coefficient and its standard error both 0 give such a t) or degrees of
/// freedom below [`MIN_DF`].
#[must_use]
pub fn t_p_value(t: f64, df: f64) -> f64 {
    if t.is_nan() || df.is_nan() || df < MIN_DF {
        return f64::NAN;
    }
    if t.is_infinite() {
        return 0.0;
    }
    if df > 1.0e7 {
        return 2.0 * (1.0 - normal_cdf(t.abs()));
    }
    match StudentsT::new(0.0, 1.0, df.max(1.0)) {
        Ok(dist) => 2.0 * (1.0 - dist.cdf(t.abs())),
        Err(_) => f64::NAN,
    }
}

/// Upper-tail p-value of an F statistic with (`df1`, `df2`) degrees of freedom: NaN for a NaN or
/// negative F or degrees of freedom below [`MIN_DF`]; 0 for an infinite F.
#[must_use]
pub fn f_p_value(f: f64, df1: f64, df2: f64) -> f64 {
    if f.is_nan() || f < 0.0 || df1.is_nan() || df2.is_nan() || df1 < MIN_DF || df2 < MIN_DF {
        return f64::NAN;
    }
    if f.is_infinite() {
        return 0.0;
    }
    match statrs::distribution::FisherSnedecor::new(df1, df2) {
        Ok(dist) => 1.0 - statrs::distribution::ContinuousCDF::cdf(&dist, f),
        Err(_) => f64::NAN,
    }
}

/// Standard normal distribution function; NaN for NaN.
#[must_use]
pub fn normal_cdf(x: f64) -> f64 {
    if x.is_nan() {
        return f64::NAN;
    }
    match Normal::new(0.0, 1.0) {
        Ok(dist) => dist.cdf(x),
        Err(_) => f64::NAN,
    }
}

/// Quantile of the standard normal distribution; NaN unless `0 < p < 1`.
#[must_use]
pub fn normal_quantile(p: f64) -> f64 {
    if !(p > 0.0 && p < 1.0) {
        return f64::NAN;
    }
    match Normal::new(0.0, 1.0) {
        Ok(dist) => dist.inverse_cdf(p),
        Err(_) => f64::NAN,
    }
}

/// Median of the values (NaNs must not be present); `None` for an empty slice.
#[must_use]
pub fn median(values: &[f64]) -> Option<f64> {
    quantile(values, 0.5)
}

/// Linear-interpolation quantile (type 7, the common default); `None` for an empty slice.
#[must_use]
pub fn quantile(values: &[f64], q: f64) -> Option<f64> {
    if values.is_empty() {
        return None;
    }
    // Selection instead of a full sort: the two order statistics around h are all that is
    // needed, and finding them is linear in the number of values.
    let mut v = values.to_vec();
    let h = (v.len() - 1) as f64 * q.clamp(0.0, 1.0);
    let lo = h.floor() as usize;
    let (_, &mut below, above) = v.select_nth_unstable_by(lo, f64::total_cmp);
    let next = if h > lo as f64 {
        above
            .iter()
            .copied()
            .min_by(f64::total_cmp)
            .unwrap_or(below)
    } else {
        below
    };
    Some(below + (h - lo as f64) * (next - below))
}

/// Weighted mean and weighted standard deviation (reliability weights, `V1²/(V1² - V2)` bias
/// correction); the SD is `None` when fewer than two weights are positive.
#[must_use]
pub fn weighted_mean_sd(values: &[f64], weights: &[f64]) -> (f64, Option<f64>) {
    let v1: f64 = weights.iter().sum();
    let v2: f64 = weights.iter().map(|w| w * w).sum();
    let mean = values.iter().zip(weights).map(|(x, w)| x * w).sum::<f64>() / v1;
    let positive = weights.iter().filter(|w| **w > 0.0).count();
    if positive < 2 || v1 * v1 - v2 <= 0.0 {
        return (mean, None);
    }
    let ss: f64 = values
        .iter()
        .zip(weights)
        .map(|(x, w)| w * (x - mean).powi(2))
        .sum();
    (mean, Some((ss / (v1 - v2 / v1)).sqrt()))
}

#[cfg(test)]
mod guard_tests {
    use super::*;

    #[test]
    fn values_the_distributions_cannot_take_give_nan_not_a_panic() {
        for (p, df) in [
            (f64::NAN, 10.0),
            (0.9, f64::NAN),
            (0.0, 10.0),
            (1.0, 10.0),
            (0.9, 0.0),
            (0.9, -3.0),
            (0.9, 1e-320),
            (0.9, 0.4),
            (f64::INFINITY, 5.0),
        ] {
            assert!(t_quantile(p, df).is_nan(), "t({p}; {df})");
        }
        assert!(t_p_value(f64::NAN, 10.0).is_nan());
        assert!(t_p_value(2.0, 1e-320).is_nan());
        assert!(t_p_value(f64::INFINITY, 10.0).abs() < f64::MIN_POSITIVE);
        assert!(t_p_value(f64::NEG_INFINITY, f64::INFINITY).abs() < f64::MIN_POSITIVE);
        assert!(normal_quantile(f64::NAN).is_nan());
        assert!(normal_cdf(f64::NAN).is_nan());
        // Infinite degrees of freedom are the normal distribution.
        assert!((t_quantile(0.975, f64::INFINITY) - 1.959_963_984_540_054).abs() < 1e-12);
        let p = t_p_value(1.959_963_984_540_054, 1e12);
        assert!((p - 0.05).abs() < 1e-9, "{p}");
    }
}

#[cfg(test)]
mod quantile_tests {
    use proptest::prelude::*;

    use super::quantile;

    /// Type-7 quantile by sorting every value: the textbook definition.
    fn by_sorting(values: &[f64], q: f64) -> f64 {
        let mut v = values.to_vec();
        v.sort_by(f64::total_cmp);
        let h = (v.len() - 1) as f64 * q;
        let (lo, hi) = (h.floor() as usize, h.ceil() as usize);
        v[lo] + (h - lo as f64) * (v[hi] - v[lo])
    }

    #[test]
    fn small_cases() {
        assert_eq!(quantile(&[], 0.5), None);
        assert_eq!(quantile(&[3.0], 0.9), Some(3.0));
        assert_eq!(quantile(&[4.0, 1.0, 3.0, 2.0], 0.5), Some(2.5));
        assert_eq!(quantile(&[4.0, 1.0, 3.0, 2.0], 1.0), Some(4.0));
        assert_eq!(quantile(&[4.0, 1.0, 3.0, 2.0], 0.0), Some(1.0));
        assert_eq!(quantile(&[5.0, 5.0, 1.0], 0.75), Some(5.0));
    }

    proptest! {
        #[test]
        fn selection_equals_sorting(
            values in prop::collection::vec(-1e6f64..1e6, 1..200),
            q in 0.0f64..=1.0,
        ) {
            let got = quantile(&values, q).unwrap_or(f64::NAN);
            prop_assert_eq!(got.to_bits(), by_sorting(&values, q).to_bits());
        }
    }
}
