//! The trade-in worksheet's inputs.

use eframe::egui::{self, Ui};
use model::appraisal::Appraisal;
use model::format::money;
use model::session::Purpose;
use model::worksheet::{HoldingCost, Line, TradeInInputs};

use model::money::Cents;

use super::super::{PaneContext, cached, cents_drag, fit_id, inputs_key};
use super::{input_row, money_input};
use crate::command::Command;

/// Edits the trade-in inputs; every change is one command.
pub fn inputs_ui(
    ui: &mut Ui,
    cx: &mut PaneContext<'_>,
    inputs: &TradeInInputs,
    appraisal: &Appraisal,
) {
    let mut edited = inputs.clone();
    let mut changed = false;
    ui.heading("What it costs to retail");
    changed |= retail_value_ui(ui, &mut edited, appraisal);
    egui::Grid::new("trade_in_inputs")
        .num_columns(2)
        .show(ui, |ui| {
            changed |= input_row(
                ui,
                "List-to-sale discount",
                egui::DragValue::new(&mut edited.list_to_sale_discount_pct)
                    .suffix(" %")
                    .speed(0.1)
                    .range(0.0..=50.0),
            );
            changed |= money_input(ui, "Transport and fees", &mut edited.transport_and_fees);
            changed |= money_input(ui, "Pack", &mut edited.pack);
            changed |= money_input(ui, "Target front gross", &mut edited.target_front_gross);
            changed |= input_row(
                ui,
                "Days to sell",
                egui::DragValue::new(&mut edited.days_to_sell)
                    .suffix(" days")
                    .range(0.0..=365.0),
            );
            ui.label("Holding cost");
            ui.horizontal(|ui| {
                let per_day = matches!(edited.holding, HoldingCost::PerDay { .. });
                if ui.radio(per_day, "per day").clicked() && !per_day {
                    edited.holding = HoldingCost::PerDay {
                        amount: Cents::whole_dollars(30),
                    };
                    changed = true;
                }
                if ui.radio(!per_day, "rate on the offer").clicked() && per_day {
                    edited.holding = HoldingCost::RateOnOffer { annual_pct: 7.0 };
                    changed = true;
                }
                match &mut edited.holding {
                    HoldingCost::PerDay { amount } => {
                        changed |= cents_drag(ui, amount, 1e4, 1.0).changed();
                        ui.label("a day");
                    }
                    HoldingCost::RateOnOffer { annual_pct } => {
                        changed |= ui
                            .add(
                                egui::DragValue::new(annual_pct)
                                    .suffix(" % a year")
                                    .speed(0.1)
                                    .range(0.0..=100.0),
                            )
                            .changed();
                    }
                }
            });
            ui.end_row();
        });
    changed |= recon_ui(ui, &mut edited.recon);
    if changed {
        cx.commands
            .push(Command::SetPurpose(Purpose::TradeIn(edited)));
    }
}

/// The retail value: the indicated value, or the appraiser's with a reason.
fn retail_value_ui(ui: &mut Ui, edited: &mut TradeInInputs, appraisal: &Appraisal) -> bool {
    let mut changed = false;
    let mut edit_retail = edited.retail_value_note.is_some();
    if ui
        .checkbox(
            &mut edit_retail,
            format!(
                "Use another retail value than the indicated {}",
                money(appraisal.reconciliation.indicated_value)
            ),
        )
        .changed()
    {
        changed = true;
        if edit_retail {
            edited.retail_value =
                Cents::round_dollars(appraisal.reconciliation.indicated_value.round())
                    .unwrap_or_default();
            edited.retail_value_note = Some(String::new());
        } else {
            edited.retail_value_note = None;
        }
    }
    if let Some(note) = edited.retail_value_note.as_mut() {
        ui.horizontal(|ui| {
            changed |= cents_drag(ui, &mut edited.retail_value, 1e8, 10.0).changed();
            let because = ui.label("because");
            changed |= ui
                .add(egui::TextEdit::singleline(note).hint_text("the reason (required)"))
                .labelled_by(because.id)
                .changed();
        });
        if note.trim().is_empty() {
            ui.colored_label(
                ui.visuals().warn_fg_color,
                "Give the reason: until then the indicated value is used.",
            );
        }
    }
    changed
}

/// The reconditioning lines.
fn recon_ui(ui: &mut Ui, recon: &mut Vec<Line>) -> bool {
    let mut changed = false;
    ui.strong("Reconditioning");
    let mut remove = None;
    for (i, line) in recon.iter_mut().enumerate() {
        ui.horizontal(|ui| {
            let item = ui.label(format!("Item {}", i + 1));
            changed |= ui
                .add(egui::TextEdit::singleline(&mut line.label).desired_width(200.0))
                .labelled_by(item.id)
                .changed();
            changed |= cents_drag(ui, &mut line.amount, 1e6, 5.0).changed();
            if ui.small_button("Remove").clicked() {
                remove = Some(i);
            }
        });
    }
    if let Some(i) = remove {
        recon.remove(i);
        changed = true;
    }
    if ui.button("Add recon line").clicked() {
        recon.push(Line {
            label: "recon".into(),
            amount: Cents::ZERO,
        });
        changed = true;
    }
    changed
}

/// Days' supply of the subject's segment, when the market file has sale dates.
pub fn supply_ui(ui: &mut Ui, cx: &PaneContext<'_>) {
    ui.separator();
    // A scan of every listing of the model: once per fit, not every frame.
    let stale = cx.document.fit.cleaning.stale_after_days;
    let key = inputs_key(&[&fit_id(cx), &stale]);
    let supply = cached(ui, "days_supply", key, || {
        model::supply::segment_supply(
            cx.market,
            &cx.fit.cleaning.rows,
            cx.fit.as_of,
            model::session::SUPPLY_WINDOW_DAYS,
            stale,
        )
    });
    match *supply {
        None => {
            ui.label("Days' supply: the market file has no sale dates.");
        }
        Some(s) => {
            ui.label(s.describe());
        }
    }
}
