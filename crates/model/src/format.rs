//! Number formatting shared by the command line, the workbench and reports.

use crate::money::Cents;

/// An amount that can be shown in dollars: a statistical `f64` or exact [`Cents`].
pub trait Dollars: Copy {
    /// The amount in dollars.
    fn in_dollars(self) -> f64;
}

impl Dollars for f64 {
    fn in_dollars(self) -> f64 {
        self
    }
}

impl Dollars for Cents {
    fn in_dollars(self) -> f64 {
        self.dollars()
    }
}

/// A number as typed in an error message: plain for everyday sizes ("0.5", "2968.374"), in
/// exponent form for the very large or very small ("1e-320", "1e300"), so a damaged value reads
/// as one short word.
#[must_use]
pub fn number(value: f64) -> String {
    let size = value.abs();
    if value == 0.0 || !value.is_finite() || (1e-4..1e15).contains(&size) {
        format!("{value}")
    } else {
        format!("{value:e}")
    }
}

/// 48000 → "48,000" (rounded to a whole number).
#[must_use]
pub fn thousands(value: f64) -> String {
    let rounded = value.round();
    let negative = rounded < 0.0;
    let digits = format!("{:.0}", rounded.abs());
    let mut out = String::with_capacity(digits.len() + digits.len() / 3 + 1);
    for (i, c) in digits.chars().enumerate() {
        if i > 0 && (digits.len() - i) % 3 == 0 {
            out.push(',');
        }
        out.push(c);
    }
    if negative { format!("-{out}") } else { out }
}

/// 24499.6 → "$24,500"; -812 → "-$812".
#[must_use]
pub fn money(value: impl Dollars) -> String {
    let value = value.in_dollars();
    if value.round() < 0.0 {
        format!("-${}", thousands(-value))
    } else {
        format!("${}", thousands(value))
    }
}

/// 812 → "+$812", -812 → "-$812": for adjustments, whose sign matters.
#[must_use]
pub fn signed_money(value: impl Dollars) -> String {
    let value = value.in_dollars();
    if value.round() > 0.0 {
        format!("+{}", money(value))
    } else {
        money(value)
    }
}

/// 22708.674 → "$22,708.67"; -1000 → "-$1,000.00": worksheet amounts, paid to the cent.
#[must_use]
pub fn cents(value: impl Dollars) -> String {
    let value = value.in_dollars();
    let total = (value * 100.0).round();
    let sign = if total < 0.0 { "-" } else { "" };
    let whole = (total.abs() / 100.0).trunc();
    let rest = total.abs() - whole * 100.0;
    format!("{sign}${}.{:02}", thousands(whole), rest as u64)
}

/// As [`cents`] with a "+" on positive amounts.
#[must_use]
pub fn signed_cents(value: impl Dollars) -> String {
    let value = value.in_dollars();
    if (value * 100.0).round() > 0.0 {
        format!("+{}", cents(value))
    } else {
        cents(value)
    }
}

/// `text` with its first letter in capitals, for a label that begins a line ("settlement
/// payment" → "Settlement payment").
#[must_use]
pub fn sentence_case(text: &str) -> String {
    let mut chars = text.chars();
    chars.next().map_or_else(String::new, |first| {
        first.to_uppercase().chain(chars).collect()
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn groups_thousands() {
        assert_eq!(thousands(0.0), "0");
        assert_eq!(thousands(999.4), "999");
        assert_eq!(thousands(1000.0), "1,000");
        assert_eq!(thousands(1_234_567.0), "1,234,567");
        assert_eq!(thousands(-48_000.0), "-48,000");
        assert_eq!(money(24_499.6), "$24,500");
        assert_eq!(money(-812.0), "-$812");
        assert_eq!(signed_money(812.0), "+$812");
        assert_eq!(signed_money(0.2), "$0");
        assert_eq!(cents(22_708.674), "$22,708.67");
        assert_eq!(cents(-1000.0), "-$1,000.00");
        assert_eq!(cents(0.005), "$0.01");
        assert_eq!(signed_cents(12.5), "+$12.50");
        assert_eq!(number(0.5), "0.5");
        assert_eq!(number(1e-320), "1e-320");
        assert_eq!(number(1e300), "1e300");
        assert_eq!(number(f64::NAN), "NaN");
        assert_eq!(sentence_case("settlement payment"), "Settlement payment");
        assert_eq!(sentence_case("ACV offer"), "ACV offer");
        assert_eq!(sentence_case(""), "");
    }
}
