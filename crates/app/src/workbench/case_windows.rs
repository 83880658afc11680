//! The case file's windows and banner: the typed-path prompt, the recovery offer, the question
//! on closing with unsaved changes, and the banner of a reopened session. They draw and return
//! what the user asked for as a [`CaseAction`]; `case_file.rs` does it.

use std::path::PathBuf;

use eframe::egui::{self, RichText, Ui};
use model::format::money;

use super::Workbench;
use super::case_file::{FilePrompt, MarketState, Opened};
use super::recovery::Recovery;
use crate::document::MarketSource;
use crate::notice::Notice;

/// What the user asked for in a case window or the banner.
#[derive(Debug, Clone, PartialEq)]
pub enum CaseAction {
    /// Use this typed path for the prompt.
    UsePath(FilePrompt, PathBuf),
    /// Take back the unsaved work.
    Recover,
    /// Throw the unsaved work away.
    DiscardRecovery,
    /// Save, then close.
    SaveBeforeClose,
    /// Close and lose the unsaved changes.
    CloseWithoutSaving,
    /// Do not close after all.
    KeepOpen,
    /// Appraise the reopened session again on this market.
    Rerun(MarketSource),
    /// Ask where the reopened session's market file went.
    LocateMarket,
    /// List the sessions of this folder in the finder.
    LookIn(PathBuf),
    /// Ask for a file with the system's dialog (or a typed path).
    Browse(FilePrompt),
}

impl Workbench {
    /// The typed-path window, the recovery offer and the close question.
    pub(super) fn case_windows(&mut self, ui: &Ui) {
        let mut actions: Vec<CaseAction> = Vec::new();
        actions.extend(prompt_window(ui, &mut self.case.prompt));
        actions.extend(self.finder_window(ui));
        if let Some(offer) = &self.case.recovery_offer {
            actions.extend(recovery_window(ui, offer));
        }
        actions.extend(self.close_question(ui));
        for action in actions {
            self.act(action);
        }
    }

    /// Asks before closing with unsaved changes; closes once allowed.
    fn close_question(&mut self, ui: &Ui) -> Option<CaseAction> {
        if ui.input(|i| i.viewport().close_requested())
            && self.has_unsaved_changes()
            && !self.case.allow_close
        {
            ui.ctx()
                .send_viewport_cmd(egui::ViewportCommand::CancelClose);
            self.case.confirm_close = true;
        }
        if self.case.allow_close && self.case.confirm_close {
            self.case.confirm_close = false;
            ui.ctx().send_viewport_cmd(egui::ViewportCommand::Close);
            return None;
        }
        if self.case.confirm_close {
            close_window(ui)
        } else {
            None
        }
    }

    /// The banner: the last notice, and a reopened session's reproduction and market file.
    pub(super) fn banner_ui(&mut self, ui: &mut Ui) {
        let case_line = self.document.case.line(&self.document.purpose);
        if !case_line.is_empty() {
            ui.label(RichText::new(case_line).strong());
        }
        let action = banner(ui, self.notice.as_ref(), self.case.opened.as_ref());
        if let Some(action) = action {
            self.act(action);
        }
    }
}

/// The typed-path window; keeps the prompt open until it is used or dismissed.
fn prompt_window(ui: &Ui, prompt: &mut Option<(FilePrompt, String)>) -> Option<CaseAction> {
    let (which, mut text) = prompt.take()?;
    let (title, action) = match which {
        FilePrompt::SaveSession => ("Save the session", "Save"),
        FilePrompt::OpenSession => ("Open a session", "Open"),
        FilePrompt::Report => ("Write the report (PDF and HTML)", "Write"),
        FilePrompt::CustomerReport => (
            "Write the customer's copy (PDF and HTML, no dealer margins)",
            "Write",
        ),
        FilePrompt::LocateMarket => ("Where is the market file now?", "Re-run"),
        FilePrompt::Profiles => ("Open a jurisdiction profiles file", "Open"),
    };
    let mut keep = true;
    let mut go = false;
    egui::Window::new(title)
        .collapsible(false)
        .show(ui.ctx(), |ui| {
            ui.label("Path:");
            let edit = ui.add(egui::TextEdit::singleline(&mut text).desired_width(420.0));
            go = edit.lost_focus() && ui.input(|i| i.key_pressed(egui::Key::Enter));
            ui.horizontal(|ui| {
                go |= ui.button(action).clicked();
                if ui.button("Cancel").clicked() {
                    keep = false;
                }
            });
        });
    if go && !text.trim().is_empty() {
        return Some(CaseAction::UsePath(which, PathBuf::from(text.trim())));
    }
    if keep {
        *prompt = Some((which, text));
    }
    None
}

fn recovery_window(ui: &Ui, offer: &Recovery) -> Option<CaseAction> {
    let text = format!(
        "comptrail closed with unsaved work on {} ({}), last written {}.",
        offer.document.subject.describe(),
        offer
            .session_path
            .as_ref()
            .map_or_else(|| "never saved".into(), |p| p.display().to_string()),
        offer.written.format("%Y-%m-%d %H:%M UTC")
    );
    let mut action = None;
    egui::Window::new("Recover unsaved work?")
        .collapsible(false)
        .anchor(egui::Align2::CENTER_CENTER, egui::Vec2::ZERO)
        .show(ui.ctx(), |ui| {
            ui.label(text);
            ui.horizontal(|ui| {
                if ui.button("Recover").clicked() {
                    action = Some(CaseAction::Recover);
                }
                if ui.button("Discard").clicked() {
                    action = Some(CaseAction::DiscardRecovery);
                }
            });
        });
    action
}

fn close_window(ui: &Ui) -> Option<CaseAction> {
    let mut action = None;
    egui::Window::new("Unsaved changes")
        .collapsible(false)
        .anchor(egui::Align2::CENTER_CENTER, egui::Vec2::ZERO)
        .show(ui.ctx(), |ui| {
            ui.label("This appraisal has changes that are not saved in a session file.");
            ui.horizontal(|ui| {
                if ui.button("Save…").clicked() {
                    action = Some(CaseAction::SaveBeforeClose);
                }
                if ui.button("Close without saving").clicked() {
                    action = Some(CaseAction::CloseWithoutSaving);
                }
                if ui.button("Cancel").clicked() {
                    action = Some(CaseAction::KeepOpen);
                }
            });
        });
    action
}

fn banner(ui: &mut Ui, notice: Option<&Notice>, opened: Option<&Opened>) -> Option<CaseAction> {
    if let Some(n) = notice {
        if n.is_failure() {
            ui.colored_label(ui.visuals().error_fg_color, &n.text);
        } else {
            ui.label(&n.text);
        }
    }
    let opened = opened?;
    let r = &opened.reproduction;
    let stored = opened.session.result.indicated_value;
    let name = opened.path.display().to_string();
    if r.reproduces() {
        ui.label(
            RichText::new(format!(
                "{name}: the saved evidence reproduces {} ({}).",
                money(stored),
                model::session::REPRODUCTION_RULE
            ))
            .strong(),
        );
    } else {
        ui.colored_label(
            ui.visuals().error_fg_color,
            format!(
                "{name}: the saved evidence does not reproduce the saved value: {} saved, {} recomputed ({} numbers differ).",
                money(stored),
                money(r.outcome.indicated_value),
                r.differences.len()
            ),
        );
    }
    let mut action = None;
    ui.horizontal_wrapped(|ui| match &opened.market {
        MarketState::Unchanged(_) => {
            ui.label("Its market file is unchanged; the appraisal is live on it.");
        }
        MarketState::Changed(path) => {
            ui.colored_label(
                ui.visuals().warn_fg_color,
                format!(
                    "Its market file {} has changed since the session was saved.",
                    path.display()
                ),
            );
            if !opened.live && ui.button("Re-run on the current file").clicked() {
                action = Some(CaseAction::Rerun(MarketSource::File(path.clone())));
            }
        }
        MarketState::Missing => {
            ui.colored_label(
                ui.visuals().warn_fg_color,
                format!(
                    "Its market file {} is not where it was; the saved evidence is shown.",
                    opened.session.market.source.file_name
                ),
            );
            if !opened.live && ui.button("Locate the market file…").clicked() {
                action = Some(CaseAction::LocateMarket);
            }
        }
    });
    action
}
