//! lagfold's estimators against scipy and statsmodels on a committed, invented
//! fixture panel with ties and missing values. Reference values:
//! `tests/fixtures/reference_values.json`, made by
//! `tests/fixtures/make_reference.py` (scipy.stats.pearsonr and spearmanr,
//! statsmodels OLS with HAC covariance: Bartlett kernel, maxlags 2, no
//! small-sample correction), also on the complete assets alone (the dense
//! path) and on an invented AR(1) series for the HAC lag choice.

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
    assert!(read.panel.has_missing(), "the fixture has a missing forecast and a missing return");
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

#[test]
fn the_dense_path_matches_scipy_on_the_complete_assets() {
    // A panel without missing values goes through the dense sums, not the
    // masked ones: the fixture's assets with every value present, against
    // scipy.stats.pearsonr on the same assets (`make_reference.py`, "dense").
    let read = read_panel(Path::new("tests/fixtures/reference_panel.csv"), &ReadOptions::default()).unwrap();
    let p = &read.panel;
    let full: Vec<usize> = (0..p.assets())
        .filter(|&a| {
            (0..p.dates()).all(|d| p.forecasts()[d * p.assets() + a].is_finite())
                && (0..p.dates() - 1).all(|d| p.returns()[d * p.assets() + a].is_finite())
        })
        .collect();
    let r = reference();
    assert_eq!(full.len(), r["dense"]["assets"].as_array().unwrap().len());
    let pick = |v: &[f64], rows: usize| -> Vec<f64> {
        (0..rows).flat_map(|d| full.iter().map(move |&a| v[d * p.assets() + a])).collect()
    };
    let dense = lagfold::measure::Panel::new(
        full.len(),
        p.dates(),
        pick(p.forecasts(), p.dates()),
        pick(p.returns(), p.dates() - 1),
    )
    .unwrap();
    assert!(!dense.has_missing());
    let mut m = Measurement::new(3, false).with_min_assets(3);
    m.update(&dense);
    for k in 1..=3 {
        let want = floats(&r["dense"]["lagged"][k.to_string()]);
        let got = m.lagged.series(k);
        assert_eq!(got.len(), want.len());
        for (t, (a, b)) in got.iter().zip(&want).enumerate() {
            assert!((a - b).abs() < 1e-9, "dense lag {k} date {t}: {a} vs scipy {b}");
        }
    }
}

#[test]
fn the_hac_lag_choice_and_its_error_match_statsmodels() {
    // An invented AR(1) series (φ = 0.8, 240 values): the lag is Andrews'
    // (1991) plug-in, here 21, far above the floor 2n = 2, recomputed in numpy;
    // the error at that lag is statsmodels' HAC (Bartlett, no correction).
    let r = &reference()["hac_choice"];
    let x = floats(&r["series"]);
    let lags = hac::hac_lags(&x, 1);
    assert_eq!(lags as u64, r["lags"].as_u64().unwrap(), "lag chosen");
    assert!(lags > 2, "the plug-in term decides the lag here");
    let (mean, se) = hac::mean_and_se(&x, lags);
    assert!((mean - r["mean"].as_f64().unwrap()).abs() < 1e-12);
    assert!((se.unwrap() - r["se"].as_f64().unwrap()).abs() < 1e-9, "se {se:?} vs statsmodels {}", r["se"]);
}
