//! The appraiser's own adjustment lines (options, prior damage, condition, other): each an amount
//! with its basis, applied to every comparable or to one.

use eframe::egui::{self, Ui};
use model::adjustment::{AdjustmentKind, UserAdjustment};
use model::format::signed_money;

use super::PaneContext;
use crate::command::Command;

/// The form's state between frames (throwaway pane state, not the document).
#[derive(Debug, Clone, PartialEq)]
struct Draft {
    kind: AdjustmentKind,
    amount: f64,
    basis: String,
    /// File line of the comparable it applies to; `None` for every comparable.
    line: Option<u64>,
}

impl Default for Draft {
    fn default() -> Self {
        Self {
            kind: AdjustmentKind::Options,
            amount: 0.0,
            basis: String::new(),
            line: None,
        }
    }
}

/// Accessible label of the basis field.
pub const BASIS_LABEL: &str = "Basis of the adjustment";

/// Draws the list of lines and the form to add one.
pub fn ui(ui: &mut Ui, cx: &mut PaneContext<'_>) {
    for (index, line) in cx.document.user_adjustments.iter().enumerate() {
        ui.horizontal(|ui| {
            ui.label(format!(
                "{} {}: {} ({})",
                signed_money(line.amount),
                line.kind.label(),
                line.basis,
                line.line
                    .map_or_else(|| "every comparable".to_owned(), |l| format!("line {l}"))
            ));
            if ui.small_button("Remove").clicked() {
                cx.commands.push(Command::RemoveUserAdjustment(index));
            }
        });
    }
    let id = ui.scope_id().with("adjustment_draft");
    let mut draft: Draft = ui.data(|d| d.get_temp(id)).unwrap_or_default();
    ui.horizontal_wrapped(|ui| {
        let kind_label = ui.label("Your adjustment:");
        egui::ComboBox::from_id_salt("adjustment_kind")
            .selected_text(draft.kind.label())
            .show_ui(ui, |ui| {
                for kind in [
                    AdjustmentKind::Options,
                    AdjustmentKind::PriorDamage,
                    AdjustmentKind::Condition,
                    AdjustmentKind::Other,
                ] {
                    ui.selectable_value(&mut draft.kind, kind, kind.label());
                }
            })
            .response
            .labelled_by(kind_label.id);
        ui.add(
            egui::DragValue::new(&mut draft.amount)
                .speed(10.0)
                .prefix("$")
                .max_decimals(2)
                .range(-1e7..=1e7),
        )
        .on_hover_text(
            "Amount added to the comparable's price; negative when the comparable is better",
        );
        let basis_label = ui.label("basis");
        ui.add(
            egui::TextEdit::singleline(&mut draft.basis)
                .hint_text("why, e.g. subject has a tow package")
                .desired_width(260.0),
        )
        .labelled_by(basis_label.id)
        .on_hover_text(BASIS_LABEL);
        let target_label = ui.label("applies to");
        let lines: Vec<u64> = cx
            .appraisal
            .map(|a| a.comparables.iter().map(|c| c.listing.line).collect())
            .unwrap_or_default();
        egui::ComboBox::from_id_salt("adjustment_target")
            .selected_text(
                draft
                    .line
                    .map_or_else(|| "every comparable".to_owned(), |l| format!("line {l}")),
            )
            .show_ui(ui, |ui| {
                ui.selectable_value(&mut draft.line, None, "every comparable");
                for l in lines {
                    ui.selectable_value(&mut draft.line, Some(l), format!("line {l}"));
                }
            })
            .response
            .labelled_by(target_label.id);
        let amount = model::money::Cents::round_dollars(draft.amount)
            .ok()
            .filter(|a| *a != model::money::Cents::ZERO);
        let ready = amount.is_some() && !draft.basis.trim().is_empty();
        if ui
            .add_enabled(ready, egui::Button::new("Add adjustment"))
            .on_disabled_hover_text("Enter an amount and its basis: every dollar needs one")
            .clicked()
        {
            if let Some(amount) = amount {
                cx.commands.push(Command::AddUserAdjustment(UserAdjustment {
                    line: draft.line,
                    kind: draft.kind,
                    amount,
                    basis: draft.basis.trim().to_owned(),
                }));
                draft = Draft::default();
            }
        }
    });
    ui.data_mut(|d| d.insert_temp(id, draft));
}
