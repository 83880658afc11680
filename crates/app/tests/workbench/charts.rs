//! The charts' drawing rules on their own: when a chart switches to a density grid and back,
//! and how it follows a selection made elsewhere.

mod density {
    use app::panes::density::{Bounds, GRID, Plotted, SHADES, View, shade, view_of};

    /// A 300 × 300 lattice of listings over [0, 300) × [0, 300), series by column parity.
    fn lattice() -> Vec<Plotted> {
        (0..300_usize)
            .flat_map(|x| {
                (0..300_usize).map(move |y| Plotted {
                    row: x * 300 + y,
                    at: [x as f64 + 0.5, y as f64 + 0.5],
                    series: (x % 2) as u32,
                })
            })
            .collect()
    }

    #[test]
    fn too_many_in_view_switches_to_the_grid_and_counts_every_listing() {
        let all = lattice();
        let whole = Bounds {
            min: [0.0, 0.0],
            max: [300.0, 300.0],
        };
        let View::Binned { cells, in_view, .. } = view_of(&all, &whole, 20_000) else {
            panic!("90,000 listings in view must be binned");
        };
        assert_eq!(in_view, 90_000);
        assert_eq!(
            cells.iter().map(|c| u64::from(c.count)).sum::<u64>(),
            90_000
        );
        assert!(cells.len() <= GRID[0] * GRID[1]);
    }

    #[test]
    fn zooming_in_below_the_limit_switches_back_to_exact_points() {
        let all = lattice();
        // 100 × 100 = 10,000 listings in view: each drawn, and only those.
        let zoomed = Bounds {
            min: [100.0, 100.0],
            max: [200.0, 200.0],
        };
        let View::Exact(shown) = view_of(&all, &zoomed, 20_000) else {
            panic!("10,000 listings in view must be drawn one by one");
        };
        assert_eq!(shown.len(), 10_000);
        assert!(shown.iter().all(|&i| {
            let p = all[i as usize].at;
            (100.0..=200.0).contains(&p[0]) && (100.0..=200.0).contains(&p[1])
        }));
        // The limit is inclusive: exactly at it is still exact, one more is binned.
        assert!(matches!(view_of(&all, &zoomed, 10_000), View::Exact(_)));
        assert!(matches!(view_of(&all, &zoomed, 9_999), View::Binned { .. }));
    }

    #[test]
    fn a_cell_takes_the_color_of_its_most_common_series_and_darkens_with_count() {
        let mut all = vec![
            Plotted {
                row: 0,
                at: [0.1, 0.1],
                series: 3,
            };
            5
        ];
        all.push(Plotted {
            row: 9,
            at: [0.1, 0.1],
            series: 1,
        });
        let b = Bounds {
            min: [0.0, 0.0],
            max: [1.0, 1.0],
        };
        let View::Binned { cells, .. } = view_of(&all, &b, 2) else {
            panic!("binned");
        };
        assert_eq!(cells.len(), 1);
        assert_eq!((cells[0].count, cells[0].series), (6, 3));
        assert_eq!(shade(1, 1_000), 1);
        assert_eq!(shade(1_000, 1_000), SHADES);
        assert!(shade(30, 1_000) <= shade(300, 1_000));
    }
}

mod following {
    use egui_kittest::Harness;

    use app::panes::follow_selection;
    use eframe::egui;

    fn bounds_after(selected: Option<usize>, at: [f64; 2]) -> egui_plot::PlotBounds {
        let plot_id = egui::Id::unique("follow_selection_test");
        let mut harness = Harness::new_ui(move |ui| {
            egui_plot::Plot::new("follow")
                .id(plot_id)
                .default_x_bounds(0.0, 10.0)
                .default_y_bounds(0.0, 10.0)
                .show(ui, |plot| {
                    follow_selection(plot, egui::Id::unique("follow_memory"), selected, Some(at));
                    plot.points(egui_plot::Points::new("p", vec![[5.0, 5.0]]));
                });
        });
        harness.run_steps(3);
        *egui_plot::PlotMemory::load(&harness.ctx, plot_id)
            .unwrap_or_else(|| panic!("the plot stored its memory"))
            .bounds()
    }

    #[test]
    fn a_chart_moves_to_a_selection_outside_its_view_and_keeps_its_zoom() {
        let moved = bounds_after(Some(7), [50.0, 80.0]);
        assert!(
            (moved.min()[0]..=moved.max()[0]).contains(&50.0),
            "{moved:?}"
        );
        assert!(
            (moved.min()[1]..=moved.max()[1]).contains(&80.0),
            "{moved:?}"
        );
        let width = moved.max()[0] - moved.min()[0];
        assert!(
            width < 20.0,
            "the zoom is kept, not widened to hold both: {moved:?}"
        );
        // A selection already in view leaves the view alone.
        let kept = bounds_after(Some(7), [5.0, 5.0]);
        assert!(kept.min()[0] <= 0.5 && kept.max()[0] >= 9.5, "{kept:?}");
    }
}
