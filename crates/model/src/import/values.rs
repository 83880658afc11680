//! Reading single values from market files: prices, odometers, years and dates.

use chrono::NaiveDate;

/// `text` without surrounding white space. Most cells have none, and they are checked on their
/// first and last byte only; the rest go through the full Unicode trim.
#[must_use]
pub fn tidy(text: &str) -> &str {
    let plain = |b: u8| b > b' ' && b < 0x80;
    match text.as_bytes() {
        [] => text,
        [first, .., last] if plain(*first) && plain(*last) => text,
        [only] if plain(*only) => text,
        _ => text.trim(),
    }
}

/// Parses a number, ignoring currency signs, thousands separators, spaces and a trailing unit
/// word ("mi", "km", "miles"). Returns `None` for anything else.
#[must_use]
pub fn parse_number(text: &str) -> Option<f64> {
    // Most feeds write plain numbers: parse them without building a cleaned copy.
    if let Ok(v) = tidy(text).parse::<f64>() {
        return v.is_finite().then_some(v);
    }
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
    let t = tidy(text);
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
    let t = tidy(text);
    if let Some(d) = parse_iso_date(t) {
        return Some(d);
    }
    let head = t.get(..10).unwrap_or(t);
    NaiveDate::parse_from_str(head, "%Y-%m-%d")
        .or_else(|_| NaiveDate::parse_from_str(head, "%Y/%m/%d"))
        .or_else(|_| NaiveDate::parse_from_str(t, "%m/%d/%Y"))
        .ok()
}

/// `YYYY-MM-DD` (optionally followed by a time) without going through a format string.
fn parse_iso_date(t: &str) -> Option<NaiveDate> {
    let b = t.as_bytes();
    if b.len() < 10
        || b[4] != b'-'
        || b[7] != b'-'
        || (b.len() > 10 && !matches!(b[10], b'T' | b' '))
    {
        return None;
    }
    let digits = |range: std::ops::Range<usize>| {
        b[range].iter().try_fold(0u32, |acc, &c| {
            c.is_ascii_digit().then(|| acc * 10 + u32::from(c - b'0'))
        })
    };
    NaiveDate::from_ymd_opt(digits(0..4)? as i32, digits(5..7)?, digits(8..10)?)
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
    fn tidy_trims_like_trim() {
        for text in [
            "",
            " ",
            "a",
            " a",
            "a ",
            "\tab\r",
            "\u{a0}x\u{a0}",
            "é",
            " é ",
            "x y",
        ] {
            assert_eq!(tidy(text), text.trim(), "{text:?}");
        }
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
