//! Depreciation: the fitted age curve by variant with loss per year in dollars and percent, the
//! variant premium by age, and the subject's holding-period forecast.

use eframe::egui::{self, RichText, Ui};
use egui_plot::{Line, Plot};
use model::depreciation::depreciation_table;
use model::format::{money, signed_money, thousands};

use super::PaneContext;
use super::key::{Glyph, KeyEntry};

/// Oldest age in the table.
const MAX_AGE: u32 = 10;

/// Draws the pane (scrolling as a whole on a short screen).
pub fn ui(ui: &mut Ui, cx: &mut PaneContext<'_>) {
    egui::ScrollArea::vertical()
        .id_salt("depreciation_scroll")
        .show(ui, |ui| pane_ui(ui, cx));
}

fn pane_ui(ui: &mut Ui, cx: &mut PaneContext<'_>) {
    let table = depreciation_table(&cx.fit.model, cx.market, MAX_AGE);
    let annual = cx.fit.model.annual_depreciation(5);
    ui.label(format!(
        "Fitted annual depreciation over five years: {:.1} % from age alone, {:.1} % with typical mileage ({} mi a year).",
        annual.age_only_pct,
        annual.with_typical_miles_pct,
        thousands(cx.fit.model.mileage().annual_miles)
    ));
    ui.columns(2, |columns| {
        let entries: Vec<KeyEntry> = table
            .curves
            .iter()
            .map(|c| KeyEntry::new(Glyph::Line, cx.variant_color_named(&c.variant), &c.variant))
            .collect();
        super::key::key_ui(&mut columns[0], "depreciation_key", &entries);
        Plot::new("depreciation_curves")
            .height(240.0)
            .x_axis_label("age (model years)")
            .y_axis_label("value at typical miles")
            .x_axis_formatter(|mark, _| {
                if mark.value.fract().abs() < 1e-9 {
                    format!("{:.0}", mark.value)
                } else {
                    String::new()
                }
            })
            .y_axis_formatter(|mark, _| money(mark.value))
            .show(&mut columns[0], |plot| {
                for curve in &table.curves {
                    let points: Vec<[f64; 2]> = curve
                        .rows
                        .iter()
                        .filter_map(|r| r.age_years.map(|a| [f64::from(a), r.value]))
                        .collect();
                    plot.line(
                        Line::new(curve.variant.clone(), points)
                            .color(cx.variant_color_named(&curve.variant))
                            .width(2.0),
                    );
                }
            });
        forecast_ui(&mut columns[1], cx);
    });
    let subject_variant = model::vocabulary::variant_text(cx.document.subject.variant.as_deref());
    let Some(curve) = table
        .curves
        .iter()
        .find(|c| c.variant == subject_variant)
        .or(table.curves.first())
    else {
        return;
    };
    ui.label(RichText::new(format!("{} by age (used at typical miles; the first row is new where the market has new listings)", curve.variant)).strong());
    age_table_ui(ui, curve);
    ranking_ui(ui, cx);
    premiums_ui(ui, cx, &table.premiums);
    ui.separator();
    market_index_ui(ui, cx);
}

/// Each variant's premium over the base by age, with its band, and what the data say about
/// whether it fades.
fn premiums_ui(
    ui: &mut Ui,
    cx: &PaneContext<'_>,
    premiums: &[model::depreciation::VariantPremium],
) {
    ui.label(RichText::new("Variant premiums by age (80 % band)").strong());
    for words in model::hedonic::premium_fade::summary(
        &cx.fit.model,
        cx.market,
        cx.fit.premium_fade.as_ref(),
        MAX_AGE,
    ) {
        ui.label(words);
    }
    for p in premiums {
        let by_age: Vec<String> = p
            .by_age
            .iter()
            .step_by(2)
            .map(|r| {
                format!(
                    "age {}: {} ({:.0} %, {:.0} to {:.0} %)",
                    r.age_years,
                    money(r.premium),
                    r.premium_pct,
                    r.lower_pct,
                    r.upper_pct
                )
            })
            .collect();
        ui.small(format!(
            "{} over {}: {}",
            p.variant,
            p.base,
            by_age.join("; ")
        ));
    }
}

/// The market's level by month (the time-dummy index) with its band, or why there is none.
fn market_index_ui(ui: &mut Ui, cx: &PaneContext<'_>) {
    ui.label(
        RichText::new("The market's level by month (latest month = 100, attributes held fixed)")
            .strong(),
    );
    let model = &cx.fit.model;
    ui.label(format!(
        "Market conditions: {}.",
        model::hedonic::market_time::summary(
            model.market_time(),
            model
                .market_drift()
                .map(|d| (d.per_month_before, d.is_distinguishable())),
        )
    ));
    let index = match &cx.fit.market_index {
        None => return,
        Some(Err(why)) => {
            ui.label(format!("No monthly index: {why}."));
            return;
        }
        Some(Ok(index)) => index,
    };
    let labels: Vec<String> = index.months.iter().map(|m| m.month.clone()).collect();
    let point = |f: fn(&model::hedonic::market_time::MonthLevel) -> f64| -> Vec<[f64; 2]> {
        index
            .months
            .iter()
            .enumerate()
            .map(|(i, m)| [i as f64, f(m)])
            .collect()
    };
    let ink = ui.visuals().text_color();
    let entries = [
        KeyEntry::new(Glyph::Line, ink, "the market's level"),
        KeyEntry::new(
            Glyph::Dashed,
            ink,
            format!("{:.0} % band", 100.0 * index.level),
        ),
    ];
    super::key::key_ui(ui, "market_index_key", &entries);
    Plot::new("market_index")
        .height(180.0)
        .y_axis_label("level (latest = 100)")
        .x_axis_formatter(move |mark, _| {
            let i = mark.value.round();
            if (mark.value - i).abs() > 1e-9 || i < 0.0 {
                return String::new();
            }
            labels.get(i as usize).cloned().unwrap_or_default()
        })
        .show(ui, |plot| {
            plot.line(Line::new("level", point(|m| m.index)).color(ink).width(2.0));
            for (name, edge) in [
                ("band, low", point(|m| m.lower)),
                ("band, high", point(|m| m.upper)),
            ] {
                plot.line(
                    Line::new(name, edge)
                        .color(ink)
                        .style(egui_plot::LineStyle::dashed_loose()),
                );
            }
        });
}

/// One variant's value, loss and cumulative loss by age.
fn age_table_ui(ui: &mut Ui, curve: &model::depreciation::VariantCurve) {
    egui::ScrollArea::vertical()
        .id_salt("depreciation_rows")
        .max_height(220.0)
        .show(ui, |ui| {
            egui::Grid::new("depreciation_grid")
                .striped(true)
                .show(ui, |ui| {
                    for h in [
                        "age",
                        "typical miles",
                        "value",
                        "loss that year",
                        "loss %",
                        "cumulative",
                        "cumulative %",
                    ] {
                        ui.label(RichText::new(h).strong());
                    }
                    ui.end_row();
                    for r in &curve.rows {
                        ui.label(
                            r.age_years
                                .map_or_else(|| "new".to_owned(), |a| a.to_string()),
                        );
                        ui.label(thousands(r.typical_miles));
                        ui.label(money(r.value));
                        ui.label(money(r.loss));
                        ui.label(format!("{:.1}", r.loss_pct));
                        ui.label(money(r.cumulative_loss));
                        ui.label(format!("{:.1}", r.cumulative_loss_pct));
                        ui.end_row();
                    }
                });
        });
}

/// The file's models ranked by fitted annual decline (computed in the background).
fn ranking_ui(ui: &mut Ui, cx: &PaneContext<'_>) {
    let Some(study) = cx.study else {
        ui.horizontal(|ui| {
            ui.spinner();
            ui.label("Ranking the models in the file…");
        });
        return;
    };
    ui.label(
        RichText::new("Models in the file by fitted annual decline (linear age, five years)")
            .strong(),
    );
    for r in &study.ranking {
        match &r.skipped {
            None => ui.label(format!(
                "{}: {:.1} % a year with typical miles, {:.1} % from age alone ({} listings)",
                r.segment,
                r.with_typical_miles_pct,
                r.age_only_pct,
                thousands(r.listings as f64)
            )),
            Some(why) => ui.label(format!("{}: not ranked ({why})", r.segment)),
        };
    }
}

fn forecast_ui(ui: &mut Ui, cx: &PaneContext<'_>) {
    let id = ui.scope_id().with("hold_months");
    let mut months: f64 = ui.data(|d| d.get_temp(id)).unwrap_or(6.0);
    ui.label(RichText::new("Holding-period forecast for the subject").strong());
    ui.add(
        egui::Slider::new(&mut months, 1.0..=36.0)
            .text("months held")
            .integer(),
    );
    ui.data_mut(|d| d.insert_temp(id, months));
    match model::forecast::forecast(
        cx.market,
        cx.fit,
        &cx.document.subject,
        months,
        None,
        cx.document.level,
    ) {
        Ok(f) => {
            ui.label(format!("Now, by the model: {}", money(f.now.median)));
            ui.label(format!(
                "After {months:.0} months and {} more miles: {} ({}, {:+.1} %)",
                thousands(f.added_miles),
                money(f.then.median),
                signed_money(f.change),
                f.change_pct
            ));
            ui.label(format!(
                "{:.0} % prediction interval then: {} to {}",
                100.0 * cx.document.level,
                money(f.then.prediction_interval.lower),
                money(f.then.prediction_interval.upper)
            ));
            if f.extrapolated {
                ui.label("Beyond the oldest age in the market: an extrapolation.");
            }
        }
        Err(e) => {
            ui.label(e.to_string());
        }
    }
}
