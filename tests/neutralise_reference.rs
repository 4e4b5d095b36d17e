//! Neutralisation against a general-purpose library: per-date residuals of
//! forecasts and returns on sector dummies plus size and beta equal
//! numpy.linalg.lstsq's (tests/fixtures/make_neutralised.py made the panel and
//! the values; numpy 2.4), and a forecast that is pure sector tilt has no IC
//! once neutralised.

use lagfold::stats::CHECK_SIGMAS;
mod common;

use lagfold::measure::Measurement;
use lagfold::measure::neutralise::neutralise;
use lagfold::reader::{ReadOptions, read_panel};
use serde_json::Value;
use std::path::Path;

#[test]
fn residuals_match_numpy_least_squares() {
    let opts = ReadOptions {
        group: Some("sector".into()),
        exposures: vec!["size".into(), "beta".into()],
        ..ReadOptions::default()
    };
    let mut read = read_panel(Path::new("tests/fixtures/neutralise_panel.csv"), &opts).unwrap();
    let cov = std::mem::take(&mut read.covariates);
    neutralise(&mut read.panel, &cov);
    let want: Value =
        serde_json::from_str(&std::fs::read_to_string("tests/fixtures/neutralise_values.json").unwrap()).unwrap();
    let p = &read.panel;
    let assets: Vec<String> = (0..16).map(|i| format!("N{i:02}")).collect();
    let mut compared = 0;
    for (t, date) in read.dates.iter().enumerate() {
        for (i, a) in assets.iter().enumerate() {
            let key = format!("{date} {a}");
            for (name, got) in
                [("forecast", Some(p.forecast_row(t)[i])), ("return", (t + 1 < p.dates()).then(|| p.return_row(t)[i]))]
            {
                let Some(got) = got else { continue };
                match want[name].get(&key).and_then(Value::as_f64) {
                    Some(w) => {
                        assert!((got - w).abs() < 1e-10, "{name} {key}: {got} vs numpy {w}");
                        compared += 1;
                    }
                    None => assert!(got.is_nan(), "{name} {key} has no reference value but got {got}"),
                }
            }
        }
    }
    assert!(compared > 200, "{compared}");
}

#[test]
fn a_pure_sector_tilt_has_no_ic_once_neutralised() {
    // Forecast = the sector's return tilt + noise; returns = the same tilt +
    // noise: before neutralisation the IC is large, after it the lag-1 IC's
    // mean is zero within four standard errors (EWC, 95 % interval / 1.96).
    let tmp = tempfile::tempdir().unwrap();
    let mut uniform = common::uniforms(0x1234_5678_9ABC_DEF1);
    let mut u = || uniform() - 0.5;
    let mut text = String::from("date,asset,forecast,return,sector\n");
    for m in 0..48u32 {
        let tilt: Vec<f64> = (0..5).map(|_| u()).collect();
        for a in 0..300 {
            let s = a % 5;
            text.push_str(&format!(
                "{}-{:02}-28,S{a},{},{},sec{s}\n",
                2001 + m / 12,
                m % 12 + 1,
                tilt[s] + 0.3 * u(),
                0.5 * tilt[s] + 0.3 * u()
            ));
        }
    }
    let csv = tmp.path().join("tilt.csv");
    std::fs::write(&csv, text).unwrap();
    let measure = |opts: ReadOptions| {
        let mut read = read_panel(&csv, &opts).unwrap();
        let cov = std::mem::take(&mut read.covariates);
        neutralise(&mut read.panel, &cov);
        let mut m = Measurement::new(1, false);
        m.update(&read.panel);
        let iv = m.lagged.intervals(false)[0].unwrap();
        (iv.mean, iv.se)
    };
    let (raw, _) = measure(ReadOptions::default());
    assert!(raw > 0.2, "raw IC {raw}");
    let (ic, se) = measure(ReadOptions { group: Some("sector".into()), ..ReadOptions::default() });
    assert!(ic.abs() < CHECK_SIGMAS * se, "neutralised IC {ic}, se {se}");
}

#[test]
fn the_command_line_neutralises_and_names_what_it_cannot_find() {
    let tmp = tempfile::tempdir().unwrap();
    let run = |extra: &[&str]| {
        assert_cmd::Command::cargo_bin("lagfold")
            .unwrap()
            .args(["measure", "tests/fixtures/neutralise_panel.csv", "--no-study", "--min-assets", "5", "-q", "--out"])
            .arg(tmp.path().join("o"))
            .args(extra)
            .output()
            .unwrap()
    };
    let ok = run(&["--group-column", "sector", "--neutralize", "size,beta"]);
    assert!(ok.status.success(), "{}", String::from_utf8_lossy(&ok.stderr));
    let m: Value = serde_json::from_slice(&std::fs::read(tmp.path().join("o/measure.json")).unwrap()).unwrap();
    assert_eq!(m["neutralised_on"], serde_json::json!(["sector", "size", "beta"]));
    let bad = run(&["--neutralize", "size,nosuch"]);
    let err = String::from_utf8_lossy(&bad.stderr);
    assert_eq!(bad.status.code(), Some(2));
    assert!(err.contains("no column `nosuch` (name it with --neutralize)"), "{err}");
}
