//! `comptrail-workbench [FILE]`: the desktop workbench. Opens FILE when given (a market CSV, or
//! a session `.ron`), so a file manager's "open with" works; else the demo market and subject.

use app::Workbench;
use app::preferences::{KEY, Preferences};

fn main() -> eframe::Result {
    let options = eframe::NativeOptions {
        viewport: eframe::egui::ViewportBuilder::default()
            .with_title("comptrail: appraisal workbench")
            .with_inner_size([1500.0, 940.0])
            .with_drag_and_drop(true),
        ..Default::default()
    };
    eframe::run_native(
        "comptrail",
        options,
        Box::new(|cc| {
            let preferences: Preferences = cc
                .storage
                .and_then(|s| eframe::get_value(s, KEY))
                .unwrap_or_default();
            let ctx = cc.egui_ctx.clone();
            let mut workbench = Workbench::new(preferences, move || {
                ctx.request_repaint();
            });
            // Unsaved work is written beside the preferences and offered back after a crash.
            if let Some(dir) = eframe::storage_dir("comptrail") {
                workbench = workbench.with_recovery_file(dir.join("unsaved-appraisal.ron"));
            }
            if let Some(file) = std::env::args_os().nth(1) {
                workbench.open_path(std::path::Path::new(&file));
            }
            Ok(Box::new(workbench))
        }),
    )
}
