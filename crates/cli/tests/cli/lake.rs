//! Parquet markets from the command line: `convert`, appraising a partitioned folder, sessions
//! that reproduce on it, and the proof with a real engine: DuckDB (from PyPI; `.ci/run`
//! installs it and sets COMPTRAIL_REQUIRE_ENGINE=1 so that its absence fails the run) writes a
//! partitioned market that comptrail reads, and reads back what `convert` wrote.

use std::path::{Path, PathBuf};
use std::process::Command;

use crate::common::{comptrail, repo, succeeded};

const SUBJECT: &str =
    "year=2022,make=Quellmark,model=Tessel,variant=Ambrel,miles=41000,condition=used";

fn scratch(name: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("comptrail-cli-{name}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    dir
}

fn json(args: &[&str]) -> serde_json::Value {
    serde_json::from_slice(&succeeded(args).stdout).expect("valid JSON")
}

fn indicated(market: &str) -> f64 {
    json(&["appraise", market, "--subject", SUBJECT, "--json"])["indicated_value"]
        .as_f64()
        .expect("a value")
}

/// The engine's script, or `None` (with the reason printed) when DuckDB is not installed and
/// the run does not require it.
fn engine() -> Option<String> {
    let script = repo("tests/interop/duckdb_lake.py");
    let ready = Command::new("python3")
        .args(["-c", "import duckdb"])
        .output()
        .is_ok_and(|o| o.status.success());
    if ready {
        return Some(script);
    }
    assert!(
        std::env::var_os("COMPTRAIL_REQUIRE_ENGINE").is_none(),
        "python3 with the duckdb package is required (pip install duckdb)"
    );
    eprintln!("skipped: python3 with duckdb is not installed here (.ci/run installs it)");
    None
}

fn run_engine(script: &str, args: &[&str]) -> String {
    let out = Command::new("python3")
        .arg(script)
        .args(args)
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "duckdb {args:?}: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    String::from_utf8(out.stdout).unwrap()
}

fn path(p: &Path) -> &str {
    p.to_str().unwrap()
}

#[test]
fn a_converted_market_values_the_subject_as_its_csv_and_its_sessions_reproduce() {
    let dir = scratch("convert");
    let csv = repo("assets/demo-market.csv");
    let lake = dir.join("lake");
    let out = succeeded(&["convert", &csv, "--out", path(&lake)]);
    let said = String::from_utf8_lossy(&out.stdout);
    assert!(
        said.contains("Wrote 2,000 listings of 3 models") && said.contains("3 Parquet files"),
        "{said}"
    );
    assert!(
        lake.join("make=Quellmark/model=Tessel/part-00000.parquet")
            .is_file()
    );
    // Converting into a folder that already holds a dataset is refused, nothing written.
    let again = comptrail(&["convert", &csv, "--out", path(&lake)]);
    assert!(!again.status.success());
    assert!(String::from_utf8_lossy(&again.stderr).contains("already holds Parquet files"));

    // The subject's value is the CSV's to the cent; only its model's folder was opened.
    assert_eq!(indicated(path(&lake)), indicated(&csv));
    let doc = json(&["appraise", path(&lake), "--subject", SUBJECT, "--json"]);
    assert_eq!(doc["import"]["parquet_files_read"], 1);
    assert_eq!(doc["import"]["parquet_files_skipped"], 2);
    assert_eq!(doc["import"]["rows_read"], 1_001);
    // A single file of the dataset is a market too.
    let one = lake.join("make=Quellmark/model=Tessel/part-00000.parquet");
    let fitted = json(&["fit", path(&one), "--json"]);
    assert_eq!(fitted["import"]["rows_used"], 1_001);
    // A model the dataset does not hold is named with what it does hold.
    let missing = comptrail(&[
        "appraise",
        path(&lake),
        "--subject",
        "year=2022,make=Quellmark,model=Nimbus,miles=41000",
    ]);
    let message = String::from_utf8_lossy(&missing.stderr);
    assert!(
        message.contains(
            "no partition holds Quellmark Nimbus; the dataset holds Orvane Kestrel (420)"
        ),
        "{message}"
    );

    // A session saved on the folder reproduces from it, and says so when its model's file
    // changes.
    let session = dir.join("s.ron");
    succeeded(&[
        "appraise",
        path(&lake),
        "--subject",
        SUBJECT,
        "--save-session",
        path(&session),
    ]);
    let check = comptrail(&["appraise", "--session", path(&session)]);
    assert!(
        check.status.success(),
        "{}",
        String::from_utf8_lossy(&check.stdout)
    );
    // A batch on the folder reads only its subjects' models, and its sessions find the folder
    // again as it was read (two models' files in the fingerprint).
    let subjects = dir.join("subjects.csv");
    std::fs::write(
        &subjects,
        "id,year,make,model,variant,miles\n\
         A,2022,Quellmark,Tessel,Ambrel,41000\n\
         B,2021,Orvane,Kestrel,Cressin,52000\n",
    )
    .unwrap();
    let sessions = dir.join("batch-sessions");
    let doc = json(&[
        "batch",
        path(&lake),
        "--subjects",
        path(&subjects),
        "--sessions",
        path(&sessions),
        "--json",
    ]);
    assert_eq!(doc["valued"], 2, "{doc}");
    for id in ["A", "B"] {
        let check = comptrail(&[
            "appraise",
            "--session",
            path(&sessions.join(format!("{id}.ron"))),
        ]);
        let said = String::from_utf8_lossy(&check.stdout);
        assert!(check.status.success(), "{id}: {said}");
        assert!(said.contains("unchanged at"), "{id}: {said}");
    }

    // Another model's file may change without making this session's market stale …
    let other = lake.join("make=Orvane/model=Kestrel/part-00000.parquet");
    let bytes = std::fs::read(&other).unwrap();
    std::fs::write(&other, &bytes).unwrap();
    let check = comptrail(&["appraise", "--session", path(&session)]);
    assert!(check.status.success());
    // … but a changed byte in its own is reported.
    let mut own = std::fs::read(&one).unwrap();
    own.push(b'\n');
    std::fs::write(&one, &own).unwrap();
    let check = comptrail(&["appraise", "--session", path(&session)]);
    let said = String::from_utf8_lossy(&check.stdout);
    assert!(said.contains("CHANGED"), "{said}");
    std::fs::remove_dir_all(&dir).ok();
}

#[test]
fn convert_prints_what_it_wrote_as_json() {
    // The same as JSON, with the documented keys.
    let dir = scratch("convert-json");
    let csv = repo("assets/demo-market.csv");
    let json_out = dir.join("lake");
    let doc = json(&["convert", &csv, "--out", path(&json_out), "--json"]);
    assert_eq!(doc["rows_written"], 2_000);
    assert_eq!(doc["partitions"], 3);
    assert_eq!(doc["import"]["rows_read"], 2_000);
    let files = doc["files"].as_array().unwrap();
    assert_eq!(files.len(), 3);
    let rows: u64 = files.iter().map(|f| f["rows"].as_u64().unwrap()).sum();
    assert_eq!(rows, 2_000);
    assert!(json_out.join(files[0]["file"].as_str().unwrap()).is_file());
    std::fs::remove_dir_all(&dir).ok();
}

#[test]
fn an_engine_reads_what_convert_wrote_and_comptrail_reads_what_the_engine_wrote() {
    let Some(script) = engine() else {
        return;
    };
    let dir = scratch("engine");
    let csv = repo("assets/demo-market.csv");

    // Written by the engine (its own types: BIGINT years and prices, DATE dates, VARCHAR
    // names; make and model only in the folder names).
    let theirs = dir.join("engine-lake");
    run_engine(&script, &["write", &csv, path(&theirs)]);
    assert_eq!(indicated(path(&theirs)), indicated(&csv));
    let whole = json(&[
        "fit",
        path(&theirs),
        "--make",
        "Orvane",
        "--model",
        "Kestrel",
        "--json",
    ]);
    assert_eq!(whole["import"]["rows_used"], 420);

    // A small export spelled three ways ("Orvane", "ORVANE", " kestrel  "): the engine makes a
    // partition of each spelling (and escapes the spaces as %20); all three are the model's,
    // and the value is the CSV's.
    let small = repo("tests/data/markets/small-export-16.csv");
    let messy = dir.join("messy-lake");
    run_engine(&script, &["write", &small, path(&messy)]);
    assert!(
        std::fs::read_dir(messy.join("Make=Orvane"))
            .unwrap()
            .any(|e| e.unwrap().file_name().to_string_lossy().contains("%20")),
        "the engine escapes spaces in folder names"
    );
    let kestrel = "year=2021,make=orvane,model=KESTREL,variant=Cressin,miles=50000";
    let value = |market: &str| {
        let doc = json(&["appraise", market, "--subject", kestrel, "--json"]);
        (
            doc["indicated_value"].as_f64(),
            doc["import"]["rows_used"].clone(),
        )
    };
    assert_eq!(value(path(&messy)), value(&small));
    let doc = json(&["appraise", path(&messy), "--subject", kestrel, "--json"]);
    assert_eq!(doc["import"]["parquet_files_read"], 3);

    // Written by comptrail, read by the engine: the same rows and sums as the engine's own
    // reading of the CSV.
    let ours = dir.join("our-lake");
    succeeded(&["convert", &csv, "--out", path(&ours)]);
    let from_csv: serde_json::Value =
        serde_json::from_str(&run_engine(&script, &["sums", &csv])).unwrap();
    let from_ours: serde_json::Value =
        serde_json::from_str(&run_engine(&script, &["sums", path(&ours)])).unwrap();
    assert_eq!(from_ours["rows"], 2_000);
    for key in [
        "rows",
        "sum_asking_price",
        "sum_miles",
        "sum_model_year",
        "by_model",
    ] {
        assert_eq!(from_ours[key], from_csv[key], "{key}");
    }

    // A feed with a bad year and a negative price, written by the engine: the rows are named
    // by partition file and row, and the rest are used.
    let text = std::fs::read_to_string(&csv).unwrap();
    let mut lines: Vec<String> = text.lines().map(str::to_owned).collect();
    // The Kestrel listings, the third and fifth of them spoiled.
    let kestrels: Vec<usize> = (1..lines.len())
        .filter(|&i| lines[i].contains(",Orvane,Kestrel,"))
        .collect();
    let spoil = |line: &str, column: usize, value: &str| {
        let mut fields: Vec<&str> = line.split(',').collect();
        fields[column] = value;
        fields.join(",")
    };
    lines[kestrels[2]] = spoil(&lines[kestrels[2]], 0, "20x4");
    lines[kestrels[4]] = spoil(&lines[kestrels[4]], 4, "-5");
    let spoiled = dir.join("spoiled.csv");
    std::fs::write(&spoiled, lines.join("\n") + "\n").unwrap();
    let bad = dir.join("bad-lake");
    run_engine(&script, &["write", path(&spoiled), path(&bad)]);
    let doc = json(&[
        "fit",
        path(&bad),
        "--make",
        "orvane",
        "--model",
        "KESTREL",
        "--json",
    ]);
    assert_eq!(doc["import"]["rows_used"], 418);
    let rejected = doc["import"]["rejected"].as_array().unwrap();
    let places: Vec<&str> = rejected
        .iter()
        .map(|r| r["place"].as_str().unwrap())
        .collect();
    // The engine keeps each partition's rows in file order.
    assert_eq!(
        places,
        [
            "make=Orvane/model=Kestrel/data_0.parquet, row 3",
            "make=Orvane/model=Kestrel/data_0.parquet, row 5"
        ]
    );
    assert_eq!(rejected[0]["reason"], "not_a_number");
    assert_eq!(rejected[1]["reason"], "price_out_of_range");
    std::fs::remove_dir_all(&dir).ok();
}
