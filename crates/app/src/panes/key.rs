//! A chart's key, drawn above the chart rather than over its data: one entry per meaning (each
//! variant's color, each sale class's shape, the comparables' rings, the subject's cross, the
//! model's lines), folded away with one click.

use eframe::egui::{self, Color32, Pos2, Stroke, Ui, Vec2};
use report::visual::Shape;

/// What an entry's sample looks like.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Glyph {
    /// A marker of the shared visual language; hollow when not filled.
    Marker(Shape, bool),
    /// A solid line.
    Line,
    /// A dashed line.
    Dashed,
    /// A short horizontal bar (a model-year mean).
    Bar,
    /// A circle of this radius in points (a bubble size).
    Bubble(f32),
}

/// One entry of a key.
#[derive(Debug, Clone, PartialEq)]
pub struct KeyEntry {
    /// Its sample.
    pub glyph: Glyph,
    /// The sample's color.
    pub color: Color32,
    /// What it means.
    pub label: String,
}

impl KeyEntry {
    /// An entry.
    #[must_use]
    pub fn new(glyph: Glyph, color: Color32, label: impl Into<String>) -> Self {
        Self {
            glyph,
            color,
            label: label.into(),
        }
    }
}

/// Height below which a chart's key starts folded, so the plot keeps most of a small pane (at
/// 1280×800 the charts are about 440 points tall).
const OPEN_KEY_MIN_HEIGHT: f32 = 500.0;

/// A key of at most this many entries takes one row and is never folded at first.
const SHORT_KEY: usize = 4;

/// Draws `entries` in rows that wrap, under a fold titled "Key" (open until folded; a long key
/// in a short pane starts folded).
pub fn key_ui(ui: &mut Ui, id: &str, entries: &[KeyEntry]) {
    egui::CollapsingHeader::new("Key")
        .id_salt(id)
        .default_open(entries.len() <= SHORT_KEY || ui.available_height() >= OPEN_KEY_MIN_HEIGHT)
        .show(ui, |ui| {
            ui.horizontal_wrapped(|ui| {
                ui.spacing_mut().item_spacing.x = 14.0;
                for e in entries {
                    entry_ui(ui, e);
                }
            });
        });
}

/// One entry, sample and words, as one unit: a row of the key wraps between entries, never
/// inside one.
fn entry_ui(ui: &mut Ui, e: &KeyEntry) {
    let sample_size = match e.glyph {
        Glyph::Bubble(r) => Vec2::splat(2.0 * r + 2.0),
        _ => Vec2::new(18.0, 14.0),
    };
    let galley = egui::WidgetText::from(egui::RichText::new(&e.label).small()).into_galley(
        ui,
        Some(egui::TextWrapMode::Extend),
        f32::INFINITY,
        egui::TextStyle::Small,
    );
    let gap = 4.0;
    let size = Vec2::new(
        sample_size.x + gap + galley.size().x,
        sample_size.y.max(galley.size().y),
    );
    let (rect, response) = ui.allocate_exact_size(size, egui::Sense::hover());
    let sample_rect = egui::Rect::from_min_size(
        Pos2::new(rect.left(), rect.center().y - sample_size.y / 2.0),
        sample_size,
    );
    sample(ui, sample_rect, e.glyph, e.color);
    let text_at = Pos2::new(
        sample_rect.right() + gap,
        rect.center().y - galley.size().y / 2.0,
    );
    ui.painter()
        .galley(text_at, galley, ui.visuals().text_color());
    response.widget_info(|| egui::WidgetInfo::labeled(egui::Role::Label, true, e.label.as_str()));
}

/// Paints one sample in `rect`.
fn sample(ui: &Ui, rect: egui::Rect, glyph: Glyph, color: Color32) {
    let painter = ui.painter_at(rect.expand(1.0));
    let c = rect.center();
    let r = 5.0;
    let stroke = Stroke::new(1.6, color);
    match glyph {
        Glyph::Marker(shape, filled) => match shape {
            Shape::Circle | Shape::Ring => {
                if filled && shape == Shape::Circle {
                    painter.circle_filled(c, r, color);
                } else {
                    painter.circle_stroke(c, r, stroke);
                }
            }
            Shape::Square => {
                let square = egui::Rect::from_center_size(c, Vec2::splat(2.0 * r - 1.0));
                if filled {
                    painter.rect_filled(square, 0.0, color);
                } else {
                    painter.rect_stroke(square, 0.0, stroke, egui::StrokeKind::Middle);
                }
            }
            Shape::Diamond => {
                polygon(&painter, &diamond(c, r + 1.0), color, filled, stroke);
            }
            Shape::TriangleDown => {
                let points = vec![
                    Pos2::new(c.x - r, c.y - r * 0.7),
                    Pos2::new(c.x + r, c.y - r * 0.7),
                    Pos2::new(c.x, c.y + r),
                ];
                polygon(&painter, &points, color, filled, stroke);
            }
            Shape::Cross => {
                let s = Stroke::new(2.5, color);
                painter.line_segment([c + Vec2::new(-r, -r), c + Vec2::new(r, r)], s);
                painter.line_segment([c + Vec2::new(-r, r), c + Vec2::new(r, -r)], s);
            }
        },
        Glyph::Line => {
            painter.line_segment(
                [rect.left_center(), rect.right_center()],
                Stroke::new(2.0, color),
            );
        }
        Glyph::Dashed => {
            let y = c.y;
            let mut x = rect.left();
            while x < rect.right() {
                let end = (x + 4.0).min(rect.right());
                painter.line_segment(
                    [Pos2::new(x, y), Pos2::new(end, y)],
                    Stroke::new(1.5, color),
                );
                x += 7.0;
            }
        }
        Glyph::Bar => {
            painter.line_segment(
                [c - Vec2::new(6.0, 0.0), c + Vec2::new(6.0, 0.0)],
                Stroke::new(3.0, color),
            );
        }
        Glyph::Bubble(radius) => {
            painter.circle_filled(c, radius, color);
        }
    }
}

fn diamond(c: Pos2, r: f32) -> Vec<Pos2> {
    vec![
        Pos2::new(c.x, c.y - r),
        Pos2::new(c.x + r, c.y),
        Pos2::new(c.x, c.y + r),
        Pos2::new(c.x - r, c.y),
    ]
}

fn polygon(painter: &egui::Painter, points: &[Pos2], color: Color32, filled: bool, stroke: Stroke) {
    let shape = if filled {
        egui::Shape::convex_polygon(points.to_vec(), color, Stroke::NONE)
    } else {
        egui::Shape::closed_line(points.to_vec(), stroke)
    };
    painter.add(shape);
}

/// The key entries every listing chart shares: each variant's color (in color order), each
/// sale class's shape, set-aside listings, comparables and the subject.
#[must_use]
pub fn listing_entries(cx: &super::PaneContext<'_>, ink: Color32) -> Vec<KeyEntry> {
    let mut entries: Vec<KeyEntry> = (0..cx.color_order().len())
        .map(|i| {
            KeyEntry::new(
                Glyph::Marker(Shape::Circle, true),
                crate::palette::variant_color(i),
                cx.variant_label(i),
            )
        })
        .collect();
    for condition in model::condition::Condition::ALL {
        entries.push(KeyEntry::new(
            Glyph::Marker(report::visual::condition_shape(condition), true),
            ink,
            format!("sold {}", condition.sold_as()),
        ));
    }
    entries.push(KeyEntry::new(
        Glyph::Marker(Shape::Circle, false),
        crate::palette::faded(ink),
        "hollow, faded: set aside from the fit",
    ));
    entries.push(KeyEntry::new(
        Glyph::Marker(Shape::Ring, false),
        ink,
        "comparable",
    ));
    entries.push(KeyEntry::new(
        Glyph::Marker(Shape::Cross, true),
        crate::palette::SUBJECT,
        "the subject at its indicated value",
    ));
    entries
}
