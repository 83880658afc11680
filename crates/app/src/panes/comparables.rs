//! The comparable set: each comparable with its adjustment lines, net and gross percent,
//! weight and adjusted price; sortable; include/exclude by hand.

use eframe::egui::{self, RichText, Ui};
use model::adjustment::AdjustmentKind;
use model::appraisal::AdjustedComparable;
use model::format::{money, signed_money, thousands};

use super::PaneContext;
use crate::command::Command;

/// Column the table is sorted by.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum SortBy {
    /// Similarity, most similar first (the ranking).
    #[default]
    Similarity,
    /// Adjusted price, low to high.
    AdjustedPrice,
    /// Gross adjustment, low to high.
    Gross,
    /// Weight, high to low.
    Weight,
    /// Miles, low to high.
    Miles,
}

/// The column groups, each with how many columns it spans (the first is the row's button).
const GROUPS: [(&str, usize); 4] = [
    ("", 1),
    ("The listing", 8),
    ("Adjustments to the subject", 9),
    ("Result", 3),
];

/// The columns after the row's button, with the sort each heading offers.
const COLUMNS: [(&str, Option<SortBy>); 20] = [
    ("line", None),
    ("vehicle", None),
    ("miles", Some(SortBy::Miles)),
    ("asking", None),
    ("seller", None),
    ("place", None),
    ("listed", None),
    ("VIN", None),
    ("mileage", None),
    ("model year", None),
    ("variant", None),
    ("sold as", None),
    ("market", None),
    ("equipment", None),
    ("your lines", None),
    ("net", None),
    ("gross", Some(SortBy::Gross)),
    ("adjusted price", Some(SortBy::AdjustedPrice)),
    ("similarity", Some(SortBy::Similarity)),
    ("weight", Some(SortBy::Weight)),
];

fn amount(c: &AdjustedComparable, kinds: &[AdjustmentKind]) -> f64 {
    c.adjustments
        .iter()
        .filter(|l| kinds.contains(&l.kind))
        .map(|l| l.amount)
        .sum()
}

/// Draws the pane.
pub fn ui(ui: &mut Ui, cx: &mut PaneContext<'_>) {
    let Some(appraisal) = cx.appraisal else {
        ui.label("No appraisal: see the message above.");
        return;
    };
    let id = ui.scope_id().with("comparables_sort");
    let mut sort: SortBy = ui.data(|d| d.get_temp(id)).unwrap_or_default();
    let mut order: Vec<&AdjustedComparable> = appraisal.comparables.iter().collect();
    match sort {
        SortBy::Similarity => {}
        SortBy::AdjustedPrice => {
            order.sort_by(|a, b| a.adjusted_price.total_cmp(&b.adjusted_price));
        }
        SortBy::Gross => order.sort_by(|a, b| a.gross_pct.total_cmp(&b.gross_pct)),
        SortBy::Weight => order.sort_by(|a, b| b.weight.total_cmp(&a.weight)),
        SortBy::Miles => order.sort_by(|a, b| a.listing.miles.total_cmp(&b.listing.miles)),
    }
    ui.label(format!(
        "{} comparables of {} listings that passed the filters ({} looked at). Hover a row to find it in the charts; each adjustment's basis is in its tooltip.",
        appraisal.comparables.len(),
        thousands(appraisal.candidates_passed as f64),
        thousands(appraisal.candidates_considered as f64)
    ));
    egui::ScrollArea::both()
        .id_salt("comparables_scroll")
        .show(ui, |ui| {
            egui::Grid::new("comparables_grid")
                .striped(true)
                .spacing([12.0, 4.0])
                .show(ui, |ui| {
                    // Group headings over the columns they span: the listing as it was
                    // listed, its adjustments to the subject, and what it counts for.
                    for (i, group) in GROUPS.iter().enumerate() {
                        for column in 0..group.1 {
                            if column == 0 && i > 0 {
                                ui.label(RichText::new(group.0).strong().underline());
                            } else {
                                ui.label("");
                            }
                        }
                    }
                    ui.end_row();
                    // The row's action first, so it is in view however wide the table.
                    ui.label("");
                    for (label, key) in COLUMNS {
                        match key {
                            Some(k) => {
                                let text = if sort == k {
                                    format!("{label} (sorted)")
                                } else {
                                    label.to_owned()
                                };
                                if ui
                                    .button(RichText::new(text).strong())
                                    .on_hover_text("sort by this column")
                                    .clicked()
                                {
                                    sort = k;
                                }
                            }
                            None => {
                                ui.label(RichText::new(label).strong());
                            }
                        }
                    }
                    ui.end_row();
                    // A listing newly selected elsewhere (a chart, the price gaps) that is a
                    // comparable scrolls into view once.
                    let scrolled_id = ui.scope_id().with("scrolled_to");
                    let scrolled: Option<usize> = ui.data(|d| d.get_temp(scrolled_id)).flatten();
                    let target = cx.selection.selected.filter(|s| Some(*s) != scrolled);
                    for c in order {
                        let line = row_ui(ui, cx, c);
                        if target == Some(c.listing.row) {
                            line.scroll_to_me(Some(egui::Align::Center));
                        }
                        ui.end_row();
                    }
                    ui.data_mut(|d| d.insert_temp(scrolled_id, cx.selection.selected));
                });
        });
    ui.data_mut(|d| d.insert_temp(id, sort));
}

/// One comparable's row; returns its first cell (to scroll to).
fn row_ui(ui: &mut Ui, cx: &mut PaneContext<'_>, c: &AdjustedComparable) -> egui::Response {
    let l = &c.listing;
    let label = format!("Exclude line {}", l.line);
    if ui.small_button("Exclude").on_hover_text(label).clicked() {
        cx.commands.push(Command::ExcludeComparable(l.line));
    }
    let highlighted = cx.selection.is_highlighted(l.row);
    // A highlighted row (hovered or selected in any pane) is marked in words too, not only
    // by weight.
    let line_text = if highlighted {
        RichText::new(format!("• {}", l.line)).strong().underline()
    } else {
        RichText::new(l.line.to_string())
    };
    let r = ui.label(line_text);
    if r.hovered() {
        cx.selection.hover(l.row);
    }
    let vehicle = format!(
        "{} {} {} {}, sold as {}{}",
        l.model_year,
        l.make,
        l.model,
        model::vocabulary::variant_text(l.variant.as_deref()),
        l.condition.sold_as(),
        if c.manual { " (by hand)" } else { "" }
    );
    let breaks: Vec<String> = c.rule_breaks.iter().map(ToString::to_string).collect();
    let vehicle_cell = ui.label(vehicle);
    let vehicle_cell = if breaks.is_empty() {
        vehicle_cell
    } else {
        vehicle_cell.on_hover_text(format!("breaks: {}", breaks.join("; ")))
    };
    if vehicle_cell.hovered() {
        cx.selection.hover(l.row);
    }
    ui.label(format!("{} mi", thousands(l.miles)));
    ui.label(money(l.asking_price));
    ui.label(l.seller.as_deref().unwrap_or("unknown"));
    ui.label(match (&l.location, l.distance_miles) {
        (Some(place), Some(d)) => format!("{place}, {d:.0} mi away"),
        (Some(place), None) => place.clone(),
        (None, Some(d)) => format!("{d:.0} mi away"),
        (None, None) => "unknown".into(),
    });
    ui.label(match (l.listed_on, c.days_listed) {
        (Some(date), Some(days)) => format!("{date}, {days} days before"),
        (Some(date), None) => date.to_string(),
        _ => "no date".into(),
    });
    vin_cell(ui, l);
    for kinds in [
        &[AdjustmentKind::Mileage][..],
        &[AdjustmentKind::ModelYear],
        &[AdjustmentKind::Variant],
        &[AdjustmentKind::SaleClass],
        &[AdjustmentKind::MarketConditions],
        &[AdjustmentKind::Equipment],
        &[
            AdjustmentKind::Condition,
            AdjustmentKind::Options,
            AdjustmentKind::PriorDamage,
            AdjustmentKind::Other,
        ],
    ] {
        let basis: Vec<String> = c
            .adjustments
            .iter()
            .filter(|a| kinds.contains(&a.kind))
            .map(|a| a.basis.clone())
            .collect();
        ui.label(signed_money(amount(c, kinds)))
            .on_hover_text(if basis.is_empty() {
                "none".into()
            } else {
                basis.join("\n")
            });
    }
    ui.label(format!("{:+.1} %", c.net_pct));
    ui.label(format!("{:.1} %", c.gross_pct));
    ui.label(RichText::new(money(c.adjusted_price)).strong());
    ui.label(format!("{:.2}", c.similarity));
    ui.label(format!("{:.1} %", 100.0 * c.weight));
    r
}

/// The listing's VIN, marked when it does not check (49 CFR 565.15).
fn vin_cell(ui: &mut Ui, l: &model::market::Listing) {
    let Some(vin) = l.vin.as_deref() else {
        ui.label("none");
        return;
    };
    let problems = model::vin::listing_problems(l);
    if problems.is_empty() {
        ui.monospace(vin);
    } else {
        ui.colored_label(
            ui.visuals().warn_fg_color,
            RichText::new(format!("{vin} (does not check)")).monospace(),
        )
        .on_hover_text(format!(
            "{} ({})",
            model::vin::problems_text(&problems),
            model::vin::SOURCE
        ));
    }
}
