//! Market supply measures.

/// Days' supply = units listed / average daily retail sales over a trailing window of
/// `window_days`; `None` when nothing sold in the window (supply is then unbounded).
#[must_use]
pub fn days_supply(units_listed: usize, units_sold: usize, window_days: u32) -> Option<f64> {
    if units_sold == 0 || window_days == 0 {
        return None;
    }
    Some(units_listed as f64 / (units_sold as f64 / f64::from(window_days)))
}
