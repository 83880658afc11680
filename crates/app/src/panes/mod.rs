//! One module per pane kind. Each pane draws from the document and runtime and pushes
//! [`Command`]s; it never changes the document itself.

pub mod comparables;
pub mod depreciation;
pub mod gaps;
pub mod mileage_chart;
pub mod saved_session;
pub mod subject;
pub mod user_adjustments;
pub mod value;
pub mod worksheet;
pub mod year_chart;

use eframe::egui;
use model::appraisal::{Appraisal, MarketFit};
use model::market::Market;

use crate::command::Command;
use crate::document::AppraisalDocument;
use crate::selection::Selection;

/// Most points a chart draws one by one; beyond this it draws an evenly spaced sample and
/// says so (the comparables and the subject are always drawn).
pub const MAX_POINTS: usize = 20_000;

/// What a pane may read and where it puts its commands.
pub struct PaneContext<'a> {
    /// The appraisal document.
    pub document: &'a AppraisalDocument,
    /// The loaded market.
    pub market: &'a Market,
    /// The fitted segment.
    pub fit: &'a MarketFit,
    /// The current appraisal, when the subject could be appraised.
    pub appraisal: Option<&'a Appraisal>,
    /// Backtest and model ranking of the current fit, once computed in the background.
    pub study: Option<&'a crate::jobs::MarketStudy>,
    /// Linked selection.
    pub selection: &'a mut Selection,
    /// Commands for the workbench to apply.
    pub commands: &'a mut Vec<Command>,
}

impl PaneContext<'_> {
    /// Index of a variant in the fitted design (its colour index).
    #[must_use]
    pub fn variant_index(&self, row: usize) -> usize {
        let v = self.market.variant[row];
        self.fit
            .model
            .design()
            .variants
            .iter()
            .position(|x| *x == v)
            .unwrap_or(0)
    }

    /// Name of the `index`-th variant of the fitted design.
    #[must_use]
    pub fn variant_label(&self, index: usize) -> String {
        match self.fit.model.design().variants.get(index) {
            Some(&v) if v != model::vocabulary::NO_NAME => self.market.names.name(v).to_owned(),
            Some(_) => "(no variant)".to_owned(),
            None => String::new(),
        }
    }

    /// Whether `row` is one of the subject's comparables.
    #[must_use]
    pub fn is_comparable(&self, row: usize) -> bool {
        self.appraisal
            .is_some_and(|a| a.comparables.iter().any(|c| c.listing.row == row))
    }
}

/// Chart data cached in the pane's temporary egui storage, rebuilt only when `key` (a hash of
/// everything the data depends on) changes, so a steady frame does no per-listing work.
pub fn cached<T: Send + Sync + 'static>(
    ui: &egui::Ui,
    name: &str,
    key: u64,
    build: impl FnOnce() -> T,
) -> std::sync::Arc<T> {
    let id = ui.scope_id().with(name);
    if let Some((k, data)) = ui.data(|d| d.get_temp::<(u64, std::sync::Arc<T>)>(id)) {
        if k == key {
            return data;
        }
    }
    let data = std::sync::Arc::new(build());
    ui.data_mut(|d| d.insert_temp(id, (key, std::sync::Arc::clone(&data))));
    data
}

/// A hash of the inputs a chart's data depends on.
#[must_use]
pub fn inputs_key(parts: &[&dyn std::fmt::Debug]) -> u64 {
    use std::hash::{Hash, Hasher};
    let mut h = std::collections::hash_map::DefaultHasher::new();
    for p in parts {
        format!("{p:?}").hash(&mut h);
    }
    h.finish()
}

/// Identity of the fit a pane draws (its address: a new fit is a new allocation).
#[must_use]
pub fn fit_id(cx: &PaneContext<'_>) -> usize {
    std::ptr::from_ref(cx.fit) as usize
}

/// Every `step`-th row so that at most [`MAX_POINTS`] are drawn, and the step used.
#[must_use]
pub fn decimate(rows: &[usize]) -> (Vec<usize>, usize) {
    let step = rows.len().div_ceil(MAX_POINTS).max(1);
    (rows.iter().copied().step_by(step).collect(), step)
}

/// A stable horizontal offset in [-0.3, 0.3] so listings of one model year do not stack.
#[must_use]
pub fn jitter(row: usize) -> f64 {
    let h = (row as u64).wrapping_mul(0x9E37_79B9_7F4A_7C15) >> 40;
    (h as f64 / f64::from(1u32 << 24) - 0.5) * 0.6
}

/// The drawn point nearest to the pointer, within `radius_px`.
#[must_use]
pub fn nearest(
    plot: &egui_plot::PlotUi<'_>,
    points: &[(usize, [f64; 2])],
    radius_px: f32,
) -> Option<usize> {
    let pointer = plot.pointer_coordinate()?;
    let at = plot.screen_from_plot(pointer);
    points
        .iter()
        .map(|(row, p)| {
            (
                *row,
                plot.screen_from_plot(egui_plot::PlotPoint::new(p[0], p[1]))
                    .distance(at),
            )
        })
        .filter(|(_, d)| *d <= radius_px)
        .min_by(|a, b| a.1.total_cmp(&b.1))
        .map(|(row, _)| row)
}
