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

/// Days' supply of one segment at a date, from the listing and sale dates in the market.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct SegmentSupply {
    /// Units listed and not yet sold on the date.
    pub listed: usize,
    /// Units sold in the trailing window.
    pub sold_in_window: usize,
    /// The window, days.
    pub window_days: u32,
    /// Days' supply; `None` when nothing sold in the window.
    pub days_supply: Option<f64>,
}

/// Days' supply of the listings `rows` as of `as_of`, over a trailing window of `window_days`;
/// `None` when no listing has a sale date (the file cannot tell).
#[must_use]
pub fn segment_supply(
    market: &crate::market::Market,
    rows: &[usize],
    as_of: chrono::NaiveDate,
    window_days: u32,
) -> Option<SegmentSupply> {
    if !rows.iter().any(|&r| market.sold_on[r].is_some()) {
        return None;
    }
    let start = as_of - chrono::Duration::days(i64::from(window_days));
    let listed = rows
        .iter()
        .filter(|&&r| {
            market.listed_on[r].is_none_or(|d| d <= as_of)
                && market.sold_on[r].is_none_or(|d| d > as_of)
        })
        .count();
    let sold_in_window = rows
        .iter()
        .filter(|&&r| market.sold_on[r].is_some_and(|d| d > start && d <= as_of))
        .count();
    Some(SegmentSupply {
        listed,
        sold_in_window,
        window_days,
        days_supply: days_supply(listed, sold_in_window, window_days),
    })
}
