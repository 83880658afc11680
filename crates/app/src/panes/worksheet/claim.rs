//! The claim worksheet: the profile, the claim's facts, the settlement and the checks.

use eframe::egui::{self, Ui};
use model::session::Purpose;
use model::worksheet::rows::{
    PROFILE_RULES_HEADING, not_paid_lines, rule_break_lines, verdict_heading,
};
use model::worksheet::{ClaimInputs, ClaimWorksheet, JurisdictionProfile, ProfileFile};

use super::super::PaneContext;
use super::{input_row, money_input};
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
    egui::CollapsingHeader::new(PROFILE_RULES_HEADING)
        .id_salt("profile_rules")
        .show(ui, |ui| {
            egui::Grid::new("profile_rules_grid")
                .num_columns(3)
                .striped(true)
                .show(ui, |ui| {
                    for r in profile.rule_rows() {
                        ui.label(r.rule);
                        ui.label(r.value);
                        ui.small(r.source);
                        ui.end_row();
                    }
                });
        });
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

/// The worked claim after its settlement rows: what is not paid, the total-loss test, the
/// comparables against the profile and the cautions.
pub fn worked_ui(ui: &mut Ui, c: &ClaimWorksheet) {
    for line in not_paid_lines(c) {
        ui.small(line);
    }
    ui.separator();
    ui.heading(verdict_heading(c));
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
    for line in rule_break_lines(&c.check) {
        ui.colored_label(ui.visuals().warn_fg_color, line);
    }
    ui.separator();
    ui.heading("Cautions");
    for caution in model::cautions::CAUTIONS {
        ui.label(format!("• {caution}"));
    }
}
