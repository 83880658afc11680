//! The workbench: owns the document, preferences and runtime, lays out the panes, applies
//! their commands in one place, and keeps fits off the UI thread.

use std::path::PathBuf;
use std::sync::Arc;

use eframe::egui::util::undoer::{Settings as UndoSettings, Undoer};
use eframe::egui::{self, Key, RichText, Ui};
use model::appraisal::appraise;
use model::worksheet::ProfileFile;

mod case_file;

pub use case_file::{AUTOSAVE_SECONDS, CaseFile, FilePrompt, MarketState, Opened, Recovery};

use crate::command::{Command, apply};
use crate::document::AppraisalDocument;
use crate::jobs::{Job, JobResult, Worker};
use crate::panes::{self, PaneContext};
use crate::preferences::Preferences;
use crate::runtime::{FitKey, ImportFailure, Runtime};
use crate::selection::Selection;

/// Listings in the demo market the workbench opens with.
pub const DEMO_ROWS: usize = 20_000;

/// The desktop workbench.
pub struct Workbench {
    document: AppraisalDocument,
    undoer: Undoer<AppraisalDocument>,
    preferences: Preferences,
    runtime: Runtime,
    worker: Worker,
    selection: Selection,
    /// Typed path, for machines without a native file dialog.
    path_input: String,
    show_help: bool,
    /// The document and fit the current appraisal was computed for.
    appraised_for: Option<(AppraisalDocument, usize)>,
    /// Seconds since start, for the undo settle rule.
    clock: f64,
    /// Which view the central area shows.
    view: CentralView,
    /// The session file, recovery and close state.
    case: CaseFile,
    /// Jurisdiction profiles for claims.
    profiles: ProfileFile,
}

/// The views of the central area.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum CentralView {
    /// The two linked charts.
    #[default]
    Charts,
    /// Depreciation by age and variant, and the holding-period forecast.
    Depreciation,
    /// Listings ranked by their gap to the market.
    PriceGaps,
    /// The trade-in offer or the claim.
    Worksheet,
}

impl Workbench {
    /// A workbench on the demo market; `wake` is called from the job thread when work is done.
    #[must_use]
    pub fn new(preferences: Preferences, wake: impl Fn() + Send + 'static) -> Self {
        Self::with_document(AppraisalDocument::demo(DEMO_ROWS), preferences, wake)
    }

    /// A workbench on `document`.
    #[must_use]
    pub fn with_document(
        document: AppraisalDocument,
        preferences: Preferences,
        wake: impl Fn() + Send + 'static,
    ) -> Self {
        let document_copy = document.clone();
        let mut worker = Worker::start(wake);
        let runtime = Runtime {
            loading: Some(document.market.clone()),
            ..Runtime::default()
        };
        worker.submit(Job::Load {
            source: document.market.clone(),
        });
        let mut undoer = Undoer::with_settings(UndoSettings {
            max_undos: 200,
            stable_time: 0.4,
            auto_save_interval: 5.0,
        });
        undoer.add_undo(&document);
        let mut wb = Self {
            document,
            // One drag of a slider settles into one undo step once it has been still for 0.4 s.
            undoer,
            preferences,
            runtime,
            worker,
            selection: Selection::default(),
            path_input: String::new(),
            show_help: false,
            appraised_for: None,
            clock: 0.0,
            view: CentralView::default(),
            case: CaseFile {
                saved: Some(document_copy),
                ..CaseFile::default()
            },
            profiles: shipped_or_empty(),
        };
        if let Some(path) = wb.preferences.profiles_file.clone() {
            if let Err(e) = wb.load_profiles(&path) {
                wb.case.message = Some((true, format!("{e}; using the shipped profiles")));
            }
        }
        wb
    }

    /// Offers the jurisdiction profiles of `path` for claims from now on (and at the next
    /// start).
    pub fn load_profiles(&mut self, path: &std::path::Path) -> Result<(), String> {
        let text = std::fs::read_to_string(path)
            .map_err(|e| format!("cannot read {}: {e}", path.display()))?;
        let file =
            ProfileFile::parse(&text, &path.display().to_string()).map_err(|e| e.to_string())?;
        if file.profiles.is_empty() {
            return Err(format!("{} holds no profiles", path.display()));
        }
        self.case.message = Some((
            false,
            format!(
                "Claims now use the {} profiles of {}.",
                file.profiles.len(),
                path.display()
            ),
        ));
        self.profiles = file;
        self.preferences.profiles_file = Some(path.to_owned());
        Ok(())
    }

    /// Goes back to the profiles shipped with comptrail.
    pub fn use_shipped_profiles(&mut self) {
        self.profiles = shipped_or_empty();
        self.preferences.profiles_file = None;
    }

    /// Shows `view` in the central area.
    pub fn show_view(&mut self, view: CentralView) {
        self.view = view;
    }

    /// The jurisdiction profiles offered for claims.
    #[must_use]
    pub fn profiles(&self) -> &ProfileFile {
        &self.profiles
    }

    /// The document.
    #[must_use]
    pub fn document(&self) -> &AppraisalDocument {
        &self.document
    }

    /// The runtime state.
    #[must_use]
    pub fn runtime(&self) -> &Runtime {
        &self.runtime
    }

    /// The preferences.
    #[must_use]
    pub fn preferences(&self) -> &Preferences {
        &self.preferences
    }

    /// The linked selection.
    #[must_use]
    pub fn selection(&self) -> Selection {
        self.selection
    }

    /// Selects a market row, as clicking it in a chart does.
    pub fn select(&mut self, row: Option<usize>) {
        self.selection.selected = row;
    }

    /// Stops queued and running background work (the toolbar's Cancel).
    pub fn cancel_jobs(&mut self) {
        self.worker.cancel();
    }

    /// Whether background work is queued or running.
    #[must_use]
    pub fn is_busy(&self) -> bool {
        self.worker.is_busy()
    }

    /// Blocks until every queued job has finished and the appraisal is current (tests and
    /// headless runs).
    pub fn wait_for_jobs(&mut self) {
        loop {
            while let Some(result) = self.worker.wait() {
                self.receive(result);
            }
            self.request_fit_if_stale();
            if !self.worker.is_busy() {
                break;
            }
        }
        self.refresh_appraisal();
    }

    /// Applies a command, recording the change for undo: a discrete change is one undo step
    /// at once; a continuous one (a drag) becomes one step when it settles.
    pub fn apply(&mut self, command: Command) {
        if let Command::OpenMarket(path) = &command {
            self.preferences.remember(path.clone());
            self.runtime.before_open = Some(self.document.clone());
        }
        let continuous = command.is_continuous();
        if !continuous {
            self.undoer.add_undo(&self.document);
        }
        if apply(&mut self.document, command) {
            if continuous {
                self.undoer.feed_state(self.clock, &self.document);
            } else {
                self.undoer.add_undo(&self.document);
            }
        }
    }

    /// Steps back one document change.
    pub fn undo(&mut self) {
        if let Some(previous) = self.undoer.undo(&self.document) {
            self.document = previous.clone();
        }
    }

    /// Steps forward one undone change.
    pub fn redo(&mut self) {
        if let Some(next) = self.undoer.redo(&self.document) {
            self.document = next.clone();
        }
    }

    fn receive(&mut self, result: JobResult) {
        match result {
            JobResult::Loaded {
                source, outcome, ..
            } => {
                self.runtime.loading = None;
                match outcome {
                    Ok((market, report)) => {
                        self.runtime.market = Some(market);
                        self.runtime.market_source = Some(source);
                        self.runtime.import_report = Some(*report);
                        self.runtime.market_generation += 1;
                        self.runtime.import_failure = None;
                        self.runtime.before_open = None;
                        self.selection = Selection::default();
                    }
                    Err(error) => {
                        // The previous market and appraisal stay; the document goes back to
                        // the market that is actually loaded.
                        self.runtime.import_failure = Some(ImportFailure { source, error });
                        self.restore_before_open();
                    }
                }
            }
            JobResult::Fitted { outcome, .. } => {
                let key = self.runtime.fitting.take();
                match outcome {
                    Ok((fit, gaps)) => {
                        if let Some(market) = self.runtime.market.clone() {
                            self.worker.submit(Job::Study {
                                market,
                                fit: Arc::clone(&fit),
                                settings: self.document.fit,
                                rules: self.document.rules,
                                level: self.document.level,
                            });
                        }
                        self.runtime.study = None;
                        self.runtime.fit = Some(fit);
                        self.runtime.gaps = Some(gaps);
                        self.runtime.fit_key = key;
                        self.runtime.fit_error = None;
                    }
                    Err(e) => {
                        self.runtime.fit_error = Some(e);
                        self.runtime.fit_key = key;
                    }
                }
            }
            JobResult::Studied(study) => {
                let current = self.runtime.fit.as_ref().map(|f| Arc::as_ptr(f) as usize);
                if current == Some(study.fit_id) {
                    self.runtime.study = Some(study);
                }
            }
            JobResult::Canceled => {
                // A canceled import leaves the loaded market in place, as a failed one does; a
                // canceled fit is not asked for again until its inputs change.
                if self.runtime.loading.take().is_some() {
                    self.restore_before_open();
                }
                if let Some(key) = self.runtime.fitting.take() {
                    self.runtime.fit_cancelled = Some(key);
                }
            }
        }
    }

    /// After a failed or canceled import: the document goes back to the market that is loaded,
    /// with the hand choices, overrides and date that opening the new one had cleared.
    fn restore_before_open(&mut self) {
        if let Some(before) = self.runtime.before_open.take() {
            self.document.market = before.market;
            self.document.choices = before.choices;
            self.document.overrides = before.overrides;
            self.document.fit.as_of = before.fit.as_of;
        } else if let Some(loaded) = self.runtime.market_source.clone() {
            self.document.market = loaded;
        }
    }

    /// Queues an import when the document names another market, and a fit when the segment,
    /// settings or overrides changed.
    fn request_fit_if_stale(&mut self) {
        if self.runtime.loading.is_none()
            && self.runtime.market_source.as_ref() != Some(&self.document.market)
        {
            let is_failed_retry = self
                .runtime
                .import_failure
                .as_ref()
                .is_some_and(|f| f.source == self.document.market);
            if !is_failed_retry {
                self.runtime.loading = Some(self.document.market.clone());
                self.worker.submit(Job::Load {
                    source: self.document.market.clone(),
                });
                return;
            }
        }
        let Some(market) = self.runtime.market.clone() else {
            return;
        };
        let key = FitKey {
            market_generation: self.runtime.market_generation,
            make: self.document.subject.make.clone(),
            model: self.document.subject.model.clone(),
            settings: self.document.fit,
            overrides: self.document.overrides.clone(),
        };
        if self.runtime.fit_key.as_ref() == Some(&key)
            || self.runtime.fitting.as_ref() == Some(&key)
            || self.runtime.fit_cancelled.as_ref() == Some(&key)
        {
            return;
        }
        if self.runtime.fitting.is_some() {
            return; // one fit at a time; the next frame asks again
        }
        self.runtime.fitting = Some(key.clone());
        self.worker.submit(Job::Fit {
            market,
            make: key.make,
            model: key.model,
            settings: key.settings,
            overrides: key.overrides,
            level: self.document.level,
        });
    }

    /// Re-appraises when the document or the fit changed (milliseconds even at a million
    /// listings, so it runs on the UI thread).
    fn refresh_appraisal(&mut self) {
        let (Some(market), Some(fit)) = (&self.runtime.market, &self.runtime.fit) else {
            return;
        };
        let fit_id = Arc::as_ptr(fit) as usize;
        if self
            .appraised_for
            .as_ref()
            .is_some_and(|(d, f)| d == &self.document && *f == fit_id)
        {
            return;
        }
        let request = self.document.request();
        let same_segment = market
            .segment_name(fit.segment)
            .eq_ignore_ascii_case(&format!(
                "{} {}",
                request.subject.make, request.subject.model
            ));
        if same_segment {
            match appraise(market, fit, &request) {
                Ok(a) => {
                    self.runtime.appraisal = Some(a);
                    self.runtime.appraisal_error = None;
                }
                Err(e) => {
                    self.runtime.appraisal = None;
                    self.runtime.appraisal_error = Some(e);
                }
            }
        }
        self.appraised_for = Some((self.document.clone(), fit_id));
    }

    fn shortcuts(&mut self, ui: &Ui) {
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
                    self.case.message = Some((true, e));
                }
            }
            None => self.prompt(FilePrompt::SaveSession),
        }
    }

    fn open_dialog(&mut self) {
        // Without a desktop portal the dialog returns nothing at once; the typed path remains.
        if let Some(path) = rfd::FileDialog::new()
            .add_filter("market CSV", &["csv"])
            .pick_file()
        {
            self.apply(Command::OpenMarket(path));
        }
    }

    /// Draws the whole workbench.
    pub fn ui(&mut self, ui: &mut Ui) {
        self.clock = ui.input(|i| i.time);
        while let Some(result) = self.worker.poll() {
            self.receive(result);
        }
        self.request_fit_if_stale();
        self.refresh_appraisal();
        self.undoer.feed_state(self.clock, &self.document);
        self.shortcuts(ui);
        self.autosave();
        let dropped: Vec<PathBuf> = ui.input(|i| {
            i.raw
                .dropped_files
                .iter()
                .map(|f| f.path().to_path_buf())
                .filter(|p| !p.as_os_str().is_empty())
                .collect()
        });
        if let Some(path) = dropped.into_iter().next() {
            self.apply(Command::OpenMarket(path));
        }
        ui.ctx().set_theme(if self.preferences.dark {
            egui::Theme::Dark
        } else {
            egui::Theme::Light
        });

        egui::Panel::top("toolbar").show(ui, |ui| self.toolbar_ui(ui));
        egui::Panel::bottom("cautions").show(ui, |ui| {
            ui.small(model::cautions::CAUTIONS[..3].join(" "));
        });
        if self.case.message.is_some() || self.case.opened.is_some() {
            egui::Panel::top("case_banner").show(ui, |ui| self.opened_banner_ui(ui));
        }
        self.case_windows(ui);
        if let Some(opened) = self.case.opened.as_ref().filter(|o| !o.live) {
            let (session, reproduction) = (opened.session.clone(), opened.reproduction.clone());
            egui::CentralPanel::default().show(ui, |ui| {
                panes::saved_session::ui(ui, &session, &reproduction);
            });
            self.failure_window(ui);
            self.help_window(ui);
            return;
        }
        let mut commands = Vec::new();
        let (Some(market), Some(fit)) = (self.runtime.market.clone(), self.runtime.fit.clone())
        else {
            egui::CentralPanel::default().show(ui, |ui| self.waiting_ui(ui));
            self.failure_window(ui);
            return;
        };
        let appraisal = self.runtime.appraisal.clone();
        let mut cx = PaneContext {
            document: &self.document,
            market: &market,
            fit: &fit,
            appraisal: appraisal.as_ref(),
            study: self.runtime.study.as_deref(),
            selection: &mut self.selection,
            commands: &mut commands,
        };
        cx.selection.hovered = None;
        side_panels_ui(
            ui,
            &mut cx,
            &self.runtime,
            self.preferences.show_comparables,
        );
        let gaps = self.runtime.gaps.clone();
        let view = &mut self.view;
        let profiles = &self.profiles;
        egui::CentralPanel::default().show(ui, |ui| {
            ui.horizontal(|ui| {
                ui.selectable_value(view, CentralView::Charts, "Charts");
                ui.selectable_value(view, CentralView::Depreciation, "Depreciation");
                ui.selectable_value(view, CentralView::PriceGaps, "Price gaps");
                ui.selectable_value(view, CentralView::Worksheet, "Worksheet");
            });
            ui.separator();
            match *view {
                CentralView::Charts => charts_ui(ui, &mut cx),
                CentralView::Depreciation => panes::depreciation::ui(ui, &mut cx),
                CentralView::PriceGaps => panes::gaps::ui(ui, &mut cx, gaps.as_deref()),
                CentralView::Worksheet => panes::worksheet::ui(ui, &mut cx, profiles),
            }
        });
        for command in commands {
            self.apply(command);
        }
        self.failure_window(ui);
        self.help_window(ui);
    }

    fn toolbar_ui(&mut self, ui: &mut Ui) {
        ui.horizontal_wrapped(|ui| {
            ui.strong("comptrail");
            if ui.button("Open market…").on_hover_text("Ctrl+O").clicked() {
                self.open_dialog();
            }
            ui.label("or path:");
            let edit = ui.add(
                egui::TextEdit::singleline(&mut self.path_input)
                    .hint_text("/path/to/market.csv")
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
                .add_enabled(
                    self.undoer.has_undo(&self.document),
                    egui::Button::new("Undo"),
                )
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
            self.prompt(FilePrompt::OpenSession);
        }
        let recent = self.preferences.recent_sessions.clone();
        if !recent.is_empty() {
            ui.menu_button("Recent sessions", |ui| {
                for path in recent {
                    if ui.button(path.display().to_string()).clicked() {
                        if let Err(e) = self.open_session(&path) {
                            self.case.message = Some((true, e));
                        }
                        ui.close();
                    }
                }
            });
        }
        let unsaved = self.has_unsaved_changes();
        let save_label = if unsaved {
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
        if ui.button("Report…").clicked() {
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

    fn status_text(&self) -> String {
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
                format!(
                    "{}: {} listings used of {} read, {} rejected{blank}",
                    source.describe(),
                    model::format::thousands(report.rows_used as f64),
                    model::format::thousands(report.rows_read as f64),
                    model::format::thousands(report.rejected.len() as f64)
                )
            }
            _ => String::new(),
        }
    }

    fn waiting_ui(&self, ui: &mut Ui) {
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

    fn failure_window(&mut self, ui: &Ui) {
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
                                ui.label(format!("line {}: {}", r.line, r.reason));
                            }
                        });
                }
                ui.label("The previous market and appraisal are unchanged.");
            });
        if !open {
            self.runtime.import_failure = None;
        }
    }

    fn help_window(&mut self, ui: &Ui) {
        egui::Window::new("Keyboard shortcuts")
            .open(&mut self.show_help)
            .show(ui.ctx(), |ui| {
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

/// The shipped jurisdiction profiles (compiled in and checked by the tests, so reading them
/// cannot fail in a released build; an empty list if it ever did).
fn shipped_or_empty() -> ProfileFile {
    model::worksheet::shipped_profiles().unwrap_or(ProfileFile {
        format_version: model::worksheet::PROFILES_FORMAT_VERSION,
        profiles: Vec::new(),
    })
}

/// The subject and value on the left, the comparables below.
fn side_panels_ui(ui: &mut Ui, cx: &mut PaneContext<'_>, runtime: &Runtime, comparables: bool) {
    egui::Panel::left("subject_and_value")
        .default_size(380.0)
        .show(ui, |ui| {
            egui::ScrollArea::vertical().show(ui, |ui| {
                panes::value::ui(ui, cx);
                if let Some(e) = &runtime.appraisal_error {
                    ui.colored_label(ui.visuals().error_fg_color, e.to_string());
                }
                if let Some(e) = &runtime.fit_error {
                    ui.colored_label(ui.visuals().error_fg_color, format!("The fit failed: {e}"));
                }
                ui.separator();
                panes::subject::ui(ui, cx);
            });
        });
    if comparables {
        egui::Panel::bottom("comparables")
            .resizable(true)
            .default_size(260.0)
            .show(ui, |ui| {
                ui.heading("Comparables");
                panes::user_adjustments::ui(ui, cx);
                panes::comparables::ui(ui, cx);
            });
    }
}

/// The two linked charts side by side.
fn charts_ui(ui: &mut Ui, cx: &mut PaneContext<'_>) {
    let half = ui.available_width() / 2.0 - 8.0;
    ui.horizontal_top(|ui| {
        ui.vertical(|ui| {
            ui.set_width(half);
            ui.strong("Price by model year");
            panes::year_chart::ui(ui, cx);
        });
        ui.vertical(|ui| {
            ui.set_width(half);
            ui.strong("Value by mileage");
            panes::mileage_chart::ui(ui, cx);
        });
    });
}

impl eframe::App for Workbench {
    fn ui(&mut self, ui: &mut Ui, _frame: &mut eframe::Frame) {
        Workbench::ui(self, ui);
    }

    fn save(&mut self, storage: &mut dyn eframe::Storage) {
        eframe::set_value(storage, crate::preferences::KEY, &self.preferences);
    }
}
