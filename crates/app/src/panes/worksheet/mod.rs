//! The worksheet: what the value is for. A trade-in offer with every deduction and its
//! sensitivity, or a total-loss claim under a jurisdiction's profile with the settlement, the
//! total-loss test and the comparables checked against the profile's rules.

mod claim;
mod trade_in;

use eframe::egui::{self, RichText, Ui};
use model::case::{self, LossType};
use model::format::money;
use model::session::{Outcome, Purpose, WorksheetOutcome, work_out, worksheet_rows};
use model::worksheet::ProfileFile;
use model::worksheet::rows::{Row, RowKind};

use super::PaneContext;
use crate::command::Command;
use crate::document::{default_claim, default_trade_in};

pub use model::worksheet::rows::{OFFER_LABEL, PAYMENT_LABEL};

/// Draws the pane.
pub fn ui(ui: &mut Ui, cx: &mut PaneContext<'_>, profiles: &ProfileFile) {
    case_details_ui(ui, cx);
    purpose_selector(ui, cx, profiles);
    ui.separator();
    let Some(appraisal) = cx.appraisal else {
        ui.label("No appraisal yet: the worksheet needs a value.");
        return;
    };
    let request = cx.document.request();
    let outcome = work_out(&cx.document.purpose, appraisal, &request);
    egui::ScrollArea::vertical().show(ui, |ui| match &cx.document.purpose {
        Purpose::Value => {
            ui.label(
                "A value only. Choose a trade-in offer or a total-loss claim above to work the value into a decision.",
            );
        }
        Purpose::TradeIn(inputs) => {
            ui.columns(2, |columns| {
                trade_in::inputs_ui(&mut columns[0], cx, inputs, appraisal);
                match &outcome {
                    Ok(o) => outcome_ui(&mut columns[1], &cx.document.purpose, o),
                    Err(e) => {
                        columns[1].colored_label(columns[1].visuals().error_fg_color, e.to_string());
                    }
                }
                trade_in::supply_ui(&mut columns[1], cx);
            });
        }
        Purpose::Claim { profile, inputs } => {
            ui.columns(2, |columns| {
                claim::inputs_ui(&mut columns[0], cx, profile, inputs, profiles);
                match &outcome {
                    Ok(o) => outcome_ui(&mut columns[1], &cx.document.purpose, o),
                    Err(e) => {
                        columns[1].colored_label(columns[1].visuals().error_fg_color, e.to_string());
                    }
                }
            });
        }
    });
}

/// Who is appraising, and notes kept with the session.
fn case_details_ui(ui: &mut Ui, cx: &mut PaneContext<'_>) {
    ui.horizontal(|ui| {
        let mut name = cx.document.appraiser.clone();
        let label = ui.label("Appraiser");
        if ui
            .add(
                egui::TextEdit::singleline(&mut name)
                    .hint_text("your name")
                    .desired_width(220.0),
            )
            .labelled_by(label.id)
            .changed()
        {
            cx.commands.push(Command::SetAppraiser(name));
        }
        let mut notes = cx.document.notes.clone();
        let label = ui.label("Notes");
        if ui
            .add(
                egui::TextEdit::multiline(&mut notes)
                    .desired_rows(1)
                    .desired_width(ui.available_width()),
            )
            .labelled_by(label.id)
            .changed()
        {
            cx.commands.push(Command::SetNotes(notes));
        }
    });
    case_fields_ui(ui, cx);
}

/// The case's numbers and names for the purpose: a claim's number, date of loss, insured and
/// type of loss; a trade-in's stock number and customer.
fn case_fields_ui(ui: &mut Ui, cx: &mut PaneContext<'_>) {
    let current = &cx.document.case;
    let mut edited = current.clone();
    ui.horizontal_wrapped(|ui| {
        let text = |ui: &mut Ui, label: &str, value: &mut String, width: f32| {
            let label = ui.label(label);
            ui.add(egui::TextEdit::singleline(value).desired_width(width))
                .labelled_by(label.id)
                .changed()
        };
        match &cx.document.purpose {
            Purpose::Claim { .. } => {
                let mut changed = text(ui, case::CLAIM_NUMBER, &mut edited.claim_number, 120.0);
                let label = ui.label(case::DATE_OF_LOSS);
                if let Some(date) =
                    super::date_field(ui, "date_of_loss", current.date_of_loss, label.id)
                {
                    cx.commands.push(Command::SetAppraisalDate(date));
                }
                changed |= text(ui, case::INSURED, &mut edited.insured, 180.0);
                let label = ui.label(case::LOSS_TYPE);
                let combo = egui::ComboBox::from_id_salt("loss_type")
                    .selected_text(edited.loss_type.map_or("(not given)", LossType::as_str))
                    .show_ui(ui, |ui| {
                        for t in LossType::ALL {
                            changed |= ui
                                .selectable_value(&mut edited.loss_type, Some(t), t.as_str())
                                .changed();
                        }
                    });
                combo.response.labelled_by(label.id);
                if changed {
                    cx.commands.push(Command::SetCase(edited));
                }
            }
            Purpose::TradeIn(_) => {
                let mut changed = text(ui, case::STOCK_NUMBER, &mut edited.stock_number, 120.0);
                changed |= text(ui, case::CUSTOMER, &mut edited.customer, 200.0);
                if changed {
                    cx.commands.push(Command::SetCase(edited));
                }
            }
            Purpose::Value => {}
        }
    });
}

fn purpose_selector(ui: &mut Ui, cx: &mut PaneContext<'_>, profiles: &ProfileFile) {
    ui.horizontal(|ui| {
        ui.label("This appraisal is for:");
        let current = &cx.document.purpose;
        if ui
            .selectable_label(matches!(current, Purpose::Value), "A value")
            .clicked()
            && !matches!(current, Purpose::Value)
        {
            cx.commands.push(Command::ChoosePurpose(Purpose::Value));
        }
        if ui
            .selectable_label(matches!(current, Purpose::TradeIn(_)), "A trade-in offer")
            .clicked()
            && !matches!(current, Purpose::TradeIn(_))
        {
            cx.commands
                .push(Command::ChoosePurpose(Purpose::TradeIn(default_trade_in())));
        }
        if ui
            .selectable_label(
                matches!(current, Purpose::Claim { .. }),
                "A total-loss claim",
            )
            .clicked()
            && !matches!(current, Purpose::Claim { .. })
        {
            if let Some(first) = profiles.profiles.first() {
                cx.commands
                    .push(Command::ChoosePurpose(default_claim(first.clone())));
            }
        }
    });
}

/// One row of an input grid: a label and the control it names. Whether the value changed.
fn input_row(ui: &mut Ui, label: &str, control: impl egui::Widget) -> bool {
    let label = ui.label(label);
    let changed = ui.add(control).labelled_by(label.id).changed();
    ui.end_row();
    changed
}

/// A row for an amount of money, in whole cents.
fn money_input(ui: &mut Ui, label: &str, value: &mut model::money::Cents) -> bool {
    let label = ui.label(label);
    let changed = super::cents_drag(ui, value, 1e7, 10.0)
        .labelled_by(label.id)
        .changed();
    ui.end_row();
    changed
}

/// The worksheet's rows as the model words them, the bottom line large.
fn rows_ui(ui: &mut Ui, id: &str, rows: &[Row]) {
    egui::Grid::new(id).striped(true).show(ui, |ui| {
        for r in rows.iter().filter(|r| r.kind != RowKind::Result) {
            ui.label(&r.label);
            ui.with_layout(egui::Layout::right_to_left(egui::Align::Center), |ui| {
                ui.monospace(r.amount_text());
            });
            ui.end_row();
        }
    });
    for r in rows.iter().filter(|r| r.kind == RowKind::Result) {
        ui.label(
            RichText::new(format!("{}: {}", r.label, r.amount_text()))
                .size(22.0)
                .strong(),
        );
    }
}

/// The worked worksheet, every part on its own line (shared with the saved-session view).
pub fn outcome_ui(ui: &mut Ui, purpose: &Purpose, outcome: &Outcome) {
    let rows = worksheet_rows(purpose, outcome.worksheet.as_ref());
    match &outcome.worksheet {
        None => {
            ui.label(format!(
                "Indicated value {}",
                money(outcome.indicated_value)
            ));
        }
        Some(WorksheetOutcome::TradeIn { sensitivity, .. }) => {
            ui.heading("Trade-in offer");
            rows_ui(ui, "offer_lines", &rows);
            ui.label(format!(
                "The offer at other days to sell: {}.",
                sensitivity.by_days_text()
            ));
            ui.label(format!(
                "Across the value band: {}.",
                sensitivity.by_value_text()
            ));
        }
        Some(WorksheetOutcome::Claim(c)) => {
            ui.heading("Settlement");
            rows_ui(ui, "settlement_lines", &rows);
            claim::worked_ui(ui, c);
        }
    }
}
