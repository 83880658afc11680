//! Value by mileage: listings of the subject's model-year window as bubbles (size by model
//! year, colour by variant), the subject's fitted value across mileage with its prediction
//! band, and listings priced below their own band marked for a look.

use eframe::egui::{Color32, Ui};
use egui_plot::{Legend, Line, MarkerShape, Plot, PlotPoints, Points};
use model::hedonic::{Attributes, age_years};

use super::year_chart::hover_and_click;
use super::{PaneContext, decimate, nearest};
use crate::palette::{SUBJECT, faded, variant_colour};

/// Draws the pane.
pub fn ui(ui: &mut Ui, cx: &mut PaneContext<'_>) {
    let market = cx.market;
    let fit = cx.fit;
    let subject = &cx.document.subject;
    let window = cx.document.rules.model_year_window;
    let in_window: Vec<usize> = fit
        .cleaning
        .rows
        .iter()
        .copied()
        .filter(|&r| (market.model_year[r] - subject.model_year).abs() <= window)
        .collect();
    let (rows, step) = decimate(&in_window);
    ui.label(format!(
        "Model years {}–{}{}",
        subject.model_year - window,
        subject.model_year + window,
        if step > 1 {
            format!(", 1 in {step} of {} listings shown", in_window.len())
        } else {
            String::new()
        }
    ));
    let level = cx.document.level;
    let oldest = subject.model_year - window;
    let mut drawn = Vec::with_capacity(rows.len());
    let mut below = Vec::new();
    // Bubbles grouped by variant, model year and inclusion: a handful of series, not one each.
    let mut bubbles: std::collections::BTreeMap<(usize, i32, bool), Vec<[f64; 2]>> =
        std::collections::BTreeMap::new();
    for &row in &rows {
        let p = [market.miles[row], market.asking_price[row]];
        let included = fit.cleaning.is_included(row);
        bubbles
            .entry((cx.variant_index(row), market.model_year[row], included))
            .or_default()
            .push(p);
        drawn.push((row, p));
        let own = fit
            .model
            .estimate(&fit.model.attributes_of_row(market, row), level);
        if market.asking_price[row] < own.prediction_interval.lower {
            below.push(p);
        }
    }
    let subject_variant = subject
        .variant
        .as_deref()
        .and_then(|v| market.names.id_ignore_case(v))
        .unwrap_or(model::vocabulary::NO_NAME);
    let max_miles = rows
        .iter()
        .map(|&r| market.miles[r])
        .fold(subject.miles, f64::max)
        * 1.05;
    let attributes = |miles: f64| Attributes {
        age_years: age_years(subject.model_year, fit.model.as_of_year()),
        miles,
        variant: subject_variant,
        condition: subject.condition,
    };
    let steps = 60;
    let (mut mid, mut lo, mut hi) = (Vec::new(), Vec::new(), Vec::new());
    for i in 0..=steps {
        let miles = max_miles * f64::from(i) / f64::from(steps);
        let e = fit.model.estimate(&attributes(miles), level);
        mid.push([miles, e.median]);
        lo.push([miles, e.prediction_interval.lower]);
        hi.push([miles, e.prediction_interval.upper]);
    }
    let mut hovered = None;
    let response = Plot::new("value_by_mileage")
        .legend(Legend::default())
        .x_axis_label("miles")
        .y_axis_label("asking price")
        .show(ui, |plot| {
            for ((variant, year, included), points) in bubbles {
                let colour = variant_colour(variant);
                // Newer model years draw larger bubbles.
                let radius = 1.5 + 1.5 * (year - oldest).max(0) as f32;
                plot.points(
                    Points::new(cx.variant_label(variant), PlotPoints::from(points))
                        .radius(radius)
                        .color(if included {
                            colour.gamma_multiply(0.7)
                        } else {
                            faded(colour)
                        }),
                );
            }
            plot.line(
                Line::new("subject: fitted value", mid)
                    .color(SUBJECT)
                    .width(2.0),
            );
            plot.line(
                Line::new(
                    format!("subject: {:.0} % prediction band", 100.0 * level),
                    lo,
                )
                .color(SUBJECT.gamma_multiply(0.5)),
            );
            plot.line(
                Line::new(
                    format!("subject: {:.0} % prediction band", 100.0 * level),
                    hi,
                )
                .color(SUBJECT.gamma_multiply(0.5)),
            );
            plot.points(
                Points::new("below its own band: a deal or a problem? look first", below)
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
                        vec![[market.miles[row], market.asking_price[row]]],
                    )
                    .filled(false)
                    .radius(10.0)
                    .color(Color32::from_rgb(0x20, 0x20, 0x20)),
                );
            }
            hovered = nearest(plot, &drawn, 8.0);
        });
    hover_and_click(ui, cx, hovered, &response.response);
}
