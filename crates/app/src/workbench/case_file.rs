//! The case file: saving the appraisal as a session, reopening one, the report, the recovery
//! file for unsaved work and the question on closing with unsaved changes.

use std::path::{Path, PathBuf};

use chrono::{DateTime, Utc};
use eframe::egui::{self, RichText, Ui};
use model::format::money;
use model::market::content_hash;
use model::session::{
    Authorship, Capture, MarketFile, Reproduction, Session, find_market_file, read_session,
    reproduce, write_atomically, write_session,
};
use serde::{Deserialize, Serialize};

use super::Workbench;
use crate::command::Command;
use crate::document::{AppraisalDocument, MarketSource};

/// Format version of the recovery file.
const RECOVERY_FORMAT_VERSION: u32 = 1;

/// Seconds between writes of the recovery file while there are unsaved changes.
pub const AUTOSAVE_SECONDS: f64 = 5.0;

/// Unsaved work, written beside the preferences so it survives a crash.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Recovery {
    /// Format version.
    pub format_version: u32,
    /// When it was written.
    pub written: DateTime<Utc>,
    /// The session file the work belongs to, if it had been saved.
    pub session_path: Option<PathBuf>,
    /// The unsaved document.
    pub document: AppraisalDocument,
}

/// The market file of a reopened session, as it is now.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum MarketState {
    /// Same bytes as when the session was saved.
    Unchanged(MarketSource),
    /// Other bytes now.
    Changed(PathBuf),
    /// Not found where it was.
    Missing,
}

/// A reopened session: its recomputed evidence and its market file's state.
#[derive(Debug, Clone)]
pub struct Opened {
    /// Where it was read from.
    pub path: PathBuf,
    /// The session as saved.
    pub session: Session,
    /// Recomputed from its evidence.
    pub reproduction: Reproduction,
    /// Its market file now.
    pub market: MarketState,
    /// Whether the workbench shows the live appraisal (true) or the saved evidence.
    pub live: bool,
}

/// Which file the user is being asked for.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FilePrompt {
    /// Save the session.
    SaveSession,
    /// Open a session.
    OpenSession,
    /// Write the report (PDF and HTML beside each other).
    Report,
    /// Point a reopened session at its moved market file.
    LocateMarket,
    /// A jurisdiction profile file of the user's own.
    Profiles,
}

/// Runtime state of the case file (never saved).
#[derive(Debug, Default)]
pub struct CaseFile {
    /// Where the session is saved.
    pub path: Option<PathBuf>,
    /// The document as last saved or opened; unsaved changes are differences from it.
    pub saved: Option<AppraisalDocument>,
    /// When the session was first saved.
    pub created: Option<DateTime<Utc>>,
    /// The session last reopened.
    pub opened: Option<Opened>,
    /// The last save, open or report outcome: (is an error, text).
    pub message: Option<(bool, String)>,
    /// Where unsaved work is written (none in tests unless set).
    pub recovery_path: Option<PathBuf>,
    /// Unsaved work found at start, offered back.
    pub recovery_offer: Option<Recovery>,
    /// The document the recovery file holds.
    pub autosaved: Option<AppraisalDocument>,
    /// Clock of the last recovery write.
    pub last_autosave: f64,
    /// Seconds between recovery writes ([`AUTOSAVE_SECONDS`] unless changed).
    pub autosave_seconds: Option<f64>,
    /// An open file prompt and its typed path.
    pub prompt: Option<(FilePrompt, String)>,
    /// Asking whether to save before closing.
    pub confirm_close: bool,
    /// The user chose to close without saving.
    pub allow_close: bool,
}

fn now() -> DateTime<Utc> {
    DateTime::<Utc>::from(std::time::SystemTime::now())
}

/// The market file of `session` (saved at `path`) as it is now.
#[must_use]
pub fn market_state(session: &Session, path: &Path) -> MarketState {
    let source = &session.market.source;
    if session.market.location.absolute.is_none() && source.file_name.starts_with("demo market") {
        // The demo market is regenerated from its seed: check it still hashes the same.
        let bytes = model::demo::demo_csv_bytes(source.rows_read, 1);
        return if content_hash(&bytes) == source.content_hash {
            MarketState::Unchanged(MarketSource::Demo {
                rows: source.rows_read,
            })
        } else {
            MarketState::Missing
        };
    }
    match find_market_file(session, path, None) {
        MarketFile::Unchanged(p) => MarketState::Unchanged(MarketSource::File(p)),
        MarketFile::Changed { path, .. } => MarketState::Changed(path),
        MarketFile::Missing { .. } => MarketState::Missing,
    }
}

impl Workbench {
    /// Whether the document differs from the one last saved or opened.
    #[must_use]
    pub fn has_unsaved_changes(&self) -> bool {
        self.case.saved.as_ref() != Some(&self.document)
    }

    /// The case file state.
    #[must_use]
    pub fn case_file(&self) -> &CaseFile {
        &self.case
    }

    /// Writes unsaved work to `path` from now on, and offers back what a previous run left
    /// there.
    #[must_use]
    pub fn with_recovery_file(mut self, path: PathBuf) -> Self {
        if let Ok(text) = std::fs::read_to_string(&path) {
            match ron::from_str::<Recovery>(&text) {
                Ok(r) if r.format_version <= RECOVERY_FORMAT_VERSION => {
                    self.case.recovery_offer = Some(r);
                }
                _ => {
                    self.case.message = Some((
                        true,
                        format!(
                            "An unreadable recovery file was left at {}; it was not used.",
                            path.display()
                        ),
                    ));
                }
            }
        }
        self.case.recovery_path = Some(path);
        self
    }

    /// Writes the recovery file this many seconds after a change instead of every
    /// [`AUTOSAVE_SECONDS`].
    pub fn set_autosave_seconds(&mut self, seconds: f64) {
        self.case.autosave_seconds = Some(seconds.max(0.0));
    }

    /// Takes back the unsaved work found at start.
    pub fn recover(&mut self) {
        if let Some(r) = self.case.recovery_offer.take() {
            self.case.path = r.session_path;
            self.apply(Command::ReplaceDocument(Box::new(r.document)));
        }
    }

    /// Discards the unsaved work found at start.
    pub fn discard_recovery(&mut self) {
        self.case.recovery_offer = None;
        if let Some(p) = &self.case.recovery_path {
            let _ = std::fs::remove_file(p);
        }
    }

    /// Writes the recovery file when there is unsaved work it does not hold yet; removes it
    /// once the work is saved.
    pub(super) fn autosave(&mut self) {
        let Some(path) = self.case.recovery_path.clone() else {
            return;
        };
        if self.case.recovery_offer.is_some() {
            return; // do not overwrite what is on offer
        }
        if !self.has_unsaved_changes() {
            if self.case.autosaved.take().is_some() {
                let _ = std::fs::remove_file(&path);
            }
            return;
        }
        if self.case.autosaved.as_ref() == Some(&self.document)
            || self.clock - self.case.last_autosave
                < self.case.autosave_seconds.unwrap_or(AUTOSAVE_SECONDS)
        {
            return;
        }
        let recovery = Recovery {
            format_version: RECOVERY_FORMAT_VERSION,
            written: now(),
            session_path: self.case.path.clone(),
            document: self.document.clone(),
        };
        if let Ok(text) = ron::ser::to_string_pretty(&recovery, ron::ser::PrettyConfig::new()) {
            if let Some(dir) = path.parent() {
                let _ = std::fs::create_dir_all(dir);
            }
            if write_atomically(&path, text.as_bytes()).is_ok() {
                self.case.autosaved = Some(self.document.clone());
                self.case.last_autosave = self.clock;
            }
        }
    }

    /// The current appraisal as a session (not written anywhere); `keep_segment` keeps every
    /// listing of the model in it.
    pub fn capture_session(&self, keep_segment: bool) -> Result<Session, String> {
        let (Some(market), Some(fit), Some(appraisal)) = (
            &self.runtime.market,
            &self.runtime.fit,
            &self.runtime.appraisal,
        ) else {
            return Err("There is no finished appraisal to save yet.".into());
        };
        if self.runtime.loading.is_some() || self.runtime.fitting.is_some() {
            return Err("Wait for the market to finish loading and fitting, then save.".into());
        }
        // The evidence must be the appraisal of this very document, not of an earlier state.
        if !self
            .appraised_for
            .as_ref()
            .is_some_and(|(d, _)| d == &self.document)
            || !appraisal.subject.same_vehicle(&self.document.subject)
        {
            return Err(
                "The appraisal is being brought up to date; save again in a moment.".into(),
            );
        }
        let market_path = match &self.document.market {
            MarketSource::File(p) => Some(
                std::fs::canonicalize(p)
                    .unwrap_or_else(|_| p.clone())
                    .display()
                    .to_string(),
            ),
            MarketSource::Demo { .. } => None,
        };
        // The market's own backtest, when it has finished, is part of the evidence.
        let mut appraisal = appraisal.clone();
        if let Some(Ok(b)) = self.runtime.study.as_ref().map(|s| &s.backtest) {
            let r = &appraisal.reconciliation;
            if let Some(w) = model::guards::backtest_warning(b, &r.value_band, r.indicated_value) {
                appraisal.warnings.push(w);
            }
        }
        let at = now();
        Session::capture(
            &Capture {
                market,
                market_path: market_path.as_deref(),
                fit,
                settings: &self.document.fit,
                overrides: &self.document.overrides,
                request: &self.document.request(),
                appraisal: &appraisal,
                purpose: &self.document.purpose,
                keep_segment,
            },
            Authorship {
                appraiser: self.document.appraiser.clone(),
                created: self.case.created.unwrap_or(at),
                saved: at,
                notes: self.document.notes.clone(),
            },
        )
        .map_err(|e| format!("The worksheet cannot be saved: {e}"))
    }

    /// Saves the appraisal as a session at `path` (atomically).
    pub fn save_session(&mut self, path: &Path) -> Result<(), String> {
        let session = self.capture_session(self.preferences.keep_segment)?;
        write_session(path, &session).map_err(|e| e.to_string())?;
        self.case.path = Some(path.to_owned());
        self.case.saved = Some(self.document.clone());
        self.case.created = Some(session.authorship.created);
        self.case.message = Some((
            false,
            format!(
                "Saved {} ({} indicated).",
                path.display(),
                money(session.result.indicated_value)
            ),
        ));
        if let Some(p) = &self.case.recovery_path {
            let _ = std::fs::remove_file(p);
        }
        self.case.autosaved = None;
        self.preferences.remember_session(path.to_owned());
        Ok(())
    }

    /// Opens a saved session: recomputes it from its evidence, and when its market file is
    /// unchanged, reopens it live on that file.
    pub fn open_session(&mut self, path: &Path) -> Result<(), String> {
        let session = read_session(path).map_err(|e| e.to_string())?;
        let reproduction = reproduce(&session).map_err(|e| {
            format!(
                "{}: the saved evidence cannot be recomputed: {e}",
                path.display()
            )
        })?;
        let market = market_state(&session, path);
        let live = matches!(market, MarketState::Unchanged(_));
        if let MarketState::Unchanged(source) = &market {
            let document = AppraisalDocument::from_session(&session, source.clone());
            self.apply(Command::ReplaceDocument(Box::new(document)));
            self.case.saved = Some(self.document.clone());
        }
        self.case.path = Some(path.to_owned());
        self.case.created = Some(session.authorship.created);
        self.case.message = None;
        self.preferences.remember_session(path.to_owned());
        self.case.opened = Some(Opened {
            path: path.to_owned(),
            session,
            reproduction,
            market,
            live,
        });
        Ok(())
    }

    /// Appraises a reopened session again on `market` (its changed or moved market file).
    pub fn rerun_opened_on(&mut self, market: MarketSource) {
        let Some(opened) = self.case.opened.as_mut() else {
            return;
        };
        opened.live = true;
        let document = AppraisalDocument::from_session(&opened.session, market);
        self.apply(Command::ReplaceDocument(Box::new(document)));
        self.case.saved = Some(self.document.clone());
    }

    /// Writes the report for the current appraisal as `base`.pdf and `base`.html.
    pub fn write_report(&mut self, base: &Path) -> Result<(PathBuf, PathBuf), String> {
        // The report's charts show the whole model's market, whether or not sessions keep it.
        let session = self.capture_session(true)?;
        let saved_bytes = self
            .case
            .path
            .as_ref()
            .filter(|_| !self.has_unsaved_changes())
            .and_then(|p| std::fs::read(p).ok());
        let identity = report::Identity {
            session_file: self
                .case
                .path
                .as_ref()
                .and_then(|p| p.file_name())
                .map_or_else(
                    || "(not saved)".into(),
                    |n| n.to_string_lossy().into_owned(),
                ),
            session_hash: saved_bytes.map_or_else(
                || "(unsaved changes: save the session to give the report its identity)".into(),
                |b| content_hash(&b),
            ),
            reproduction: "computed live in the workbench from the market file".into(),
        };
        let doc = report::Report::from_session(&session, &identity);
        let pdf = base.with_extension("pdf");
        let html = base.with_extension("html");
        write_atomically(&pdf, &report::pdf::render(&doc)).map_err(|e| e.to_string())?;
        write_atomically(&html, report::html::render(&doc).as_bytes())
            .map_err(|e| e.to_string())?;
        self.case.message = Some((
            false,
            format!("Wrote {} and {}.", pdf.display(), html.display()),
        ));
        Ok((pdf, html))
    }

    /// Asks for a file: the native dialog when there is one, else a typed path.
    pub(super) fn prompt(&mut self, which: FilePrompt) {
        let suggested = match which {
            FilePrompt::SaveSession | FilePrompt::OpenSession => self
                .case
                .path
                .clone()
                .unwrap_or_else(|| PathBuf::from("appraisal.ron")),
            FilePrompt::Report => self
                .case
                .path
                .clone()
                .unwrap_or_else(|| PathBuf::from("appraisal.ron"))
                .with_extension(""),
            FilePrompt::LocateMarket => PathBuf::from("market.csv"),
            FilePrompt::Profiles => PathBuf::from("jurisdictions.ron"),
        };
        let dialog = rfd::FileDialog::new();
        let picked = match which {
            FilePrompt::SaveSession => dialog
                .add_filter("comptrail session", &["ron"])
                .set_file_name(suggested.display().to_string())
                .save_file(),
            FilePrompt::OpenSession => dialog.add_filter("comptrail session", &["ron"]).pick_file(),
            FilePrompt::Report => dialog
                .set_file_name(suggested.display().to_string())
                .save_file(),
            FilePrompt::LocateMarket => dialog.add_filter("market CSV", &["csv"]).pick_file(),
            FilePrompt::Profiles => dialog
                .add_filter("jurisdiction profiles", &["ron"])
                .pick_file(),
        };
        match picked {
            Some(path) => self.use_prompted(which, &path),
            // No desktop portal (or canceled): let the user type the path.
            None => self.case.prompt = Some((which, suggested.display().to_string())),
        }
    }

    fn use_prompted(&mut self, which: FilePrompt, path: &Path) {
        let outcome = match which {
            FilePrompt::SaveSession => self.save_session(path),
            FilePrompt::OpenSession => self.open_session(path),
            FilePrompt::Report => self.write_report(path).map(|_| ()),
            FilePrompt::LocateMarket => {
                self.rerun_opened_on(MarketSource::File(path.to_owned()));
                Ok(())
            }
            FilePrompt::Profiles => self.load_profiles(path),
        };
        if let Err(e) = outcome {
            self.case.message = Some((true, e));
        }
        if which == FilePrompt::SaveSession
            && self.case.confirm_close
            && !self.has_unsaved_changes()
        {
            self.case.allow_close = true;
        }
    }

    /// The typed-path window, the recovery offer, the close question and the reopened
    /// session's banner.
    pub(super) fn case_windows(&mut self, ui: &Ui) {
        self.prompt_window(ui);
        self.recovery_window(ui);
        self.close_window(ui);
    }

    fn prompt_window(&mut self, ui: &Ui) {
        let Some((which, mut text)) = self.case.prompt.take() else {
            return;
        };
        let (title, action) = match which {
            FilePrompt::SaveSession => ("Save the session", "Save"),
            FilePrompt::OpenSession => ("Open a session", "Open"),
            FilePrompt::Report => ("Write the report (PDF and HTML)", "Write"),
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
            self.use_prompted(which, Path::new(text.trim()));
        } else if keep {
            self.case.prompt = Some((which, text));
        }
    }

    fn recovery_window(&mut self, ui: &Ui) {
        let Some(offer) = &self.case.recovery_offer else {
            return;
        };
        let text = format!(
            "comptrail closed with unsaved work on {} ({}), last written {}.",
            offer.document.subject.describe(),
            offer
                .session_path
                .as_ref()
                .map_or_else(|| "never saved".into(), |p| p.display().to_string()),
            offer.written.format("%Y-%m-%d %H:%M UTC")
        );
        let (mut recover, mut discard) = (false, false);
        egui::Window::new("Recover unsaved work?")
            .collapsible(false)
            .anchor(egui::Align2::CENTER_CENTER, egui::Vec2::ZERO)
            .show(ui.ctx(), |ui| {
                ui.label(text);
                ui.horizontal(|ui| {
                    recover = ui.button("Recover").clicked();
                    discard = ui.button("Discard").clicked();
                });
            });
        if recover {
            self.recover();
        } else if discard {
            self.discard_recovery();
        }
    }

    fn close_window(&mut self, ui: &Ui) {
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
            return;
        }
        if !self.case.confirm_close {
            return;
        }
        let (mut save, mut discard, mut cancel) = (false, false, false);
        egui::Window::new("Unsaved changes")
            .collapsible(false)
            .anchor(egui::Align2::CENTER_CENTER, egui::Vec2::ZERO)
            .show(ui.ctx(), |ui| {
                ui.label("This appraisal has changes that are not saved in a session file.");
                ui.horizontal(|ui| {
                    save = ui.button("Save…").clicked();
                    discard = ui.button("Close without saving").clicked();
                    cancel = ui.button("Cancel").clicked();
                });
            });
        if save {
            match self.case.path.clone() {
                Some(p) => {
                    self.use_prompted(FilePrompt::SaveSession, &p);
                }
                None => self.prompt(FilePrompt::SaveSession),
            }
        } else if discard {
            if let Some(p) = &self.case.recovery_path {
                let _ = std::fs::remove_file(p);
            }
            self.case.allow_close = true;
        } else if cancel {
            self.case.confirm_close = false;
        }
    }

    /// The banner of a reopened session: whether it reproduces, and its market file's state.
    pub(super) fn opened_banner_ui(&mut self, ui: &mut Ui) {
        if let Some((error, text)) = &self.case.message {
            if *error {
                ui.colored_label(ui.visuals().error_fg_color, text);
            } else {
                ui.label(text);
            }
        }
        let Some(opened) = &self.case.opened else {
            return;
        };
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
                    action = Some(Some(MarketSource::File(path.clone())));
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
                    action = Some(None);
                }
            }
        });
        match action {
            Some(Some(source)) => self.rerun_opened_on(source),
            Some(None) => self.prompt(FilePrompt::LocateMarket),
            None => {}
        }
    }
}
