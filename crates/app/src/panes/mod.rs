//! One module per pane kind. Each pane draws from the document and runtime and pushes
//! [`Command`]s; it never changes the document itself.

pub mod comparables;
pub mod density;
pub mod depreciation;
pub mod gaps;
pub mod key;
pub mod mileage_chart;
pub mod saved_session;
pub mod settings;
pub mod subject;
pub mod user_adjustments;
pub mod value;
pub mod worksheet;
pub mod year_chart;

use eframe::egui::{self, Ui};
use model::appraisal::{Appraisal, MarketFit};
use model::market::Market;

use crate::command::Command;
use crate::document::AppraisalDocument;
use crate::selection::Selection;

/// Accessible label of the list of warnings beside the value.
pub const WARNINGS_LABEL: &str = "Warnings";

/// The warnings, each on its own wrapped line in the theme's warning color, visible without
/// hovering (the code, for reference, on hover).
pub fn warnings_ui(ui: &mut Ui, warnings: &[model::warnings::Warning]) {
    if warnings.is_empty() {
        return;
    }
    let color = ui.visuals().warn_fg_color;
    egui::Frame::group(ui.style())
        .stroke(egui::Stroke::new(1.0, color))
        .show(ui, |ui| {
            ui.label(
                egui::RichText::new(format!("{WARNINGS_LABEL} ({})", warnings.len()))
                    .color(color)
                    .strong(),
            );
            for w in warnings {
                ui.add(
                    egui::Label::new(egui::RichText::new(format!("• {}", w.message)).color(color))
                        .wrap(),
                )
                .on_hover_text(w.code.as_str());
            }
        });
}

/// Adds a drag field for an amount in whole cents (dollars on screen, at most two decimals),
/// between `0` and `max_dollars`; the amount changes only to a whole number of cents.
pub fn cents_drag(
    ui: &mut Ui,
    value: &mut model::money::Cents,
    max_dollars: f64,
    speed: f64,
) -> egui::Response {
    let mut dollars = value.dollars();
    let response = ui.add(
        egui::DragValue::new(&mut dollars)
            .prefix("$")
            .speed(speed)
            .max_decimals(2)
            .range(0.0..=max_dollars),
    );
    if response.changed() {
        if let Ok(cents) = model::money::Cents::round_dollars(dollars) {
            *value = cents;
        }
    }
    response
}

/// Most listings a chart draws one by one; with more in view it draws the density grid
/// ([`density`]) and says so (the comparables and the subject are always drawn exactly).
pub const MAX_POINTS: usize = 20_000;

/// What a pane may read and where it puts its commands.
pub struct PaneContext<'a> {
    /// The appraisal document.
    pub document: &'a AppraisalDocument,
    /// The loaded market.
    pub market: &'a Market,
    /// The fitted segment.
    pub fit: &'a MarketFit,
    /// The fit's generation (see `Runtime::fit_generation`): what caches of it are keyed by.
    pub fit_generation: u64,
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
    /// Index of a variant in the fitted design (its color index).
    #[must_use]
    pub fn variant_index(&self, row: usize) -> usize {
        let v = self.market.variant[row];
        self.color_order().iter().position(|x| *x == v).unwrap_or(0)
    }

    /// The fitted variants in color order: by fitted effect, then name
    /// (`report::visual::variant_order`), as the report colors them from the saved rates.
    #[must_use]
    pub fn color_order(&self) -> Vec<model::vocabulary::NameId> {
        let model = &self.fit.model;
        let mut v: Vec<(model::vocabulary::NameId, f64, String)> = model
            .design()
            .variants
            .iter()
            .map(|&id| (id, model.variant_effect(id), self.name_of(id)))
            .collect();
        v.sort_by(|a, b| a.1.total_cmp(&b.1).then_with(|| a.2.cmp(&b.2)));
        v.into_iter().map(|(id, _, _)| id).collect()
    }

    fn name_of(&self, id: model::vocabulary::NameId) -> String {
        self.market.names.variant_name(id).to_owned()
    }

    /// Name of the `index`-th variant in color order.
    #[must_use]
    pub fn variant_label(&self, index: usize) -> String {
        self.color_order()
            .get(index)
            .map_or_else(String::new, |&v| self.name_of(v))
    }

    /// The color of the variant named `name` (the base color when unknown).
    #[must_use]
    pub fn variant_color_named(&self, name: &str) -> egui::Color32 {
        let index = self
            .color_order()
            .iter()
            .position(|&v| self.name_of(v) == name)
            .unwrap_or(0);
        crate::palette::variant_color(index)
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
    cached_in(ui.ctx(), ui.scope_id().with(name), key, build)
}

/// As [`cached`], under an explicit id (for code that holds a context but no `Ui`).
pub fn cached_in<T: Send + Sync + 'static>(
    ctx: &egui::Context,
    id: egui::Id,
    key: u64,
    build: impl FnOnce() -> T,
) -> std::sync::Arc<T> {
    if let Some((k, data)) = ctx.data(|d| d.get_temp::<(u64, std::sync::Arc<T>)>(id)) {
        if k == key {
            return data;
        }
    }
    let data = std::sync::Arc::new(build());
    ctx.data_mut(|d| d.insert_temp(id, (key, std::sync::Arc::clone(&data))));
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

/// The identity of the current fit for caches: its generation, never its address (a freed
/// address can be reused by the next fit).
#[must_use]
pub fn fit_id(cx: &PaneContext<'_>) -> u64 {
    cx.fit_generation
}

/// A stable horizontal offset in [-0.3, 0.3] so listings of one model year do not stack.
#[must_use]
pub fn jitter(row: usize) -> f64 {
    let h = (row as u64).wrapping_mul(0x9E37_79B9_7F4A_7C15) >> 40;
    (h as f64 / f64::from(1u32 << 24) - 0.5) * 0.6
}

/// The drawn point nearest to the pointer, within `radius_px`.
#[must_use]
fn nearest(
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

/// The plot's current view as density bounds.
#[must_use]
pub fn view_bounds(plot: &egui_plot::PlotUi<'_>) -> density::Bounds {
    let b = plot.plot_bounds();
    density::Bounds {
        min: b.min(),
        max: b.max(),
    }
}

/// Draws the density grid: one square per non-empty cell, colored by its most common series
/// (`color_of`) and darker where there are more listings.
pub fn draw_cells(
    plot: &mut egui_plot::PlotUi<'_>,
    view: &density::View,
    color_of: impl Fn(u32) -> (String, egui::Color32),
) {
    let density::View::Binned {
        cells,
        cell_size,
        max_count,
        ..
    } = view
    else {
        return;
    };
    let Some(first) = cells.first() else {
        return;
    };
    let a = plot.screen_from_plot(egui_plot::PlotPoint::new(first.center[0], first.center[1]));
    let b = plot.screen_from_plot(egui_plot::PlotPoint::new(
        first.center[0] + cell_size[0],
        first.center[1] + cell_size[1],
    ));
    // Squares a little larger than a cell, so the grid reads as a filled area.
    let radius = 0.55 * (b.x - a.x).abs().max((b.y - a.y).abs()).max(1.0);
    let mut groups: std::collections::BTreeMap<(u32, usize), Vec<[f64; 2]>> =
        std::collections::BTreeMap::new();
    for c in cells {
        groups
            .entry((c.series, density::shade(c.count, *max_count)))
            .or_default()
            .push(c.center);
    }
    for ((series, shade), centres) in groups {
        let (name, color) = color_of(series);
        let strength = shade as f32 / density::SHADES as f32;
        plot.points(
            egui_plot::Points::new(name, centres)
                .shape(egui_plot::MarkerShape::Square)
                .radius(radius)
                .color(color.gamma_multiply(0.12 + 0.88 * strength)),
        );
    }
}

/// The line under a chart saying what it shows of the market.
#[must_use]
pub fn view_note(view: &density::View, total: usize) -> Option<String> {
    match view {
        density::View::Exact(shown) if shown.len() < total => Some(format!(
            "{} of {} listings in view, each drawn.",
            model::format::thousands(shown.len() as f64),
            model::format::thousands(total as f64)
        )),
        density::View::Exact(_) => None,
        density::View::Binned { in_view, .. } => Some(format!(
            "{} listings in view: too many to tell apart, so the chart shows where they are (darker squares hold more; color: the most common variant). Zoom in to see each listing; comparables and the subject are always drawn.",
            model::format::thousands(*in_view as f64)
        )),
    }
}

/// Brings a listing selected elsewhere into a chart's view: when the selection changes and the
/// listing at `at` lies outside the current bounds, the view moves to center it (same zoom).
pub fn follow_selection(
    plot: &mut egui_plot::PlotUi<'_>,
    id: egui::Id,
    selected: Option<usize>,
    at: Option<[f64; 2]>,
) {
    let last: Option<usize> = plot.ctx().data(|d| d.get_temp(id)).flatten();
    plot.ctx().data_mut(|d| d.insert_temp(id, selected));
    let (Some(row), Some(p)) = (selected, at) else {
        return;
    };
    if last == Some(row) {
        return;
    }
    let b = plot.plot_bounds();
    let (min, max) = (b.min(), b.max());
    let inside = (min[0]..=max[0]).contains(&p[0]) && (min[1]..=max[1]).contains(&p[1]);
    if !inside {
        let (hw, hh) = ((max[0] - min[0]) / 2.0, (max[1] - min[1]) / 2.0);
        plot.set_plot_bounds(egui_plot::PlotBounds::from_min_max(
            [p[0] - hw, p[1] - hh],
            [p[0] + hw, p[1] + hh],
        ));
    }
}

/// A chart of listings: asking price in dollars up the side (its key is drawn above it, not
/// over the data), it fills the space left above its note, and its automatic view always
/// holds the whole `extent`.
#[must_use]
pub fn listing_plot<'a>(
    ui: &Ui,
    id: &'a str,
    extent: Option<density::Bounds>,
) -> egui_plot::Plot<'a> {
    let mut plot = egui_plot::Plot::new(id)
        .y_axis_label("asking price")
        .y_axis_formatter(|mark, _| model::format::money(mark.value))
        .y_axis_min_width(56.0)
        .height((ui.available_height() - 24.0).max(120.0));
    if let Some(e) = extent {
        plot = plot
            .include_x(e.min[0])
            .include_x(e.max[0])
            .include_y(e.min[1])
            .include_y(e.max[1]);
    }
    plot
}

/// What a chart shows of `all` in its current view (cached; asks for one more frame when the
/// view changed, since plot bounds lag a frame behind a zoom), with the bounds.
#[must_use]
fn current_view(
    plot: &egui_plot::PlotUi<'_>,
    id: egui::Id,
    key: u64,
    all: &[density::Plotted],
) -> (std::sync::Arc<density::View>, density::Bounds) {
    let bounds = view_bounds(plot);
    let (view, fresh) = density::cached_view(plot.ctx(), id, key, all, &bounds, MAX_POINTS);
    if fresh {
        plot.ctx().request_repaint();
    }
    (view, bounds)
}

/// A date typed as YYYY-MM-DD: returns the new value once the field is left or Enter pressed
/// (`Some(None)` when emptied); a date it cannot read is said beside it and not applied.
pub fn date_field(
    ui: &mut Ui,
    id: &str,
    current: Option<chrono::NaiveDate>,
    labelled_by: egui::Id,
) -> Option<Option<chrono::NaiveDate>> {
    let memory = ui.scope_id().with(id);
    let shown = current.map(|d| d.to_string()).unwrap_or_default();
    let mut text: String = ui
        .data(|d| d.get_temp::<(String, String)>(memory))
        .filter(|(of, _)| *of == shown)
        .map_or_else(|| shown.clone(), |(_, typed)| typed);
    let response = ui
        .add(
            egui::TextEdit::singleline(&mut text)
                .hint_text("YYYY-MM-DD")
                .desired_width(110.0),
        )
        .labelled_by(labelled_by);
    let done = response.lost_focus();
    let parsed = if text.trim().is_empty() {
        Ok(None)
    } else {
        model::import::parse_date(&text).map(Some).ok_or(())
    };
    if parsed.is_err() {
        ui.colored_label(ui.visuals().error_fg_color, "not a date (YYYY-MM-DD)");
    }
    if done {
        ui.data_mut(|d| d.remove::<(String, String)>(memory));
        return parsed.ok().filter(|p| *p != current);
    }
    ui.data_mut(|d| d.insert_temp(memory, (shown, text)));
    None
}

/// The listings a chart plots.
#[derive(Clone, Copy)]
pub struct ChartListings<'a> {
    /// Names the chart's remembered view.
    pub name: &'a str,
    /// Changes when the listings or their places change.
    pub key: u64,
    /// Every listing the chart can show.
    pub all: &'a [density::Plotted],
    /// Where the selected listing is, when this chart shows it.
    pub selected_at: Option<[f64; 2]>,
}

/// Draws a chart of listings the way both listing charts behave: the selected listing (at
/// `selected_at` in plot coordinates) kept in view, the points thinned to the visible region
/// (cached under `view_key`), drawn by `draw` (which returns the listings drawn one by one, for
/// picking), and hover and click linked to the selection.
pub fn listing_chart(
    ui: &mut Ui,
    cx: &mut PaneContext<'_>,
    plot: egui_plot::Plot<'_>,
    listings: &ChartListings<'_>,
    draw: impl FnOnce(
        &mut egui_plot::PlotUi<'_>,
        &PaneContext<'_>,
        &density::View,
        &density::Bounds,
    ) -> Vec<(usize, [f64; 2])>,
) {
    let ChartListings {
        name,
        key,
        all,
        selected_at,
    } = *listings;
    let view_id = ui.scope_id().with(name);
    let mut hovered = None;
    let mut shown = None;
    let response = plot.show(ui, |plot| {
        follow_selection(
            plot,
            view_id.with("follow"),
            cx.selection.selected,
            selected_at,
        );
        let (view, bounds) = current_view(plot, view_id, key, all);
        let drawn = draw(plot, cx, &view, &bounds);
        hovered = nearest(plot, &drawn, 8.0);
        shown = Some(view);
    });
    after_chart(
        ui,
        cx,
        hovered,
        &response.response,
        shown.as_deref(),
        all.len(),
    );
}

/// The appraisal's comparables as hollow rings in the plot's ink, placed by `at`.
pub fn comparable_rings(
    plot: &mut egui_plot::PlotUi<'_>,
    appraisal: &Appraisal,
    radius: f32,
    ink: egui::Color32,
    at: impl Fn(&model::market::Listing) -> [f64; 2],
) {
    let points: Vec<[f64; 2]> = appraisal
        .comparables
        .iter()
        .map(|c| at(&c.listing))
        .collect();
    plot.points(
        egui_plot::Points::new("comparables", points)
            .shape(crate::palette::marker(report::visual::Shape::Ring))
            .filled(false)
            .radius(radius)
            .color(ink),
    );
}

/// After a chart: link the hovered listing, and say under the chart what it shows.
fn after_chart(
    ui: &mut Ui,
    cx: &mut PaneContext<'_>,
    hovered: Option<usize>,
    response: &egui::Response,
    shown: Option<&density::View>,
    total: usize,
) {
    hover_and_click(cx, hovered, response);
    if let Some(note) = shown.and_then(|v| view_note(v, total)) {
        ui.small(note);
    }
}

/// Shared by both charts: hovering a point links it everywhere; clicking selects it; the
/// hovered listing's exclusion reason shows as a tooltip.
fn hover_and_click(cx: &mut PaneContext<'_>, hovered: Option<usize>, response: &egui::Response) {
    let Some(row) = hovered else { return };
    cx.selection.hover(row);
    let listing = cx.market.listing(row);
    let reason = cx
        .fit
        .cleaning
        .exclusion_of(row)
        .filter(|_| !cx.fit.cleaning.is_included(row))
        .map(|e| format!("\nexcluded: {e}"))
        .unwrap_or_default();
    response
        .clone()
        .on_hover_text_at_pointer(format!("{}{reason}", listing.describe()));
    if response.clicked() {
        cx.selection.selected = Some(row);
    }
}
