//! What a chart shows of a large market: each listing when few enough are in view, or a grid
//! of counts (a density view) when more are than can be told apart. Zooming in switches back to
//! exact points.

/// One listing as a chart places it.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Plotted {
    /// Market row.
    pub row: usize,
    /// Plot coordinates.
    pub at: [f64; 2],
    /// The chart's series (color, shape) it belongs to.
    pub series: u32,
}

/// The visible region of a plot.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Bounds {
    /// Lower-left corner.
    pub min: [f64; 2],
    /// Upper-right corner.
    pub max: [f64; 2],
}

impl Bounds {
    fn contains(&self, p: [f64; 2]) -> bool {
        p[0] >= self.min[0] && p[0] <= self.max[0] && p[1] >= self.min[1] && p[1] <= self.max[1]
    }

    /// A key that changes when the bounds move by more than a hair.
    #[must_use]
    pub fn key(&self) -> [i64; 4] {
        let span = [
            (self.max[0] - self.min[0]).abs().max(1e-9),
            (self.max[1] - self.min[1]).abs().max(1e-9),
        ];
        let q = |v: f64, s: f64| (v / s * 1e4).round() as i64;
        [
            q(self.min[0], span[0]),
            q(self.min[1], span[1]),
            q(self.max[0], span[0]),
            q(self.max[1], span[1]),
        ]
    }
}

/// One cell of the density grid.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Cell {
    /// Centre in plot coordinates.
    pub center: [f64; 2],
    /// Listings in the cell.
    pub count: u32,
    /// The most common series in the cell.
    pub series: u32,
}

/// What to draw.
#[derive(Debug, Clone, PartialEq)]
pub enum View {
    /// Each listing in view (indices into the chart's listings).
    Exact(Vec<u32>),
    /// Counts on a grid over the view.
    Binned {
        /// Non-empty cells.
        cells: Vec<Cell>,
        /// Listings in view.
        in_view: usize,
        /// Width and height of a cell in plot units.
        cell_size: [f64; 2],
        /// The largest count of a cell.
        max_count: u32,
    },
}

/// Cells across and down the view in the density view.
pub const GRID: [usize; 2] = [110, 70];

/// What to draw of `all` within `bounds`: exact points when at most `max_points` are in view,
/// else the density grid.
#[must_use]
pub fn view_of(all: &[Plotted], bounds: &Bounds, max_points: usize) -> View {
    let in_view = all.iter().filter(|p| bounds.contains(p.at)).count();
    if in_view <= max_points {
        return View::Exact(
            all.iter()
                .enumerate()
                .filter(|(_, p)| bounds.contains(p.at))
                .map(|(i, _)| i as u32)
                .collect(),
        );
    }
    let series = all
        .iter()
        .map(|p| p.series)
        .max()
        .map_or(1, |m| m as usize + 1);
    let [nx, ny] = GRID;
    let size = [
        (bounds.max[0] - bounds.min[0]) / nx as f64,
        (bounds.max[1] - bounds.min[1]) / ny as f64,
    ];
    let mut counts = vec![0_u32; nx * ny * series];
    for p in all.iter().filter(|p| bounds.contains(p.at)) {
        let cx = (((p.at[0] - bounds.min[0]) / size[0]) as usize).min(nx - 1);
        let cy = (((p.at[1] - bounds.min[1]) / size[1]) as usize).min(ny - 1);
        counts[(cy * nx + cx) * series + p.series as usize] += 1;
    }
    let mut cells = Vec::new();
    for cy in 0..ny {
        for cx in 0..nx {
            let by_series = &counts[(cy * nx + cx) * series..(cy * nx + cx + 1) * series];
            let count: u32 = by_series.iter().sum();
            if count == 0 {
                continue;
            }
            let dominant = by_series
                .iter()
                .enumerate()
                .max_by_key(|(_, c)| **c)
                .map_or(0, |(s, _)| s as u32);
            cells.push(Cell {
                center: [
                    bounds.min[0] + (cx as f64 + 0.5) * size[0],
                    bounds.min[1] + (cy as f64 + 0.5) * size[1],
                ],
                count,
                series: dominant,
            });
        }
    }
    let max_count = cells.iter().map(|c| c.count).max().unwrap_or(1);
    View::Binned {
        cells,
        in_view,
        cell_size: size,
        max_count,
    }
}

/// Shade of a cell, 1 (fewest) to [`SHADES`] (most), on a log scale of its count.
#[must_use]
pub fn shade(count: u32, max_count: u32) -> usize {
    let t = f64::from(count).ln_1p() / f64::from(max_count.max(1)).ln_1p();
    1 + ((t * (SHADES as f64 - 1.0)).round() as usize).min(SHADES - 1)
}

/// Number of shades of the density view.
pub const SHADES: usize = 5;

/// Places `rows` on a chart: each at `at(row)` in the series `key(row)` names. Returns the
/// placed listings and the series in order of first appearance.
pub fn place<K: Ord + Copy>(
    rows: impl Iterator<Item = usize>,
    key: impl Fn(usize) -> K,
    at: impl Fn(usize) -> [f64; 2],
) -> (Vec<Plotted>, Vec<K>) {
    let mut index: std::collections::BTreeMap<K, u32> = std::collections::BTreeMap::new();
    let mut series = Vec::new();
    let all = rows
        .map(|row| {
            let k = key(row);
            let s = *index.entry(k).or_insert_with(|| {
                series.push(k);
                series.len() as u32 - 1
            });
            Plotted {
                row,
                at: at(row),
                series: s,
            }
        })
        .collect();
    (all, series)
}

/// Points by series.
pub type SeriesPoints = std::collections::BTreeMap<u32, Vec<[f64; 2]>>;

/// The exact view's listings grouped by series, and each drawn listing with its row (for
/// picking); both empty for the density grid.
#[must_use]
pub fn exact_groups(all: &[Plotted], view: &View) -> (SeriesPoints, Vec<(usize, [f64; 2])>) {
    let mut groups = SeriesPoints::new();
    let mut drawn = Vec::new();
    if let View::Exact(shown) = view {
        drawn.reserve(shown.len());
        for &i in shown {
            let p = all[i as usize];
            groups.entry(p.series).or_default().push(p.at);
            drawn.push((p.row, p.at));
        }
    }
    (groups, drawn)
}

/// The data extent of `all`, for keeping the whole market in the auto-fitted view.
#[must_use]
pub fn extent(all: &[Plotted]) -> Option<Bounds> {
    let mut it = all.iter();
    let first = it.next()?;
    let mut b = Bounds {
        min: first.at,
        max: first.at,
    };
    for p in it {
        b.min = [b.min[0].min(p.at[0]), b.min[1].min(p.at[1])];
        b.max = [b.max[0].max(p.at[0]), b.max[1].max(p.at[1])];
    }
    Some(b)
}

/// The view for `all` in `bounds`, cached in `ctx` under `id` until `data_key` or the bounds
/// change. Returns the view and whether it was just recomputed (the caller asks for one more
/// frame, since plot bounds lag a frame behind a zoom).
#[must_use]
pub fn cached_view(
    ctx: &eframe::egui::Context,
    id: eframe::egui::Id,
    data_key: u64,
    all: &[Plotted],
    bounds: &Bounds,
    max_points: usize,
) -> (std::sync::Arc<View>, bool) {
    type Entry = (u64, [i64; 4], std::sync::Arc<View>);
    let key = bounds.key();
    if let Some((k, b, view)) = ctx.data(|d| d.get_temp::<Entry>(id)) {
        if k == data_key && b == key {
            return (view, false);
        }
    }
    let view = std::sync::Arc::new(view_of(all, bounds, max_points));
    ctx.data_mut(|d| d.insert_temp::<Entry>(id, (data_key, key, std::sync::Arc::clone(&view))));
    (view, true)
}
