//! A seeded generator of an invented market, for the default run, the tests and the benchmarks.
//!
//! Every maker, model, variant, seller and place is fictional. The generator writes the truth it
//! draws from in [`DemoTruth`], so tests can check that the fit recovers it. The price model is
//! the one comptrail fits (quadratic age in ln price, linear mileage, variant and condition
//! shifts) plus the defects a real pull has: old-model-year units listed as new, relisted
//! duplicates, stale listings, high outliers and cheap units with branded titles or hidden damage.

use std::io::{self, Write};

use chrono::{Datelike, NaiveDate, TimeDelta};
use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;
use rand_distr::{Distribution, Normal};

/// The seed of the demo market the command line and the workbench open.
pub const DEMO_SEED: u64 = 1;

/// The name a demo market of `rows` is imported under (a session records it as its market).
#[must_use]
pub fn demo_name(rows: usize) -> String {
    format!(
        "demo market ({} invented listings, seed {DEMO_SEED})",
        crate::format::thousands(rows as f64)
    )
}

/// Imports a demo market of `rows` listings drawn with [`DEMO_SEED`], with `options` (its
/// latest model year allows the demo's next-year models): the one way the command line and
/// the workbench open it.
pub fn import_demo(
    rows: usize,
    options: &crate::import::ImportOptions,
) -> Result<(crate::market::Market, crate::import::ImportReport), crate::import::ImportError> {
    let options = crate::import::ImportOptions {
        latest_model_year: options.latest_model_year.max(demo_as_of().year() + 1),
        ..*options
    };
    crate::import::import_csv_bytes(&demo_name(rows), demo_csv_bytes(rows, DEMO_SEED), &options)
}

/// Whether `source` names a demo market (rather than a file).
#[must_use]
pub fn is_demo(source: &crate::market::MarketSource) -> bool {
    source.file_name.starts_with("demo market")
}

/// Whether the demo market generated again from its seed is the one `source` describes, byte
/// for byte.
#[must_use]
pub fn still_matches(source: &crate::market::MarketSource) -> bool {
    is_demo(source)
        && crate::market::content_hash(&demo_csv_bytes(source.rows_read, DEMO_SEED))
            == source.content_hash
}

/// The demo market's appraisal date.
#[must_use]
pub fn demo_as_of() -> NaiveDate {
    NaiveDate::from_ymd_opt(2026, 11, 30).unwrap_or_default()
}

/// The true parameters of one invented model.
#[derive(Debug, Clone, PartialEq)]
pub struct ModelTruth {
    /// Fictional maker.
    pub make: &'static str,
    /// Fictional model.
    pub model: &'static str,
    /// Share of the market's listings.
    pub share: f64,
    /// Price of the base variant, used, at age 0 with no miles.
    pub base_price: f64,
    /// Variants with their ln-price premium over the first.
    pub variants: [(&'static str, f64); 3],
    /// ln-price slope per year of age.
    pub age: f64,
    /// ln-price curvature per squared year of age.
    pub age_squared: f64,
}

/// The truth the demo market is drawn from.
#[derive(Debug, Clone, PartialEq)]
pub struct DemoTruth {
    /// The models.
    pub models: [ModelTruth; 3],
    /// ln-price change per 10,000 miles.
    pub miles_10k: f64,
    /// ln-price shift of a certified unit over a used one.
    pub certified: f64,
    /// ln-price shift of a new unit over a used one of age 0 with no miles.
    pub new: f64,
    /// SD of the ln-price noise.
    pub noise_sd: f64,
    /// Average miles driven a year.
    pub annual_miles: f64,
    /// ln-price shift per month a listing was dated before the appraisal date: the market's
    /// drift (positive: asking prices have been falling).
    pub per_month_before: f64,
    /// ln-price change per year of age of the top variant's premium (its third variant): the
    /// premium fades when negative.
    pub top_variant_fade: f64,
    /// ln-price effect of each option a listing states.
    pub option_premiums: [(&'static str, f64); 5],
}

/// The demo market's truth.
#[must_use]
pub fn demo_truth() -> DemoTruth {
    DemoTruth {
        models: [
            ModelTruth {
                make: "Quellmark",
                model: "Tessel",
                share: 0.5,
                base_price: 46_000.0,
                variants: [("Veskel", 0.0), ("Ambrel", 0.12), ("Tolvane", 0.28)],
                age: -0.14,
                age_squared: 0.006,
            },
            ModelTruth {
                make: "Quellmark",
                model: "Brindle",
                share: 0.3,
                base_price: 39_000.0,
                variants: [("Veskel", 0.0), ("Durnow", 0.09), ("Saltry", 0.22)],
                age: -0.13,
                age_squared: 0.005,
            },
            ModelTruth {
                make: "Orvane",
                model: "Kestrel",
                share: 0.2,
                base_price: 24_500.0,
                variants: [("Cressin", 0.0), ("Halvet", 0.10), ("Norrith", 0.19)],
                age: -0.12,
                age_squared: 0.004,
            },
        ],
        miles_10k: -0.02,
        certified: 0.04,
        new: 0.06,
        noise_sd: 0.06,
        annual_miles: 12_500.0,
        // The market fell about 0.3 % a month over the pull (invented).
        per_month_before: 0.003,
        // The top variant's premium fades by 1.2 points of ln price a year (invented).
        top_variant_fade: -0.012,
        // Invented: what each option adds to the asking price (cold weather: nothing).
        option_premiums: [
            ("sunroof", 0.015),
            ("tow package", 0.01),
            ("premium audio", 0.012),
            ("driver assist", 0.025),
            ("cold weather", 0.0),
        ],
    }
}

/// Header of the demo CSV.
pub const DEMO_HEADER: &str = "model_year,make,model,variant,asking_price,miles,condition,listed_on,sold_on,sale_price,vin,seller,location,distance_mi,title,options";

const PLACES: [&str; 10] = [
    "Ashwen Vale",
    "Marrow Bend",
    "Kettle Cross",
    "Linden Reach",
    "Osterby",
    "Pellham Weir",
    "Quarry Hill",
    "Renwick Flats",
    "Sallow Point",
    "Tamsin Wells",
];
const OPTIONS: [&str; 5] = [
    "sunroof",
    "tow package",
    "premium audio",
    "driver assist",
    "cold weather",
];
const VIN_CHARS: &[u8] = b"ABCDEFGHJKLMNPRSTUVWXYZ0123456789";

/// An invented VIN that checks (49 CFR 565.15) and can never be a real vehicle's: the
/// manufacturer code starts with 0, which the region table of ISO 3780 assigns to no region
/// (from memory of that table as public summaries give it: 1–5 North America, 6–7 Oceania,
/// 8–9 South America, letters Africa, Asia and Europe), followed by the first VIN letters of the
/// make and model; then five drawn characters, the check digit, the model-year character and
/// seven drawn characters. `drawn` holds at least twelve VIN characters.
fn demo_vin(make: &str, model: &str, model_year: i32, drawn: &[char]) -> String {
    let letter = |name: &str| {
        name.to_ascii_uppercase()
            .chars()
            .find(|c| crate::vin::transliterate(*c).is_some() && c.is_ascii_alphabetic())
            .unwrap_or('X')
    };
    let mut vin = String::with_capacity(17);
    vin.push('0');
    vin.push(letter(make));
    vin.push(letter(model));
    vin.extend(&drawn[..5]);
    vin.push('0'); // the check digit, put in below
    vin.push(crate::vin::year_code(model_year));
    vin.extend(&drawn[5..12]);
    crate::vin::with_check_digit(&vin).unwrap_or(vin)
}

/// Writes a demo market of `rows` listings drawn with `seed` as CSV.
pub fn write_demo_csv(rows: usize, seed: u64, out: &mut impl Write) -> io::Result<()> {
    let truth = demo_truth();
    let as_of = demo_as_of();
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    let noise = Normal::new(0.0, truth.noise_sd).map_err(io::Error::other)?;
    let spread = Normal::new(0.0, 0.35).map_err(io::Error::other)?;
    writeln!(out, "{DEMO_HEADER}")?;
    let mut last: Option<String> = None;
    for _ in 0..rows {
        // The same listing twice, as happens when a pull merges feeds.
        if let Some(prev) = &last {
            if rng.random::<f64>() < 0.003 {
                writeln!(out, "{prev}")?;
                continue;
            }
        }
        let line = demo_row(&truth, as_of, &mut rng, &noise, &spread);
        writeln!(out, "{line}")?;
        last = Some(line);
    }
    Ok(())
}

/// Generates a demo market as CSV bytes.
#[must_use]
pub fn demo_csv_bytes(rows: usize, seed: u64) -> Vec<u8> {
    let mut bytes = Vec::with_capacity(rows * 130 + 200);
    // Writing to a Vec cannot fail.
    let _ = write_demo_csv(rows, seed, &mut bytes);
    bytes
}

fn pick_model<'a>(truth: &'a DemoTruth, rng: &mut ChaCha8Rng) -> &'a ModelTruth {
    let mut u: f64 = rng.random();
    for m in &truth.models {
        if u < m.share {
            return m;
        }
        u -= m.share;
    }
    &truth.models[0]
}

/// The options a listing states (each with probability 0.3) and its asking price with their
/// premiums, rounded to $50.
fn options_and_price(
    truth: &DemoTruth,
    rng: &mut ChaCha8Rng,
    log_price: f64,
) -> (Vec<&'static str>, f64) {
    let options: Vec<&'static str> = OPTIONS
        .iter()
        .copied()
        .filter(|_| rng.random::<f64>() < 0.3)
        .collect();
    let equipped: f64 = truth
        .option_premiums
        .iter()
        .filter(|(name, _)| options.contains(name))
        .map(|(_, premium)| premium)
        .sum();
    (
        options,
        ((log_price + equipped).exp() / 50.0).round() * 50.0,
    )
}

/// A listing's date (most within four months, some stale ones up to 400 days old) and its ln
/// asking price in the market of that date: the market drifts, so a listing dated earlier was
/// priced in a higher market.
fn listing_date_and_log_price(
    truth: &DemoTruth,
    as_of: NaiveDate,
    rng: &mut ChaCha8Rng,
    log_price: f64,
) -> (NaiveDate, f64) {
    let days_listed = if rng.random::<f64>() < 0.08 {
        rng.random_range(150..400)
    } else {
        rng.random_range(0..120)
    };
    let listed_on = as_of - TimeDelta::days(days_listed);
    (
        listed_on,
        log_price
            + truth.per_month_before * crate::hedonic::market_time::months_before(as_of, listed_on),
    )
}

fn demo_row(
    truth: &DemoTruth,
    as_of: NaiveDate,
    rng: &mut ChaCha8Rng,
    noise: &Normal<f64>,
    spread: &Normal<f64>,
) -> String {
    let m = pick_model(truth, rng);
    let variant_index = match rng.random::<f64>() {
        u if u < 0.45 => 0,
        u if u < 0.8 => 1,
        _ => 2,
    };
    let (variant, premium) = m.variants[variant_index];
    let as_of_year = as_of.year();
    let class: f64 = rng.random();
    let (condition, model_year, miles, mut log_price) = if class < 0.12 {
        let old_stock = rng.random::<f64>() < 0.04;
        let model_year = if old_stock {
            as_of_year - rng.random_range(1..=2)
        } else if rng.random::<f64>() < 0.2 {
            as_of_year + 1
        } else {
            as_of_year
        };
        // Old stock is priced as new, with a small discount.
        let discount = if old_stock { -0.03 } else { 0.0 };
        (
            "new",
            model_year,
            f64::from(rng.random_range(3..60)),
            m.base_price.ln() + truth.new + discount,
        )
    } else {
        let age = draw_age(rng);
        let certified = age <= 6 && rng.random::<f64>() < 0.12;
        let miles = (truth.annual_miles * (f64::from(age) + 0.5) * spread.sample(rng).exp())
            .min(300_000.0)
            .round();
        let a = f64::from(age);
        let log_price = m.base_price.ln()
            + m.age * a
            + m.age_squared * a * a
            + truth.miles_10k * miles / 10_000.0
            + if certified { truth.certified } else { 0.0 };
        (
            if certified { "certified" } else { "used" },
            as_of_year - age,
            miles,
            log_price,
        )
    };
    log_price += premium + noise.sample(rng);
    if variant_index == 2 && condition != "new" {
        log_price += truth.top_variant_fade * f64::from(as_of_year - model_year);
    }
    let mut title = "clean";
    let defect: f64 = rng.random();
    if condition != "new" && defect < 0.006 {
        // A cheap unit: branded title or undisclosed damage.
        log_price += (0.55f64).ln();
        title = match rng.random_range(0..4) {
            0 | 1 => "salvage",
            2 => "rebuilt",
            _ => "",
        };
    } else if defect < 0.010 {
        log_price += (1.4f64).ln();
    }
    let (listed_on, log_price) = listing_date_and_log_price(truth, as_of, rng, log_price);
    let sale = if rng.random::<f64>() < 0.35 {
        let days_to_sell = (-35.0 * (1.0 - rng.random::<f64>()).ln()).round() as i64;
        let sold = listed_on + TimeDelta::days(days_to_sell);
        (sold <= as_of).then(|| (sold, rng.random_range(0.94..0.99)))
    } else {
        None
    };
    let drawn: Vec<char> = (0..14)
        .map(|_| VIN_CHARS[rng.random_range(0..VIN_CHARS.len())] as char)
        .collect();
    let vin = demo_vin(m.make, m.model, model_year, &drawn);
    let (options, price) = options_and_price(truth, rng, log_price);
    let (sold_on, sale_price) = sale.map_or_else(
        || (String::new(), String::new()),
        |(sold, ratio)| {
            (
                sold.to_string(),
                format!("{:.0}", (price * ratio / 50.0).round() * 50.0),
            )
        },
    );
    format!(
        "{model_year},{},{},{variant},{price:.0},{miles:.0},{condition},{listed_on},{sold_on},{sale_price},{vin},Seller {:03},{},{:.1},{title},{}",
        m.make,
        m.model,
        rng.random_range(1..=80),
        PLACES[rng.random_range(0..PLACES.len())],
        rng.random_range(0.0..250.0),
        options.join(";")
    )
}

/// Ages 0..=12, younger ones more common.
fn draw_age(rng: &mut ChaCha8Rng) -> i32 {
    loop {
        let age = rng.random_range(0..=12);
        if rng.random::<f64>() < 1.0 / (1.0 + 0.15 * f64::from(age)) {
            return age;
        }
    }
}

#[cfg(test)]
mod tests {
    #[test]
    fn every_demo_vin_checks_and_none_can_be_a_real_vehicle_s() {
        let bytes = super::demo_csv_bytes(500, 3);
        let text = String::from_utf8(bytes).unwrap_or_default();
        let mut seen = 0;
        for line in text.lines().skip(1) {
            let fields: Vec<&str> = line.split(',').collect();
            let (year, vin) = (fields[0].parse::<i32>().unwrap_or(0), fields[10]);
            assert!(
                vin.starts_with('0'),
                "{vin}: no region holds manufacturer codes from 0"
            );
            assert!(crate::vin::problems(vin, year).is_empty(), "{vin} ({year})");
            seen += 1;
        }
        assert!(seen >= 500);
    }
}
