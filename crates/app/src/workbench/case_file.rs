//! The case file's logic: saving the appraisal as a session, reopening one, the report, and
//! what each of the case windows' actions does. Drawing lives in `case_windows.rs`, which only
//! returns [`CaseAction`]s; the recovery file for unsaved work in `recovery.rs`.

use std::path::{Path, PathBuf};

use super::recovery::Recovery;
use chrono::{DateTime, Utc};
use model::format::money;
use model::session::{
    Authorship, Capture, MarketFile, Reproduction, Session, find_market_file, read_session,
    reproduce, write_atomically, write_session,
};

use super::Workbench;
use super::case_windows::CaseAction;
use crate::command::Command;
use crate::document::{AppraisalDocument, MarketSource};
use crate::error::AppError;
use crate::notice::Notice;

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
    /// Write the customer's copy of a trade-in's report (no dealer margin lines).
    CustomerReport,
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
    /// Where unsaved work is written (none in tests unless set).
    pub recovery_path: Option<PathBuf>,
    /// Unsaved work found at start, offered back.
    pub recovery_offer: Option<Recovery>,
    /// The document the recovery file holds.
    pub autosaved: Option<AppraisalDocument>,
    /// Clock of the last recovery write (or attempt).
    pub last_autosave: f64,
    /// Seconds between recovery writes ([`AUTOSAVE_SECONDS`] unless changed).
    pub autosave_seconds: Option<f64>,
    /// An open file prompt and its typed path.
    pub prompt: Option<(FilePrompt, String)>,
    /// Asking whether to save before closing.
    pub confirm_close: bool,
    /// The user chose to close without saving.
    pub allow_close: bool,
    /// The session finder, while its window is open.
    pub finder: Option<super::finder::Finder>,
}

pub(super) fn now() -> DateTime<Utc> {
    DateTime::<Utc>::from(std::time::SystemTime::now())
}

/// The market file of `session` (saved at `path`) as it is now.
#[must_use]
pub fn market_state(session: &Session, path: &Path) -> MarketState {
    let source = &session.market.source;
    if session.market.location.absolute.is_none() && model::demo::is_demo(source) {
        // The demo market is generated again from its seed: it is unchanged when it still
        // hashes the same.
        return if model::demo::still_matches(source) {
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

    /// The current appraisal as a session (not written anywhere); `keep_segment` keeps every
    /// listing of the model in it.
    pub fn capture_session(&self, keep_segment: bool) -> Result<Session, AppError> {
        let (Some(market), Some(fit), Some(appraisal)) = (
            &self.runtime.market,
            &self.runtime.fit,
            &self.runtime.appraisal,
        ) else {
            return Err(AppError::NoAppraisal);
        };
        if self.runtime.loading.is_some() || self.runtime.fitting.is_some() {
            return Err(AppError::Busy);
        }
        // The evidence must be the appraisal of this very document, not of an earlier state.
        if !self
            .appraised_for
            .as_ref()
            .is_some_and(|(d, _)| d == &self.document)
            || !appraisal.subject.same_vehicle(&self.document.subject)
        {
            return Err(AppError::Stale);
        }
        let market_path = match &self.document.market {
            MarketSource::File(p) => Some(p.as_path()),
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
        Ok(Session::capture(
            &Capture {
                market,
                market_path,
                fit,
                settings: &self.document.fit,
                overrides: &self.document.overrides,
                request: &self.document.request(),
                appraisal: &appraisal,
                purpose: &self.document.purpose,
                keep_segment,
                case: &self.document.case,
            },
            Authorship {
                appraiser: self.document.appraiser.clone(),
                created: self.case.created.unwrap_or(at),
                saved: at,
                notes: self.document.notes.clone(),
            },
        )?)
    }

    /// Saves the appraisal as a session at `path` (atomically).
    pub fn save_session(&mut self, path: &Path) -> Result<(), AppError> {
        let session = self.capture_session(self.preferences.keep_segment)?;
        write_session(path, &session)?;
        self.case.path = Some(path.to_owned());
        self.case.saved = Some(self.document.clone());
        self.case.created = Some(session.authorship.created);
        self.notice = Some(Notice::done(format!(
            "Saved {} ({} indicated).",
            path.display(),
            money(session.result.indicated_value)
        )));
        self.remove_recovery_file();
        self.case.autosaved = None;
        self.preferences.remember_session(path.to_owned());
        Ok(())
    }

    /// Opens a saved session: recomputes it from its evidence, and when its market file is
    /// unchanged, reopens it live on that file (as one undoable change of the document).
    pub fn open_session(&mut self, path: &Path) -> Result<(), AppError> {
        let session = read_session(path)?;
        let reproduction = reproduce(&session).map_err(|source| AppError::Replay {
            path: path.to_owned(),
            source,
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
        self.notice = None;
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
    pub fn write_report(
        &mut self,
        base: &Path,
        audience: report::Audience,
    ) -> Result<(PathBuf, PathBuf), AppError> {
        // The report's charts show the whole model's market, whether or not sessions keep it.
        let session = self.capture_session(true)?;
        let saved_bytes = self
            .case
            .path
            .as_ref()
            .filter(|_| !self.has_unsaved_changes())
            .and_then(|p| std::fs::read(p).ok());
        let identity = report::Identity::of(
            self.case.path.as_deref(),
            saved_bytes.as_deref(),
            "computed live in the workbench from the market file".into(),
        );
        let doc = report::Report::for_audience(&session, &identity, audience);
        let pdf = base.with_extension("pdf");
        let html = base.with_extension("html");
        write_atomically(&pdf, &report::pdf::render(&doc))?;
        write_atomically(&html, report::html::render(&doc).as_bytes())?;
        self.notice = Some(Notice::done(format!(
            "Wrote {} and {}.",
            pdf.display(),
            html.display()
        )));
        Ok((pdf, html))
    }

    /// Opens a file given from outside (the command line, a file manager, a drop): a session
    /// when it ends in `.ron`, else a market. A failure is said in the banner.
    pub fn open_path(&mut self, path: &Path) {
        let is_session = path
            .extension()
            .is_some_and(|e| e.eq_ignore_ascii_case("ron"));
        if is_session {
            if let Err(e) = self.open_session(path) {
                self.notice = Some(Notice::from(&e));
            }
        } else {
            self.apply(Command::OpenMarket(path.to_owned()));
        }
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
            FilePrompt::CustomerReport => {
                let base = self
                    .case
                    .path
                    .clone()
                    .unwrap_or_else(|| PathBuf::from("appraisal.ron"))
                    .with_extension("");
                let name = base
                    .file_name()
                    .map(|n| n.to_string_lossy().into_owned())
                    .unwrap_or_default();
                base.with_file_name(format!("{name}-customer"))
            }
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
            FilePrompt::Report | FilePrompt::CustomerReport => dialog
                .set_file_name(suggested.display().to_string())
                .save_file(),
            FilePrompt::LocateMarket => dialog
                .add_filter("market (CSV or Parquet)", &["csv", "parquet"])
                .pick_file(),
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
            FilePrompt::OpenSession => self.open_session(path).map(|()| {
                self.case.finder = None;
            }),
            FilePrompt::Report => self.write_report(path, report::Audience::Full).map(|_| ()),
            FilePrompt::CustomerReport => self
                .write_report(path, report::Audience::Customer)
                .map(|_| ()),
            FilePrompt::LocateMarket => {
                self.rerun_opened_on(MarketSource::File(path.to_owned()));
                Ok(())
            }
            FilePrompt::Profiles => self.load_profiles(path),
        };
        if let Err(e) = outcome {
            self.notice = Some(Notice::from(&e));
        }
        if which == FilePrompt::SaveSession
            && self.case.confirm_close
            && !self.has_unsaved_changes()
        {
            self.case.allow_close = true;
        }
    }

    /// Does what a case window or the banner asked for.
    pub(super) fn act(&mut self, action: CaseAction) {
        match action {
            CaseAction::UsePath(which, path) => self.use_prompted(which, &path),
            CaseAction::Recover => self.recover(),
            CaseAction::DiscardRecovery => self.discard_recovery(),
            CaseAction::SaveBeforeClose => match self.case.path.clone() {
                Some(p) => self.use_prompted(FilePrompt::SaveSession, &p),
                None => self.prompt(FilePrompt::SaveSession),
            },
            CaseAction::CloseWithoutSaving => {
                self.remove_recovery_file();
                self.case.allow_close = true;
            }
            CaseAction::KeepOpen => self.case.confirm_close = false,
            CaseAction::Rerun(source) => self.rerun_opened_on(source),
            CaseAction::LocateMarket => self.prompt(FilePrompt::LocateMarket),
            CaseAction::LookIn(folder) => self.find_sessions_in(&folder),
            CaseAction::Browse(which) => self.prompt(which),
        }
    }
}
