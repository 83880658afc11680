//! The toolbar, its status line and the keyboard shortcuts.

use std::path::PathBuf;

use eframe::egui::{self, Key, Ui};

use super::{FilePrompt, Workbench};
use crate::command::Command;
use crate::notice::Notice;

impl Workbench {
    pub(super) fn shortcuts(&mut self, ui: &Ui) {
        let (undo, redo, open, help, save) = ui.input(|i| {
            let command = i.modifiers.command;
            (
                command && !i.modifiers.shift && i.key_pressed(Key::Z),
                command && (i.key_pressed(Key::Y) || (i.modifiers.shift && i.key_pressed(Key::Z))),
                command && !i.modifiers.shift && i.key_pressed(Key::O),
                i.key_pressed(Key::F1),
                command && i.key_pressed(Key::S),
            )
        });
        if save {
            self.save_or_prompt();
        }
        if undo {
            self.undo();
        }
        if redo {
            self.redo();
        }
        if open {
            self.open_dialog();
        }
        if help {
            self.show_help = !self.show_help;
        }
    }

    /// Saves to the session's file, or asks where when it has none yet.
    fn save_or_prompt(&mut self) {
        match self.case.path.clone() {
            Some(path) => {
                if let Err(e) = self.save_session(&path) {
                    self.notice = Some(Notice::from(&e));
                }
            }
            None => self.prompt(FilePrompt::SaveSession),
        }
    }

    fn open_dialog(&mut self) {
        // Without a desktop portal the dialog returns nothing at once; the typed path remains.
        if let Some(path) = rfd::FileDialog::new()
            .add_filter("market (CSV or Parquet)", &["csv", "parquet"])
            .pick_file()
        {
            self.apply(Command::OpenMarket(path));
        }
    }

    /// A folder of Parquet files partitioned make=…/model=…/, as analytical engines write them.
    fn open_folder_dialog(&mut self) {
        if let Some(path) = rfd::FileDialog::new().pick_folder() {
            self.apply(Command::OpenMarket(path));
        }
    }

    pub(super) fn toolbar_ui(&mut self, ui: &mut Ui) {
        ui.horizontal_wrapped(|ui| {
            ui.strong("comptrail");
            if ui
                .button("Open market…")
                .on_hover_text("A CSV or Parquet file (Ctrl+O)")
                .clicked()
            {
                self.open_dialog();
            }
            if ui
                .button("Folder…")
                .on_hover_text(
                    "A folder of Parquet files partitioned make=…/model=…/, as analytical engines write them",
                )
                .clicked()
            {
                self.open_folder_dialog();
            }
            ui.label("or path:");
            let edit = ui.add(
                egui::TextEdit::singleline(&mut self.path_input)
                    .hint_text("market.csv, .parquet or folder")
                    .desired_width(220.0),
            );
            let submit = edit.lost_focus() && ui.input(|i| i.key_pressed(Key::Enter));
            if (ui.button("Load").clicked() || submit) && !self.path_input.trim().is_empty() {
                let path = PathBuf::from(self.path_input.trim());
                self.apply(Command::OpenMarket(path));
            }
            let recent = self.preferences.recent_files.clone();
            if !recent.is_empty() {
                ui.menu_button("Recent markets", |ui| {
                    for path in recent {
                        if ui.button(path.display().to_string()).clicked() {
                            self.apply(Command::OpenMarket(path));
                            ui.close();
                        }
                    }
                });
            }
            ui.separator();
            self.session_buttons_ui(ui);
            ui.separator();
            if ui
                .add_enabled(self.can_undo(), egui::Button::new("Undo"))
                .on_hover_text("Ctrl+Z")
                .clicked()
            {
                self.undo();
            }
            if ui
                .add_enabled(
                    self.undoer.has_redo(&self.document),
                    egui::Button::new("Redo"),
                )
                .on_hover_text("Ctrl+Shift+Z")
                .clicked()
            {
                self.redo();
            }
            ui.separator();
            ui.checkbox(&mut self.preferences.dark, "Dark");
            ui.checkbox(&mut self.preferences.show_comparables, "Comparables");
            if ui.button("Help").on_hover_text("F1").clicked() {
                self.show_help = !self.show_help;
            }
            ui.separator();
            ui.label(self.status_text());
            if self.worker.is_busy() {
                ui.spinner();
                if ui.button("Cancel").clicked() {
                    self.cancel_jobs();
                }
            }
        });
    }

    fn session_buttons_ui(&mut self, ui: &mut Ui) {
        if ui.button("Open session…").clicked() {
            self.open_finder();
        }
        let recent = self.preferences.recent_sessions.clone();
        if !recent.is_empty() {
            ui.menu_button("Recent sessions", |ui| {
                for path in recent {
                    if ui.button(path.display().to_string()).clicked() {
                        if let Err(e) = self.open_session(&path) {
                            self.notice = Some(Notice::from(&e));
                        }
                        ui.close();
                    }
                }
            });
        }
        let save_label = if self.has_unsaved_changes() {
            "Save session*"
        } else {
            "Save session"
        };
        if ui
            .button(save_label)
            .on_hover_text("Ctrl+S; * marks unsaved changes")
            .clicked()
        {
            self.save_or_prompt();
        }
        if ui.button("Save as…").clicked() {
            self.prompt(FilePrompt::SaveSession);
        }
        if matches!(self.document.purpose, model::session::Purpose::TradeIn(_)) {
            ui.menu_button("Report…", |ui| {
                if ui.button("For the file (every line)…").clicked() {
                    self.prompt(FilePrompt::Report);
                    ui.close();
                }
                if ui.button("For the customer (no dealer margins)…").clicked() {
                    self.prompt(FilePrompt::CustomerReport);
                    ui.close();
                }
            });
        } else if ui.button("Report…").clicked() {
            self.prompt(FilePrompt::Report);
        }
        ui.menu_button("Session options", |ui| {
            ui.checkbox(
                &mut self.preferences.keep_segment,
                "Keep every listing of the model in saved sessions (larger files)",
            );
            ui.separator();
            ui.label(match &self.preferences.profiles_file {
                Some(p) => format!("Jurisdiction profiles: {}", p.display()),
                None => "Jurisdiction profiles: shipped with comptrail".to_owned(),
            });
            if ui.button("Open a profiles file…").clicked() {
                self.prompt(FilePrompt::Profiles);
                ui.close();
            }
            if self.preferences.profiles_file.is_some()
                && ui.button("Use the shipped profiles").clicked()
            {
                self.use_shipped_profiles();
                ui.close();
            }
        });
    }

    pub(super) fn status_text(&self) -> String {
        if let Some(source) = &self.runtime.loading {
            return format!("Importing {}…", source.describe());
        }
        if self.runtime.fitting.is_some() {
            return "Fitting the market…".to_owned();
        }
        match (&self.runtime.market_source, &self.runtime.import_report) {
            (Some(source), Some(report)) => {
                let blank = if report.blank_lines > 0 {
                    format!(
                        "; {} blank lines passed over",
                        model::format::thousands(report.blank_lines as f64)
                    )
                } else {
                    String::new()
                };
                let form = if report.is_parquet() {
                    let files = report.parts_read.len();
                    format!(
                        " (Parquet, {} {})",
                        model::format::thousands(files as f64),
                        if files == 1 { "file" } else { "files" }
                    )
                } else {
                    String::new()
                };
                format!(
                    "{}{form}: {} listings used of {} read, {} rejected{blank}",
                    source.describe(),
                    model::format::thousands(report.rows_used as f64),
                    model::format::thousands(report.rows_read as f64),
                    model::format::thousands(report.rejected.len() as f64)
                )
            }
            _ => String::new(),
        }
    }
}
