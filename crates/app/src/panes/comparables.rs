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
                    // The row's action first, so it is in view however wide the table.
                    ui.label("");
                    for (label, key) in [
                        ("line", None),
                        ("vehicle", None),
                        ("miles", Some(SortBy::Miles)),
                        ("asking", None),
                        ("mileage", None),
                        ("year", None),
                        ("variant", None),
                        ("condition", None),
                        ("your lines", None),
                        ("net %", None),
                        ("gross %", Some(SortBy::Gross)),
                        ("adjusted", Some(SortBy::AdjustedPrice)),
                        ("similarity", Some(SortBy::Similarity)),
                        ("weight", Some(SortBy::Weight)),
                    ] {
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
    let source = l.source();
    let vehicle = format!(
        "{} {} {}{}",
        l.model_year,
        l.variant.as_deref().unwrap_or(""),
        l.condition,
        if c.manual { " (by hand)" } else { "" }
    );
    let breaks: Vec<String> = c.rule_breaks.iter().map(ToString::to_string).collect();
    let hover = if breaks.is_empty() {
        source
    } else {
        format!("{source}\nbreaks: {}", breaks.join("; "))
    };
    if ui.label(vehicle).on_hover_text(hover).hovered() {
        cx.selection.hover(l.row);
    }
    ui.label(thousands(l.miles));
    ui.label(money(l.asking_price));
    for kinds in [
        &[AdjustmentKind::Mileage][..],
        &[AdjustmentKind::ModelYear],
        &[AdjustmentKind::Variant],
        &[AdjustmentKind::Condition],
        &[
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
    ui.label(format!("{:.1}", c.net_pct));
    ui.label(format!("{:.1}", c.gross_pct));
    ui.label(RichText::new(money(c.adjusted_price)).strong());
    ui.label(format!("{:.2}", c.similarity));
    ui.label(format!("{:.1} %", 100.0 * c.weight));
    r
}
