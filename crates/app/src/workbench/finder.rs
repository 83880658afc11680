//! The session finder: *Open session…* lists the sessions of a folder with their case details
//! (claim or stock number, insured or customer, VIN, vehicle, bottom line), filtered by what is
//! typed, so an appraisal is found again by the number everybody uses.

use std::path::{Path, PathBuf};

use eframe::egui::{self, Ui};
use model::session::finder::{Shelf, sessions_in};

use super::Workbench;
use super::case_file::FilePrompt;
use super::case_windows::CaseAction;

/// Title of the finder's window.
pub const FINDER_TITLE: &str = "Open a session";

/// Label of the finder's filter field.
pub const FINDER_FILTER_LABEL: &str = "Find";

/// The finder's state while its window is open.
#[derive(Debug, Clone, Default)]
pub struct Finder {
    /// The folder typed or looked in.
    pub folder: String,
    /// What the list is filtered by.
    pub query: String,
    /// The folder's sessions, or why it could not be read.
    pub shelf: Option<Result<Shelf, String>>,
}

impl Workbench {
    /// Opens the finder on the folder of the current or most recent session (else the working
    /// folder) and lists its sessions.
    pub fn open_finder(&mut self) {
        let folder = self
            .case
            .path
            .as_ref()
            .or(self.preferences.recent_sessions.first())
            .and_then(|p| p.parent())
            .filter(|p| !p.as_os_str().is_empty())
            .map_or_else(|| PathBuf::from("."), Path::to_path_buf);
        let mut finder = Finder::default();
        look_in(&mut finder, &folder);
        self.case.finder = Some(finder);
    }

    /// Lists the sessions of `folder` in the open finder (opening it if needed).
    pub fn find_sessions_in(&mut self, folder: &Path) {
        let finder = self.case.finder.get_or_insert_with(Finder::default);
        look_in(finder, folder);
    }

    /// Filters the open finder's list.
    pub fn filter_sessions(&mut self, query: &str) {
        if let Some(f) = self.case.finder.as_mut() {
            query.clone_into(&mut f.query);
        }
    }

    /// The finder's window, when open.
    pub(super) fn finder_window(&mut self, ui: &Ui) -> Option<CaseAction> {
        let finder = self.case.finder.as_mut()?;
        let mut open = true;
        let mut action = None;
        egui::Window::new(FINDER_TITLE)
            .collapsible(false)
            .open(&mut open)
            .default_width(760.0)
            .show(ui.ctx(), |ui| action = finder_ui(ui, finder));
        if !open {
            self.case.finder = None;
        }
        action
    }
}

fn look_in(finder: &mut Finder, folder: &Path) {
    finder.folder = folder.display().to_string();
    finder.shelf = Some(sessions_in(folder).map_err(|e| format!("{}: {e}", folder.display())));
}

fn finder_ui(ui: &mut Ui, finder: &mut Finder) -> Option<CaseAction> {
    let mut action = None;
    ui.horizontal(|ui| {
        let label = ui.label("Folder");
        let edit = ui
            .add(egui::TextEdit::singleline(&mut finder.folder).desired_width(420.0))
            .labelled_by(label.id);
        let enter = edit.lost_focus() && ui.input(|i| i.key_pressed(egui::Key::Enter));
        if ui.button("Look in this folder").clicked() || enter {
            action = Some(CaseAction::LookIn(PathBuf::from(finder.folder.trim())));
        }
        if ui.button("Browse…").clicked() {
            action = Some(CaseAction::Browse(FilePrompt::OpenSession));
        }
    });
    ui.horizontal(|ui| {
        let label = ui.label(FINDER_FILTER_LABEL);
        ui.add(
            egui::TextEdit::singleline(&mut finder.query)
                .hint_text("claim or stock number, VIN, name")
                .desired_width(320.0),
        )
        .labelled_by(label.id);
    });
    ui.separator();
    match &finder.shelf {
        None => {}
        Some(Err(e)) => {
            ui.colored_label(ui.visuals().error_fg_color, format!("Cannot list {e}"));
        }
        Some(Ok(shelf)) => {
            action = action.or_else(|| shelf_ui(ui, shelf, &finder.query));
        }
    }
    action
}

fn shelf_ui(ui: &mut Ui, shelf: &Shelf, query: &str) -> Option<CaseAction> {
    let cards: Vec<_> = shelf.matching(query).collect();
    ui.label(format!(
        "{} of {} session{} in {}",
        cards.len(),
        shelf.cards.len(),
        if shelf.cards.len() == 1 { "" } else { "s" },
        shelf.folder.display()
    ));
    let mut action = None;
    egui::ScrollArea::vertical()
        .max_height(360.0)
        .id_salt("finder_list")
        .show(ui, |ui| {
            egui::Grid::new("finder_grid")
                .striped(true)
                .num_columns(7)
                .show(ui, |ui| {
                    for heading in ["", "Number", "Name", "Vehicle", "VIN", "Result", "Saved"] {
                        ui.strong(heading);
                    }
                    ui.end_row();
                    for card in cards {
                        let file = card
                            .path
                            .file_name()
                            .map(|f| f.to_string_lossy().into_owned())
                            .unwrap_or_default();
                        if ui
                            .button(format!("Open {}", card.purpose.to_lowercase()))
                            .on_hover_text(card.path.display().to_string())
                            .clicked()
                        {
                            action = Some(CaseAction::UsePath(
                                FilePrompt::OpenSession,
                                card.path.clone(),
                            ));
                        }
                        ui.label(if card.number.is_empty() {
                            file
                        } else {
                            card.number.clone()
                        });
                        ui.label(&card.person);
                        ui.label(&card.vehicle);
                        ui.monospace(&card.vin);
                        ui.label(&card.bottom_line);
                        ui.label(card.saved.format("%Y-%m-%d %H:%M").to_string());
                        ui.end_row();
                    }
                });
        });
    if !shelf.unreadable.is_empty() {
        ui.collapsing(
            format!(
                "{} file(s) that are not readable sessions",
                shelf.unreadable.len()
            ),
            |ui| {
                for (path, why) in &shelf.unreadable {
                    ui.small(format!("{}: {why}", path.display()));
                }
            },
        );
    }
    action
}
