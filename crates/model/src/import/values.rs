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
    let text = tidy(text);
    if let Some(v) = plain_decimal(text) {
        return Some(v);
    }
    if let Ok(v) = text.parse::<f64>() {
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

/// A plain decimal ("30400", "106.5"): digits with at most one point, at most 15 digits in all.
/// Such a number is an integer below 2^53 divided by a power of ten no larger than 10^15, both
/// exact in binary, so one division gives the correctly rounded value (Clinger 1990), the
/// same value the standard parser returns, without its general machinery.
fn plain_decimal(text: &str) -> Option<f64> {
    const POWERS: [f64; 16] = [
        1.0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15,
    ];
    let bytes = text.as_bytes();
    if bytes.is_empty() || bytes.len() > 16 {
        return None;
    }
    let (mut mantissa, mut digits, mut point) = (0u64, 0usize, None);
    for (i, &b) in bytes.iter().enumerate() {
        match b {
            b'0'..=b'9' => {
                mantissa = mantissa * 10 + u64::from(b - b'0');
                digits += 1;
            }
            b'.' if point.is_none() => point = Some(i),
            _ => return None,
        }
    }
    if digits == 0 || digits > 15 {
        return None;
    }
    let decimals = point.map_or(0, |p| bytes.len() - p - 1);
    Some(mantissa as f64 / POWERS[decimals])
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
    fn plain_decimals_read_exactly_as_the_standard_parser_reads_them() {
        for text in [
            "0",
            "7",
            "30400",
            "106.5",
            "0.1",
            "1.",
            ".5",
            "999999999999999",
            "12345.6789",
            "0.000000000000001",
            "000123",
            "4503599627370497",
        ] {
            let expected = text.parse::<f64>().ok();
            let got = plain_decimal(text).or_else(|| parse_number(text));
            assert_eq!(got, expected, "{text}");
        }
        let mut state = 0x9e37_79b9_7f4a_7c15u64;
        for _ in 0..20_000 {
            state ^= state << 13;
            state ^= state >> 7;
            state ^= state << 17;
            let digits = (state % 15 + 1) as usize;
            let whole = format!("{:015}", state % 1_000_000_000_000_000);
            let whole = &whole[15 - digits..];
            let point = (state >> 20) as usize % (digits + 1);
            let text = if point == digits {
                whole.to_owned()
            } else {
                format!("{}.{}", &whole[..point], &whole[point..])
            };
            assert_eq!(plain_decimal(&text), text.parse::<f64>().ok(), "{text}");
        }
        for text in [
            "",
            ".",
            "1.2.3",
            "-5",
            "+5",
            "1e5",
            "12,500",
            "$5",
            "1234567890123456",
        ] {
            assert_eq!(plain_decimal(text), None, "{text}");
        }
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
