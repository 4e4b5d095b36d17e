//! Apache Parquet input reads as the same panel as its CSV twin. The
//! fixtures are written by pandas and pyarrow (general-purpose libraries)
//! from `neutralise_panel.csv` by `tests/fixtures/make_parquet.py`: dates as
//! timestamps, a categorical sector, zstd and snappy compression, nulls and
//! NaNs.

use assert_cmd::Command;
use serde_json::Value;
use std::path::Path;

const FIXTURES: &str = "tests/fixtures";

/// `measure.json` of `file` with neutralisation, without the file name.
fn measured(file: &Path, out: &Path) -> Value {
    Command::cargo_bin("lagfold")
        .unwrap()
        .arg("measure")
        .arg(file)
        .args(["--horizons", "2", "--min-assets", "5", "--group-column", "sector", "--neutralize", "size,beta"])
        .args(["--no-study", "--no-charts", "-q", "--out"])
        .arg(out)
        .assert()
        .success();
    let mut v: Value = serde_json::from_slice(&std::fs::read(out.join("measure.json")).unwrap()).unwrap();
    v.as_object_mut().unwrap().remove("file");
    v
}

#[test]
fn a_parquet_file_measures_exactly_as_its_csv_twin() {
    let tmp = tempfile::tempdir().unwrap();
    let csv = measured(&Path::new(FIXTURES).join("neutralise_panel.csv"), &tmp.path().join("c"));
    let pq = measured(&Path::new(FIXTURES).join("neutralise_panel.parquet"), &tmp.path().join("p"));
    assert_eq!(csv, pq);
    assert!(csv["lagged_ic"]["mean"][0].is_f64());
}

#[test]
fn parquet_nulls_and_nans_are_missing_values() {
    // The CSV twin of neutralise_holes.parquet: the same cells left empty.
    let text = std::fs::read_to_string(Path::new(FIXTURES).join("neutralise_panel.csv")).unwrap();
    let mut lines = text.lines();
    let mut twin = format!("{}\n", lines.next().unwrap());
    for (i, line) in lines.enumerate() {
        let mut f: Vec<&str> = line.split(',').collect();
        if i % 17 == 0 {
            f[2] = "";
        }
        if i % 23 == 0 {
            f[3] = "NaN";
        }
        twin.push_str(&f.join(","));
        twin.push('\n');
    }
    let tmp = tempfile::tempdir().unwrap();
    let csv_file = tmp.path().join("holes.csv");
    std::fs::write(&csv_file, twin).unwrap();
    let csv = measured(&csv_file, &tmp.path().join("c"));
    let pq = measured(&Path::new(FIXTURES).join("neutralise_holes.parquet"), &tmp.path().join("p"));
    assert_eq!(csv, pq);
}

#[test]
fn parquet_errors_name_the_row_and_the_schema() {
    let tmp = tempfile::tempdir().unwrap();
    let run = |extra: &[&str]| {
        let a = Command::cargo_bin("lagfold")
            .unwrap()
            .arg("measure")
            .arg(Path::new(FIXTURES).join("neutralise_panel.parquet"))
            .args(extra)
            .args(["--no-study", "-q", "--out"])
            .arg(tmp.path().join("o"))
            .assert()
            .code(2);
        String::from_utf8(a.get_output().stderr.clone()).unwrap()
    };
    let err = run(&["--return-column", "sector"]);
    assert!(err.contains("neutralise_panel.parquet, row 1: `sector` must be a finite number"), "{err}");
    let err = run(&["--forecast-column", "score"]);
    assert!(err.contains("schema: no column `score`") && err.contains("the header has: date, asset"), "{err}");
}

#[test]
fn a_malformed_parquet_file_that_trips_the_reader_is_refused_not_a_panic() {
    // Found by fuzzing (`fuzz/`): the `parquet` crate panics on an assertion
    // in this file's metadata; the reader turns that into exit code 2.
    let tmp = tempfile::tempdir().unwrap();
    let a = Command::cargo_bin("lagfold")
        .unwrap()
        .args(["measure", "tests/fixtures/malformed.parquet", "--no-study", "-q", "--out"])
        .arg(tmp.path().join("o"))
        .assert()
        .code(2);
    let err = String::from_utf8_lossy(&a.get_output().stderr).to_string();
    assert!(err.contains("malformed.parquet") && err.contains("not a readable Parquet file"), "{err}");
    assert!(!err.contains("panicked"), "{err}");
}
