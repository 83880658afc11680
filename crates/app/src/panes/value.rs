//! The value: indicated value and band, the model's own estimate, large and readable.

use eframe::egui::{self, RichText, Ui};
use model::appraisal::AsOfSource;
use model::format::money;
use model::guards::{accuracy_in_words, backtest_warning};
use model::reconcile::BandSource;

use super::PaneContext;
use crate::command::Command;

/// Accessible label of the indicated value, used by tests and screen readers.
pub const INDICATED_VALUE_LABEL: &str = "Indicated value";

/// Draws the pane: the value, its band and date, what the market says of its own accuracy, and
/// every warning, in that order; the model's details folded below.
pub fn ui(ui: &mut Ui, cx: &mut PaneContext<'_>) {
    let Some(a) = cx.appraisal else {
        return;
    };
    let r = &a.reconciliation;
    let level = 100.0 * r.value_band.level;
    ui.horizontal(|ui| {
        ui.label(RichText::new(INDICATED_VALUE_LABEL).size(16.0));
        ui.label(RichText::new(money(r.indicated_value)).size(30.0).strong());
    });
    ui.label(
        RichText::new(format!(
            "Value band ({level:.0} %): {} to {}",
            money(r.value_band.lower),
            money(r.value_band.upper)
        ))
        .size(18.0),
    );
    ui.label(format!(
        "Appraisal date {} ({})",
        a.as_of,
        match cx.fit.as_of_source {
            AsOfSource::Given => "as set",
            AsOfSource::LatestInMarket => "the market's latest listing date",
            AsOfSource::Today => "today: the listings have no dates",
        }
    ));
    let mut warnings = a.warnings.clone();
    match cx.study.map(|s| &s.backtest) {
        Some(Ok(b)) => {
            ui.label(format!("Accuracy: {}.", accuracy_in_words(b)));
            warnings.extend(backtest_warning(b, &r.value_band, r.indicated_value));
        }
        Some(Err(e)) => {
            ui.label(format!("Accuracy: not available ({e})."));
        }
        None => {
            ui.horizontal(|ui| {
                ui.spinner();
                ui.label("Testing this market's own accuracy…");
            });
        }
    }
    super::warnings_ui(ui, &warnings);
    egui::CollapsingHeader::new("Model details")
        .id_salt("value_model_details")
        .show(ui, |ui| details_ui(ui, cx, a));
    ui.horizontal(|ui| {
        let mut percent = (100.0 * cx.document.level).round();
        if ui
            .add(
                egui::Slider::new(&mut percent, 50.0..=99.0)
                    .step_by(1.0)
                    .suffix(" %")
                    .text("band level"),
            )
            .on_hover_text("How sure the value band is: 80 % means four in five such vehicles would sell inside it")
            .changed()
        {
            cx.commands.push(Command::SetLevel(percent / 100.0));
        }
        let mut count = cx.document.rules.count;
        if ui
            .add(egui::Slider::new(&mut count, 1..=20).text("comparables"))
            .changed()
        {
            cx.commands.push(Command::SetComparableCount(count));
        }
    });
}

/// Where the band comes from, the model's own estimate, the fit and the market study.
fn details_ui(ui: &mut Ui, cx: &PaneContext<'_>, a: &model::appraisal::Appraisal) {
    let r = &a.reconciliation;
    let level = 100.0 * r.value_band.level;
    ui.label(match r.band_source {
        BandSource::Comparables => "Band width set by the spread of the adjusted comparables.",
        BandSource::Model => "Band width set by the model's prediction interval.",
        BandSource::ModelOnly => {
            "No comparables passed the filters: the model's estimate stands alone."
        }
    });
    let m = &a.model_estimate;
    ui.label(format!(
        "Model's own estimate {} (mean {}); {level:.0} % prediction interval {} to {}",
        money(m.median),
        money(m.mean),
        money(m.prediction_interval.lower),
        money(m.prediction_interval.upper)
    ));
    ui.label(format!(
        "Comparables vs model {:+.1} %; effective number of comparables {:.1}; fit: n = {}, residual SD {:.3}, R² {:.3}",
        r.model_gap_pct,
        r.effective_count,
        cx.fit.model.rows(),
        cx.fit.model.residual_sd(),
        cx.fit.model.r_squared()
    ));
    ui.label(match &cx.fit.age_form_choice {
        Some(c) => format!("Age form: {}.", c.reason),
        None => format!("Age form: {} (as set).", cx.fit.model.params().age_form),
    });
    if let Some(Ok(b)) = cx.study.map(|s| &s.backtest) {
        ui.label(format!(
            "{}-fold backtest, asking prices as truth: model median error {:.1} %, {:.0} % inside its {:.0} % band; comparables median error {:.1} %, {:.0} % inside their band.",
            b.folds,
            b.model.median_abs_pct_error,
            b.model.band_coverage_pct,
            100.0 * b.model.level,
            b.comparables.median_abs_pct_error,
            b.comparables.band_coverage_pct
        ));
    }
}
