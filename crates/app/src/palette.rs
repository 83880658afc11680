//! Colours and marker shapes, our own: variant by colour, condition class by shape.

use eframe::egui::Color32;
use egui_plot::MarkerShape;
use model::condition::Condition;

/// Variant colours in order of the fitted design (base first): teal, plum, ochre, slate,
/// moss, brick. Chosen to stay distinct for common colour-vision deficiencies and on both
/// themes.
pub const VARIANT_COLOURS: [Color32; 6] = [
    Color32::from_rgb(0x1f, 0x8a, 0x80),
    Color32::from_rgb(0x8e, 0x44, 0x8a),
    Color32::from_rgb(0xc0, 0x8b, 0x1a),
    Color32::from_rgb(0x4d, 0x5d, 0x73),
    Color32::from_rgb(0x6b, 0x8e, 0x23),
    Color32::from_rgb(0xa6, 0x3d, 0x32),
];

/// The subject's colour: a strong magenta-red, used for nothing else.
pub const SUBJECT: Color32 = Color32::from_rgb(0xd6, 0x1f, 0x5b);

/// Colour of the `index`-th variant.
#[must_use]
pub fn variant_colour(index: usize) -> Color32 {
    VARIANT_COLOURS[index % VARIANT_COLOURS.len()]
}

/// Marker shape of a condition class: used circles, certified squares, new diamonds.
#[must_use]
pub fn condition_shape(condition: Condition) -> MarkerShape {
    match condition {
        Condition::Used => MarkerShape::Circle,
        Condition::Certified => MarkerShape::Square,
        Condition::New => MarkerShape::Diamond,
    }
}

/// The same colour, faded (excluded listings).
#[must_use]
pub fn faded(colour: Color32) -> Color32 {
    colour.gamma_multiply(0.25)
}
