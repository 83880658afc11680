//! Command-line arguments.

use std::path::PathBuf;

use clap::{Args, Parser, Subcommand, ValueEnum};

/// A value parser for a finite number from `min` to `max`, whose error names the range.
fn number_in(min: f64, max: f64) -> impl Fn(&str) -> Result<f64, String> + Clone + Send + Sync {
    move |text: &str| {
        let value = model::import::parse_number(text)
            .ok_or_else(|| format!("not a number; give one from {min} to {max}"))?;
        if (min..=max).contains(&value) {
            Ok(value)
        } else {
            Err(format!("must be from {min} to {max}"))
        }
    }
}

/// A value parser for an interval level, strictly between 0 and 1.
fn level(text: &str) -> Result<f64, String> {
    match model::import::parse_number(text) {
        Some(v) if v > 0.0 && v < 1.0 => Ok(v),
        _ => Err("must be strictly between 0 and 1, e.g. 0.8 for an 80 % band".into()),
    }
}

/// A value parser for a field separator: one ASCII character.
fn separator(text: &str) -> Result<char, String> {
    match text.chars().collect::<Vec<_>>().as_slice() {
        ['\\', 't'] => Ok('\t'),
        [c] if c.is_ascii() && !c.is_ascii_alphanumeric() && *c != '"' && *c != '\n' => Ok(*c),
        _ => Err("must be one ASCII punctuation character such as , ; | or \\t for a tab".into()),
    }
}

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
    /// Write an invented demo market as CSV, or with --parquet straight into a folder
    /// partitioned make=…/model=…/.
    DemoMarket {
        /// Listings to generate (1 to 10,000,000 as CSV; to 1,000,000,000 with --parquet).
        #[arg(long, allow_negative_numbers = true, default_value_t = 20_000, value_parser = clap::value_parser!(u64).range(1..=1_000_000_000))]
        rows: u64,
        /// Random seed; the same seed gives the same file.
        #[arg(long, default_value_t = 1)]
        seed: u64,
        /// Output file (with --parquet, the folder).
        #[arg(long)]
        out: PathBuf,
        /// Write partitioned Parquet, generated a million listings at a time on every core.
        #[arg(long)]
        parquet: bool,
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
        /// Oldest age in the table (1 to 60).
        #[arg(long, allow_negative_numbers = true, default_value_t = 10, value_parser = clap::value_parser!(u32).range(1..=60))]
        max_age: u32,
    },
    /// Every listing's asking price against the market for its attributes, ranked.
    Gaps {
        /// Market options.
        #[command(flatten)]
        market: MarketArgs,
        /// Interval level used to flag listings (strictly between 0 and 1).
        #[arg(long, allow_negative_numbers = true, default_value_t = 0.8, value_parser = level)]
        level: f64,
        /// Rows to print at each end (human output).
        #[arg(long, default_value_t = 15)]
        top: usize,
    },
    /// Write a market CSV as Parquet partitioned by make and model (make=…/model=…/ folders),
    /// reading it in blocks; prints the CSV's import report.
    Convert {
        /// The market CSV.
        file: PathBuf,
        /// The folder to write (created; it must not already hold Parquet files).
        #[arg(long)]
        out: PathBuf,
        /// Field separator (default: detected from the header).
        #[arg(long, allow_negative_numbers = true, value_parser = separator)]
        delimiter: Option<char>,
        /// Unit of a column named only "mileage" or "odometer".
        #[arg(long, value_enum, default_value = "miles")]
        odometer: OdometerArg,
        /// Print JSON instead of a summary.
        #[arg(long)]
        json: bool,
    },
    /// Appraise many subjects against one market: MARKET positional as for `appraise`, the
    /// subjects from --subjects (the market's column names plus `id`), one value row each.
    Batch(Box<BatchArgs>),
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
        /// The customer's copy of a trade-in: the market evidence, the value and the offer,
        /// without the dealer's margin lines (pack, target front gross, holding cost). A claim's
        /// report is always whole.
        #[arg(long)]
        customer: bool,
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
        /// Folds (2 to 20).
        #[arg(long, allow_negative_numbers = true, default_value_t = 5, value_parser = clap::value_parser!(u64).range(2..=20))]
        folds: u64,
        /// Interval level whose coverage is measured (strictly between 0 and 1).
        #[arg(long, allow_negative_numbers = true, default_value_t = 0.8, value_parser = level)]
        level: f64,
        /// Held-out listings valued by comparables per fold (0 to 10,000).
        #[arg(long, allow_negative_numbers = true, default_value_t = 100, value_parser = clap::value_parser!(u64).range(0..=10_000))]
        comparable_subjects: u64,
    },
}

/// How age enters the fit.
#[derive(Debug, Clone, Copy, ValueEnum)]
pub enum AgeFormArg {
    /// Chosen by the data: the form that falls with age and has the lowest BIC.
    Auto,
    /// ln price linear in age (constant geometric rate).
    Linear,
    /// ln price quadratic in age.
    Quadratic,
    /// One indicator per age.
    PerYear,
}

/// Whether each variant gets its own age slope.
#[derive(Debug, Clone, Copy, ValueEnum)]
pub enum VariantSlopesArg {
    /// When the F test against one premium at every age supports them (p < 0.05).
    Auto,
    /// Never: each variant's premium is the same percentage at every age.
    Never,
    /// Always, whatever the test says.
    Always,
}

/// Odometer unit of a column named only "mileage" or "odometer".
#[derive(Debug, Clone, Copy, ValueEnum)]
pub enum OdometerArg {
    /// Miles.
    Miles,
    /// Kilometers (converted to miles).
    Km,
}

/// `batch`: the market, the comparable rules and level of `appraise`, and the subjects.
#[derive(Debug, Clone, Args)]
pub struct BatchArgs {
    /// Market, fit and comparable options as for `appraise` (its --subject, worksheet, case and
    /// session options are refused: each subject comes from --subjects).
    #[command(flatten)]
    pub appraise: AppraiseArgs,
    /// The subjects, one per row: id, model year, make, model, miles (or km), optionally
    /// variant, condition, VIN and options, with the market's header spellings.
    #[arg(long, value_name = "SUBJECTS.csv")]
    pub subjects: PathBuf,
    /// Write the values here as CSV (standard output when omitted; --json prints JSON).
    #[arg(long, value_name = "VALUES.csv")]
    pub out: Option<PathBuf>,
    /// Also write one session file per appraised subject into this folder (<id>.ron).
    #[arg(long, value_name = "DIR")]
    pub sessions: Option<PathBuf>,
}

/// Options shared by every command that reads and fits a market.
#[derive(Debug, Clone, Args)]
pub struct MarketArgs {
    /// Market: a CSV file, a Parquet file, or a folder of Parquet files partitioned
    /// make=…/model=…/ (only the model needed is read); the built-in demo market when omitted.
    pub file: Option<PathBuf>,
    /// Make to fit (needed when the file holds several models).
    #[arg(long)]
    pub make: Option<String>,
    /// Model to fit.
    #[arg(long)]
    pub model: Option<String>,
    /// How age enters the fit.
    #[arg(long, value_enum, default_value = "auto")]
    pub age_form: AgeFormArg,
    /// Huber robust fit instead of least squares.
    #[arg(long)]
    pub robust: bool,
    /// Leave the market-conditions term out of the fit (it enters when every listing is dated
    /// and the dates span at least 90 days over 3 calendar months).
    #[arg(long)]
    pub no_market_time: bool,
    /// Leave the options out of the fit (by default each option stated on at least 20 fitted
    /// listings, and missing from as many, gets its own term).
    #[arg(long)]
    pub no_equipment: bool,
    /// Whether each variant's premium may fade (or grow) with age: its own age slope.
    #[arg(long, value_enum, default_value = "auto")]
    pub variant_slopes: VariantSlopesArg,
    /// Appraisal date, YYYY-MM-DD (default: the market's latest listing or sale date).
    #[arg(long)]
    pub as_of: Option<String>,
    /// Field separator (default: detected from the header).
    #[arg(long, allow_negative_numbers = true, value_parser = separator)]
    pub delimiter: Option<char>,
    /// Unit of a column named only "mileage" or "odometer".
    #[arg(long, value_enum, default_value = "miles")]
    pub odometer: OdometerArg,
    /// Unsold listings older than this many days are stale (0 keeps them all; at most 3,650).
    #[arg(long, allow_negative_numbers = true, default_value_t = 180, value_parser = clap::value_parser!(u32).range(0..=3_650))]
    pub stale_days: u32,
    /// Keep the listing on this file line (for Parquet, this dataset row) even if a cleaning
    /// rule excludes it (repeatable).
    #[arg(long = "keep", value_name = "LINE")]
    pub keep: Vec<u64>,
    /// Exclude the listing on this file line (for Parquet, this dataset row) from the fit and
    /// comparables (repeatable).
    #[arg(long = "drop", value_name = "LINE")]
    pub drop: Vec<u64>,
    /// Rows of the demo market when no file is given (1 to 10,000,000).
    #[arg(long, allow_negative_numbers = true, default_value_t = 20_000, value_parser = clap::value_parser!(u64).range(1..=10_000_000))]
    pub demo_rows: u64,
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
    /// The subject, e.g. "year=2021,make=Quellmark,model=Tessel,variant=Ambrel,miles=48000,condition=used".
    #[arg(long)]
    pub subject: Option<String>,
    /// Level of the intervals and the value band (strictly between 0 and 1).
    #[arg(long, allow_negative_numbers = true, default_value_t = 0.8, value_parser = level)]
    pub level: f64,
    /// Comparables to keep (1 to 100).
    #[arg(long, allow_negative_numbers = true, default_value_t = 8, value_parser = clap::value_parser!(u32).range(1..=100))]
    pub comps: u32,
    /// Model years either side of the subject's (0 to 30).
    #[arg(long, allow_negative_numbers = true, default_value_t = 1, value_parser = clap::value_parser!(i32).range(0..=30))]
    pub year_window: i32,
    /// Mileage rule.
    #[arg(long, value_enum, default_value = "pricing")]
    pub mileage_rule: MileageRuleArg,
    /// Listed at most this many days before the appraisal date (0: no limit; at most 3,650).
    #[arg(long, allow_negative_numbers = true, default_value_t = 90, value_parser = clap::value_parser!(u32).range(0..=3_650))]
    pub max_days: u32,
    /// At most this many miles away, 0 to 25,000 (needs a distance column).
    #[arg(long, allow_negative_numbers = true, value_parser = number_in(0.0, 25_000.0))]
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
    /// An adjustment of yours, "KIND[@LINE]:AMOUNT:BASIS": KIND is options, prior-damage,
    /// condition or other; AMOUNT in dollars, minus when the subject is worth less (e.g. -400
    /// for a torn seat); BASIS any text, colons included; @LINE applies it to the comparable on
    /// that market file line only, else to every comparable (repeatable). Example:
    /// "condition@260:-400:driver seat bolster torn".
    #[arg(long = "adjust", value_name = "SPEC")]
    pub adjust: Vec<String>,
    /// Also forecast the value after this many months (0 to 120).
    #[arg(long, allow_negative_numbers = true, value_parser = number_in(0.0, 120.0))]
    pub hold_months: Option<f64>,
    /// Miles added over the holding period, 0 to 500,000 (default: the market's typical pace).
    #[arg(long, allow_negative_numbers = true, value_parser = number_in(0.0, 500_000.0))]
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
    /// The claim number, saved with the session and printed on the report.
    #[arg(long, default_value = "")]
    pub claim_number: String,
    /// The date of loss, YYYY-MM-DD: a claim's appraisal date (sets --as-of; both given must
    /// agree).
    #[arg(long, value_name = "YYYY-MM-DD")]
    pub date_of_loss: Option<String>,
    /// The insured or owner of the vehicle.
    #[arg(long, default_value = "")]
    pub insured: String,
    /// What happened: collision, theft, flood, fire, hail, vandalism or other.
    #[arg(long, value_parser = clap::builder::ValueParser::new(|s: &str| s.parse::<model::case::LossType>()))]
    pub loss_type: Option<model::case::LossType>,
    /// The dealer's stock number for the traded vehicle.
    #[arg(long, default_value = "")]
    pub stock_number: String,
    /// The customer trading the vehicle in.
    #[arg(long, default_value = "")]
    pub customer: String,
}
