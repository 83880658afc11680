//! Price by model year: every listing a point (variant by color, condition by shape), each
//! year's mean, the fitted curve at typical mileage, excluded listings faded with their reason.

use std::collections::BTreeMap;

use eframe::egui::{Color32, Ui};
use egui_plot::{Line, MarkerShape, PlotPoints, PlotUi, Points};
use model::condition::Condition;
use model::hedonic::Attributes;
use report::visual::Shape;

use super::density::{Bounds, Plotted, View, exact_groups, extent, place};
use super::key::{self, Glyph, KeyEntry};
use super::{
    ChartListings, PaneContext, cached, comparable_rings, draw_cells, fit_id, inputs_key, jitter,
    listing_chart, listing_plot,
};
use crate::palette::{SUBJECT, condition_shape, faded, marker, variant_color};

/// A series of the chart: (variant index, condition, included in the fit).
type Series = (usize, Condition, bool);

/// What the chart draws, gathered once per fit.
pub struct YearChartData {
    /// Every listing of the model, placed.
    pub all: Vec<Plotted>,
    /// The series a listing's `series` indexes.
    pub series: Vec<Series>,
    /// Mean asking price of the included listings of each model year.
    means: BTreeMap<i32, f64>,
    /// The fitted value of the subject's variant, used, at typical mileage, by model year.
    curve: Vec<[f64; 2]>,
    /// The whole market's extent, kept in the auto-fitted view.
    extent: Option<Bounds>,
}

/// Places every listing of the fitted model.
#[must_use]
pub fn gather(cx: &PaneContext<'_>) -> YearChartData {
    let market = cx.market;
    let fit = cx.fit;
    let mut sums: BTreeMap<i32, (f64, usize)> = BTreeMap::new();
    for &row in &fit.included_rows {
        let e = sums.entry(market.model_year[row]).or_default();
        e.0 += market.asking_price[row];
        e.1 += 1;
    }
    let (all, series) = place(
        fit.cleaning.rows.iter().copied(),
        |row| {
            (
                cx.variant_index(row),
                market.condition[row],
                fit.cleaning.is_included(row),
            )
        },
        |row| {
            [
                f64::from(market.model_year[row]) + jitter(row),
                market.asking_price[row],
            ]
        },
    );
    let subject_variant = cx
        .document
        .subject
        .variant
        .as_deref()
        .and_then(|v| market.names.id_ignore_case(v))
        .unwrap_or(model::vocabulary::NO_NAME);
    let as_of_year = fit.model.as_of_year();
    let curve = sums
        .keys()
        .map(|&y| {
            let age = model::hedonic::age_years(y, as_of_year);
            let a = Attributes {
                age_years: age,
                miles: fit.model.mileage().typical_miles(age),
                variant: subject_variant,
                condition: Condition::Used,
            };
            [
                f64::from(y),
                fit.model.estimate(&a, cx.document.level).median,
            ]
        })
        .collect();
    YearChartData {
        extent: extent(&all),
        all,
        series,
        means: sums
            .into_iter()
            .map(|(y, (sum, n))| (y, sum / n as f64))
            .collect(),
        curve,
    }
}

/// Draws the pane.
pub fn ui(ui: &mut Ui, cx: &mut PaneContext<'_>) {
    let doc = cx.document;
    let key = inputs_key(&[&fit_id(cx), &doc.subject.variant, &doc.level]);
    let data = cached(ui, "year_chart_data", key, || gather(cx));
    let ink = crate::palette::ink(ui);
    let mut entries = key::listing_entries(cx, ink);
    let variant = model::vocabulary::variant_text(doc.subject.variant.as_deref());
    entries.extend([
        KeyEntry::new(
            Glyph::Bar,
            ink.gamma_multiply(0.55),
            "model-year mean asking price",
        ),
        KeyEntry::new(
            Glyph::Line,
            ink,
            format!("fitted: {variant}, sold used, typical miles"),
        ),
        KeyEntry::new(
            Glyph::Line,
            crate::palette::SUBJECT,
            "the subject's value band",
        ),
    ]);
    key::key_ui(ui, "year_chart_key", &entries);
    let plot = listing_plot(ui, "price_by_year", data.extent)
        .x_axis_label("model year")
        // A tick and label for every model year (years are whole numbers).
        .x_grid_spacer(egui_plot::uniform_grid_spacer(|_| [1.0, 5.0, 10.0]))
        .x_axis_formatter(|mark, _| {
            if (mark.value - mark.value.round()).abs() < 1e-6 {
                format!("{:.0}", mark.value)
            } else {
                String::new()
            }
        });
    let selected_at = cx.selection.selected.map(|r| {
        [
            f64::from(cx.market.model_year[r]) + jitter(r),
            cx.market.asking_price[r],
        ]
    });
    let listings = ChartListings {
        name: "year_chart_view",
        key,
        all: &data.all,
        selected_at,
    };
    listing_chart(ui, cx, plot, &listings, |plot, cx, view, _| {
        draw(plot, cx, &data, view)
    });
}

/// The neutral ink of the plot's theme.
fn ink_of(plot: &PlotUi<'_>) -> Color32 {
    crate::palette::ink_for(plot.ctx().global_style().visuals.dark_mode)
}

/// Draws the chart; returns the listings drawn one by one (for picking).
fn draw(
    plot: &mut PlotUi<'_>,
    cx: &PaneContext<'_>,
    data: &YearChartData,
    view: &View,
) -> Vec<(usize, [f64; 2])> {
    let (groups, drawn) = exact_groups(&data.all, view);
    draw_cells(plot, view, |s| {
        let (variant, _, _) = data.series[s as usize];
        (cx.variant_label(variant), variant_color(variant))
    });
    for (series, points) in groups {
        let (variant, condition, included) = data.series[series as usize];
        // One legend entry per variant (series with one name share it) and one for exclusions;
        // the condition is the marker's shape, explained above the chart.
        let name = if included {
            cx.variant_label(variant)
        } else {
            "excluded (hover for why)".to_owned()
        };
        let color = variant_color(variant);
        plot.points(
            Points::new(name, PlotPoints::from(points))
                .color(if included { color } else { faded(color) })
                .shape(condition_shape(condition))
                .filled(included)
                .radius(2.0),
        );
    }
    let ink = ink_of(plot);
    for (&year, &mean) in &data.means {
        let y = f64::from(year);
        plot.line(
            Line::new("model-year mean", vec![[y - 0.4, mean], [y + 0.4, mean]])
                .color(ink.gamma_multiply(0.55))
                .width(2.5),
        );
    }
    let subject = &cx.document.subject;
    let variant = model::vocabulary::variant_text(subject.variant.as_deref());
    plot.line(
        Line::new(
            format!("fitted: {variant}, used, typical miles"),
            data.curve.clone(),
        )
        .color(ink)
        .width(1.5),
    );
    if let Some(a) = cx.appraisal {
        comparable_rings(plot, a, 6.0, ink, |l| {
            [f64::from(l.model_year) + jitter(l.row), l.asking_price]
        });
        let x = f64::from(subject.model_year);
        let band = a.reconciliation.value_band;
        plot.line(
            Line::new("subject", vec![[x, band.lower], [x, band.upper]])
                .color(SUBJECT)
                .width(3.0),
        );
        plot.points(
            Points::new("subject", vec![[x, a.reconciliation.indicated_value]])
                .shape(marker(Shape::Cross))
                .radius(9.0)
                .color(SUBJECT),
        );
    }
    if let Some(row) = cx.selection.selected.or(cx.selection.hovered) {
        let p = [
            f64::from(cx.market.model_year[row]) + jitter(row),
            cx.market.asking_price[row],
        ];
        plot.points(
            Points::new("selected", vec![p])
                .shape(MarkerShape::Square)
                .filled(false)
                .radius(9.0)
                .color(ink),
        );
    }
    drawn
}
