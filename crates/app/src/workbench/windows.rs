//! The windows over the workbench that are not about the case file: the import report of a
//! market that could not be read, the help, and the wait for the first fit.

use eframe::egui::{self, RichText, Ui};

use super::Workbench;

/// Title of the help window.
pub const HELP_TITLE: &str = "Help";

impl Workbench {
    pub(super) fn waiting_ui(&self, ui: &mut Ui) {
        ui.vertical_centered(|ui| {
            ui.add_space(40.0);
            if let Some(e) = &self.runtime.fit_error {
                ui.colored_label(
                    ui.visuals().error_fg_color,
                    format!("The market could not be fitted for this subject: {e}"),
                );
            } else {
                ui.spinner();
                ui.label(self.status_text());
            }
        });
    }

    pub(super) fn failure_window(&mut self, ui: &Ui) {
        let Some(failure) = self.runtime.import_failure.clone() else {
            return;
        };
        let mut open = true;
        egui::Window::new("Import report")
            .open(&mut open)
            .show(ui.ctx(), |ui| {
                ui.label(
                    RichText::new(format!(
                        "{} could not be imported.",
                        failure.source.describe()
                    ))
                    .strong(),
                );
                ui.label(failure.error.to_string());
                if let model::import::ImportError::NoUsableRows { report, .. } =
                    failure.error.as_ref()
                {
                    egui::ScrollArea::vertical()
                        .max_height(240.0)
                        .show(ui, |ui| {
                            for r in report.rejected.iter().take(200) {
                                ui.label(format!("{}: {}", r.where_found(), r.reason));
                            }
                        });
                }
                ui.label("The previous market and appraisal are unchanged.");
            });
        if !open {
            self.runtime.import_failure = None;
        }
    }

    pub(super) fn help_window(&mut self, ui: &Ui) {
        egui::Window::new(HELP_TITLE)
            .open(&mut self.show_help)
            .default_width(620.0)
            .show(ui.ctx(), |ui| {
                ui.strong("The words on screen");
                egui::ScrollArea::vertical()
                    .max_height(420.0)
                    .id_salt("glossary")
                    .show(ui, |ui| {
                        egui::Grid::new("glossary_grid")
                            .num_columns(2)
                            .striped(true)
                            .show(ui, |ui| {
                                for (term, meaning) in model::glossary::GLOSSARY {
                                    ui.strong(term);
                                    ui.add(egui::Label::new(meaning).wrap());
                                    ui.end_row();
                                }
                            });
                    });
                ui.separator();
                ui.strong("Keyboard and mouse");
                egui::Grid::new("shortcuts").show(ui, |ui| {
                    for (keys, what) in [
                        ("Ctrl+O", "open a market file"),
                        ("Ctrl+S", "save the session"),
                        ("Ctrl+Z", "undo"),
                        ("Ctrl+Shift+Z or Ctrl+Y", "redo"),
                        ("F1", "show or hide this help"),
                        ("double-click a chart", "reset its view"),
                        ("drag / scroll in a chart", "pan / zoom"),
                    ] {
                        ui.strong(keys);
                        ui.label(what);
                        ui.end_row();
                    }
                });
            });
    }
}
