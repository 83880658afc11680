//! Background work: importing a market and fitting a segment run on a worker thread, so the
//! window never freezes on a large file. Results come back over a channel.

use std::sync::Arc;
use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::mpsc::{Receiver, Sender, channel};

use model::appraisal::{AppraisalError, FitSettings, MarketFit, find_segment, fit_market};
use model::backtest::{Backtest, BacktestSettings, backtest};
use model::clean::Overrides;
use model::comparables::ComparableRules;
use model::depreciation::{DeclineRank, rank_segments};
use model::gaps::{PriceGap, price_gaps};
use model::import::{ImportError, ImportOptions, ImportReport, import_market};
use model::market::Market;

use crate::document::MarketSource;

/// How well the loaded market supports a value, and how its models compare: computed after
/// each fit, in the background.
#[derive(Debug, Clone)]
pub struct MarketStudy {
    /// The generation of the fit it was computed for (see `Runtime::fit_generation`).
    pub fit_generation: u64,
    /// K-fold accuracy of the model and the comparables method.
    pub backtest: Result<Backtest, AppraisalError>,
    /// Models in the file ranked by fitted annual decline.
    pub ranking: Vec<DeclineRank>,
}

/// Price gaps with the interval level they were flagged at.
pub type FlaggedGaps = (f64, Vec<PriceGap>);

/// Work for the background thread.
pub enum Job {
    /// Import a market.
    Load {
        /// Which market.
        source: MarketSource,
        /// The subject's make and model: the model read when a Parquet market is too large to
        /// read whole.
        prefer: (String, String),
    },
    /// Backtest the fitted segment and rank the file's models.
    Study {
        /// The market.
        market: Arc<Market>,
        /// The fit to study.
        fit: Arc<MarketFit>,
        /// Its generation, returned with the study so a stale one can be told apart.
        fit_generation: u64,
        /// Fit settings (for the ranking's per-model fits).
        settings: FitSettings,
        /// Comparable rules (for the comparables backtest).
        rules: ComparableRules,
        /// Interval level whose coverage is measured.
        level: f64,
    },
    /// Clean and fit a segment.
    Fit {
        /// The market.
        market: Arc<Market>,
        /// Make to fit.
        make: String,
        /// Model to fit.
        model: String,
        /// Fit settings.
        settings: FitSettings,
        /// Overrides.
        overrides: Overrides,
        /// Level for the price-gap flags.
        level: f64,
    },
}

/// What came back.
pub enum JobResult {
    /// A market was imported (or failed to import).
    Loaded {
        /// Which market.
        source: MarketSource,
        /// The market and its report, or the reason it failed (boxed: the report is large).
        outcome: Result<(Arc<Market>, Box<ImportReport>), Arc<ImportError>>,
        /// What was read when it was not the whole market, for a notice.
        note: Option<String>,
    },
    /// A fit finished (or failed), with the segment's price gaps at the requested level.
    Fitted {
        /// The fit and its gaps, or why it failed.
        outcome: Result<(Arc<MarketFit>, Arc<FlaggedGaps>), AppraisalError>,
    },
    /// A market study finished.
    Studied(Box<MarketStudy>),
    /// The job was canceled.
    Canceled,
}

/// A worker thread and its channels.
pub struct Worker {
    jobs: Sender<(Job, Arc<AtomicBool>)>,
    results: Receiver<JobResult>,
    cancel: Arc<AtomicBool>,
    pending: usize,
}

impl Worker {
    /// Starts the worker; `wake` is called when a result is ready (to request a repaint).
    #[must_use]
    pub fn start(wake: impl Fn() + Send + 'static) -> Self {
        let (job_tx, job_rx) = channel::<(Job, Arc<AtomicBool>)>();
        let (result_tx, result_rx) = channel();
        std::thread::Builder::new()
            .name("comptrail-jobs".into())
            .spawn(move || {
                for (job, cancel) in job_rx {
                    let result = if cancel.load(Ordering::Relaxed) {
                        JobResult::Canceled
                    } else {
                        run(job)
                    };
                    let result = if cancel.load(Ordering::Relaxed) {
                        JobResult::Canceled
                    } else {
                        result
                    };
                    if result_tx.send(result).is_err() {
                        break;
                    }
                    wake();
                }
            })
            .ok();
        Self {
            jobs: job_tx,
            results: result_rx,
            cancel: Arc::new(AtomicBool::new(false)),
            pending: 0,
        }
    }

    /// Queues a job.
    pub fn submit(&mut self, job: Job) {
        if self.pending == 0 {
            self.cancel = Arc::new(AtomicBool::new(false));
        }
        if self.jobs.send((job, Arc::clone(&self.cancel))).is_ok() {
            self.pending += 1;
        }
    }

    /// Asks running and queued jobs to stop; their results are dropped.
    pub fn cancel(&self) {
        self.cancel.store(true, Ordering::Relaxed);
    }

    /// Whether jobs are queued or running.
    #[must_use]
    pub fn is_busy(&self) -> bool {
        self.pending > 0
    }

    /// A finished result, if any, without waiting.
    pub fn poll(&mut self) -> Option<JobResult> {
        let r = self.results.try_recv().ok();
        if r.is_some() {
            self.pending = self.pending.saturating_sub(1);
        }
        r
    }

    /// Waits for the next result (tests and headless use).
    pub fn wait(&mut self) -> Option<JobResult> {
        if self.pending == 0 {
            return None;
        }
        let r = self.results.recv().ok();
        self.pending = self.pending.saturating_sub(1);
        r
    }
}

/// Listings above which the workbench reads one model of a Parquet market partitioned by make
/// and model instead of all of it (a data lake's folder may hold a hundred million).
pub const WHOLE_DATASET_LIMIT: u64 = 5_000_000;

/// Imports a market file: a CSV, a Parquet file, or a partitioned folder, which is read whole
/// up to `limit` listings (every model can then be chosen) and beyond it for one model only:
/// `prefer` when the folder holds it, else its largest; the note says what was read.
pub fn load_file(
    path: &std::path::Path,
    options: &ImportOptions,
    prefer: (&str, &str),
    limit: u64,
) -> (Result<(Market, ImportReport), ImportError>, Option<String>) {
    use model::vocabulary::name_key;
    if !model::import::dataset::is_parquet_market(path) {
        return (import_market(path, options, &[]), None);
    }
    let models = match model::import::parquet_models(path) {
        Ok(models) => models,
        Err(e) => return (Err(e), None),
    };
    let total: u64 = models.iter().map(|m| m.rows).sum();
    let Some(largest) = models.first() else {
        return (import_market(path, options, &[]), None);
    };
    if models.len() < 2 || total <= limit {
        return (import_market(path, options, &[]), None);
    }
    let chosen = models
        .iter()
        .find(|m| {
            name_key(&m.make) == name_key(prefer.0) && name_key(&m.model) == name_key(prefer.1)
        })
        .unwrap_or(largest);
    let thousands = |n: u64| model::format::thousands(n as f64);
    let note = format!(
        "This folder holds {} listings of {} models, more than the workbench reads at once ({}): it read {} {} only ({} listings). To work on another model, open its folder (make=…/model=…) or use the command line, which reads the subject's model. The folder's models: {}.",
        thousands(total),
        models.len(),
        thousands(limit),
        chosen.make,
        chosen.model,
        thousands(chosen.rows),
        models
            .iter()
            .map(|m| format!("{} {} ({})", m.make, m.model, thousands(m.rows)))
            .collect::<Vec<_>>()
            .join(", ")
    );
    let wanted = [(chosen.make.clone(), chosen.model.clone())];
    (import_market(path, options, &wanted), Some(note))
}

fn run(job: Job) -> JobResult {
    match job {
        Job::Load { source, prefer } => {
            let options = ImportOptions::default();
            let (outcome, note) = match &source {
                MarketSource::Demo { rows } => (model::demo::import_demo(*rows, &options), None),
                MarketSource::File(path) => {
                    load_file(path, &options, (&prefer.0, &prefer.1), WHOLE_DATASET_LIMIT)
                }
            };
            JobResult::Loaded {
                source,
                outcome: outcome
                    .map(|(m, r)| (Arc::new(m), Box::new(r)))
                    .map_err(Arc::new),
                note,
            }
        }
        Job::Study {
            market,
            fit,
            fit_generation,
            settings,
            rules,
            level,
        } => {
            let backtest_settings = BacktestSettings {
                level,
                ..BacktestSettings::default()
            };
            JobResult::Studied(Box::new(MarketStudy {
                fit_generation,
                backtest: backtest(&market, &fit, &rules, &backtest_settings),
                ranking: rank_segments(&market, &settings, 40),
            }))
        }
        Job::Fit {
            market,
            make,
            model,
            settings,
            overrides,
            level,
        } => {
            let outcome = find_segment(&market, &make, &model)
                .and_then(|segment| fit_market(&market, segment, &settings, &overrides))
                .map(|fit| {
                    let gaps = price_gaps(&market, &fit, level);
                    (Arc::new(fit), Arc::new((level, gaps)))
                });
            JobResult::Fitted { outcome }
        }
    }
}
