//! The ground rules of the appraisal: every engine option the command line has, grouped as the
//! trade thinks of them: the appraisal date, how the market is fitted, which listings may be
//! comparables. Each change is a command (undoable, saved in the session); a claim's profile
//! filters are shown locked with their citation.

use eframe::egui::{self, RichText, Ui};
use model::appraisal::AsOfSource;
use model::comparables::{ComparableRules, MileageRule};
use model::hedonic::{AgeForm, VariantSlopes};
use model::session::Purpose;

use super::PaneContext;
use crate::command::Command;

/// The tab's heading and accessible name.
pub const SETTINGS_LABEL: &str = "Ground rules";

/// Label of the appraisal date's field.
pub const APPRAISAL_DATE_LABEL: &str = "Appraisal date";

/// Label of the model-year window's field.
pub const YEAR_WINDOW_LABEL: &str = "Model years either side";

/// Draws the pane.
pub fn ui(ui: &mut Ui, cx: &mut PaneContext<'_>) {
    egui::ScrollArea::vertical()
        .id_salt("settings_scroll")
        .show(ui, |ui| {
            ui.heading(SETTINGS_LABEL);
            ui.small(
                "Every change refits or re-appraises at once, can be undone (Ctrl+Z) and is saved with the session.",
            );
            ui.add_space(6.0);
            appraisal_date_ui(ui, cx);
            ui.separator();
            fitting_ui(ui, cx);
            ui.separator();
            comparables_ui(ui, cx);
        });
}

fn appraisal_date_ui(ui: &mut Ui, cx: &mut PaneContext<'_>) {
    ui.strong(APPRAISAL_DATE_LABEL);
    let claim = matches!(cx.document.purpose, Purpose::Claim { .. });
    if claim {
        ui.label("In a claim the appraisal date is the date of loss: ages and listing ages are counted back from it, and a listing first listed after it is not a comparable.");
    } else {
        ui.label("Ages and listing ages are counted back from this date; a listing first listed after it is not a comparable.");
    }
    let set = cx.document.fit.as_of;
    ui.horizontal(|ui| {
        let label = ui.label(if claim { "Date of loss" } else { "Date" });
        if let Some(date) = super::date_field(ui, "appraisal_date", set, label.id) {
            cx.commands.push(Command::SetAppraisalDate(date));
        }
        if set.is_some()
            && ui
                .button("Use the market's latest date")
                .on_hover_text("The latest listing or sale date in the market file")
                .clicked()
        {
            cx.commands.push(Command::SetAppraisalDate(None));
        }
    });
    ui.small(match cx.fit.as_of_source {
        AsOfSource::Given => format!("In use: {} (as set).", cx.fit.as_of),
        AsOfSource::LatestInMarket => format!(
            "In use: {}, the market's latest listing or sale date.",
            cx.fit.as_of
        ),
        AsOfSource::Today => format!(
            "In use: {}, today: the listings have no dates. Set the date the market was pulled.",
            cx.fit.as_of
        ),
    });
}

fn fitting_ui(ui: &mut Ui, cx: &mut PaneContext<'_>) {
    ui.strong("How the market is fitted");
    let fit = cx.document.fit;
    ui.label("How price falls with age:");
    let forms = [
        (
            AgeForm::Auto,
            "Chosen by the data (lowest BIC among the forms that fall with age)",
        ),
        (AgeForm::Linear, "A constant rate each year"),
        (AgeForm::Quadratic, "A rate that changes smoothly with age"),
        (
            AgeForm::PerYear,
            "Each model year on its own (no shape imposed)",
        ),
    ];
    for (form, words) in forms {
        if ui.radio(fit.age_form == form, words).clicked() && fit.age_form != form {
            cx.commands.push(Command::SetAgeForm(form));
        }
    }
    if let Some(choice) = &cx.fit.age_form_choice {
        ui.small(format!("In use: {}", choice.reason));
    }
    let mut robust = fit.robust;
    if ui
        .checkbox(
            &mut robust,
            "Robust fit (Huber): listings far from the curve count less",
        )
        .changed()
    {
        cx.commands.push(Command::SetRobust(robust));
    }
    terms_ui(ui, cx);
    let stale = fit.cleaning.stale_after_days;
    let limit = OptionalLimit {
        before: "Set aside unsold listings older than",
        after: "",
        default: 180,
        range: 1..=3_650,
        speed: 1.0,
        suffix: " days",
    };
    limit.ui(ui, stale, cx.commands, Command::SetStaleDays);
}

/// The terms that enter the fit when the data allow: market conditions, equipment and variant
/// slopes, each with what is in use.
fn terms_ui(ui: &mut Ui, cx: &mut PaneContext<'_>) {
    let fit = cx.document.fit;
    let mut market_time = fit.market_time;
    if ui
        .checkbox(
            &mut market_time,
            "Adjust for market conditions: a term for the market's drift over the listing dates",
        )
        .on_hover_text(format!(
            "It enters when every listing is dated and the dates span at least {} days over {} calendar months",
            model::hedonic::market_time::MIN_SPAN_DAYS,
            model::hedonic::market_time::MIN_MONTHS
        ))
        .changed()
    {
        cx.commands.push(Command::SetMarketTime(market_time));
    }
    ui.small(format!(
        "In use: {}",
        model::hedonic::market_time::summary(
            cx.fit.model.market_time(),
            cx.fit
                .model
                .market_drift()
                .map(|d| (d.per_month_before, d.is_distinguishable())),
        )
    ));
    let mut equipment = fit.equipment;
    if ui
        .checkbox(
            &mut equipment,
            "Price the options stated on enough listings (an equipment line per option the subject and a comparable differ in)",
        )
        .changed()
    {
        cx.commands.push(Command::SetEquipment(equipment));
    }
    ui.label("Variant premiums by age:");
    let choices = [
        (
            VariantSlopes::Auto,
            "A premium that fades or grows with age when the data support it (F test)",
        ),
        (VariantSlopes::Never, "One premium per variant at every age"),
        (
            VariantSlopes::Always,
            "Each variant its own age slope, always",
        ),
    ];
    for (choice, words) in choices {
        if ui.radio(fit.variant_slopes == choice, words).clicked() && fit.variant_slopes != choice {
            cx.commands.push(Command::SetVariantSlopes(choice));
        }
    }
    if let Some(verdict) = model::hedonic::premium_fade::summary(
        &cx.fit.model,
        cx.market,
        cx.fit.premium_fade.as_ref(),
        model::depreciation::PREMIUM_MAX_AGE,
    )
    .first()
    {
        ui.small(format!("In use: {verdict}"));
    }
}

fn comparables_ui(ui: &mut Ui, cx: &mut PaneContext<'_>) {
    ui.strong("Which listings may be comparables");
    let rules = cx.document.rules;
    let profile = match &cx.document.purpose {
        Purpose::Claim { profile, .. } => Some(profile.clone()),
        _ => None,
    };
    egui::Grid::new("comparable_rules")
        .num_columns(2)
        .spacing([12.0, 6.0])
        .show(ui, |ui| {
            let label = ui.label(YEAR_WINDOW_LABEL);
            let mut years = rules.model_year_window;
            if ui
                .add(egui::DragValue::new(&mut years).range(0..=30).prefix("± "))
                .labelled_by(label.id)
                .changed()
            {
                cx.commands.push(Command::SetYearWindow(years));
            }
            ui.end_row();

            ui.label("Mileage");
            match &profile {
                Some(p) => locked(
                    ui,
                    &rule_text(&p.comparable_rules(&rules)),
                    &p.mileage_rule.source(),
                ),
                None => mileage_ui(ui, cx, rules.mileage),
            }
            ui.end_row();

            ui.label("Listing age");
            match &profile {
                Some(p) => locked(
                    ui,
                    &limit_text(
                        p.max_listing_age_days.value.map(f64::from),
                        "days before the appraisal date",
                    ),
                    &p.max_listing_age_days.source(),
                ),
                None => listing_age_ui(ui, cx, rules.max_listing_age_days),
            }
            ui.end_row();

            ui.label("Distance");
            match &profile {
                Some(p) => locked(
                    ui,
                    &limit_text(p.max_distance_miles.value, "miles away"),
                    &p.max_distance_miles.source(),
                ),
                None => distance_ui(ui, cx, rules.max_distance_miles),
            }
            ui.end_row();

            ui.label("Variant");
            let mut same = rules.same_variant_only;
            if ui
                .checkbox(&mut same, "only the subject's own variant")
                .changed()
            {
                cx.commands.push(Command::SetSameVariant(same));
            }
            ui.end_row();

            let label = ui.label("Comparables to keep");
            let mut count = rules.count;
            if ui
                .add(egui::DragValue::new(&mut count).range(1..=30))
                .labelled_by(label.id)
                .changed()
            {
                cx.commands.push(Command::SetComparableCount(count));
            }
            ui.end_row();
        });
    if let Some(p) = &profile {
        ui.small(format!(
            "The {} profile sets the mileage, listing-age and distance rules of this claim and at least {} comparables ({}); choose another profile in the worksheet to change them.",
            p.name,
            p.min_comparables.value,
            p.min_comparables.source()
        ));
    }
}

/// A rule the claim's profile sets: its value, and where it comes from on hover and below.
fn locked(ui: &mut Ui, value: &str, source: &str) {
    ui.vertical(|ui| {
        ui.label(RichText::new(format!("{value} (set by the profile)")).strong())
            .on_hover_text("Set by the claim's jurisdiction profile");
        ui.small(format!("Source: {source}"));
    });
}

fn limit_text(limit: Option<f64>, unit: &str) -> String {
    limit.map_or_else(
        || "no limit".to_owned(),
        |v| format!("at most {} {unit}", model::format::thousands(v)),
    )
}

fn rule_text(rules: &ComparableRules) -> String {
    rules.mileage.to_string()
}

fn mileage_ui(ui: &mut Ui, cx: &mut PaneContext<'_>, current: MileageRule) {
    let none = MileageRule {
        max_over: None,
        max_under: None,
    };
    let choices = [
        (
            MileageRule::default_pricing(),
            "Within 15,000 mi or 30 % either way",
        ),
        (
            MileageRule::new_york(),
            "At most 4,000 mi or 10 % more (11 NYCRR 216.7)",
        ),
        (none, "No limit"),
    ];
    ui.vertical(|ui| {
        for (rule, words) in choices {
            if ui.radio(current == rule, words).clicked() && current != rule {
                cx.commands.push(Command::SetMileageRule(rule));
            }
        }
        if !choices.iter().any(|(rule, _)| *rule == current) {
            ui.small(format!("In use (as saved): {current}"));
        }
    });
}

fn listing_age_ui(ui: &mut Ui, cx: &mut PaneContext<'_>, current: Option<u32>) {
    let limit = OptionalLimit {
        before: "listed at most",
        after: "before the appraisal date",
        default: 90,
        range: 1..=3_650,
        speed: 1.0,
        suffix: " days",
    };
    limit.ui(ui, current, cx.commands, Command::SetListingAge);
}

fn distance_ui(ui: &mut Ui, cx: &mut PaneContext<'_>, current: Option<f64>) {
    let limit = OptionalLimit {
        before: "at most",
        after: "away (needs a distance column)",
        default: 150.0,
        range: 1.0..=25_000.0,
        speed: 5.0,
        suffix: " mi",
    };
    limit.ui(ui, current, cx.commands, Command::SetDistance);
}

/// A limit that can be switched off: a checkbox, the amount, and the words around them.
struct OptionalLimit<T> {
    before: &'static str,
    after: &'static str,
    default: T,
    range: std::ops::RangeInclusive<T>,
    speed: f64,
    suffix: &'static str,
}

impl<T: egui::emath::Numeric> OptionalLimit<T> {
    /// Draws it; a change (`None`: switched off) becomes the command `set` makes of it.
    fn ui(
        self,
        ui: &mut Ui,
        current: Option<T>,
        commands: &mut Vec<Command>,
        set: impl Fn(Option<T>) -> Command,
    ) {
        let mut change = None;
        ui.horizontal(|ui| {
            let mut on = current.is_some();
            if ui.checkbox(&mut on, self.before).changed() {
                change = Some(on.then_some(current.unwrap_or(self.default)));
            }
            let mut amount = current.unwrap_or(self.default);
            if ui
                .add_enabled(
                    on,
                    egui::DragValue::new(&mut amount)
                        .range(self.range)
                        .speed(self.speed)
                        .suffix(self.suffix),
                )
                .changed()
            {
                change = Some(Some(amount));
            }
            if !self.after.is_empty() {
                ui.label(self.after);
            }
        });
        if let Some(limit) = change {
            commands.push(set(limit));
        }
    }
}
