//! The subject: edit model year, variant, mileage and condition, or use a listing picked in a
//! chart.

use eframe::egui::{self, Ui};
use model::condition::Condition;
use model::subject::Subject;

use super::PaneContext;
use crate::command::Command;

/// Draws the pane.
pub fn ui(ui: &mut Ui, cx: &mut PaneContext<'_>) {
    let subject = cx.document.subject.clone();
    ui.heading("Subject");
    model_selector_ui(ui, cx, &subject);
    egui::Grid::new("subject_grid")
        .num_columns(2)
        .show(ui, |ui| {
            ui.label("Model year");
            let mut year = subject.model_year;
            // Any model year a subject can have (as the command line reads it); a subject
            // outside the market is warned about, never silently moved into it.
            if ui
                .add(
                    egui::DragValue::new(&mut year)
                        .range(1900..=cx.fit.model.as_of_year() + 1)
                        .clamp_existing_to_range(false),
                )
                .on_hover_text("Subject model year")
                .changed()
            {
                cx.commands.push(Command::SetSubjectYear(year));
            }
            ui.end_row();

            let label = ui.label("Variant");
            let current = model::vocabulary::variant_text(subject.variant.as_deref());
            let combo = egui::ComboBox::from_id_salt("subject_variant")
                .selected_text(current)
                .show_ui(ui, |ui| {
                    for id in cx.color_order() {
                        let value = cx.market.optional_name(id);
                        let chosen = value == subject.variant;
                        let name = cx.market.names.variant_name(id);
                        if ui.selectable_label(chosen, name).clicked() && !chosen {
                            cx.commands.push(Command::SetSubjectVariant(value));
                        }
                    }
                });
            combo.response.labelled_by(label.id);
            ui.end_row();

            ui.label("Miles");
            let mut miles = subject.miles;
            if ui
                .add(
                    egui::DragValue::new(&mut miles)
                        .range(0.0..=model::import::MAX_MILES)
                        .speed(100.0)
                        .max_decimals(0),
                )
                .on_hover_text("Subject miles")
                .changed()
            {
                cx.commands.push(Command::SetSubjectMiles(miles));
            }
            ui.end_row();

            ui.label("Sold as");
            ui.horizontal(|ui| {
                for c in Condition::ALL {
                    if ui
                        .selectable_label(subject.condition == c, c.sold_as())
                        .clicked()
                        && subject.condition != c
                    {
                        cx.commands.push(Command::SetSubjectCondition(c));
                    }
                }
            });
            ui.end_row();

            options_row(ui, cx, &subject);
            vin_row(ui, cx, &subject);
        });
    ui.separator();
    selected_listing_ui(ui, cx);
}

/// Accessible label of the subject's options field.
pub const OPTIONS_LABEL: &str = "Options";

/// The subject's options, typed as names separated by ";", and which of them the fit prices.
fn options_row(ui: &mut Ui, cx: &mut PaneContext<'_>, subject: &Subject) {
    let label = ui.label(OPTIONS_LABEL);
    ui.vertical(|ui| {
        let mut options = subject.options.clone().unwrap_or_default();
        if ui
            .add(
                egui::TextEdit::singleline(&mut options)
                    .hint_text("e.g. sunroof; tow package")
                    .desired_width(190.0),
            )
            .labelled_by(label.id)
            .changed()
        {
            cx.commands.push(Command::SetSubjectOptions(Some(options)));
        }
        let fitted = &cx.fit.model.design().options;
        if !fitted.is_empty() {
            let names: Vec<&str> = fitted.iter().map(|(_, n)| n.as_str()).collect();
            ui.small(format!("Priced by the market: {}", names.join(", ")))
                .on_hover_text("Options stated on at least 20 listings, and missing from as many, have their own term; others are for your own lines");
        }
    });
    ui.end_row();
}

/// Accessible label of the subject's VIN field.
pub const VIN_LABEL: &str = "VIN";

/// The subject's VIN, typed, and whether it checks (49 CFR 565.15) for its model year.
fn vin_row(ui: &mut Ui, cx: &mut PaneContext<'_>, subject: &Subject) {
    let label = ui.label(VIN_LABEL);
    ui.vertical(|ui| {
        let mut vin = subject.vin.clone().unwrap_or_default();
        if ui
            .add(
                egui::TextEdit::singleline(&mut vin)
                    .hint_text("17 characters")
                    .char_limit(20)
                    .desired_width(190.0)
                    .font(egui::TextStyle::Monospace),
            )
            .labelled_by(label.id)
            .changed()
        {
            cx.commands.push(Command::SetSubjectVin(Some(vin)));
        }
        if let Some(vin) = subject.vin.as_deref().filter(|v| !v.is_empty()) {
            let problems = model::vin::problems(vin, subject.model_year);
            if problems.is_empty() {
                ui.small("Checks (check digit and model year)");
            } else {
                ui.colored_label(
                    ui.visuals().warn_fg_color,
                    format!("Does not check: {}", model::vin::problems_text(&problems)),
                );
            }
        }
    });
    ui.end_row();
}

/// Keep an excluded listing in the fit, or drop a kept one, by hand (the market refits).
fn override_ui(ui: &mut Ui, cx: &mut PaneContext<'_>, row: usize, line: u64) {
    use model::clean::Override;
    ui.horizontal(|ui| {
        if let Some(current) = cx.document.overrides.get(&line) {
            let what = match current {
                Override::Include { .. } => "kept in the fit by hand",
                Override::Exclude { .. } => "dropped from the fit by hand",
            };
            ui.label(what);
            if ui.button("Undo hand override").clicked() {
                cx.commands.push(Command::ClearOverride(line));
            }
        } else if cx.fit.cleaning.is_included(row) {
            if ui.button("Drop from the fit").clicked() {
                cx.commands.push(Command::SetOverride(
                    line,
                    Override::Exclude {
                        note: "dropped by hand in the workbench".into(),
                    },
                ));
            }
        } else if ui.button("Keep in the fit").clicked() {
            cx.commands.push(Command::SetOverride(
                line,
                Override::Include {
                    note: "kept by hand in the workbench".into(),
                },
            ));
        }
    });
}

/// Make and model: any model in the file. Switching keeps the year and miles and takes the new
/// model's most common variant, so the subject stays one the market can price.
fn model_selector_ui(ui: &mut Ui, cx: &mut PaneContext<'_>, subject: &Subject) {
    // The fitted segment is the subject's (the fit follows the subject's make and model).
    let current = cx.fit.segment;
    let label = ui.label("Make and model");
    let combo = egui::ComboBox::from_id_salt("subject_model")
        .selected_text(format!("{} {}", subject.make, subject.model))
        .show_ui(ui, |ui| {
            for (segment, count) in cx.market.segments() {
                let text = format!(
                    "{} ({} listings)",
                    cx.market.segment_name(segment),
                    model::format::thousands(count as f64)
                );
                let chosen = segment == current;
                if ui.selectable_label(chosen, text).clicked() && !chosen {
                    let variant = cx.market.most_common_variant(segment);
                    cx.commands.push(Command::SetSubject(Subject {
                        make: cx.market.names.name(segment.make).to_owned(),
                        model: cx.market.names.name(segment.model).to_owned(),
                        variant,
                        ..subject.clone()
                    }));
                }
            }
        });
    combo.response.labelled_by(label.id);
}

/// The listing clicked in a chart, with what can be done with it.
fn selected_listing_ui(ui: &mut Ui, cx: &mut PaneContext<'_>) {
    let Some(row) = cx.selection.selected else {
        ui.weak("Click a listing in a chart to select it.");
        return;
    };
    let listing = cx.market.listing(row);
    ui.label(format!("Selected: {}", listing.describe()));
    if let Some(e) = cx.fit.cleaning.exclusion_of(row) {
        ui.label(format!("Cleaning: {e}"));
    }
    override_ui(ui, cx, row, listing.line);
    ui.horizontal(|ui| {
        if ui.button("Use as subject").clicked() {
            // The listing is a template: its VIN is another vehicle's, so the subject's own
            // stays.
            cx.commands.push(Command::SetSubject(Subject {
                vin: cx.document.subject.vin.clone(),
                ..Subject::from_listing(&listing)
            }));
        }
        if cx.is_comparable(row) {
            if ui.button("Remove from comparables").clicked() {
                cx.commands.push(Command::ExcludeComparable(listing.line));
            }
        } else if ui.button("Add as comparable").clicked() {
            cx.commands.push(Command::IncludeComparable(listing.line));
        }
        let chosen_by_hand = cx.document.choices.include.contains(&listing.line)
            || cx.document.choices.exclude.contains(&listing.line);
        if chosen_by_hand && ui.button("Clear hand choice").clicked() {
            cx.commands
                .push(Command::ClearComparableChoice(listing.line));
        }
    });
}
