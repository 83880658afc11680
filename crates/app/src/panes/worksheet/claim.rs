//! The claim worksheet: the profile, the claim's facts, the settlement and the checks.

use eframe::egui::{self, RichText, Ui};
use model::format::{cents, signed_cents};
use model::session::Purpose;
use model::worksheet::{ClaimInputs, ClaimWorksheet, JurisdictionProfile, ProfileFile};

use super::super::PaneContext;
use super::{PAYMENT_LABEL, amount_row, input_row, money_input};
use crate::command::Command;

/// Edits the claim's profile and facts.
pub fn inputs_ui(
    ui: &mut Ui,
    cx: &mut PaneContext<'_>,
    profile: &JurisdictionProfile,
    inputs: &ClaimInputs,
    profiles: &ProfileFile,
) {
    let mut edited = inputs.clone();
    let mut chosen = profile.clone();
    let mut changed = false;
    ui.heading("Jurisdiction");
    egui::ComboBox::from_label("profile")
        .selected_text(&profile.name)
        .show_ui(ui, |ui| {
            for p in &profiles.profiles {
                if ui.selectable_label(p.id == profile.id, &p.name).clicked() && p.id != profile.id
                {
                    chosen = p.clone();
                    edited.profile_id.clone_from(&p.id);
                    changed = true;
                }
            }
        });
    ui.small(format!(
        "Profile reviewed {}. Its filters (listing age, distance, mileage) apply to the comparable search.",
        profile.reviewed
    ));
    ui.heading("The claim");
    egui::Grid::new("claim_inputs")
        .num_columns(2)
        .show(ui, |ui| {
            changed |= input_row(
                ui,
                "Sales tax rate",
                egui::DragValue::new(&mut edited.sales_tax_pct)
                    .suffix(" %")
                    .speed(0.05)
                    .range(0.0..=25.0),
            );
            changed |= money_input(ui, "Title fee", &mut edited.title_fee);
            changed |= money_input(ui, "Transfer fee", &mut edited.transfer_fee);
            changed |= money_input(ui, "Annual registration", &mut edited.annual_registration);
            changed |= input_row(
                ui,
                "Registration months left",
                egui::DragValue::new(&mut edited.registration_months_remaining).range(0.0..=12.0),
            );
            changed |= money_input(ui, "Deductible", &mut edited.deductible);
            changed |= money_input(ui, "Repair estimate", &mut edited.repair_estimate);
            changed |= money_input(ui, "Salvage value", &mut edited.salvage_value);
            ui.label("Salvage");
            changed |= ui
                .checkbox(
                    &mut edited.owner_retains_salvage,
                    "the owner keeps the vehicle",
                )
                .changed();
            ui.end_row();
        });
    ui.small("Condition and prior-damage deductions: add them as your own adjustment lines (kind condition or prior damage, every comparable); they are itemized on the settlement.");
    if changed {
        cx.commands.push(Command::SetPurpose(Purpose::Claim {
            profile: chosen,
            inputs: edited,
        }));
    }
}

/// The worked claim.
pub fn worked_ui(ui: &mut Ui, c: &ClaimWorksheet) {
    ui.heading("Settlement");
    egui::Grid::new("settlement_lines")
        .striped(true)
        .show(ui, |ui| {
            amount_row(ui, "Actual cash value", cents(c.acv));
            for l in &c.itemized_in_acv {
                amount_row(
                    ui,
                    &format!("   of which {}", l.label),
                    signed_cents(l.amount),
                );
            }
            for l in &c.settlement.additions {
                amount_row(ui, &format!("plus {}", l.label), signed_cents(l.amount));
            }
            for l in &c.settlement.deductions {
                amount_row(ui, &format!("less {}", l.label), signed_cents(-l.amount));
            }
        });
    ui.label(
        RichText::new(format!("{PAYMENT_LABEL}: {}", cents(c.settlement.payment)))
            .size(22.0)
            .strong(),
    );
    for n in &c.not_paid {
        ui.small(format!("Not paid: {} ({})", n.label, n.citation));
    }
    ui.separator();
    ui.heading(if c.verdict.total_loss {
        "Total loss: yes"
    } else {
        "Total loss: no"
    });
    ui.label(&c.verdict.explanation);
    ui.small(format!("Rule: {}", c.total_loss_citation));
    ui.separator();
    ui.heading("Comparables against the profile");
    let summary = c.check.summary();
    if c.check.enough() {
        ui.label(summary);
    } else {
        ui.colored_label(ui.visuals().error_fg_color, summary);
    }
    for (i, comparable) in c.check.comparables.iter().enumerate() {
        for b in &comparable.breaks {
            ui.colored_label(
                ui.visuals().warn_fg_color,
                format!("Comparable {} (line {}): {b}", i + 1, comparable.line),
            );
        }
    }
    ui.separator();
    ui.heading("Cautions");
    for caution in model::cautions::CAUTIONS {
        ui.label(format!("• {caution}"));
    }
}
