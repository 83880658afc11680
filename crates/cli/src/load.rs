//! Reading the market and building the fit from the shared options.

use anyhow::{Context, Result, anyhow, bail};
use chrono::NaiveDate;
use model::appraisal::{FitSettings, MarketFit, find_segment, fit_market, segment_list};
use model::clean::{Override, Overrides};
use model::hedonic::{AgeForm, VariantSlopes};
use model::import::{ImportOptions, ImportReport, OdometerUnit, import_market};
use model::market::{Market, Segment};

use crate::args::{AgeFormArg, MarketArgs, OdometerArg, VariantSlopesArg};

/// A loaded market with its import report.
pub struct Loaded {
    /// The market.
    pub market: Market,
    /// What the import did: rows read, rejected (with their lines), names merged.
    pub report: ImportReport,
}

/// The import options for a separator and odometer unit.
#[must_use]
pub fn import_options(delimiter: Option<char>, odometer: OdometerArg) -> ImportOptions {
    ImportOptions {
        delimiter: delimiter.map(|c| c as u8),
        odometer_unit: match odometer {
            OdometerArg::Miles => OdometerUnit::Miles,
            OdometerArg::Km => OdometerUnit::Kilometers,
        },
        ..ImportOptions::default()
    }
}

/// The makes and models a command needs from a partitioned Parquet market: `--make/--model`
/// when both are given, else `subject`'s, else none (every partition is read).
#[must_use]
pub fn wanted(args: &MarketArgs, subject: Option<(&str, &str)>) -> Vec<(String, String)> {
    match (args.make.as_deref(), args.model.as_deref(), subject) {
        (Some(make), Some(model), _) | (_, _, Some((make, model))) => {
            vec![(make.to_owned(), model.to_owned())]
        }
        _ => Vec::new(),
    }
}

/// Imports the market named in `args` (only the makes and models in `wanted` of a partitioned
/// Parquet market; everything when it is empty), or generates the demo market.
pub fn load_market(args: &MarketArgs, wanted: &[(String, String)]) -> Result<Loaded> {
    let mut options = import_options(args.delimiter, args.odometer);
    if let Some(as_of) = parse_as_of(args)? {
        use chrono::Datelike;
        options.latest_model_year = options.latest_model_year.max(as_of.year() + 1);
    }
    let (market, report) = if let Some(path) = &args.file {
        import_market(path, &options, wanted)?
    } else {
        model::demo::import_demo(args.demo_rows as usize, &options)?
    };
    Ok(Loaded { market, report })
}

fn parse_as_of(args: &MarketArgs) -> Result<Option<NaiveDate>> {
    args.as_of
        .as_deref()
        .map(|t| {
            model::import::parse_date(t)
                .ok_or_else(|| anyhow!("--as-of '{t}' is not a date (use YYYY-MM-DD)"))
        })
        .transpose()
}

/// The fit settings the options ask for.
pub fn fit_settings(args: &MarketArgs) -> Result<FitSettings> {
    let mut settings = FitSettings {
        age_form: match args.age_form {
            AgeFormArg::Auto => AgeForm::Auto,
            AgeFormArg::Linear => AgeForm::Linear,
            AgeFormArg::Quadratic => AgeForm::Quadratic,
            AgeFormArg::PerYear => AgeForm::PerYear,
        },
        robust: args.robust,
        as_of: parse_as_of(args)?,
        market_time: !args.no_market_time,
        equipment: !args.no_equipment,
        variant_slopes: match args.variant_slopes {
            VariantSlopesArg::Auto => VariantSlopes::Auto,
            VariantSlopesArg::Never => VariantSlopes::Never,
            VariantSlopesArg::Always => VariantSlopes::Always,
        },
        ..FitSettings::default()
    };
    settings.cleaning.stale_after_days = (args.stale_days > 0).then_some(args.stale_days);
    if args.file.is_none() && settings.as_of.is_none() {
        settings.as_of = Some(model::demo::demo_as_of());
    }
    Ok(settings)
}

/// The appraiser's overrides from `--keep` and `--drop`.
#[must_use]
pub fn overrides(args: &MarketArgs) -> Overrides {
    let mut o = Overrides::new();
    for &line in &args.keep {
        o.insert(
            line,
            Override::Include {
                note: "kept from the command line".into(),
            },
        );
    }
    for &line in &args.drop {
        o.insert(
            line,
            Override::Exclude {
                note: "dropped from the command line".into(),
            },
        );
    }
    o
}

/// The segment named by `--make/--model`, the subject's, or the file's only one.
pub fn choose_segment(
    market: &Market,
    args: &MarketArgs,
    subject: Option<(&str, &str)>,
) -> Result<Segment> {
    match (args.make.as_deref(), args.model.as_deref(), subject) {
        (Some(make), Some(model), _) | (_, _, Some((make, model))) => {
            Ok(find_segment(market, make, model)?)
        }
        (Some(_), None, _) | (None, Some(_), _) => bail!("give both --make and --model"),
        (None, None, None) => {
            let segments = market.segments();
            match segments.as_slice() {
                [(only, _)] => Ok(*only),
                _ => bail!(
                    "the file holds {} models; choose one with --make and --model: {}",
                    segments.len(),
                    segment_list(market)
                ),
            }
        }
    }
}

/// Cleans and fits the chosen segment.
pub fn fit(loaded: &Loaded, args: &MarketArgs, segment: Segment) -> Result<MarketFit> {
    let settings = fit_settings(args)?;
    fit_market(&loaded.market, segment, &settings, &overrides(args))
        .with_context(|| format!("fitting {}", loaded.market.segment_name(segment)))
}
