//! Argument parsing never panics: any words on the command line either parse into settings the
//! engine runs with, or give an error. Fuzz-style: 10,000 generated command lines by default
//! (`COMPTRAIL_FUZZ_CASES` for more; the long run is in DEVELOPERS.md).

use std::sync::OnceLock;

use clap::Parser;
use proptest::prelude::*;

use cli::args::{Cli, Command};

/// The long names of the options of `command` (every subcommand's when `None`), read from the
/// argument definitions themselves so a new option is fuzzed the day it is added; with
/// `valued`, only those that take a value (`Some(true)`) or only flags (`Some(false)`).
fn options(command: Option<&str>, valued: Option<bool>) -> Vec<String> {
    let cli = <Cli as clap::CommandFactory>::command();
    let mut names: Vec<String> = cli
        .get_subcommands()
        .filter(|c| command.is_none_or(|name| c.get_name() == name))
        .flat_map(clap::Command::get_arguments)
        .filter(|a| valued.is_none_or(|v| a.get_action().takes_values() == v))
        .filter_map(|a| a.get_long().map(|l| format!("--{l}")))
        .collect();
    names.sort();
    names.dedup();
    names
}

/// Every command's name, and one that is none.
fn commands() -> Vec<String> {
    let cli = <Cli as clap::CommandFactory>::command();
    cli.get_subcommands()
        .map(|c| c.get_name().to_owned())
        .chain(std::iter::once("nonsense".to_owned()))
        .collect()
}

/// Every option of every command.
fn all_options() -> &'static [String] {
    static ALL: OnceLock<Vec<String>> = OnceLock::new();
    ALL.get_or_init(|| options(None, None))
}

/// Values that break parsing written without care.
const VALUES: [&str; 34] = [
    "nan",
    "NaN",
    "inf",
    "-inf",
    "1e308",
    "-1",
    "0",
    "-0",
    "0.5",
    "0.99999999",
    "1",
    "2147483647",
    "-2147483648",
    "18446744073709551616",
    "99999999999999999999999",
    "",
    " ",
    "é",
    "\t",
    "\\t",
    "linear",
    "per-year",
    "quadratic",
    "km",
    "new-york",
    "none",
    "2026-02-30",
    "2026-11-30",
    "9999-12-31",
    "options:600:tow package",
    "condition:-1e7:worn",
    "other:0.001:x",
    "year=2022,make=Quellmark,model=Tessel,variant=Ambrel,miles=41000,condition=used",
    "year=99999,make=,model=,miles=-5",
];

fn word() -> impl Strategy<Value = String> {
    prop_oneof![
        4 => prop::sample::select(all_options()),
        4 => prop::sample::select(VALUES.to_vec()).prop_map(str::to_owned),
        1 => "\\PC{0,12}",
        1 => "-{1,2}[a-z-]{0,10}",
    ]
}

/// `appraise` options that take a value, each followed by one, and flags: most such lines
/// parse, so their values reach the engine.
fn appraise_line() -> impl Strategy<Value = Vec<String>> {
    let valued = options(Some("appraise"), Some(true));
    let flags: Vec<Vec<String>> = options(Some("appraise"), Some(false))
        .into_iter()
        .filter(|f| f != "--help" && f != "--json")
        .map(|f| vec![f])
        .collect();
    let pair = (
        prop::sample::select(valued),
        prop_oneof![
            3 => prop::sample::select(VALUES.to_vec()).prop_map(str::to_owned),
            2 => (-5.0e5f64..5.0e5).prop_map(|v| format!("{v}")),
            2 => (0u32..4_000).prop_map(|v| v.to_string()),
        ],
    )
        .prop_map(|(o, v)| vec![o, v]);
    let flag = prop::sample::select(flags);
    prop::collection::vec(prop_oneof![4 => pair, 1 => flag], 0..6).prop_map(|parts| {
        ["comptrail", "appraise"]
            .into_iter()
            .map(str::to_owned)
            .chain(parts.into_iter().flatten())
            .collect()
    })
}

fn command_line() -> impl Strategy<Value = Vec<String>> {
    prop_oneof![1 => any_command_line(), 1 => appraise_line()]
}

fn any_command_line() -> impl Strategy<Value = Vec<String>> {
    (
        prop::sample::select(commands()),
        prop::collection::vec(word(), 0..10),
    )
        .prop_map(|(command, words)| {
            std::iter::once("comptrail".to_owned())
                .chain(std::iter::once(command))
                .chain(words)
                .collect()
        })
}

/// A small demo market (300 listings), imported once.
fn market() -> &'static model::market::Market {
    static MARKET: OnceLock<model::market::Market> = OnceLock::new();
    MARKET.get_or_init(|| {
        let options = model::import::ImportOptions {
            latest_model_year: 2027,
            ..model::import::ImportOptions::default()
        };
        model::import::import_csv_bytes("demo.csv", model::demo::demo_csv_bytes(300, 2), &options)
            .map(|(m, _)| m)
            .unwrap_or_default()
    })
}

/// What a parsed `appraise` runs: its fit settings, overrides, subject, request and forecast,
/// on the small market (no file is read).
fn run_appraise(args: &cli::args::AppraiseArgs) {
    let market = market();
    let Ok(settings) = cli::load::fit_settings(&args.market) else {
        return;
    };
    let subject = args.subject.as_deref().map_or_else(
        || model::subject::Subject::parse(cli::DEMO_SUBJECT),
        model::subject::Subject::parse,
    );
    let Ok(subject) = subject else { return };
    let Ok(request) = cli::appraisal_request(args, subject.clone()) else {
        return;
    };
    let Some(segment) = market.find_segment(&subject.make, &subject.model) else {
        return;
    };
    let overrides = cli::load::overrides(&args.market);
    let Ok(fit) = model::appraisal::fit_market(market, segment, &settings, &overrides) else {
        return;
    };
    if let Ok(appraisal) = model::appraisal::appraise(market, &fit, &request) {
        let _ = model::session::work_out(&model::session::Purpose::Value, &appraisal, &request);
    }
    if let Some(months) = args.hold_months {
        let _ =
            model::forecast::forecast(market, &fit, &subject, months, args.hold_miles, args.level);
    }
}

fn cases() -> u32 {
    std::env::var("COMPTRAIL_FUZZ_CASES")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(10_000)
}

proptest! {
    #![proptest_config(ProptestConfig {
        cases: cases(),
        failure_persistence: None,
        max_shrink_iters: 256,
        ..ProptestConfig::default()
    })]

    #[test]
    fn no_command_line_makes_parsing_or_the_engine_panic(words in command_line()) {
        match Cli::try_parse_from(&words) {
            Ok(cli) => {
                if let Some(Command::Appraise(args)) = cli.command {
                    run_appraise(&args);
                }
            }
            Err(e) => {
                // The one-line form of every error is printable.
                let line = cli::one_line(&e);
                prop_assert!(!line.contains('\n'), "{}", line);
            }
        }
    }
}

#[test]
fn the_generated_command_lines_reach_the_engine() {
    // The harness itself: a plain command line parses and runs.
    let words = [
        "comptrail",
        "appraise",
        "--year-window",
        "2",
        "--hold-months",
        "6",
    ];
    let Ok(Cli {
        command: Some(Command::Appraise(args)),
    }) = Cli::try_parse_from(words)
    else {
        panic!("a plain appraise parses");
    };
    assert_eq!(args.year_window, 2);
    run_appraise(&args);
}

#[test]
fn the_fuzzed_options_are_read_from_the_argument_definitions() {
    // Every command and option is fuzzed, including ones added later.
    for command in ["appraise", "fit", "report", "profiles", "demo-market"] {
        assert!(commands().iter().any(|c| c == command), "{command}");
    }
    let valued = options(Some("appraise"), Some(true));
    for option in ["--adjust", "--subject", "--as-of", "--claim", "--trade-in"] {
        assert!(valued.iter().any(|o| o == option), "{option}");
    }
    let flags = options(Some("appraise"), Some(false));
    assert!(flags.iter().any(|f| f == "--robust"), "{flags:?}");
    assert!(!flags.iter().any(|f| f == "--subject"));
    assert!(all_options().len() >= 40, "{}", all_options().len());
}
