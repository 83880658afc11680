//! Value by mileage: listings of the subject's model-year window as bubbles (size by model
//! year, colour by variant), the subject's fitted value across mileage with its prediction
//! band, and listings priced below their own band marked for a look.

use std::collections::BTreeMap;

use eframe::egui::{Color32, Ui};
use egui_plot::{Legend, Line, MarkerShape, Plot, PlotPoints, PlotUi, Points};
use model::hedonic::{Attributes, age_years};

use super::year_chart::hover_and_click;
use super::{PaneContext, cached, decimate, fit_id, inputs_key, nearest};
use crate::palette::{SUBJECT, faded, variant_colour};

/// What the chart draws, gathered before drawing.
struct MileageChartData {
    /// Points by (variant index, model year, included).
    bubbles: BTreeMap<(usize, i32, bool), Vec<[f64; 2]>>,
    /// Drawn points with their market rows, for picking.
    drawn: Vec<(usize, [f64; 2])>,
    /// Listings asking less than the lower end of their own prediction interval.
    below: Vec<[f64; 2]>,
    /// The subject's fitted median, lower and upper prediction bound across mileage.
    median: Vec<[f64; 2]>,
    lower: Vec<[f64; 2]>,
    upper: Vec<[f64; 2]>,
    /// Listings in the window, and the decimation step.
    in_window: usize,
    step: usize,
}

fn gather(cx: &PaneContext<'_>) -> MileageChartData {
    let market = cx.market;
    let fit = cx.fit;
    let subject = &cx.document.subject;
    let window = cx.document.rules.model_year_window;
    let level = cx.document.level;
    let in_window: Vec<usize> = fit
        .cleaning
        .rows
        .iter()
        .copied()
        .filter(|&r| (market.model_year[r] - subject.model_year).abs() <= window)
        .collect();
    let (rows, step) = decimate(&in_window);
    let mut data = MileageChartData {
        bubbles: BTreeMap::new(),
        drawn: Vec::with_capacity(rows.len()),
        below: Vec::new(),
        median: Vec::new(),
        lower: Vec::new(),
        upper: Vec::new(),
        in_window: in_window.len(),
        step,
    };
    for &row in &rows {
        let p = [market.miles[row], market.asking_price[row]];
        data.bubbles
            .entry((
                cx.variant_index(row),
                market.model_year[row],
                fit.cleaning.is_included(row),
            ))
            .or_default()
            .push(p);
        data.drawn.push((row, p));
        let own = fit
            .model
            .estimate(&fit.model.attributes_of_row(market, row), level);
        if market.asking_price[row] < own.prediction_interval.lower {
            data.below.push(p);
        }
    }
    let variant = subject
        .variant
        .as_deref()
        .and_then(|v| market.names.id_ignore_case(v))
        .unwrap_or(model::vocabulary::NO_NAME);
    let max_miles = rows
        .iter()
        .map(|&r| market.miles[r])
        .fold(subject.miles, f64::max)
        * 1.05;
    let steps = 60;
    for i in 0..=steps {
        let miles = max_miles * f64::from(i) / f64::from(steps);
        let a = Attributes {
            age_years: age_years(subject.model_year, fit.model.as_of_year()),
            miles,
            variant,
            condition: subject.condition,
        };
        let e = fit.model.estimate(&a, level);
        data.median.push([miles, e.median]);
        data.lower.push([miles, e.prediction_interval.lower]);
        data.upper.push([miles, e.prediction_interval.upper]);
    }
    data
}

/// Draws the pane.
pub fn ui(ui: &mut Ui, cx: &mut PaneContext<'_>) {
    let doc = cx.document;
    let key = inputs_key(&[
        &fit_id(cx),
        &doc.subject,
        &doc.rules.model_year_window,
        &doc.level,
    ]);
    let data = cached(ui, "mileage_chart_data", key, || gather(cx));
    let subject = &cx.document.subject;
    let window = cx.document.rules.model_year_window;
    ui.label(format!(
        "Model years {}–{}{}",
        subject.model_year - window,
        subject.model_year + window,
        if data.step > 1 {
            format!(", 1 in {} of {} listings shown", data.step, data.in_window)
        } else {
            String::new()
        }
    ));
    let mut hovered = None;
    let response = Plot::new("value_by_mileage")
        .legend(Legend::default())
        .x_axis_label("miles")
        .y_axis_label("asking price")
        .show(ui, |plot| {
            draw(plot, cx, &data);
            hovered = nearest(plot, &data.drawn, 8.0);
        });
    hover_and_click(cx, hovered, &response.response);
}

fn draw(plot: &mut PlotUi<'_>, cx: &PaneContext<'_>, data: &MileageChartData) {
    let subject = &cx.document.subject;
    let oldest = subject.model_year - cx.document.rules.model_year_window;
    for (&(variant, year, included), points) in &data.bubbles {
        let colour = variant_colour(variant);
        // Newer model years draw larger bubbles.
        let radius = 1.5 + 1.5 * (year - oldest).max(0) as f32;
        plot.points(
            Points::new(
                if included {
                    cx.variant_label(variant)
                } else {
                    "excluded (hover for why)".to_owned()
                },
                PlotPoints::from(points.clone()),
            )
            .radius(radius)
            .color(if included {
                colour.gamma_multiply(0.7)
            } else {
                faded(colour)
            }),
        );
    }
    let level = 100.0 * cx.document.level;
    plot.line(
        Line::new("subject: fitted value", data.median.clone())
            .color(SUBJECT)
            .width(2.0),
    );
    plot.line(
        Line::new(
            format!("subject: {level:.0} % prediction band"),
            data.lower.clone(),
        )
        .color(SUBJECT.gamma_multiply(0.5)),
    );
    plot.line(
        Line::new(
            format!("subject: {level:.0} % prediction band"),
            data.upper.clone(),
        )
        .color(SUBJECT.gamma_multiply(0.5)),
    );
    plot.points(
        Points::new(
            "below its own band: a deal or a problem? look first",
            data.below.clone(),
        )
        .shape(MarkerShape::Down)
        .radius(5.0)
        .color(Color32::from_rgb(0x60, 0x60, 0x60)),
    );
    if let Some(a) = cx.appraisal {
        let comps: Vec<[f64; 2]> = a
            .comparables
            .iter()
            .map(|c| [c.listing.miles, c.listing.asking_price])
            .collect();
        plot.points(
            Points::new("comparables", comps)
                .filled(false)
                .radius(8.0)
                .color(SUBJECT),
        );
        plot.points(
            Points::new(
                "subject",
                vec![[subject.miles, a.reconciliation.indicated_value]],
            )
            .shape(MarkerShape::Asterisk)
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
            .filled(false)
            .radius(10.0)
            .color(Color32::from_rgb(0x20, 0x20, 0x20)),
        );
    }
}
