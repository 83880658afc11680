//! The workbench's side of the shared visual language (`report::visual`): the same colors and
//! shapes as the printed report, as egui colors and plot markers.

use eframe::egui::{Color32, Ui};
use egui_plot::MarkerShape;
use model::condition::Condition;
use report::visual::{self, Rgb, Shape};

fn color(rgb: Rgb) -> Color32 {
    Color32::from_rgb(rgb[0], rgb[1], rgb[2])
}

/// The subject's color, used for nothing else.
pub const SUBJECT: Color32 =
    Color32::from_rgb(visual::SUBJECT[0], visual::SUBJECT[1], visual::SUBJECT[2]);

/// Color of the `index`-th variant in color order (see `report::visual::variant_order`).
#[must_use]
pub fn variant_color(index: usize) -> Color32 {
    color(visual::variant_color(index))
}

/// The neutral ink of the current theme: the model's line and band, comparables' rings, the
/// selection, marks of judgment.
#[must_use]
pub fn ink(ui: &Ui) -> Color32 {
    ink_for(ui.visuals().dark_mode)
}

/// The neutral ink for a dark or a light theme.
#[must_use]
pub fn ink_for(dark: bool) -> Color32 {
    color(if dark {
        visual::INK_ON_DARK
    } else {
        visual::INK_ON_LIGHT
    })
}

/// The plot marker of a shape of the shared language.
#[must_use]
pub fn marker(shape: Shape) -> MarkerShape {
    match shape {
        Shape::Circle | Shape::Ring => MarkerShape::Circle,
        Shape::Square => MarkerShape::Square,
        Shape::Diamond => MarkerShape::Diamond,
        Shape::Cross => MarkerShape::Cross,
        Shape::TriangleDown => MarkerShape::Down,
    }
}

/// Marker shape of a condition class: used circles, certified squares, new diamonds.
#[must_use]
pub fn condition_shape(condition: Condition) -> MarkerShape {
    marker(visual::condition_shape(condition))
}

/// The same color, faded (excluded listings).
#[must_use]
pub fn faded(color: Color32) -> Color32 {
    color.gamma_multiply(0.25)
}
