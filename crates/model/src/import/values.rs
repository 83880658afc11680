//! Reading single values from market files: prices, odometers, years and dates.

use chrono::NaiveDate;

/// Parses a number, ignoring currency signs, thousands separators, spaces and a trailing unit
/// word ("mi", "km", "miles"). Returns `None` for anything else.
#[must_use]
pub fn parse_number(text: &str) -> Option<f64> {
    let mut cleaned = String::with_capacity(text.len());
    let t = text.trim();
    let t = t
        .strip_suffix("miles")
        .or_else(|| t.strip_suffix("mi"))
        .or_else(|| t.strip_suffix("km"))
        .unwrap_or(t);
    for c in t.chars() {
        match c {
            '$' | '€' | '£' | ',' | '_' | ' ' | '\u{a0}' => {}
            _ => cleaned.push(c),
        }
    }
    if cleaned.is_empty() {
        return None;
    }
    cleaned.parse::<f64>().ok().filter(|v| v.is_finite())
}

/// Parses a whole model year; accepts "2019" and "2019.0".
#[must_use]
pub fn parse_year(text: &str) -> Option<i64> {
    let t = text.trim();
    if let Ok(y) = t.parse::<i64>() {
        return Some(y);
    }
    let v = t.parse::<f64>().ok()?;
    (v.fract() == 0.0 && v.abs() < 1e6).then_some(v as i64)
}

/// Parses a date written as `YYYY-MM-DD`, `YYYY/MM/DD`, `MM/DD/YYYY`, or an ISO timestamp
/// (its date part).
#[must_use]
pub fn parse_date(text: &str) -> Option<NaiveDate> {
    let t = text.trim();
    let head = t.get(..10).unwrap_or(t);
    NaiveDate::parse_from_str(head, "%Y-%m-%d")
        .or_else(|_| NaiveDate::parse_from_str(head, "%Y/%m/%d"))
        .or_else(|_| NaiveDate::parse_from_str(t, "%m/%d/%Y"))
        .ok()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn numbers_with_currency_and_separators() {
        assert_eq!(parse_number("$24,500"), Some(24_500.0));
        assert_eq!(parse_number(" 61 200 mi"), Some(61_200.0));
        assert_eq!(parse_number("12.5"), Some(12.5));
        assert_eq!(parse_number("abc"), None);
        assert_eq!(parse_number(""), None);
        assert_eq!(parse_number("NaN"), None);
    }

    #[test]
    fn years_and_dates() {
        assert_eq!(parse_year("2019"), Some(2019));
        assert_eq!(parse_year("2019.0"), Some(2019));
        assert_eq!(parse_year("2019.5"), None);
        let d = NaiveDate::from_ymd_opt(2026, 3, 7);
        assert_eq!(parse_date("2026-03-07"), d);
        assert_eq!(parse_date("2026/03/07"), d);
        assert_eq!(parse_date("03/07/2026"), d);
        assert_eq!(parse_date("2026-03-07T10:00:00Z"), d);
        assert_eq!(parse_date("March 7"), None);
    }
}
