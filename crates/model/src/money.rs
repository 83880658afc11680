//! Money in whole cents, and the exact decimals (rates, days, months) money is multiplied by.
//!
//! Everything a worksheet pays or decides on is an integer number of cents: each line, each sum,
//! the offer, the settlement and both total-loss tests. A rate such as a sales-tax percentage is
//! an exact decimal counted in millionths ([`Decimal`]), so `amount × rate` is worked in integers
//! and rounded once, half away from zero, to the cent. Statistics (the fit, the grid, the
//! reconciliation) stay in `f64`; a statistical value becomes money once, where a worksheet
//! starts from it ([`Cents::round_dollars`]).
//!
//! In files (sessions, worksheet inputs, JSON) an amount is written as a number of dollars with
//! at most two decimals (`2968.37`), as before; reading one with a fraction of a cent is an error
//! rather than a silent rounding, so the number in the file is the number used.

use std::fmt;
use std::ops::{Add, AddAssign, Neg, Sub, SubAssign};

use serde::{Deserialize, Deserializer, Serialize, Serializer};

/// Largest amount comptrail accepts, in dollars: ten billion, far above any vehicle and far
/// below where `i64` cents or exact products with a [`Decimal`] could overflow.
pub const MAX_DOLLARS: f64 = 1e10;

const MAX_CENTS: i64 = 1_000_000_000_000;

/// Largest magnitude of a [`Decimal`]: a billion (days, months and percentages are far below).
pub const MAX_DECIMAL: f64 = 1e9;

/// Millionths in one unit of a [`Decimal`].
const MICROS: i64 = 1_000_000;

/// Why an amount or a decimal is not usable.
#[derive(Debug, Clone, Copy, PartialEq, thiserror::Error)]
pub enum MoneyError {
    /// Not a finite number.
    #[error("{} is not a number", crate::format::number(*.0))]
    NotFinite(f64),
    /// Larger than comptrail accepts.
    #[error("{} is out of range (at most 10,000,000,000 in size)", crate::format::number(*.0))]
    OutOfRange(f64),
    /// An amount with a fraction of a cent.
    #[error("{} has a fraction of a cent (write at most two decimals)", crate::format::number(*.0))]
    FractionOfACent(f64),
}

/// An amount of money in whole cents (negative for a deduction or a minus adjustment).
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub struct Cents(i64);

impl Cents {
    /// Nothing.
    pub const ZERO: Self = Self(0);

    /// `cents` cents; clamped to the accepted range.
    #[must_use]
    pub fn new(cents: i64) -> Self {
        Self(cents.clamp(-MAX_CENTS, MAX_CENTS))
    }

    /// Whole dollars.
    #[must_use]
    pub fn whole_dollars(dollars: i64) -> Self {
        Self::new(dollars.saturating_mul(100))
    }

    /// The number of cents.
    #[must_use]
    pub fn get(self) -> i64 {
        self.0
    }

    /// An amount typed or read in dollars, which must be a whole number of cents
    /// (`2968.37`, not `2968.374`).
    pub fn from_dollars(dollars: f64) -> Result<Self, MoneyError> {
        let cents = Self::round_dollars(dollars)?;
        // `n / 100.0` is the double nearest n/100, which is what reading "n/100" in decimal
        // gives: exact equality (on purpose) means the text had at most two decimals.
        #[allow(clippy::float_cmp)]
        let whole_cents = cents.dollars() == dollars;
        if whole_cents {
            Ok(cents)
        } else {
            Err(MoneyError::FractionOfACent(dollars))
        }
    }

    /// A computed value in dollars (an indicated value, a band end) rounded half away from zero
    /// to the cent: where a statistic becomes money.
    pub fn round_dollars(dollars: f64) -> Result<Self, MoneyError> {
        if !dollars.is_finite() {
            return Err(MoneyError::NotFinite(dollars));
        }
        if dollars.abs() > MAX_DOLLARS {
            return Err(MoneyError::OutOfRange(dollars));
        }
        Ok(Self((dollars * 100.0).round() as i64))
    }

    /// The amount in dollars, for statistics and charts.
    #[must_use]
    pub fn dollars(self) -> f64 {
        self.0 as f64 / 100.0
    }

    /// The absolute amount.
    #[must_use]
    pub fn abs(self) -> Self {
        Self(self.0.abs())
    }

    /// Whether the amount is below zero.
    #[must_use]
    pub fn is_negative(self) -> bool {
        self.0 < 0
    }

    /// `self × numerator / denominator`, worked exactly and rounded half away from zero to the
    /// cent (a `denominator` of 0 gives zero).
    #[must_use]
    pub fn scaled(self, numerator: i128, denominator: i128) -> Self {
        if denominator == 0 {
            return Self::ZERO;
        }
        let (n, d) = if denominator < 0 {
            (-(i128::from(self.0) * numerator), -denominator)
        } else {
            (i128::from(self.0) * numerator, denominator)
        };
        let rounded = div_round_half_away(n, d);
        Self::new(rounded.clamp(i128::from(-MAX_CENTS), i128::from(MAX_CENTS)) as i64)
    }

    /// `self × rate %`, e.g. the sales tax on an ACV, to the cent.
    #[must_use]
    pub fn percent(self, rate: Decimal) -> Self {
        self.scaled(i128::from(rate.micros()), 100 * i128::from(MICROS))
    }

    /// `self × quantity`, e.g. a daily cost times days, to the cent.
    #[must_use]
    pub fn times(self, quantity: Decimal) -> Self {
        self.scaled(i128::from(quantity.micros()), i128::from(MICROS))
    }
}

/// `n / d` rounded half away from zero, for `d > 0`.
fn div_round_half_away(n: i128, d: i128) -> i128 {
    let (q, r) = (n / d, n % d);
    if 2 * r.abs() >= d { q + n.signum() } else { q }
}

impl Add for Cents {
    type Output = Self;
    fn add(self, rhs: Self) -> Self {
        Self(self.0 + rhs.0)
    }
}

impl AddAssign for Cents {
    fn add_assign(&mut self, rhs: Self) {
        self.0 += rhs.0;
    }
}

impl Sub for Cents {
    type Output = Self;
    fn sub(self, rhs: Self) -> Self {
        Self(self.0 - rhs.0)
    }
}

impl SubAssign for Cents {
    fn sub_assign(&mut self, rhs: Self) {
        self.0 -= rhs.0;
    }
}

impl Neg for Cents {
    type Output = Self;
    fn neg(self) -> Self {
        Self(-self.0)
    }
}

impl std::iter::Sum for Cents {
    fn sum<I: Iterator<Item = Self>>(iter: I) -> Self {
        Self(iter.map(|c| c.0).sum())
    }
}

impl<'a> std::iter::Sum<&'a Cents> for Cents {
    fn sum<I: Iterator<Item = &'a Self>>(iter: I) -> Self {
        Self(iter.map(|c| c.0).sum())
    }
}

impl fmt::Display for Cents {
    /// "$22,708.67", "-$1,000.00".
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let sign = if self.0 < 0 { "-" } else { "" };
        let abs = self.0.unsigned_abs();
        write!(
            f,
            "{sign}${}.{:02}",
            crate::format::thousands((abs / 100) as f64),
            abs % 100
        )
    }
}

impl Serialize for Cents {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        serializer.serialize_f64(self.dollars())
    }
}

thread_local! {
    /// Set while a file of an older format is read: see [`RoundAmountsOnRead`].
    static ROUND_ON_READ: std::cell::Cell<bool> = const { std::cell::Cell::new(false) };
}

/// While alive, amounts read on this thread are rounded to the cent instead of refused for a
/// fraction of a cent. Session formats before 3 stored some amounts unrounded (the trade-in's
/// retail value was the indicated value as computed); reading them rounds each to the cent, as
/// the worksheet of the time did before paying it.
pub(crate) struct RoundAmountsOnRead(bool);

impl RoundAmountsOnRead {
    /// Starts rounding amounts on this thread until dropped.
    pub(crate) fn begin() -> Self {
        Self(ROUND_ON_READ.with(|r| r.replace(true)))
    }
}

impl Drop for RoundAmountsOnRead {
    fn drop(&mut self) {
        ROUND_ON_READ.with(|r| r.set(self.0));
    }
}

impl<'de> Deserialize<'de> for Cents {
    fn deserialize<D: Deserializer<'de>>(deserializer: D) -> Result<Self, D::Error> {
        let dollars = deserializer.deserialize_f64(NumberVisitor)?;
        let read = if ROUND_ON_READ.with(std::cell::Cell::get) {
            Self::round_dollars(dollars)
        } else {
            Self::from_dollars(dollars)
        };
        read.map_err(serde::de::Error::custom)
    }
}

/// Reads any number (RON and JSON give integers for "420" and floats for "420.5").
struct NumberVisitor;

impl serde::de::Visitor<'_> for NumberVisitor {
    type Value = f64;

    fn expecting(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str("an amount such as 1250.00")
    }

    fn visit_f64<E: serde::de::Error>(self, v: f64) -> Result<f64, E> {
        Ok(v)
    }

    fn visit_i64<E: serde::de::Error>(self, v: i64) -> Result<f64, E> {
        Ok(v as f64)
    }

    fn visit_u64<E: serde::de::Error>(self, v: u64) -> Result<f64, E> {
        Ok(v as f64)
    }
}

/// An exact decimal counted in millionths: a percentage, a number of days or months that
/// money is multiplied by. `8.875` is exactly 8,875,000 millionths, so the tax on $10,000.00
/// is exactly $887.50.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub struct Decimal(i64);

impl Decimal {
    /// Zero.
    pub const ZERO: Self = Self(0);

    /// A whole number.
    #[must_use]
    pub fn whole(n: i64) -> Self {
        Self(n.saturating_mul(MICROS))
    }

    /// The decimal nearest `value` to a millionth (inputs are typed with a few decimals; a
    /// value such as 7.300000000000001 from a drag is 7.3).
    pub fn from_f64(value: f64) -> Result<Self, MoneyError> {
        if !value.is_finite() {
            return Err(MoneyError::NotFinite(value));
        }
        if value.abs() > MAX_DECIMAL {
            return Err(MoneyError::OutOfRange(value));
        }
        Ok(Self((value * MICROS as f64).round() as i64))
    }

    /// The value in millionths.
    #[must_use]
    pub fn micros(self) -> i64 {
        self.0
    }

    /// The value as a float, for display.
    #[must_use]
    pub fn to_f64(self) -> f64 {
        self.0 as f64 / MICROS as f64
    }
}

impl fmt::Display for Decimal {
    /// "8.875", "4", "0.5": no trailing zeros.
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let sign = if self.0 < 0 { "-" } else { "" };
        let abs = self.0.unsigned_abs();
        let (whole, frac) = (abs / MICROS as u64, abs % MICROS as u64);
        if frac == 0 {
            write!(f, "{sign}{whole}")
        } else {
            let digits = format!("{frac:06}");
            write!(f, "{sign}{whole}.{}", digits.trim_end_matches('0'))
        }
    }
}

#[cfg(test)]
mod tests {
    use proptest::prelude::*;

    use super::*;

    #[test]
    fn reads_whole_cents_and_refuses_fractions() {
        assert_eq!(Cents::from_dollars(2968.37), Ok(Cents::new(296_837)));
        assert_eq!(Cents::from_dollars(420.0), Ok(Cents::new(42_000)));
        assert_eq!(Cents::from_dollars(-0.01), Ok(Cents::new(-1)));
        assert!(matches!(
            Cents::from_dollars(2968.374),
            Err(MoneyError::FractionOfACent(_))
        ));
        assert!(matches!(
            Cents::from_dollars(f64::NAN),
            Err(MoneyError::NotFinite(_))
        ));
        assert!(matches!(
            Cents::from_dollars(1e11),
            Err(MoneyError::OutOfRange(_))
        ));
        assert_eq!(Cents::round_dollars(30_384.125), Ok(Cents::new(3_038_413)));
        assert_eq!(Cents::round_dollars(-0.005), Ok(Cents::new(-1)));
    }

    #[test]
    fn shows_dollars_and_cents() {
        assert_eq!(Cents::new(2_270_867).to_string(), "$22,708.67");
        assert_eq!(Cents::new(-100_000).to_string(), "-$1,000.00");
        assert_eq!(Cents::new(5).to_string(), "$0.05");
        assert_eq!(Decimal::from_f64(8.875).unwrap().to_string(), "8.875");
        assert_eq!(Decimal::from_f64(4.0).unwrap().to_string(), "4");
        assert_eq!(Decimal::from_f64(-0.5).unwrap().to_string(), "-0.5");
    }

    #[test]
    fn rates_are_exact() {
        // 8.875 % of $10,000.00 is exactly $887.50; in floats 10000 * 8.875 / 100 is too, but
        // 0.1 % of $5.00 (half a cent) must round up to 1 cent, away from zero.
        let tax = Decimal::from_f64(8.875).unwrap();
        assert_eq!(Cents::new(1_000_000).percent(tax), Cents::new(88_750));
        let tenth = Decimal::from_f64(0.1).unwrap();
        assert_eq!(Cents::new(500).percent(tenth), Cents::new(1));
        assert_eq!(Cents::new(-500).percent(tenth), Cents::new(-1));
        assert_eq!(Cents::new(499).percent(tenth), Cents::ZERO);
        // $32.00 a day for 45 days.
        assert_eq!(
            Cents::new(3_200).times(Decimal::whole(45)),
            Cents::new(144_000)
        );
        assert_eq!(
            Decimal::from_f64(7.300_000_000_000_001).unwrap().micros(),
            7_300_000
        );
    }

    proptest! {
        #[test]
        fn every_whole_cent_amount_reads_back_exactly(cents in -MAX_CENTS..=MAX_CENTS) {
            let c = Cents::new(cents);
            prop_assert_eq!(Cents::from_dollars(c.dollars()), Ok(c));
            let text = ron::to_string(&c).unwrap_or_default();
            prop_assert_eq!(ron::from_str::<Cents>(&text).ok(), Some(c));
        }

        #[test]
        fn rounding_is_to_the_nearest_cent(cents in -1_000_000_000i64..1_000_000_000, num in 0i128..100_000_000, den in 1i128..100_000_000) {
            let got = Cents::new(cents).scaled(num, den).get();
            let exact_times_2d = 2 * i128::from(cents) * num;
            let limit = i128::from(MAX_CENTS);
            if exact_times_2d.abs() > 2 * limit * den {
                // Beyond the largest amount held: held at the limit, on its side of zero
                // (found by this property: -479,327,563 x 90,274,383 / 1).
                prop_assert_eq!(i128::from(got), limit * exact_times_2d.signum());
            } else {
                // The exact quotient lies within half a cent of the result.
                let diff = exact_times_2d - 2 * i128::from(got) * den;
                prop_assert!(diff.abs() <= den, "{cents} * {num} / {den} -> {got}");
            }
        }
    }
}
