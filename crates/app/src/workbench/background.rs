//! The background jobs' state machine: imports and fits run on the worker thread; their results
//! are taken in here, stale work is asked for again, and the subject is re-appraised when the
//! document or the fit changed. Every fit received gets a new generation number; whatever is
//! computed from a fit (its study, the appraisal, the charts' caches) carries the generation
//! it was made for.

use std::sync::Arc;

use model::appraisal::appraise;

use super::Workbench;
use crate::command::Command;
use crate::jobs::{Job, JobResult};
use crate::runtime::{FitKey, ImportFailure};
use crate::selection::Selection;

impl Workbench {
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

    /// Waits for the next result of the worker only, takes it in, asks for what is stale and
    /// re-appraises, as a frame would between two results (tests of what is on screen while a
    /// fit is still running).
    pub fn take_next_result(&mut self) {
        if let Some(result) = self.worker.wait() {
            self.receive(result);
        }
        self.request_fit_if_stale();
        self.refresh_appraisal();
    }

    /// Takes in what the worker finished, asks for what is stale, and re-appraises: once a
    /// frame, without blocking.
    pub(super) fn take_results(&mut self) {
        while let Some(result) = self.worker.poll() {
            self.receive(result);
        }
        self.request_fit_if_stale();
        self.refresh_appraisal();
    }

    fn receive(&mut self, result: JobResult) {
        match result {
            JobResult::Loaded {
                source,
                outcome,
                note,
            } => {
                self.runtime.loading = None;
                match outcome {
                    Ok((market, report)) => {
                        if let Some(note) = note {
                            self.notice = Some(crate::notice::Notice::done(note));
                        }
                        // A subject the file does not hold starts over as a typical vehicle
                        // of the file's largest model, and says so: else nothing can be shown
                        // to pick another from.
                        let subject = &self.document.subject;
                        if market.find_segment(&subject.make, &subject.model).is_none() {
                            if let Some(typical) = model::subject::Subject::typical_of(&market) {
                                let before = self
                                    .notice
                                    .take()
                                    .map(|n| format!("{} ", n.text))
                                    .unwrap_or_default();
                                self.notice = Some(crate::notice::Notice::done(format!(
                                    "{before}The file has no {} {}: the subject is now a typical {} of it. Set your vehicle in the subject pane.",
                                    subject.make,
                                    subject.model,
                                    typical.describe()
                                )));
                                self.apply(Command::SetSubject(typical));
                            }
                        }
                        self.runtime.market = Some(market);
                        self.runtime.market_source = Some(source);
                        self.runtime.import_report = Some(*report);
                        self.runtime.market_generation += 1;
                        // The fit, its gaps and study and the appraisal were of the market just
                        // replaced: their rows and names are that market's. Never shown with
                        // the new one (a value from the old fit on the new rows, or a panic on
                        // a row the new market does not have); the new fit follows.
                        self.runtime.fit = None;
                        self.runtime.fit_key = None;
                        self.runtime.gaps = None;
                        self.runtime.study = None;
                        self.runtime.fit_error = None;
                        self.runtime.appraisal = None;
                        self.runtime.appraisal_error = None;
                        self.runtime.import_failure = None;
                        self.runtime.before_open = None;
                        self.selection = Selection::default();
                    }
                    Err(error) => {
                        // The previous market and appraisal stay; the document goes back to
                        // the market that is actually loaded.
                        self.runtime.import_failure = Some(ImportFailure { source, error });
                        self.revert_open();
                    }
                }
            }
            JobResult::Fitted { outcome } => {
                let key = self.runtime.fitting.take();
                if key
                    .as_ref()
                    .is_some_and(|k| k.market_generation != self.runtime.market_generation)
                {
                    // Fitted on a market replaced meanwhile: dropped; the next frame asks for
                    // the new market's fit.
                    return;
                }
                match outcome {
                    Ok((fit, gaps)) => {
                        self.runtime.fit_generation += 1;
                        if let Some(market) = self.runtime.market.clone() {
                            self.worker.submit(Job::Study {
                                market,
                                fit: Arc::clone(&fit),
                                fit_generation: self.runtime.fit_generation,
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
                // A study of an earlier fit is stale.
                if study.fit_generation == self.runtime.fit_generation {
                    self.runtime.study = Some(study);
                }
            }
            JobResult::Canceled => {
                // A canceled import leaves the loaded market in place, as a failed one does; a
                // canceled fit is not asked for again until its inputs change.
                if self.runtime.loading.take().is_some() {
                    self.revert_open();
                }
                if let Some(key) = self.runtime.fitting.take() {
                    self.runtime.fit_canceled = Some(key);
                }
            }
        }
    }

    /// After a failed or canceled import: the document goes back (through a command, like
    /// every change) to the market that is loaded, with the hand choices, overrides and date
    /// that opening the new one had cleared.
    fn revert_open(&mut self) {
        let before = match self.runtime.before_open.take() {
            Some(before) => before,
            None => match self.runtime.market_source.clone() {
                Some(loaded) => crate::document::AppraisalDocument {
                    market: loaded,
                    ..self.document.clone()
                },
                None => return,
            },
        };
        self.apply(Command::RevertOpen(Box::new(before)));
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
                    prefer: (
                        self.document.subject.make.clone(),
                        self.document.subject.model.clone(),
                    ),
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
            || self.runtime.fit_canceled.as_ref() == Some(&key)
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
        // Only a fit of the market on screen (see the import's handling above).
        if self
            .runtime
            .fit_key
            .as_ref()
            .is_none_or(|k| k.market_generation != self.runtime.market_generation)
        {
            return;
        }
        let generation = self.runtime.fit_generation;
        if self
            .appraised_for
            .as_ref()
            .is_some_and(|(d, g)| d == &self.document && *g == generation)
        {
            return;
        }
        let request = self.document.request();
        // The fit is of the subject's segment (a subject just switched to another model waits
        // for its fit).
        if market.find_segment(&request.subject.make, &request.subject.model) == Some(fit.segment) {
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
        self.appraised_for = Some((self.document.clone(), generation));
    }
}
