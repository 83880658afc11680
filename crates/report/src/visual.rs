//! One visual language for every chart, on screen and on paper.
//!
//! The workbench's charts and the report's (PDF and HTML) read these definitions, so a mark
//! means the same thing wherever it is seen:
//!
//! - **variant by color**: [`VARIANTS`], in the order of the variants' fitted effects
//!   ([`variant_order`]), so the base variant is the first color everywhere;
//! - **condition by shape**: used a circle, certified a square, new a diamond
//!   ([`condition_shape`]); the condition is never a color;
//! - **the subject** by a cross in [`SUBJECT`], a color used for nothing else (its value band
//!   is drawn in it too: the band is the subject's);
//! - **comparables** by a ring around their point ([`Shape::Ring`]) in the neutral ink, numbered
//!   as in the comparables table where there is room (the report);
//! - **the model** (its fitted line and prediction band) and marks of judgment (a listing below
//!   its own band) in the neutral ink ([`INK_ON_LIGHT`], [`INK_ON_DARK`]).
//!
//! The variant colors and the subject's are our own, chosen by a search for colors that stay
//! apart for the common color-vision deficiencies: under simulated deuteranopia, protanopia and
//! tritanopia (Machado, Oliveira & Fernandes 2009, severity 1) as under normal vision, the
//! subject and the first three variants differ pairwise by a CIE76 ΔE of at least 30, and all
//! seven colors by at least 15; each has a contrast of at least 2.8:1 against both the light
//! and the dark background. No blue-and-orange (or blue-green-and-golden) pair is among the
//! first three. The test below recomputes all of it.

use model::condition::Condition;

/// An sRGB color.
pub type Rgb = [u8; 3];

/// Variant colors, base first: periwinkle, green, orchid, moss, plum, violet.
pub const VARIANTS: [Rgb; 6] = [
    [0x55, 0x55, 0xdd],
    [0x33, 0xaa, 0x33],
    [0xbb, 0x77, 0xcc],
    [0x44, 0x77, 0x33],
    [0xaa, 0x44, 0x88],
    [0x77, 0x55, 0xbb],
];

/// The subject (and its value band): raspberry, used for nothing else.
pub const SUBJECT: Rgb = [0xdd, 0x44, 0x77];

/// Neutral ink on a light background: the model's line and band, comparables' rings, marks of
/// judgment.
pub const INK_ON_LIGHT: Rgb = [0x4a, 0x4f, 0x57];

/// Neutral ink on a dark background.
pub const INK_ON_DARK: Rgb = [0xc4, 0xc8, 0xcf];

/// The background the light theme and the printed page are checked against.
pub const LIGHT_BACKGROUND: Rgb = [0xf8, 0xf8, 0xf8];

/// The background the dark theme is checked against.
pub const DARK_BACKGROUND: Rgb = [0x1b, 0x1b, 0x1b];

/// How a point is marked.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Shape {
    /// A used vehicle.
    Circle,
    /// A certified pre-owned vehicle.
    Square,
    /// A new vehicle.
    Diamond,
    /// The subject.
    Cross,
    /// A comparable: a ring around its point.
    Ring,
    /// A listing asking less than its own band: look before trusting it.
    TriangleDown,
}

/// The shape of a condition class.
#[must_use]
pub fn condition_shape(condition: Condition) -> Shape {
    match condition {
        Condition::Used => Shape::Circle,
        Condition::Certified => Shape::Square,
        Condition::New => Shape::Diamond,
    }
}

/// The color of the variant at `index` in [`variant_order`].
#[must_use]
pub fn variant_color(index: usize) -> Rgb {
    VARIANTS[index % VARIANTS.len()]
}

/// Variants in color order: by fitted effect on price (the base, with none, usually first),
/// then by name; so the workbench (from the live fit) and the report (from the saved rates)
/// color each variant alike.
#[must_use]
pub fn variant_order<'a>(effects: impl IntoIterator<Item = (&'a str, f64)>) -> Vec<&'a str> {
    let mut v: Vec<(&str, f64)> = effects.into_iter().collect();
    v.sort_by(|a, b| a.1.total_cmp(&b.1).then_with(|| a.0.cmp(b.0)));
    v.into_iter().map(|(name, _)| name).collect()
}

/// The key to the marks, in words, for legends and the README.
pub const KEY: [(&str, &str); 6] = [
    ("color", "the listing's variant (base first)"),
    ("circle, square, diamond", "used, certified pre-owned, new"),
    ("raspberry cross", "the subject, with its value band"),
    ("ring", "a comparable"),
    (
        "gray line and band",
        "the model's fitted value and prediction band",
    ),
    (
        "gray triangle",
        "asking less than its own band: look before trusting it",
    ),
];

#[cfg(test)]
mod tests {
    use super::*;

    /// Machado, Oliveira & Fernandes (2009), severity 1.0, on linear RGB.
    const DEUTERANOPIA: [[f64; 3]; 3] = [
        [0.367_322, 0.860_646, -0.227_968],
        [0.280_085, 0.672_501, 0.047_413],
        [-0.011_820, 0.042_940, 0.968_881],
    ];
    const PROTANOPIA: [[f64; 3]; 3] = [
        [0.152_286, 1.052_583, -0.204_868],
        [0.114_503, 0.786_281, 0.099_216],
        [-0.003_882, -0.048_116, 1.051_998],
    ];
    const TRITANOPIA: [[f64; 3]; 3] = [
        [1.255_528, -0.076_749, -0.178_779],
        [-0.078_411, 0.930_809, 0.147_602],
        [0.004_733, 0.691_367, 0.303_900],
    ];
    const IDENTITY: [[f64; 3]; 3] = [[1.0, 0.0, 0.0], [0.0, 1.0, 0.0], [0.0, 0.0, 1.0]];

    fn linear(c: Rgb) -> [f64; 3] {
        c.map(|v| {
            let v = f64::from(v) / 255.0;
            if v <= 0.040_45 {
                v / 12.92
            } else {
                ((v + 0.055) / 1.055).powf(2.4)
            }
        })
    }

    fn luminance(c: Rgb) -> f64 {
        let [r, g, b] = linear(c);
        0.2126 * r + 0.7152 * g + 0.0722 * b
    }

    /// CIELAB (D65) of `c` as seen through `m`.
    fn lab(c: Rgb, m: &[[f64; 3]; 3]) -> [f64; 3] {
        let l = linear(c);
        let s: Vec<f64> = m
            .iter()
            .map(|row| (row[0] * l[0] + row[1] * l[1] + row[2] * l[2]).clamp(0.0, 1.0))
            .collect();
        let xyz = [
            0.4124 * s[0] + 0.3576 * s[1] + 0.1805 * s[2],
            0.2126 * s[0] + 0.7152 * s[1] + 0.0722 * s[2],
            0.0193 * s[0] + 0.1192 * s[1] + 0.9505 * s[2],
        ];
        let white = [0.950_47, 1.0, 1.088_83];
        let f = |t: f64| {
            if t > 0.008_856 {
                t.cbrt()
            } else {
                7.787 * t + 16.0 / 116.0
            }
        };
        let (fx, fy, fz) = (
            f(xyz[0] / white[0]),
            f(xyz[1] / white[1]),
            f(xyz[2] / white[2]),
        );
        [116.0 * fy - 16.0, 500.0 * (fx - fy), 200.0 * (fy - fz)]
    }

    fn delta_e(a: [f64; 3], b: [f64; 3]) -> f64 {
        ((a[0] - b[0]).powi(2) + (a[1] - b[1]).powi(2) + (a[2] - b[2]).powi(2)).sqrt()
    }

    fn smallest_difference(colors: &[Rgb]) -> f64 {
        let mut smallest = f64::INFINITY;
        for m in [&IDENTITY, &DEUTERANOPIA, &PROTANOPIA, &TRITANOPIA] {
            for (i, a) in colors.iter().enumerate() {
                for b in &colors[i + 1..] {
                    smallest = smallest.min(delta_e(lab(*a, m), lab(*b, m)));
                }
            }
        }
        smallest
    }

    fn contrast(a: Rgb, b: Rgb) -> f64 {
        let (x, y) = (luminance(a), luminance(b));
        (x.max(y) + 0.05) / (x.min(y) + 0.05)
    }

    // The largest channel is one of the three exactly (no arithmetic between them).
    #[allow(clippy::float_cmp)]
    fn hue(c: Rgb) -> f64 {
        let [r, g, b] = c.map(|v| f64::from(v) / 255.0);
        let (max, min) = (r.max(g).max(b), r.min(g).min(b));
        let d = max - min;
        if d == 0.0 {
            return 0.0;
        }
        let h = if max == r {
            ((g - b) / d).rem_euclid(6.0)
        } else if max == g {
            (b - r) / d + 2.0
        } else {
            (r - g) / d + 4.0
        };
        60.0 * h
    }

    #[test]
    fn the_colors_stay_apart_for_common_color_vision_deficiencies() {
        let first = [SUBJECT, VARIANTS[0], VARIANTS[1], VARIANTS[2]];
        let d = smallest_difference(&first);
        assert!(d >= 30.0, "subject and first three variants: ΔE {d:.1}");
        let mut all = vec![SUBJECT];
        all.extend(VARIANTS);
        let d = smallest_difference(&all);
        assert!(d >= 15.0, "every color: ΔE {d:.1}");
    }

    #[test]
    fn every_color_reads_on_both_themes() {
        for c in VARIANTS.iter().chain([&SUBJECT]) {
            for bg in [LIGHT_BACKGROUND, DARK_BACKGROUND] {
                let r = contrast(*c, bg);
                assert!(r >= 2.8, "{c:?} on {bg:?}: {r:.2}");
            }
        }
        assert!(contrast(INK_ON_LIGHT, LIGHT_BACKGROUND) >= 4.5);
        assert!(contrast(INK_ON_DARK, DARK_BACKGROUND) >= 4.5);
    }

    #[test]
    fn no_blue_against_orange_among_the_first_three_variants() {
        let blue = |h: f64| (185.0..=255.0).contains(&h);
        let warm = |h: f64| (15.0..=60.0).contains(&h);
        for (i, a) in VARIANTS[..3].iter().enumerate() {
            for b in &VARIANTS[i + 1..3] {
                let (ha, hb) = (hue(*a), hue(*b));
                assert!(
                    !(blue(ha) && warm(hb) || blue(hb) && warm(ha)),
                    "{a:?} against {b:?}"
                );
            }
        }
        // The neutral ink is gray; the subject's color is no variant's.
        assert!(!VARIANTS.contains(&SUBJECT));
    }

    #[test]
    fn variants_are_colored_by_their_fitted_effect() {
        assert_eq!(
            variant_order([("Halvet", 0.12), ("Cressin", 0.0), ("Norrith", 0.3)]),
            ["Cressin", "Halvet", "Norrith"]
        );
    }
}
