//! Price gaps: every listing's asking price against the market for its own attributes, ranked;
//! click a row to select the listing in every pane.

use eframe::egui::{self, RichText, Ui};
use model::format::{money, signed_money};
use model::gaps::{GapFlag, PriceGap};

use super::PaneContext;

/// Rows shown at each end of the ranking.
const SHOWN: usize = 40;

/// Draws the pane over gaps computed with the fit (off the UI thread).
pub fn ui(ui: &mut Ui, cx: &mut PaneContext<'_>, gaps: Option<&crate::jobs::FlaggedGaps>) {
    let Some((level, gaps)) = gaps else {
        ui.spinner();
        ui.label("Computing price gaps…");
        return;
    };
    ui.label(format!(
        "{} listings of {}. Flags against each listing's own {:.0} % prediction interval. Far below the market may be a deal, or a branded title or damage: look before relying on it.",
        model::format::thousands(gaps.len() as f64),
        cx.market.segment_name(cx.fit.segment),
        100.0 * level
    ));
    // One table above the other, each scrolling on its own both ways: side by side they ran
    // into each other on screens narrower than the two.
    let height = ((ui.available_height() - 60.0) / 2.0).max(120.0);
    ui.label(RichText::new("Furthest below the market").strong());
    table(ui, cx, "gaps_below", height, gaps.iter().take(SHOWN));
    ui.separator();
    ui.label(RichText::new("Furthest above the market").strong());
    table(ui, cx, "gaps_above", height, gaps.iter().rev().take(SHOWN));
}

fn table<'a>(
    ui: &mut Ui,
    cx: &mut PaneContext<'_>,
    id: &str,
    height: f32,
    rows: impl Iterator<Item = &'a PriceGap>,
) {
    egui::ScrollArea::both()
        .id_salt(id)
        .max_height(height)
        .auto_shrink([false, true])
        .show(ui, |ui| {
            egui::Grid::new(id).striped(true).show(ui, |ui| {
                for h in [
                    "line",
                    "listing",
                    "asking",
                    "market",
                    "gap",
                    "against its band",
                    "set aside by cleaning",
                ] {
                    ui.label(RichText::new(h).strong());
                }
                ui.end_row();
                for g in rows {
                    let selected = cx.selection.selected == Some(g.row);
                    if ui
                        .selectable_label(selected, g.line.to_string())
                        .on_hover_text("select this listing")
                        .clicked()
                    {
                        cx.selection.selected = Some(g.row);
                    }
                    ui.label(&g.description);
                    ui.label(money(g.asking_price));
                    ui.label(money(g.expected));
                    ui.label(format!("{} ({:+.1} %)", signed_money(g.gap), g.gap_pct));
                    ui.label(match g.flag {
                        GapFlag::Within => "within",
                        GapFlag::BelowMarket => "below band",
                        GapFlag::AboveMarket => "above band",
                    });
                    ui.label(
                        g.exclusion
                            .as_deref()
                            .map_or("", model::clean::rule_in_words),
                    );
                    ui.end_row();
                }
            });
        });
}
