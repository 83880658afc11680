//! `comptrail-workbench`: the desktop workbench. Opens on the demo market and a demo subject.

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
            Ok(Box::new(workbench))
        }),
    )
}
