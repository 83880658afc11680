//! Charts as data: what to draw, in data coordinates. The HTML and PDF writers map them to
//! their own drawing calls.

use model::session::Session;

use crate::visual::{self, Rgb, Shape};

/// One layer of a chart.
#[derive(Debug, Clone, PartialEq)]
pub enum Mark {
    /// Points.
    Points {
        /// (x, y).
        points: Vec<(f64, f64)>,
        /// How each point is marked.
        shape: Shape,
        /// Color.
        rgb: Rgb,
        /// Whether each point carries its number (1, 2, …) beside it, as in the comparables
        /// table.
        numbered: bool,
    },
    /// A polyline.
    Line {
        /// (x, y).
        points: Vec<(f64, f64)>,
        /// Color.
        rgb: Rgb,
        /// Dashed.
        dashed: bool,
    },
    /// A vertical bar from `low` to `high` at `x` (the subject's value band).
    Range {
        /// x.
        x: f64,
        /// Low end.
        low: f64,
        /// High end.
        high: f64,
        /// Color.
        rgb: Rgb,
    },
}

/// One entry of a chart's key: its mark (a shape, or a line when `None`), color and meaning.
#[derive(Debug, Clone, PartialEq)]
pub struct KeyEntry {
    /// The shape, or `None` for a line.
    pub shape: Option<Shape>,
    /// Color.
    pub rgb: Rgb,
    /// What it means.
    pub text: String,
}

/// A chart.
#[derive(Debug, Clone, PartialEq)]
pub struct Figure {
    /// Title.
    pub title: String,
    /// x-axis label.
    pub x_label: String,
    /// y-axis label.
    pub y_label: String,
    /// Whether x is a year (ticks without thousands separators).
    pub x_is_year: bool,
    /// Layers, back to front.
    pub marks: Vec<Mark>,
    /// The key to the marks.
    pub legend: Vec<KeyEntry>,
}

impl Figure {
    /// The data range of every layer, padded by 5 %: ((x0, x1), (y0, y1)).
    #[must_use]
    pub fn bounds(&self) -> ((f64, f64), (f64, f64)) {
        let mut xs = (f64::INFINITY, f64::NEG_INFINITY);
        let mut ys = (f64::INFINITY, f64::NEG_INFINITY);
        let mut take = |x: f64, y: f64| {
            if x.is_finite() && y.is_finite() {
                xs = (xs.0.min(x), xs.1.max(x));
                ys = (ys.0.min(y), ys.1.max(y));
            }
        };
        for m in &self.marks {
            match m {
                Mark::Points { points, .. } | Mark::Line { points, .. } => {
                    for &(x, y) in points {
                        take(x, y);
                    }
                }
                Mark::Range { x, low, high, .. } => {
                    take(*x, *low);
                    take(*x, *high);
                }
            }
        }
        let pad = |(a, b): (f64, f64)| {
            if !(a.is_finite() && b.is_finite()) {
                return (0.0, 1.0);
            }
            let span = if b > a { b - a } else { a.abs().max(1.0) };
            (a - 0.06 * span, b + 0.06 * span)
        };
        (pad(xs), pad(ys))
    }
}

/// Round tick positions covering `lo..hi`, about `n` of them.
#[must_use]
pub fn ticks(lo: f64, hi: f64, n: usize) -> Vec<f64> {
    if hi.partial_cmp(&lo) != Some(std::cmp::Ordering::Greater) || n == 0 {
        return vec![lo];
    }
    let raw = (hi - lo) / n as f64;
    let magnitude = 10f64.powf(raw.log10().floor());
    let step = [1.0, 2.0, 2.5, 5.0, 10.0]
        .iter()
        .map(|m| m * magnitude)
        .find(|s| *s >= raw)
        .unwrap_or(10.0 * magnitude);
    let first = (lo / step).ceil() * step;
    (0..=n * 3)
        .map(|i| first + i as f64 * step)
        .take_while(|t| *t <= hi + step * 1e-9)
        .collect()
}

/// The x-axis ticks of `f` over `x`: whole years, at most about ten, on a year axis; round
/// numbers otherwise.
#[must_use]
pub fn x_ticks(f: &Figure, x: (f64, f64)) -> Vec<f64> {
    if f.x_is_year {
        let (a, b) = (x.0.ceil() as i64, x.1.floor() as i64);
        let step = ((b - a) / 10).max(1) as usize;
        (a..=b).step_by(step).map(|v| v as f64).collect()
    } else {
        ticks(x.0, x.1, 6)
    }
}

/// The variants of the saved fit in color order (see [`visual::variant_order`]).
fn variant_colors(session: &Session) -> Vec<(String, Rgb)> {
    let effects = &session.fit.rates.variant_effects;
    visual::variant_order(effects.iter().map(|(k, v)| (k.as_str(), *v)))
        .into_iter()
        .enumerate()
        .map(|(i, name)| (name.to_owned(), visual::variant_color(i)))
        .collect()
}

fn color_of(colors: &[(String, Rgb)], variant: Option<&str>) -> Rgb {
    let label = variant.unwrap_or(model::rates::NO_VARIANT);
    colors
        .iter()
        .find(|(name, _)| name == label)
        .map_or(visual::INK_ON_LIGHT, |(_, c)| *c)
}

/// What one series of listings is drawn with: its variant's color and its condition's shape.
type SeriesKey = (Rgb, Shape);

/// The saved segment's listings, by variant color and condition shape (thinned past 4,000:
/// a printed chart cannot show more).
fn market_points(session: &Session, x: impl Fn(&model::market::Listing) -> f64) -> Vec<Mark> {
    let Some(listings) = session.segment_listings.as_ref() else {
        return Vec::new();
    };
    let colors = variant_colors(session);
    let step = (listings.len() / 4_000).max(1);
    // One series per (color, shape), in order of first appearance.
    let mut series: Vec<(SeriesKey, Vec<(f64, f64)>)> = Vec::new();
    for l in listings.iter().step_by(step) {
        let key = (
            color_of(&colors, l.variant.as_deref()),
            visual::condition_shape(l.condition),
        );
        let point = (x(l), l.asking_price);
        match series.iter_mut().find(|(k, _)| *k == key) {
            Some((_, points)) => points.push(point),
            None => series.push((key, vec![point])),
        }
    }
    series
        .into_iter()
        .map(|((rgb, shape), points)| Mark::Points {
            points,
            shape,
            rgb,
            numbered: false,
        })
        .collect()
}

/// The comparables as rings, numbered as in the table.
fn comparable_rings(points: Vec<(f64, f64)>) -> Mark {
    Mark::Points {
        points,
        shape: Shape::Ring,
        rgb: visual::INK_ON_LIGHT,
        numbered: true,
    }
}

/// The subject's cross at its indicated value, and its value band.
fn subject_marks(x: f64, value: f64, band: &model::ols::Interval) -> [Mark; 2] {
    [
        Mark::Range {
            x,
            low: band.lower,
            high: band.upper,
            rgb: visual::SUBJECT,
        },
        Mark::Points {
            points: vec![(x, value)],
            shape: Shape::Cross,
            rgb: visual::SUBJECT,
            numbered: false,
        },
    ]
}

/// The key: the variants present, the shapes, the comparables and the subject.
fn legend(session: &Session) -> Vec<KeyEntry> {
    let mut legend = Vec::new();
    if session.segment_listings.is_some() {
        for (name, rgb) in variant_colors(session) {
            legend.push(KeyEntry {
                shape: Some(Shape::Circle),
                rgb,
                text: name,
            });
        }
        legend.push(KeyEntry {
            shape: Some(Shape::Square),
            rgb: visual::INK_ON_LIGHT,
            text: "shape: circle used, square certified pre-owned, diamond new".into(),
        });
    }
    legend.push(KeyEntry {
        shape: Some(Shape::Ring),
        rgb: visual::INK_ON_LIGHT,
        text: "comparables (asking price, numbered as in the table)".into(),
    });
    legend.push(KeyEntry {
        shape: Some(Shape::Cross),
        rgb: visual::SUBJECT,
        text: "subject: indicated value and value band".into(),
    });
    legend
}

/// Asking price against model year, with the comparables numbered and the subject's value and
/// band at its model year.
#[must_use]
pub fn price_by_year(session: &Session) -> Figure {
    let a = &session.appraisal;
    let r = &session.result;
    let mut marks = market_points(session, |l| f64::from(l.model_year));
    marks.push(comparable_rings(
        a.comparables
            .iter()
            .map(|c| (f64::from(c.listing.model_year), c.listing.asking_price))
            .collect(),
    ));
    let x = f64::from(session.request.subject.model_year);
    marks.extend(subject_marks(x, r.indicated_value, &r.value_band));
    Figure {
        title: "Asking price by model year".into(),
        x_label: "model year".into(),
        y_label: "asking price".into(),
        x_is_year: true,
        marks,
        legend: legend(session),
    }
}

/// Asking price against mileage, with the model's line for the subject (its median value at
/// each odometer reading, from the fitted mileage slope) and its prediction band.
#[must_use]
pub fn price_by_mileage(session: &Session) -> Figure {
    let a = &session.appraisal;
    let r = &session.result;
    let subject_miles = session.request.subject.miles;
    let mut marks = market_points(session, |l| l.miles);
    let comparables: Vec<(f64, f64)> = a
        .comparables
        .iter()
        .map(|c| (c.listing.miles, c.listing.asking_price))
        .collect();
    let (lo, hi) = comparables
        .iter()
        .map(|p| p.0)
        .chain([subject_miles])
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), m| {
            (a.min(m), b.max(m))
        });
    let slope = session.fit.rates.miles_slope;
    let estimate = &a.model_estimate;
    let along = |scale: f64| -> Vec<(f64, f64)> {
        (0..=24)
            .map(|i| {
                let m = lo + (hi - lo) * f64::from(i) / 24.0;
                (m, scale * (slope * (m - subject_miles)).exp())
            })
            .collect()
    };
    for (scale, dashed) in [
        (estimate.prediction_interval.lower, true),
        (estimate.prediction_interval.upper, true),
        (estimate.median, false),
    ] {
        marks.push(Mark::Line {
            points: along(scale),
            rgb: visual::INK_ON_LIGHT,
            dashed,
        });
    }
    marks.push(comparable_rings(comparables));
    marks.extend(subject_marks(
        subject_miles,
        r.indicated_value,
        &r.value_band,
    ));
    let mut legend = legend(session);
    legend.push(KeyEntry {
        shape: None,
        rgb: visual::INK_ON_LIGHT,
        text: format!(
            "model: the subject's median value by mileage, dashed its {:.0} % prediction interval",
            100.0 * estimate.prediction_interval.level
        ),
    });
    Figure {
        title: "Asking price by mileage".into(),
        x_label: "miles".into(),
        y_label: "asking price".into(),
        x_is_year: false,
        marks,
        legend,
    }
}
