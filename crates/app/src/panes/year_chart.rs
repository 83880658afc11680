//! Price by model year: every listing a point (variant by colour, condition by shape), each
//! year's mean, the fitted curve at typical mileage, excluded listings faded with their reason.

use std::collections::BTreeMap;

use eframe::egui::{self, Color32, Ui};
use egui_plot::{Legend, Line, MarkerShape, Plot, PlotPoints, PlotUi, Points};
use model::condition::Condition;
use model::hedonic::Attributes;

use super::{PaneContext, cached, decimate, fit_id, inputs_key, jitter, nearest};
use crate::palette::{SUBJECT, condition_shape, faded, variant_colour};

/// Points by (variant index, condition, included).
type Groups = BTreeMap<(usize, Condition, bool), Vec<[f64; 2]>>;

/// What the chart draws, gathered before drawing.
struct YearChartData {
    groups: Groups,
    /// Drawn points with their market rows, for picking.
    drawn: Vec<(usize, [f64; 2])>,
    /// Mean asking price of the included listings of each model year.
    means: BTreeMap<i32, f64>,
    /// The fitted value of the subject's variant, used, at typical mileage, by model year.
    curve: Vec<[f64; 2]>,
    /// Listings left out of the drawing (1 in `step` shown).
    step: usize,
}

fn gather(cx: &PaneContext<'_>) -> YearChartData {
    let market = cx.market;
    let fit = cx.fit;
    let (rows, step) = decimate(&fit.cleaning.rows);
    let mut sums: BTreeMap<i32, (f64, usize)> = BTreeMap::new();
    for &row in &fit.included_rows {
        let e = sums.entry(market.model_year[row]).or_default();
        e.0 += market.asking_price[row];
        e.1 += 1;
    }
    let mut groups = Groups::new();
    let mut drawn = Vec::with_capacity(rows.len());
    for &row in &rows {
        let p = [
            f64::from(market.model_year[row]) + jitter(row),
            market.asking_price[row],
        ];
        groups
            .entry((
                cx.variant_index(row),
                market.condition[row],
                fit.cleaning.is_included(row),
            ))
            .or_default()
            .push(p);
        drawn.push((row, p));
    }
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
        groups,
        drawn,
        means: sums
            .into_iter()
            .map(|(y, (sum, n))| (y, sum / n as f64))
            .collect(),
        curve,
        step,
    }
}

/// Draws the pane.
pub fn ui(ui: &mut Ui, cx: &mut PaneContext<'_>) {
    let doc = cx.document;
    let key = inputs_key(&[&fit_id(cx), &doc.subject.variant, &doc.level]);
    let data = cached(ui, "year_chart_data", key, || gather(cx));
    ui.label(
        "Circles used, squares certified, diamonds new; hollow and faded: excluded from the fit.",
    );
    if data.step > 1 {
        ui.label(format!(
            "Showing 1 in {} of {} listings; comparables and the subject are always shown.",
            data.step,
            cx.fit.cleaning.rows.len()
        ));
    }
    let mut hovered = None;
    let response = Plot::new("price_by_year")
        .legend(Legend::default().position(egui_plot::Corner::LeftTop))
        .x_axis_label("model year")
        .y_axis_label("asking price")
        .show(ui, |plot| {
            draw(plot, cx, &data);
            hovered = nearest(plot, &data.drawn, 8.0);
        });
    hover_and_click(cx, hovered, &response.response);
}

fn draw(plot: &mut PlotUi<'_>, cx: &PaneContext<'_>, data: &YearChartData) {
    for (&(variant, condition, included), points) in &data.groups {
        // One legend entry per variant (series with one name share it) and one for exclusions;
        // the condition is the marker's shape, explained above the chart.
        let name = if included {
            cx.variant_label(variant)
        } else {
            "excluded (hover for why)".to_owned()
        };
        let colour = variant_colour(variant);
        plot.points(
            Points::new(name, PlotPoints::from(points.clone()))
                .color(if included { colour } else { faded(colour) })
                .shape(condition_shape(condition))
                .filled(included)
                .radius(2.0),
        );
    }
    for (&year, &mean) in &data.means {
        let y = f64::from(year);
        plot.line(
            Line::new("model-year mean", vec![[y - 0.4, mean], [y + 0.4, mean]])
                .color(Color32::GRAY)
                .width(2.5),
        );
    }
    let subject = &cx.document.subject;
    let variant = subject.variant.as_deref().unwrap_or("(no variant)");
    plot.line(
        Line::new(
            format!("fitted: {variant}, used, typical miles"),
            data.curve.clone(),
        )
        .color(SUBJECT.gamma_multiply(0.6))
        .width(1.5),
    );
    if let Some(a) = cx.appraisal {
        let comparables: Vec<[f64; 2]> = a
            .comparables
            .iter()
            .map(|c| {
                [
                    f64::from(c.listing.model_year) + jitter(c.listing.row),
                    c.listing.asking_price,
                ]
            })
            .collect();
        plot.points(
            Points::new("comparables", comparables)
                .filled(false)
                .radius(6.0)
                .color(SUBJECT),
        );
        let x = f64::from(subject.model_year);
        let band = a.reconciliation.value_band;
        plot.line(
            Line::new("value band", vec![[x, band.lower], [x, band.upper]])
                .color(SUBJECT)
                .width(3.0),
        );
        plot.points(
            Points::new("subject", vec![[x, a.reconciliation.indicated_value]])
                .shape(MarkerShape::Asterisk)
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
                .filled(false)
                .radius(9.0)
                .color(Color32::from_rgb(0x20, 0x20, 0x20)),
        );
    }
}

/// Shared by both charts: hovering a point links it everywhere; clicking selects it; the
/// hovered listing's exclusion reason shows as a tooltip.
pub fn hover_and_click(
    cx: &mut PaneContext<'_>,
    hovered: Option<usize>,
    response: &egui::Response,
) {
    let Some(row) = hovered else { return };
    cx.selection.hovered = Some(row);
    let listing = cx.market.listing(row);
    let reason = cx
        .fit
        .cleaning
        .exclusion_of(row)
        .filter(|_| !cx.fit.cleaning.is_included(row))
        .map(|e| format!("\nexcluded: {e}"))
        .unwrap_or_default();
    response
        .clone()
        .on_hover_text_at_pointer(format!("{}{reason}", listing.describe()));
    if response.clicked() {
        cx.selection.selected = Some(row);
    }
}
