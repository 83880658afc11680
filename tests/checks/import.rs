//! Importing market files: mapping, per-row rejections with their lines, clear errors.

use model::condition::Condition;
use model::import::{ImportError, ImportOptions, OdometerUnit, import_csv_bytes};

fn options() -> ImportOptions {
    ImportOptions {
        latest_model_year: 2027,
        ..ImportOptions::default()
    }
}

fn import(text: &str) -> Result<(model::market::Market, model::import::ImportReport), ImportError> {
    import_csv_bytes("test.csv", text.as_bytes().to_vec(), &options())
}

#[test]
fn maps_common_header_spellings_and_reports_the_map() {
    let (market, report) = import(
        "Year,Manufacturer,Model,Trim,Price,Odometer,Stock Type,Dealer,Colour\n\
         2021,Quellmark,Tessel,Ambrel,\"$31,400\",\"40,431\",Used,Seller 1,grey\n",
    )
    .unwrap();
    assert_eq!(market.len(), 1);
    assert_eq!(market.asking_price[0], 31_400.0);
    assert_eq!(market.miles[0], 40_431.0);
    assert_eq!(market.condition[0], Condition::Used);
    assert_eq!(report.column_map["Trim"], "variant");
    assert_eq!(report.column_map["Price"], "asking_price");
    assert_eq!(report.ignored_columns, vec!["Colour".to_owned()]);
}

#[test]
fn rejects_each_bad_row_with_its_line_and_reason() {
    let text = "model_year,make,model,asking_price,miles\n\
                2021,Quellmark,Tessel,30000,40000\n\
                2021,Quellmark,Tessel,-5,40000\n\
                2031,Quellmark,Tessel,30000,40000\n\
                2021,Quellmark,Tessel,30000,1200000\n\
                2021,Quellmark,Tessel,thirty,40000\n\
                2021,,Tessel,30000,40000\n\
                2020,Quellmark,Tessel,28000,52000\n";
    let (market, report) = import(text).unwrap();
    assert_eq!(market.len(), 2);
    assert_eq!(report.rows_read, 7);
    assert_eq!(report.rows_used, 2);
    let lines: Vec<(u64, &str)> = report
        .rejected
        .iter()
        .map(|r| (r.line, r.reason.code()))
        .collect();
    assert_eq!(
        lines,
        vec![
            (3, "price_out_of_range"),
            (4, "model_year_out_of_range"),
            (5, "mileage_out_of_range"),
            (6, "not_a_number"),
            (7, "missing_value"),
        ]
    );
    assert_eq!(report.rejected_by_reason["price_out_of_range"], 1);
    assert_eq!(market.line, vec![2, 8]);
}

#[test]
fn line_numbers_survive_quoted_newlines_and_blank_lines() {
    let text = "model_year,make,model,asking_price,miles,options\n\
                2021,Quellmark,Tessel,30000,40000,\"sunroof\nand tow package\"\n\
                \n\
                2021,Quellmark,Tessel,bad,40000,\n";
    let (market, report) = import(text).unwrap();
    assert_eq!(market.line, vec![2]);
    // The blank line is neither a row nor a rejection (it once came out as "missing value" at
    // the next record's line, which this check alone did not catch).
    let rejected: Vec<(u64, &str)> = report
        .rejected
        .iter()
        .map(|r| (r.line, r.reason.code()))
        .collect();
    assert_eq!(rejected, vec![(5, "not_a_number")], "{report:?}");
    assert_eq!((report.rows_read, report.blank_lines), (2, 1));
}

#[test]
fn optional_values_that_do_not_parse_are_dropped_and_reported() {
    let text = "model_year,make,model,asking_price,miles,listed_on,condition\n\
                2021,Quellmark,Tessel,30000,40000,yesterday,refurbished\n";
    let (market, report) = import(text).unwrap();
    assert_eq!(market.len(), 1);
    assert_eq!(market.listed_on[0], None);
    assert_eq!(
        market.condition[0],
        Condition::Used,
        "inferred from 40,000 mi"
    );
    assert_eq!(report.dropped_values.len(), 2);
    assert_eq!(report.dropped_values[0].line, 2);
    assert_eq!(report.condition_inferred, 1);
}

#[test]
fn kilometers_are_converted_and_said() {
    let text = "model_year,make,model,asking_price,km\n2021,Quellmark,Tessel,30000,160934.4\n";
    let (market, report) = import(text).unwrap();
    assert!((market.miles[0] - 100_000.0).abs() < 1e-6);
    assert_eq!(report.odometer_unit, "kilometers");
    // An ambiguous "mileage" column follows the option.
    let opts = ImportOptions {
        odometer_unit: OdometerUnit::Kilometers,
        ..options()
    };
    let (market, _) = import_csv_bytes(
        "t.csv",
        b"year,make,model,price,mileage\n2021,Q,T,1000,1609.344\n".to_vec(),
        &opts,
    )
    .unwrap();
    assert!((market.miles[0] - 1_000.0).abs() < 1e-9);
}

#[test]
fn semicolon_and_tab_files_are_detected() {
    for sep in [';', '\t', '|'] {
        let text = format!(
            "model_year{sep}make{sep}model{sep}asking_price{sep}miles\n2021{sep}Q{sep}T{sep}30000{sep}40000\n"
        );
        let (market, report) = import(&text).unwrap();
        assert_eq!(market.len(), 1, "separator {sep:?}");
        assert_ne!(report.delimiter, "comma");
    }
}

#[test]
fn a_forced_wrong_delimiter_is_named_in_the_error() {
    let opts = ImportOptions {
        delimiter: Some(b','),
        ..options()
    };
    let err = import_csv_bytes(
        "t.csv",
        b"model_year;make;model;asking_price;miles\n2021;Q;T;1;2\n".to_vec(),
        &opts,
    )
    .unwrap_err();
    let text = err.to_string();
    assert!(text.contains("missing required column"), "{text}");
    assert!(text.contains("semicolon"), "{text}");
}

#[test]
fn file_level_errors_are_clear() {
    assert!(matches!(import("  \n\n"), Err(ImportError::Empty { .. })));
    let err = import("make,model,asking_price\nQ,T,1\n").unwrap_err();
    assert!(err.to_string().contains("model_year"), "{err}");
    assert!(err.to_string().contains("miles (or kilometers)"), "{err}");
    let err = import("model_year,year,make,model,asking_price,miles\n").unwrap_err();
    assert!(matches!(err, ImportError::DuplicateColumn { .. }), "{err}");
    let err = import("model_year,make,model,asking_price,miles\n").unwrap_err();
    assert!(matches!(err, ImportError::NoUsableRows { .. }), "{err}");
    let err = import("model_year,make,model,asking_price,miles\n2021,Q,T,-1,5\n").unwrap_err();
    assert!(err.to_string().contains("line 2"), "{err}");
}

#[test]
fn non_utf8_bytes_are_located() {
    let mut bytes = b"model_year,make,model,asking_price,miles\n2021,Q,T,1000,5\n2021,Q,".to_vec();
    bytes.push(0xE9); // Latin-1 "é"
    bytes.extend_from_slice(b",1000,5\n");
    let err = import_csv_bytes("latin1.csv", bytes, &options()).unwrap_err();
    match err {
        ImportError::NotUtf8 { line, column, .. } => {
            // "2021,Q," is seven bytes, so the bad byte is the eighth of line 3.
            assert_eq!((line, column), (3, 8));
        }
        other => panic!("{other}"),
    }
}

#[test]
fn a_line_with_too_many_fields_is_an_error_not_a_panic() {
    let r = import(
        "model_year,make,model,asking_price,miles\n2021,Q,T,1000,5\n\"2020\",Q,\"T, with a comma\",900,6\n2021,Q,T,1000,5,extra,fields\n",
    );
    // Regression: the error used to carry the tokenizer's two-line hint and no line number.
    let e = r.unwrap_err();
    assert!(e.to_string().contains("test.csv"), "{e}");
    assert!(
        matches!(
            e,
            ImportError::RaggedLine {
                line: 4,
                fields: 7,
                header_fields: 5,
                ..
            }
        ),
        "{e}"
    );
    assert_eq!(e.to_string().lines().count(), 1, "{e}");
}

#[test]
fn a_large_file_parsed_on_several_threads_matches_its_lines() {
    // Large enough for the parallel path; plant bad rows on both sides of the split.
    let text = String::from_utf8(model::demo::demo_csv_bytes(80_000, 12)).unwrap();
    let mut lines: Vec<String> = text.lines().map(str::to_owned).collect();
    for bad in [10_000usize, 45_000, 79_000] {
        let mut fields: Vec<String> = lines[bad].split(',').map(str::to_owned).collect();
        fields[4] = "n/a".into();
        lines[bad] = fields.join(",");
    }
    let (market, report) = import(&(lines.join("\n") + "\n")).unwrap();
    let rejected: Vec<u64> = report.rejected.iter().map(|r| r.line).collect();
    assert_eq!(rejected, vec![10_001, 45_001, 79_001]);
    assert_eq!(market.len(), 80_000 - 3);
    assert!(market.line.windows(2).all(|w| w[0] < w[1]));
    for row in [0, 39_999, 40_000, 44_998, 60_000, market.len() - 1] {
        let listing = market.listing(row);
        let fields: Vec<&str> = lines[(listing.line - 1) as usize].split(',').collect();
        assert_eq!(listing.model_year.to_string(), fields[0]);
        assert_eq!(listing.make, fields[1]);
        assert_eq!(listing.model, fields[2]);
        assert_eq!(listing.variant.as_deref(), Some(fields[3]));
        assert_eq!(format!("{:.0}", listing.asking_price), fields[4]);
        assert_eq!(listing.vin.as_deref(), Some(fields[10]));
        assert_eq!(listing.seller.as_deref(), Some(fields[11]));
    }
}
