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

use crate::format::thousands;

impl SegmentSupply {
    /// "Days' supply 62 days (410 listed, 198 sold in the last 30 days)".
    #[must_use]
    pub fn describe(&self) -> String {
        match self.days_supply {
            Some(d) => format!(
                "Days' supply of this model: {d:.0} days ({} listed, {} sold in the last {} days).",
                thousands(self.listed as f64),
                thousands(self.sold_in_window as f64),
                self.window_days
            ),
            None => format!(
                "Days' supply: none of the {} listed sold in the last {} days.",
                thousands(self.listed as f64),
                self.window_days
            ),
        }
    }
}

/// Days' supply of the listings `rows` as of `as_of`, over a trailing window of `window_days`;
/// listings older than `stale_after_days` and unsold are not counted as supply (the cleaning
/// rule's stale listings). `None` when no listing has a sale date (the file cannot tell).
#[must_use]
pub fn segment_supply(
    market: &crate::market::Market,
    rows: &[usize],
    as_of: chrono::NaiveDate,
    window_days: u32,
    stale_after_days: Option<u32>,
) -> Option<SegmentSupply> {
    if !rows.iter().any(|&r| market.sold_on[r].is_some()) {
        return None;
    }
    let start = as_of - chrono::Duration::days(i64::from(window_days));
    let listed = rows
        .iter()
        .filter(|&&r| {
            market.listed_on[r].is_none_or(|d| {
                d <= as_of
                    && stale_after_days
                        .is_none_or(|stale| (as_of - d).num_days() <= i64::from(stale))
            }) && market.sold_on[r].is_none_or(|d| d > as_of)
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

#[cfg(test)]
mod tests {
    use chrono::NaiveDate;

    use super::*;
    use crate::market::{Listing, Market};

    fn listing(line: u64, listed: i64, sold: Option<i64>) -> Listing {
        let day =
            |n: i64| NaiveDate::from_ymd_opt(2026, 11, 30).map(|d| d - chrono::Duration::days(n));
        Listing {
            listed_on: day(listed),
            sold_on: sold.and_then(day),
            ..Listing::asking(line, ("Quellmark", "Tessel"), 2022, 40_000.0, 30_000.0)
        }
    }

    #[test]
    fn supply_counts_active_unsold_listings_against_the_trailing_sales_rate() {
        // Worked by hand: listed 10, 20, 50 days ago and unsold (3 active); one listed 200 days
        // ago and unsold (stale after 180, not supply); sold 5 and 25 days ago (2 in the
        // 30-day window); sold 40 days ago (outside). Rate 2 / 30 a day; 3 / (2/30) = 45 days.
        let mut market = Market::default();
        for (i, (listed, sold)) in [
            (10, None),
            (20, None),
            (50, None),
            (200, None),
            (60, Some(5)),
            (70, Some(25)),
            (90, Some(40)),
        ]
        .into_iter()
        .enumerate()
        {
            market.push(&listing(i as u64 + 2, listed, sold));
        }
        let rows: Vec<usize> = (0..market.len()).collect();
        let as_of = NaiveDate::from_ymd_opt(2026, 11, 30).unwrap_or_default();
        let s = segment_supply(&market, &rows, as_of, 30, Some(180)).unwrap_or_else(|| {
            panic!("the market has sale dates");
        });
        assert_eq!((s.listed, s.sold_in_window), (3, 2));
        assert!((s.days_supply.unwrap_or(0.0) - 45.0).abs() < 1e-9);
        // Without sale dates the file cannot tell.
        let mut unsold = Market::default();
        unsold.push(&listing(2, 10, None));
        assert!(segment_supply(&unsold, &[0], as_of, 30, Some(180)).is_none());
    }
}
