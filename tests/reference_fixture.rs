//! lagfold's estimators against scipy and statsmodels on a committed, invented
//! fixture panel with ties and missing values. Reference values:
//! `tests/fixtures/reference_values.json`, made by
//! `tests/fixtures/make_reference.py` (scipy.stats.pearsonr and spearmanr,
//! statsmodels OLS with HAC covariance: Bartlett kernel, maxlags 2, no
//! small-sample correction).

use lagfold::measure::{Measurement, hac};
use lagfold::reader::{ReadOptions, read_panel};
use serde_json::Value;
use std::path::Path;

fn reference() -> Value {
    serde_json::from_str(&std::fs::read_to_string("tests/fixtures/reference_values.json").unwrap()).unwrap()
}

fn floats(v: &Value) -> Vec<f64> {
    v.as_array().unwrap().iter().map(|x| x.as_f64().unwrap()).collect()
}

#[test]
fn per_date_ics_means_and_newey_west_match_scipy_and_statsmodels() {
    let read = read_panel(Path::new("tests/fixtures/reference_panel.csv"), &ReadOptions::default()).unwrap();
    assert!(read.panel.has_missing, "the fixture has a missing forecast and a missing return");
    let mut m = Measurement::new(3, true).with_min_assets(3);
    m.update(&read.panel);
    let r = reference();
    for k in 1..=3 {
        for (what, series, key) in [
            ("Pearson", m.lagged.series(k), "lagged"),
            ("Spearman", m.rank_lagged.series(k), "rank"),
            ("horizon", m.horizon.series(k), "horizon"),
        ] {
            let want = floats(&r[key][k.to_string()]["per_date"]);
            assert_eq!(series.len(), want.len(), "{what} {k}");
            for (t, (a, b)) in series.iter().zip(&want).enumerate() {
                assert!((a - b).abs() < 1e-9, "{what} lag {k} date {t}: {a} vs scipy {b}");
            }
            let mean = series.iter().sum::<f64>() / series.len() as f64;
            assert!((mean - r[key][k.to_string()]["mean"].as_f64().unwrap()).abs() < 1e-9);
        }
    }
    let (mean, se) = hac::mean_and_se(m.lagged.series(1), 2);
    let nw = &r["newey_west"];
    assert!((mean - nw["mean"].as_f64().unwrap()).abs() < 1e-9);
    assert!((se.unwrap() - nw["se"].as_f64().unwrap()).abs() < 1e-6, "NW se {se:?} vs statsmodels {}", nw["se"]);
}
