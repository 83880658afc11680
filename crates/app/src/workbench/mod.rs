//! The workbench: owns the document, preferences and runtime, lays out the panes and applies
//! their commands in one place. Its concerns live in their own files: the background jobs
//! (`background.rs`), the toolbar and shortcuts (`toolbar.rs`), the import report, help and
//! waiting windows (`windows.rs`), the case file's logic (`case_file.rs`), its windows and
//! banner (`case_windows.rs`), the session finder (`finder.rs`) and the recovery file for
//! unsaved work (`recovery.rs`).

use eframe::egui::util::undoer::{Settings as UndoSettings, Undoer};
use eframe::egui::{self, Ui};
use model::worksheet::ProfileFile;

mod background;
mod case_file;
mod case_windows;
pub mod finder;
mod recovery;
mod toolbar;
mod windows;

pub use case_file::{CaseFile, FilePrompt, MarketState, Opened};
pub use finder::{FINDER_FILTER_LABEL, FINDER_TITLE, Finder};
pub use recovery::{AUTOSAVE_SECONDS, Recovery};

use crate::command::{Command, apply};
use crate::document::AppraisalDocument;
use crate::error::AppError;
use crate::jobs::{Job, Worker};
use crate::notice::Notice;
use crate::panes::{self, PaneContext};
use crate::preferences::Preferences;
use crate::runtime::Runtime;
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
    /// The document and fit generation the current appraisal was computed for.
    appraised_for: Option<(AppraisalDocument, u64)>,
    /// Seconds since start, for the undo settle rule.
    clock: f64,
    /// Which view the central area shows.
    view: CentralView,
    /// The session file, recovery and close state.
    case: CaseFile,
    /// Jurisdiction profiles for claims.
    profiles: ProfileFile,
    /// What the last action did, for the banner.
    notice: Option<Notice>,
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
    /// The appraisal date, how the market is fitted, which listings may be comparables.
    Settings,
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
            prefer: (
                document.subject.make.clone(),
                document.subject.model.clone(),
            ),
        });
        // One drag of a slider settles into one undo step once it has been still for 0.4 s.
        let mut undoer = Undoer::with_settings(UndoSettings {
            max_undos: 200,
            stable_time: 0.4,
            auto_save_interval: 5.0,
        });
        undoer.add_undo(&document);
        let mut wb = Self {
            document,
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
            notice: None,
        };
        if let Some(path) = wb.preferences.profiles_file.clone() {
            if let Err(e) = wb.load_profiles(&path) {
                wb.notice = Some(Notice::failed(format!("{e}; using the shipped profiles")));
            }
        }
        wb
    }

    /// Offers the jurisdiction profiles of `path` for claims from now on (and at the next
    /// start).
    pub fn load_profiles(&mut self, path: &std::path::Path) -> Result<(), AppError> {
        let text = std::fs::read_to_string(path).map_err(|source| AppError::Read {
            path: path.to_owned(),
            source,
        })?;
        let file = ProfileFile::parse(&text, &path.display().to_string())?;
        if file.profiles.is_empty() {
            return Err(AppError::NoProfiles(path.to_owned()));
        }
        self.notice = Some(Notice::done(format!(
            "Claims now use the {} profiles of {}.",
            file.profiles.len(),
            path.display()
        )));
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

    /// What the last action did, as the banner shows it.
    #[must_use]
    pub fn notice(&self) -> Option<&Notice> {
        self.notice.as_ref()
    }

    /// Selects a market row, as clicking it in a chart does.
    pub fn select(&mut self, row: Option<usize>) {
        self.selection.selected = row;
    }

    /// Points at a market row, as hovering it in a pane does (every pane shows it from the
    /// next frame).
    pub fn hover(&mut self, row: usize) {
        self.selection.hover(row);
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

    /// Whether there is a change to undo.
    #[must_use]
    pub fn can_undo(&self) -> bool {
        self.undoer.has_undo(&self.document)
    }

    /// Draws the whole workbench.
    pub fn ui(&mut self, ui: &mut Ui) {
        self.clock = ui.input(|i| i.time);
        self.selection.next_frame();
        self.take_results();
        self.undoer.feed_state(self.clock, &self.document);
        self.shortcuts(ui);
        self.autosave();
        self.open_dropped(ui);
        ui.ctx().set_theme(if self.preferences.dark {
            egui::Theme::Dark
        } else {
            egui::Theme::Light
        });
        egui::Panel::top("toolbar").show(ui, |ui| self.toolbar_ui(ui));
        egui::Panel::bottom("cautions").show(ui, |ui| {
            ui.small(model::cautions::CAUTIONS[..3].join(" "));
        });
        let has_case = !self.document.case.line(&self.document.purpose).is_empty();
        if self.notice.is_some() || self.case.opened.is_some() || has_case {
            egui::Panel::top("case_banner").show(ui, |ui| self.banner_ui(ui));
        }
        self.case_windows(ui);
        if let Some(opened) = self.case.opened.as_ref().filter(|o| !o.live) {
            let (session, reproduction) = (opened.session.clone(), opened.reproduction.clone());
            egui::CentralPanel::default().show(ui, |ui| {
                panes::saved_session::ui(ui, &session, &reproduction);
            });
        } else {
            self.panes_ui(ui);
        }
        self.failure_window(ui);
        self.help_window(ui);
    }

    /// The value, subject and comparables around the central view, with the commands they
    /// emit applied once they have all drawn.
    fn panes_ui(&mut self, ui: &mut Ui) {
        let mut commands = Vec::new();
        let (Some(market), Some(fit)) = (self.runtime.market.clone(), self.runtime.fit.clone())
        else {
            egui::CentralPanel::default().show(ui, |ui| self.waiting_ui(ui));
            return;
        };
        let appraisal = self.runtime.appraisal.clone();
        let mut cx = PaneContext {
            document: &self.document,
            market: &market,
            fit: &fit,
            fit_generation: self.runtime.fit_generation,
            appraisal: appraisal.as_ref(),
            study: self.runtime.study.as_deref(),
            selection: &mut self.selection,
            commands: &mut commands,
        };
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
                ui.selectable_value(view, CentralView::Settings, panes::settings::SETTINGS_LABEL);
            });
            ui.separator();
            match *view {
                CentralView::Charts => charts_ui(ui, &mut cx),
                CentralView::Depreciation => panes::depreciation::ui(ui, &mut cx),
                CentralView::PriceGaps => panes::gaps::ui(ui, &mut cx, gaps.as_deref()),
                CentralView::Worksheet => panes::worksheet::ui(ui, &mut cx, profiles),
                CentralView::Settings => panes::settings::ui(ui, &mut cx),
            }
        });
        for command in commands {
            self.apply(command);
        }
    }

    /// A file dropped on the window is opened: a session (`.ron`) or a market.
    fn open_dropped(&mut self, ui: &Ui) {
        let dropped = ui.input(|i| {
            i.raw
                .dropped_files
                .iter()
                .map(|f| f.path().to_path_buf())
                .find(|p| !p.as_os_str().is_empty())
        });
        if let Some(path) = dropped {
            self.open_path(&path);
        }
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
