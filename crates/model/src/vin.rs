//! Vehicle identification numbers: the check digit and the model-year character.
//!
//! The method is that of 49 CFR 565.15 (and ISO 3779): 17 characters, never I, O or Q; each
//! character has a value (digits their own, letters by the transliteration table below), each
//! position a weight; the weighted sum modulo 11 is the check digit in position 9, a remainder
//! of 10 written X. Position 10 codes the model year in a 30-year cycle (1980 A … 2000 Y,
//! 2001 1 … 2009 9, then A again for 2010), skipping I, O, Q, U, Z and 0. The tables are
//! transcribed from memory of the regulation and agree with the summary in the project's
//! domain notes; the checks in `tests/checks/vin.rs` name their worked examples.
//!
//! A VIN that fails is the usual sign of a misread identifier in a comparable's evidence; the
//! check says so and never changes the value.

use serde::{Deserialize, Serialize};

/// Where the method comes from, as warnings cite it.
pub const SOURCE: &str = "49 CFR 565.15";

/// The problems of a listing's VIN for its model year; empty when it has none or it checks.
#[must_use]
pub fn listing_problems(listing: &crate::market::Listing) -> Vec<VinProblem> {
    listing
        .vin
        .as_deref()
        .filter(|v| !v.trim().is_empty())
        .map_or_else(Vec::new, |v| problems(v, listing.model_year))
}

/// Weight of each position, 1 to 17 (position 9, the check digit itself, weighs 0).
pub const WEIGHTS: [u32; 17] = [8, 7, 6, 5, 4, 3, 2, 10, 0, 9, 8, 7, 6, 5, 4, 3, 2];

/// Model-year characters of one 30-year cycle, from 1980 (and 2010, 2040).
pub const YEAR_CODES: [char; 30] = [
    'A', 'B', 'C', 'D', 'E', 'F', 'G', 'H', 'J', 'K', 'L', 'M', 'N', 'P', 'R', 'S', 'T', 'V', 'W',
    'X', 'Y', '1', '2', '3', '4', '5', '6', '7', '8', '9',
];

/// First model year of the cycle [`YEAR_CODES`] starts.
const CYCLE_START: i32 = 1980;

/// Model years from which a VIN has 17 characters (the format of 49 CFR 565 applies from the
/// 1981 model year; earlier identifiers were the maker's own).
pub const FIRST_17_CHARACTER_YEAR: i32 = 1981;

/// The value a character carries in the check-digit sum; `None` for a character a VIN never
/// holds (I, O, Q, anything not a digit or capital letter).
#[must_use]
pub fn transliterate(c: char) -> Option<u32> {
    match c {
        '0'..='9' => c.to_digit(10),
        'A' | 'J' => Some(1),
        'B' | 'K' | 'S' => Some(2),
        'C' | 'L' | 'T' => Some(3),
        'D' | 'M' | 'U' => Some(4),
        'E' | 'N' | 'V' => Some(5),
        'F' | 'W' => Some(6),
        'G' | 'P' | 'X' => Some(7),
        'H' | 'Y' => Some(8),
        'R' | 'Z' => Some(9),
        _ => None,
    }
}

/// What is wrong with a VIN.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case", tag = "problem")]
pub enum VinProblem {
    /// Not 17 characters for a vehicle of a model year that has 17.
    Length {
        /// Characters found.
        found: usize,
    },
    /// A character a VIN never holds.
    Character {
        /// Position, from 1.
        position: usize,
        /// The character.
        found: char,
    },
    /// The check digit in position 9 is not the one the other sixteen give.
    CheckDigit {
        /// In position 9.
        found: char,
        /// What the other positions give.
        expected: char,
    },
    /// The model-year character in position 10 is not the vehicle's model year's.
    ModelYear {
        /// In position 10.
        found: char,
        /// The character of the stated model year.
        expected: char,
        /// The stated model year.
        model_year: i32,
    },
}

impl std::fmt::Display for VinProblem {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            Self::Length { found } => write!(f, "{found} characters, not 17"),
            Self::Character { position, found } => write!(
                f,
                "'{}' in position {position}, a character VINs never use",
                found.escape_debug()
            ),
            Self::CheckDigit { found, expected } => write!(
                f,
                "check digit {found} in position 9 where the other characters give {expected}"
            ),
            Self::ModelYear {
                found,
                expected,
                model_year,
            } => write!(
                f,
                "model-year character {found} in position 10, not {expected} for a {model_year}"
            ),
        }
    }
}

/// The check digit the characters of `vin` other than position 9 give: '0'–'9' or 'X'.
///
/// # Errors
/// The first problem that prevents the computation: a length other than 17 or a character a
/// VIN never holds.
pub fn check_digit(vin: &str) -> Result<char, VinProblem> {
    let chars: Vec<char> = vin.chars().collect();
    if chars.len() != 17 {
        return Err(VinProblem::Length { found: chars.len() });
    }
    let mut sum = 0;
    for (i, (&c, weight)) in chars.iter().zip(WEIGHTS).enumerate() {
        let value = transliterate(c).ok_or(VinProblem::Character {
            position: i + 1,
            found: c,
        })?;
        sum += value * weight;
    }
    Ok(match sum % 11 {
        10 => 'X',
        r => char::from_digit(r, 10).unwrap_or('X'),
    })
}

/// The model-year character of `model_year` (the cycle repeats every 30 years).
#[must_use]
pub fn year_code(model_year: i32) -> char {
    let index = usize::try_from((model_year - CYCLE_START).rem_euclid(30)).unwrap_or(0);
    YEAR_CODES[index]
}

/// The model years, from 1980 to 2069, that position-10 character `code` can stand for.
#[must_use]
pub fn years_of_code(code: char) -> Vec<i32> {
    let Some(index) = YEAR_CODES.iter().position(|&c| c == code) else {
        return Vec::new();
    };
    let first = CYCLE_START + i32::try_from(index).unwrap_or(0);
    vec![first, first + 30, first + 60]
}

/// Every problem of `vin` for a vehicle of `model_year`, in position order; empty when it
/// checks. A VIN of a vehicle older than [`FIRST_17_CHARACTER_YEAR`] is not checked, and
/// spaces around it and lower case are forgiven (a typed VIN is read in capitals).
#[must_use]
pub fn problems(vin: &str, model_year: i32) -> Vec<VinProblem> {
    if model_year < FIRST_17_CHARACTER_YEAR {
        return Vec::new();
    }
    let vin = vin.trim().to_ascii_uppercase();
    let chars: Vec<char> = vin.chars().collect();
    if chars.len() != 17 {
        return vec![VinProblem::Length { found: chars.len() }];
    }
    let mut found: Vec<VinProblem> = chars
        .iter()
        .enumerate()
        .filter(|(_, c)| transliterate(**c).is_none())
        .map(|(i, &c)| VinProblem::Character {
            position: i + 1,
            found: c,
        })
        .collect();
    if !found.is_empty() {
        return found;
    }
    if let Ok(expected) = check_digit(&vin) {
        if chars[8] != expected {
            found.push(VinProblem::CheckDigit {
                found: chars[8],
                expected,
            });
        }
    }
    let expected = year_code(model_year);
    if chars[9] != expected {
        found.push(VinProblem::ModelYear {
            found: chars[9],
            expected,
            model_year,
        });
    }
    found
}

/// The problems of `vin` in one line for a grid or a warning: "check digit 4 in position 9
/// where the other characters give 7".
#[must_use]
pub fn problems_text(problems: &[VinProblem]) -> String {
    problems
        .iter()
        .map(ToString::to_string)
        .collect::<Vec<_>>()
        .join("; ")
}

/// `vin` with its check digit put in position 9 (for making test and demo VINs); `None` when
/// it is not 17 VIN characters.
#[must_use]
pub fn with_check_digit(vin: &str) -> Option<String> {
    let digit = check_digit(vin).ok()?;
    Some(
        vin.chars()
            .enumerate()
            .map(|(i, c)| if i == 8 { digit } else { c })
            .collect(),
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_year_code_is_a_vin_character_and_the_cycle_is_thirty_years() {
        for c in YEAR_CODES {
            assert!(transliterate(c).is_some(), "{c}");
            assert!(!matches!(c, 'I' | 'O' | 'Q' | 'U' | 'Z' | '0'), "{c}");
        }
        assert_eq!(year_code(1980), 'A');
        assert_eq!(year_code(2010), 'A');
        assert_eq!(year_code(2009), '9');
        assert_eq!(year_code(2022), 'N');
        assert_eq!(years_of_code('N'), [1992, 2022, 2052]);
        assert!(years_of_code('U').is_empty());
    }

    #[test]
    fn a_vehicle_older_than_the_17_character_format_is_not_checked() {
        assert!(problems("ABC123", 1975).is_empty());
        assert_eq!(problems("ABC123", 1995), [VinProblem::Length { found: 6 }]);
    }
}
