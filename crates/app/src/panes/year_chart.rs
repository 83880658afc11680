//! Price by model year: every listing a point (variant by colour, condition by shape), each
//! year's mean, the fitted curve at typical mileage, excluded listings faded with their reason.

use std::collections::BTreeMap;

use eframe::egui::{self, Color32, Ui};
use egui_plot::{Legend, Line, Plot, PlotPoints, Points};
use model::condition::Condition;
use model::hedonic::Attributes;

use super::{PaneContext, decimate, jitter, nearest};
use crate::palette::{SUBJECT, condition_shape, faded, variant_colour};

/// Draws the pane.
pub fn ui(ui: &mut Ui, cx: &mut PaneContext<'_>) {
    let market = cx.market;
    let fit = cx.fit;
    let (rows, step) = decimate(&fit.cleaning.rows);
    if step > 1 {
        ui.label(format!(
            "Showing 1 in {step} of {} listings; comparables and the subject are always shown.",
            fit.cleaning.rows.len()
        ));
    }
    let mut groups: BTreeMap<(usize, Condition, bool), Vec<[f64; 2]>> = BTreeMap::new();
    let mut drawn: Vec<(usize, [f64; 2])> = Vec::with_capacity(rows.len());
    let mut sums: BTreeMap<i32, (f64, usize)> = BTreeMap::new();
    for &row in &fit.cleaning.rows {
        if fit.cleaning.is_included(row) {
            let e = sums.entry(market.model_year[row]).or_default();
            e.0 += market.asking_price[row];
            e.1 += 1;
        }
    }
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
    let subject = &cx.document.subject;
    let subject_variant = subject
        .variant
        .as_deref()
        .and_then(|v| market.names.id_ignore_case(v))
        .unwrap_or(model::vocabulary::NO_NAME);
    let as_of_year = fit.model.as_of_year();
    let years: Vec<i32> = sums.keys().copied().collect();
    let curve: Vec<[f64; 2]> = years
        .iter()
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
    let comparables: Vec<[f64; 2]> = cx
        .appraisal
        .map(|a| {
            a.comparables
                .iter()
                .map(|c| {
                    [
                        f64::from(c.listing.model_year) + jitter(c.listing.row),
                        c.listing.asking_price,
                    ]
                })
                .collect()
        })
        .unwrap_or_default();
    let mut hovered = None;
    let response = Plot::new("price_by_year")
        .legend(Legend::default())
        .x_axis_label("model year")
        .y_axis_label("asking price")
        .show(ui, |plot| {
            for ((variant, condition, included), points) in groups {
                let name = format!(
                    "{} · {}{}",
                    cx.variant_label(variant),
                    condition,
                    if included { "" } else { " (excluded)" }
                );
                let colour = variant_colour(variant);
                plot.points(
                    Points::new(name, PlotPoints::from(points))
                        .color(if included { colour } else { faded(colour) })
                        .shape(condition_shape(condition))
                        .filled(included)
                        .radius(2.0),
                );
            }
            for (year, (sum, n)) in &sums {
                let mean = sum / *n as f64;
                let y = f64::from(*year);
                plot.line(
                    Line::new("model-year mean", vec![[y - 0.4, mean], [y + 0.4, mean]])
                        .color(Color32::GRAY)
                        .width(2.5),
                );
            }
            plot.line(
                Line::new(
                    format!(
                        "fitted, {} at typical miles",
                        subject.variant.as_deref().unwrap_or("(no variant)")
                    ),
                    curve,
                )
                .color(SUBJECT.gamma_multiply(0.6))
                .width(1.5),
            );
            plot.points(
                Points::new("comparables", comparables)
                    .shape(egui_plot::MarkerShape::Circle)
                    .filled(false)
                    .radius(6.0)
                    .color(SUBJECT),
            );
            if let Some(a) = cx.appraisal {
                let x = f64::from(subject.model_year);
                let band = a.reconciliation.value_band;
                plot.line(
                    Line::new("value band", vec![[x, band.lower], [x, band.upper]])
                        .color(SUBJECT)
                        .width(3.0),
                );
                plot.points(
                    Points::new("subject", vec![[x, a.reconciliation.indicated_value]])
                        .shape(egui_plot::MarkerShape::Asterisk)
                        .radius(9.0)
                        .color(SUBJECT),
                );
            }
            if let Some(row) = cx.selection.selected.or(cx.selection.hovered) {
                plot.points(
                    Points::new(
                        "selected",
                        vec![[
                            f64::from(market.model_year[row]) + jitter(row),
                            market.asking_price[row],
                        ]],
                    )
                    .filled(false)
                    .radius(9.0)
                    .color(Color32::from_rgb(0x20, 0x20, 0x20)),
                );
            }
            hovered = nearest(plot, &drawn, 8.0);
        });
    hover_and_click(ui, cx, hovered, &response.response);
}

/// Shared by both charts: hovering a point links it everywhere; clicking selects it; the
/// hovered listing's exclusion reason shows as a tooltip.
pub fn hover_and_click(
    ui: &Ui,
    cx: &mut PaneContext<'_>,
    hovered: Option<usize>,
    response: &egui::Response,
) {
    if let Some(row) = hovered {
        cx.selection.hovered = Some(row);
        let listing = cx.market.listing(row);
        let reason = cx
            .fit
            .cleaning
            .exclusion_of(row)
            .filter(|_| !cx.fit.cleaning.is_included(row))
            .map(|e| format!("\nexcluded: {e}"))
            .unwrap_or_default();
        response.clone().on_hover_text_at_pointer(format!(
            "line {}: {} {} {}, {} mi, {}, {}{reason}",
            listing.line,
            listing.model_year,
            listing.model,
            listing.variant.as_deref().unwrap_or(""),
            model::format::thousands(listing.miles),
            listing.condition,
            model::format::money(listing.asking_price)
        ));
        if response.clicked() {
            cx.selection.selected = Some(row);
        }
    }
    let _ = ui;
}
