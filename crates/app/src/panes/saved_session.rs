//! A reopened session shown from its saved evidence, when its market file has changed or gone:
//! the subject, the value and band, every comparable with its adjustment lines, and the
//! worksheet, all recomputed from what the file holds.

use eframe::egui::{self, RichText, Ui};
use model::format::{money, signed_money};
use model::session::{Reproduction, Session};

/// Draws the saved evidence.
pub fn ui(ui: &mut Ui, session: &Session, reproduction: &Reproduction) {
    let a = &reproduction.appraisal;
    let r = &a.reconciliation;
    egui::ScrollArea::vertical().show(ui, |ui| {
        ui.heading(format!(
            "{}: {} (saved evidence)",
            session.purpose.title(),
            session.request.subject.describe()
        ));
        ui.label(format!(
            "Appraised by {} as of {}, saved {}; market file {} ({} rows, hash {}).",
            if session.authorship.appraiser.is_empty() {
                "(no name)"
            } else {
                &session.authorship.appraiser
            },
            a.as_of,
            session.authorship.saved.format("%Y-%m-%d %H:%M UTC"),
            session.market.source.file_name,
            model::format::thousands(session.market.source.rows_read as f64),
            session.market.source.content_hash
        ));
        ui.label(
            RichText::new(format!(
                "Indicated value {}   band {} to {} ({:.0} %)",
                money(r.indicated_value),
                money(r.value_band.lower),
                money(r.value_band.upper),
                100.0 * r.value_band.level
            ))
            .size(20.0)
            .strong(),
        );
        super::warnings_ui(ui, &session.appraisal.warnings);
        ui.separator();
        ui.strong("Comparables as saved, adjusted again from the saved rates");
        egui::Grid::new("saved_comparables")
            .striped(true)
            .show(ui, |ui| {
                for title in [
                    "#", "Vehicle", "Source", "Asking", "Adjusted", "Gross %", "Weight",
                ] {
                    ui.strong(title);
                }
                ui.end_row();
                for (i, c) in a.comparables.iter().enumerate() {
                    let l = &c.listing;
                    ui.label((i + 1).to_string());
                    ui.label(format!(
                        "{} {} {}, {} mi, {}",
                        l.model_year,
                        l.model,
                        model::vocabulary::variant_text(l.variant.as_deref()),
                        model::format::thousands(l.miles),
                        l.condition
                    ))
                    .on_hover_text(
                        c.adjustments
                            .iter()
                            .map(|x| {
                                format!(
                                    "{} {}: {}",
                                    signed_money(x.amount),
                                    x.kind.label(),
                                    x.basis
                                )
                            })
                            .collect::<Vec<_>>()
                            .join("\n"),
                    );
                    ui.label(l.source());
                    ui.label(money(l.asking_price));
                    ui.label(money(c.adjusted_price));
                    ui.label(format!("{:.1}", c.gross_pct));
                    ui.label(format!("{:.1} %", 100.0 * c.weight));
                    ui.end_row();
                }
            });
        ui.separator();
        super::worksheet::outcome_ui(ui, &session.purpose, &reproduction.outcome);
        if !session.authorship.notes.is_empty() {
            ui.separator();
            ui.strong("Notes");
            ui.label(&session.authorship.notes);
        }
    });
}
