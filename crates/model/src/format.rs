//! Number formatting shared by the command line, the workbench and reports.

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
pub fn money(value: f64) -> String {
    if value.round() < 0.0 {
        format!("-${}", thousands(-value))
    } else {
        format!("${}", thousands(value))
    }
}

/// 812 → "+$812", -812 → "-$812": for adjustments, whose sign matters.
#[must_use]
pub fn signed_money(value: f64) -> String {
    if value.round() > 0.0 {
        format!("+{}", money(value))
    } else {
        money(value)
    }
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
    }
}
