//! Value by mileage: listings of the subject's model-year window as bubbles (size by model
//! year, color by variant), the subject's fitted value across mileage with its prediction
//! band, and listings priced below their own band marked for a look.

use eframe::egui::Ui;
use egui_plot::{Line, MarkerShape, PlotPoints, PlotUi, Points};
use model::hedonic::{Attributes, age_years};

use super::density::{Bounds, Plotted, View, exact_groups, extent, place};
use super::key::{self, Glyph, KeyEntry};
use super::{
    ChartListings, PaneContext, cached, cached_in, comparable_rings, draw_cells, fit_id,
    inputs_key, listing_chart, listing_plot,
};
use crate::palette::{SUBJECT, condition_shape, faded, ink_for, marker, variant_color};
use report::visual::Shape;

/// A series of the chart: (variant index, model year, condition, included in the fit).
type Series = (usize, i32, model::condition::Condition, bool);

/// The listings of the subject's model-year window, placed; gathered once per fit and window.
pub struct MileageChartData {
    /// Every listing in the window.
    pub all: Vec<Plotted>,
    /// The series a listing's `series` indexes.
    pub series: Vec<Series>,
    /// The window's extent, kept in the auto-fitted view.
    extent: Option<Bounds>,
}

/// The subject's fitted median, lower and upper prediction bound across mileage.
struct SubjectCurve {
    median: Vec<[f64; 2]>,
    lower: Vec<[f64; 2]>,
    upper: Vec<[f64; 2]>,
}

/// Places the listings of the subject's model-year window.
#[must_use]
pub fn gather(cx: &PaneContext<'_>) -> MileageChartData {
    let market = cx.market;
    let fit = cx.fit;
    let subject_year = cx.document.subject.model_year;
    let window = cx.document.rules.model_year_window;
    let (all, series) = place(
        fit.cleaning
            .rows
            .iter()
            .copied()
            .filter(|&r| (market.model_year[r] - subject_year).abs() <= window),
        |row| {
            (
                cx.variant_index(row),
                market.model_year[row],
                market.condition[row],
                fit.cleaning.is_included(row),
            )
        },
        |row| [market.miles[row], market.asking_price[row]],
    );
    MileageChartData {
        extent: extent(&all),
        all,
        series,
    }
}

fn subject_curve(cx: &PaneContext<'_>, max_miles: f64) -> SubjectCurve {
    let fit = cx.fit;
    let subject = &cx.document.subject;
    let variant = subject
        .variant
        .as_deref()
        .and_then(|v| cx.market.names.id_ignore_case(v))
        .unwrap_or(model::vocabulary::NO_NAME);
    let mut curve = SubjectCurve {
        median: Vec::new(),
        lower: Vec::new(),
        upper: Vec::new(),
    };
    let steps = 60;
    for i in 0..=steps {
        let miles = max_miles * f64::from(i) / f64::from(steps);
        let a = Attributes {
            age_years: age_years(subject.model_year, fit.model.as_of_year()),
            miles,
            variant,
            condition: subject.condition,
        };
        let e = fit.model.estimate(&a, cx.document.level);
        curve.median.push([miles, e.median]);
        curve.lower.push([miles, e.prediction_interval.lower]);
        curve.upper.push([miles, e.prediction_interval.upper]);
    }
    curve
}

/// The drawn listings asking less than the lower end of their own prediction interval.
fn below_band(cx: &PaneContext<'_>, data: &MileageChartData, view: &View) -> Vec<[f64; 2]> {
    let View::Exact(shown) = view else {
        return Vec::new();
    };
    let fit = cx.fit;
    shown
        .iter()
        .map(|&i| data.all[i as usize])
        .filter(|p| {
            let own = fit.model.estimate(
                &fit.model.attributes_of_row(cx.market, p.row),
                cx.document.level,
            );
            // Against the market on the listing's own date.
            let shift = fit.model.row_shift(cx.market, p.row).exp();
            cx.market.asking_price[p.row] < shift * own.prediction_interval.lower
        })
        .map(|p| p.at)
        .collect()
}

/// Draws the pane.
pub fn ui(ui: &mut Ui, cx: &mut PaneContext<'_>) {
    let doc = cx.document;
    let key = inputs_key(&[
        &fit_id(cx),
        &doc.subject.model_year,
        &doc.rules.model_year_window,
    ]);
    let data = cached(ui, "mileage_chart_data", key, || gather(cx));
    let max_miles = data
        .extent
        .map_or(doc.subject.miles, |e| e.max[0].max(doc.subject.miles))
        * 1.05;
    let curve_key = inputs_key(&[&key, &doc.subject, &doc.level]);
    let curve = cached(ui, "mileage_chart_curve", curve_key, || {
        subject_curve(cx, max_miles)
    });
    let subject = &cx.document.subject;
    let window = cx.document.rules.model_year_window;
    let (oldest, newest) = (subject.model_year - window, subject.model_year + window);
    ui.label(format!("Model years {oldest}–{newest}"));
    let ink = crate::palette::ink(ui);
    let level = 100.0 * cx.document.level;
    let mut entries = key::listing_entries(cx, ink);
    entries.extend([
        KeyEntry::new(Glyph::Line, ink, "model: the subject's fitted value"),
        KeyEntry::new(
            Glyph::Dashed,
            ink.gamma_multiply(0.6),
            format!("model: {level:.0} % prediction band"),
        ),
        KeyEntry::new(
            Glyph::Marker(Shape::TriangleDown, true),
            ink,
            "below its own band: a deal or a problem? look first",
        ),
        KeyEntry::new(
            Glyph::Bubble(bubble_radius(oldest, oldest)),
            ink.gamma_multiply(0.7),
            format!("bubble size: model year, {oldest}"),
        ),
        KeyEntry::new(
            Glyph::Bubble(bubble_radius(newest, oldest)),
            ink.gamma_multiply(0.7),
            format!("to {newest}"),
        ),
    ]);
    key::key_ui(ui, "mileage_chart_key", &entries);
    let below_id = ui.scope_id().with("mileage_chart_below");
    let plot = listing_plot(ui, "value_by_mileage", data.extent)
        .x_axis_label("miles")
        .x_axis_formatter(|mark, _| format!("{} mi", model::format::thousands(mark.value)));
    let selected_at = cx
        .selection
        .selected
        .filter(|&r| (cx.market.model_year[r] - subject.model_year).abs() <= window)
        .map(|r| [cx.market.miles[r], cx.market.asking_price[r]]);
    let listings = ChartListings {
        name: "mileage_chart_view",
        key,
        all: &data.all,
        selected_at,
    };
    listing_chart(ui, cx, plot, &listings, |plot, cx, view, bounds| {
        let below_key = inputs_key(&[&key, &bounds.key(), &cx.document.level]);
        let below = cached_in(plot.ctx(), below_id, below_key, || {
            below_band(cx, &data, view)
        });
        draw(plot, cx, &data, view, &curve, &below)
    });
}

/// Newer model years draw larger bubbles.
fn bubble_radius(year: i32, oldest: i32) -> f32 {
    1.5 + 1.5 * (year - oldest).max(0) as f32
}

/// Draws the chart; returns the listings drawn one by one (for picking).
fn draw(
    plot: &mut PlotUi<'_>,
    cx: &PaneContext<'_>,
    data: &MileageChartData,
    view: &View,
    curve: &SubjectCurve,
    below: &[[f64; 2]],
) -> Vec<(usize, [f64; 2])> {
    let subject = &cx.document.subject;
    let oldest = subject.model_year - cx.document.rules.model_year_window;
    let (groups, drawn) = exact_groups(&data.all, view);
    draw_cells(plot, view, |s| {
        let (variant, _, _, _) = data.series[s as usize];
        (cx.variant_label(variant), variant_color(variant))
    });
    for (series, points) in groups {
        let (variant, year, condition, included) = data.series[series as usize];
        let color = variant_color(variant);
        let radius = bubble_radius(year, oldest);
        plot.points(
            Points::new(
                if included {
                    cx.variant_label(variant)
                } else {
                    "excluded (hover for why)".to_owned()
                },
                PlotPoints::from(points),
            )
            .radius(radius)
            .shape(condition_shape(condition))
            .color(if included {
                color.gamma_multiply(0.7)
            } else {
                faded(color)
            }),
        );
    }
    let level = 100.0 * cx.document.level;
    let ink = ink_for(plot.ctx().global_style().visuals.dark_mode);
    plot.line(
        Line::new("model: the subject's fitted value", curve.median.clone())
            .color(ink)
            .width(2.0),
    );
    for edge in [&curve.lower, &curve.upper] {
        plot.line(
            Line::new(format!("model: {level:.0} % prediction band"), edge.clone())
                .color(ink.gamma_multiply(0.6))
                .style(egui_plot::LineStyle::dashed_loose()),
        );
    }
    plot.points(
        Points::new(
            "below its own band: a deal or a problem? look first",
            below.to_vec(),
        )
        .shape(marker(Shape::TriangleDown))
        .radius(5.0)
        .color(ink),
    );
    if let Some(a) = cx.appraisal {
        comparable_rings(plot, a, 8.0, ink, |l| [l.miles, l.asking_price]);
        plot.points(
            Points::new(
                "subject",
                vec![[subject.miles, a.reconciliation.indicated_value]],
            )
            .shape(marker(Shape::Cross))
            .radius(9.0)
            .color(SUBJECT),
        );
    }
    if let Some(row) = cx.selection.selected.or(cx.selection.hovered) {
        plot.points(
            Points::new(
                "selected",
                vec![[cx.market.miles[row], cx.market.asking_price[row]]],
            )
            .shape(MarkerShape::Square)
            .filled(false)
            .radius(10.0)
            .color(ink),
        );
    }
    drawn
}
