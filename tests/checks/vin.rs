//! VIN checks: the check digit and model-year character of 49 CFR 565.15 (ISO 3779), on a
//! worked example, on VINs constructed by the definition, and as properties of the method
//! (every single misread character of a different value, and every transposition of two
//! characters of different values and weights, is caught).

use model::vin::{
    VinProblem, WEIGHTS, YEAR_CODES, check_digit, problems, transliterate, with_check_digit,
    year_code,
};
use proptest::prelude::*;

#[test]
fn the_worked_example_gives_check_digit_x() {
    // Recalled from memory, not re-read: the worked check-digit example of the English
    // Wikipedia article "Vehicle identification number" uses 1M8GDM9A?KP042788, whose
    // weighted sum is 351 and 351 mod 11 = 10, written X. Verify against the article before
    // citing it elsewhere. The sum below is recomputed from the regulation's tables.
    let vin = "1M8GDM9AXKP042788";
    let sum: u32 = vin
        .chars()
        .zip(WEIGHTS)
        .map(|(c, w)| transliterate(c).unwrap() * w)
        .sum();
    assert_eq!(sum, 351);
    assert_eq!(check_digit(vin), Ok('X'));
    // Position 10 'K' stands for 1989 or 2019 (the 30-year cycle).
    assert!(problems(vin, 2019).is_empty());
    assert!(problems(vin, 1989).is_empty());
    assert_eq!(
        problems(vin, 2020),
        [VinProblem::ModelYear {
            found: 'K',
            expected: 'L',
            model_year: 2020
        }]
    );
}

#[test]
fn constructed_vins_check_by_the_definition() {
    // Constructed by the definition: seventeen 1s sum to 1 × (8+7+6+5+4+3+2+10+0+9+8+7+6+5+4+3+2)
    // = 89, and 89 mod 11 = 1, so the check digit is 1 and the VIN checks (year code '1' is
    // 2001 or 2031).
    assert_eq!(check_digit("11111111111111111"), Ok('1'));
    assert!(problems("11111111111111111", 2001).is_empty());
    // Every zero: sum 0, check digit 0.
    assert_eq!(check_digit("00000000000000000"), Ok('0'));
    // The characters a VIN never holds are refused by position.
    assert_eq!(
        problems("1M8GDM9AXKP04278O", 2019),
        [VinProblem::Character {
            position: 17,
            found: 'O'
        }]
    );
    for c in ['I', 'O', 'Q', 'a', '-', ' '] {
        assert_eq!(transliterate(c), None, "{c:?}");
    }
    // Typed in lower case with spaces around it, it is read in capitals.
    assert!(problems(" 1m8gdm9axkp042788 ", 2019).is_empty());
}

#[test]
fn the_year_code_table_is_the_regulation_s_cycle() {
    // 49 CFR 565.15 (from memory of its table, as the module says): 1980 A to 2000 Y without I,
    // O, Q, U, Z; 2001 to 2009 the digits 1 to 9; 2010 starts again at A.
    let letters: String = (1980..=2000).map(year_code).collect();
    assert_eq!(letters, "ABCDEFGHJKLMNPRSTVWXY");
    let digits: String = (2001..=2009).map(year_code).collect();
    assert_eq!(digits, "123456789");
    assert_eq!(year_code(2010), 'A');
    assert_eq!(year_code(2026), 'T');
    assert_eq!(YEAR_CODES.len(), 30);
}

/// A valid VIN built from any sixteen VIN characters.
fn any_valid_vin() -> impl Strategy<Value = String> {
    let chars: Vec<char> = "ABCDEFGHJKLMNPRSTUVWXYZ0123456789".chars().collect();
    prop::collection::vec(prop::sample::select(chars), 17)
        .prop_map(|v| with_check_digit(&v.into_iter().collect::<String>()).unwrap())
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(2_000))]

    #[test]
    fn a_single_misread_character_of_another_value_is_caught(
        vin in any_valid_vin(),
        position in 0usize..17,
        replacement in prop::sample::select(
            "ABCDEFGHJKLMNPRSTUVWXYZ0123456789".chars().collect::<Vec<_>>()
        ),
    ) {
        // A property of the method (weights 1 to 10 and a prime modulus): changing one
        // character's value by d changes the sum by w·d, never a multiple of 11. Letters of
        // the same value (A and J) cannot be told apart; position 9 is the digit itself.
        let mut chars: Vec<char> = vin.chars().collect();
        let before = transliterate(chars[position]).unwrap();
        prop_assume!(position != 8 && transliterate(replacement).unwrap() != before);
        chars[position] = replacement;
        let misread: String = chars.into_iter().collect();
        prop_assert_ne!(check_digit(&misread).unwrap(), misread.chars().nth(8).unwrap());
    }

    #[test]
    fn two_characters_swapped_are_caught_when_their_values_and_weights_differ(
        vin in any_valid_vin(),
        i in 0usize..17,
        j in 0usize..17,
    ) {
        let mut chars: Vec<char> = vin.chars().collect();
        prop_assume!(i != 8 && j != 8 && WEIGHTS[i] != WEIGHTS[j]);
        prop_assume!(transliterate(chars[i]) != transliterate(chars[j]));
        chars.swap(i, j);
        let swapped: String = chars.into_iter().collect();
        prop_assert_ne!(check_digit(&swapped).unwrap(), swapped.chars().nth(8).unwrap());
    }
}
