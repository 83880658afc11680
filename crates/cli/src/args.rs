//! Command-line arguments.

use std::path::PathBuf;

use clap::{Args, Parser, Subcommand, ValueEnum};

/// comptrail: value one vehicle from a market of listings, with the basis of every dollar.
#[derive(Debug, Parser)]
#[command(name = "comptrail", version, about, long_about = None)]
pub struct Cli {
    /// What to do; with none, appraises a demo subject on the built-in demo market.
    #[command(subcommand)]
    pub command: Option<Command>,
}

/// The commands.
#[derive(Debug, Subcommand)]
pub enum Command {
    /// Write an invented demo market as CSV.
    DemoMarket {
        /// Listings to generate (up to 10,000,000).
        #[arg(long, default_value_t = 20_000)]
        rows: usize,
        /// Random seed; the same seed gives the same file.
        #[arg(long, default_value_t = 1)]
        seed: u64,
        /// Output file.
        #[arg(long)]
        out: PathBuf,
    },
    /// Fit the market: terms, standard errors, R², annual depreciation, import and cleaning summary.
    Fit(MarketArgs),
    /// Appraise a subject: comparables, itemized adjustments, indicated value and band.
    Appraise(Box<AppraiseArgs>),
    /// Depreciation table by variant, variant premiums by age, and the ranking of models in the file.
    Depreciation {
        /// Market options.
        #[command(flatten)]
        market: MarketArgs,
        /// Oldest age in the table.
        #[arg(long, default_value_t = 10)]
        max_age: u32,
    },
    /// Every listing's asking price against the market for its attributes, ranked.
    Gaps {
        /// Market options.
        #[command(flatten)]
        market: MarketArgs,
        /// Interval level used to flag listings.
        #[arg(long, default_value_t = 0.8)]
        level: f64,
        /// Rows to print at each end (human output).
        #[arg(long, default_value_t = 15)]
        top: usize,
    },
    /// Print a saved session's report as PDF and/or self-contained HTML.
    Report {
        /// The session file.
        session: PathBuf,
        /// Write the PDF here.
        #[arg(long)]
        pdf: Option<PathBuf>,
        /// Write the HTML page here.
        #[arg(long)]
        html: Option<PathBuf>,
    },
    /// List the jurisdiction profiles with each rule and its citation.
    Profiles {
        /// A profile file of your own instead of the shipped one.
        #[arg(long)]
        profiles: Option<PathBuf>,
        /// Print JSON instead of a table.
        #[arg(long)]
        json: bool,
    },
    /// K-fold cross-validated accuracy of the model and of the comparables method.
    Backtest {
        /// Market options.
        #[command(flatten)]
        market: MarketArgs,
        /// Folds.
        #[arg(long, default_value_t = 5)]
        folds: usize,
        /// Interval level whose coverage is measured.
        #[arg(long, default_value_t = 0.8)]
        level: f64,
        /// Held-out listings valued by comparables per fold.
        #[arg(long, default_value_t = 100)]
        comparable_subjects: usize,
    },
}

/// How age enters the fit.
#[derive(Debug, Clone, Copy, ValueEnum)]
pub enum AgeFormArg {
    /// ln price linear in age (constant geometric rate).
    Linear,
    /// ln price quadratic in age.
    Quadratic,
    /// One indicator per age.
    PerYear,
}

/// Odometer unit of a column named only "mileage" or "odometer".
#[derive(Debug, Clone, Copy, ValueEnum)]
pub enum OdometerArg {
    /// Miles.
    Miles,
    /// Kilometres (converted to miles).
    Km,
}

/// Options shared by every command that reads and fits a market.
#[derive(Debug, Clone, Args)]
pub struct MarketArgs {
    /// Market CSV file; the built-in demo market when omitted.
    pub file: Option<PathBuf>,
    /// Make to fit (needed when the file holds several models).
    #[arg(long)]
    pub make: Option<String>,
    /// Model to fit.
    #[arg(long)]
    pub model: Option<String>,
    /// How age enters the fit.
    #[arg(long, value_enum, default_value = "quadratic")]
    pub age_form: AgeFormArg,
    /// Huber robust fit instead of least squares.
    #[arg(long)]
    pub robust: bool,
    /// Appraisal date, YYYY-MM-DD (default: the market's latest listing or sale date).
    #[arg(long)]
    pub as_of: Option<String>,
    /// Field separator (default: detected from the header).
    #[arg(long)]
    pub delimiter: Option<char>,
    /// Unit of a column named only "mileage" or "odometer".
    #[arg(long, value_enum, default_value = "miles")]
    pub odometer: OdometerArg,
    /// Unsold listings older than this many days are stale (0 keeps them all).
    #[arg(long, default_value_t = 180)]
    pub stale_days: u32,
    /// Keep the listing on this file line even if a cleaning rule excludes it (repeatable).
    #[arg(long = "keep", value_name = "LINE")]
    pub keep: Vec<u64>,
    /// Exclude the listing on this file line from the fit and comparables (repeatable).
    #[arg(long = "drop", value_name = "LINE")]
    pub drop: Vec<u64>,
    /// Rows of the demo market when no file is given.
    #[arg(long, default_value_t = 20_000)]
    pub demo_rows: usize,
    /// Print JSON instead of tables.
    #[arg(long)]
    pub json: bool,
}

/// Mileage rule for comparables.
#[derive(Debug, Clone, Copy, ValueEnum)]
pub enum MileageRuleArg {
    /// Within the greater of 15,000 mi or 30 % either way.
    Pricing,
    /// 11 NYCRR 216.7: at most 4,000 mi or 10 % more than the subject, whichever is greater.
    NewYork,
    /// No mileage limit.
    None,
}

/// Options of `appraise`.
#[derive(Debug, Clone, Args)]
pub struct AppraiseArgs {
    /// Market options.
    #[command(flatten)]
    pub market: MarketArgs,
    /// The subject, e.g. "year=2021,make=Quellmark,model=Tessel,variant=Plus,miles=48000,condition=used".
    #[arg(long)]
    pub subject: Option<String>,
    /// Level of the intervals and the value band.
    #[arg(long, default_value_t = 0.8)]
    pub level: f64,
    /// Comparables to keep.
    #[arg(long, default_value_t = 8)]
    pub comps: usize,
    /// Model years either side of the subject's.
    #[arg(long, default_value_t = 1)]
    pub year_window: i32,
    /// Mileage rule.
    #[arg(long, value_enum, default_value = "pricing")]
    pub mileage_rule: MileageRuleArg,
    /// Listed at most this many days before the appraisal date (0: no limit).
    #[arg(long, default_value_t = 90)]
    pub max_days: u32,
    /// At most this many miles away (needs a distance column).
    #[arg(long)]
    pub max_distance: Option<f64>,
    /// Only the subject's own variant.
    #[arg(long)]
    pub same_variant: bool,
    /// Use the listing on this file line as a comparable whatever the filters say (repeatable).
    #[arg(long = "include-comp", value_name = "LINE")]
    pub include_comp: Vec<u64>,
    /// Never use the listing on this file line as a comparable (repeatable).
    #[arg(long = "exclude-comp", value_name = "LINE")]
    pub exclude_comp: Vec<u64>,
    /// An adjustment of yours: "KIND:AMOUNT:BASIS[:LINE]", KIND options, prior-damage or other;
    /// without LINE it applies to every comparable (repeatable).
    #[arg(long = "adjust", value_name = "SPEC")]
    pub adjust: Vec<String>,
    /// Also forecast the value after this many months.
    #[arg(long)]
    pub hold_months: Option<f64>,
    /// Miles added over the holding period (default: the market's typical pace).
    #[arg(long)]
    pub hold_miles: Option<f64>,

    /// Re-run a saved session: recompute it from its evidence and say whether it reproduces
    /// the stored value (exit status 2 when it does not). Other market options are ignored.
    #[arg(long, value_name = "SESSION.ron")]
    pub session: Option<PathBuf>,
    /// With --session: also appraise again on the market file as it is now (at its saved
    /// path, or the FILE given) and show how the value moves.
    #[arg(long, requires = "session")]
    pub rerun: bool,
    /// Save the appraisal as a session file.
    #[arg(long, value_name = "OUT.ron")]
    pub save_session: Option<PathBuf>,
    /// Work a trade-in offer from this worksheet file (RON, see sample-sessions/README.md).
    #[arg(long, value_name = "TRADE_IN.ron", conflicts_with = "claim")]
    pub trade_in: Option<PathBuf>,
    /// Work a total-loss claim from this worksheet file (RON); its profile's filters apply to
    /// the comparable search.
    #[arg(long, value_name = "CLAIM.ron")]
    pub claim: Option<PathBuf>,
    /// A jurisdiction profile file of your own instead of the shipped one.
    #[arg(long, value_name = "PROFILES.ron")]
    pub profiles: Option<PathBuf>,
    /// The appraiser's name, saved with the session.
    #[arg(long, default_value = "")]
    pub appraiser: String,
    /// Notes saved with the session.
    #[arg(long, default_value = "")]
    pub notes: String,
    /// Keep every listing of the segment in the session (larger file; the fit can be redone).
    #[arg(long)]
    pub keep_segment: bool,
}
