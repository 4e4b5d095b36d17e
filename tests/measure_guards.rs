//! `measure` refuses to answer from no data, applies its guards, and never
//! lets a non-finite figure reach an output; calendar gaps, return timing,
//! the success ratio, extreme units and the memory budget.

use lagfold::stats::CHECK_SIGMAS;
mod common;

use assert_cmd::Command;
use serde_json::Value;
use std::path::{Path, PathBuf};

fn lagfold() -> Command {
    Command::cargo_bin("lagfold").unwrap()
}

/// A simulated panel (`lagfold panel`) of a preset or scenario file.
fn simulated(dir: &Path, scenario: &str, extra: &[&str]) -> PathBuf {
    let csv = dir.join(format!("p{}.csv", extra.join("").replace(['-', ' '], "")));
    lagfold().args(["panel", scenario, "-q", "--out"]).arg(&csv).args(extra).assert().success();
    csv
}

/// The data lines of a CSV (header first) as rows of fields.
fn rows(csv: &Path) -> Vec<Vec<String>> {
    std::fs::read_to_string(csv).unwrap().lines().map(|l| l.split(',').map(String::from).collect()).collect()
}

fn write(path: &Path, rows: &[Vec<String>]) {
    std::fs::write(path, rows.iter().map(|r| r.join(",")).collect::<Vec<_>>().join("\n") + "\n").unwrap();
}

/// Runs measure; returns (exit code, stdout, stderr, measure.json if written).
fn measure(csv: &Path, args: &[&str]) -> (i32, String, String, Option<Value>) {
    let out = csv.with_extension("out");
    let a = lagfold().arg("measure").arg(csv).args(["--out"]).arg(&out).args(args).output().unwrap();
    let json = std::fs::read(out.join("measure.json")).ok().map(|b| serde_json::from_slice(&b).unwrap());
    // Words joined by single spaces: the terminal wraps prose at 78 columns.
    let flat = |b: Vec<u8>| String::from_utf8(b).unwrap().split_whitespace().collect::<Vec<_>>().join(" ");
    let (so, se) = (flat(a.stdout), flat(a.stderr));
    assert!(!se.contains("panicked"), "{se}");
    (a.status.code().unwrap(), so, se, json)
}

/// No NaN, inf or "null" where a number must be, in any text output of the folder.
fn assert_all_finite(out: &Path) {
    for f in ["measure.json", "measure_lags.csv", "calibrated.toml", "report.html"] {
        if let Ok(text) = std::fs::read_to_string(out.join(f)) {
            let lower = text.to_lowercase();
            assert!(
                !lower.contains("nan") && !lower.contains("inf,") && !lower.contains("= inf"),
                "{f} holds a non-finite value"
            );
        }
    }
}

#[test]
fn no_data_exits_2_naming_why_and_the_fix() {
    let tmp = tempfile::tempdir().unwrap();
    let csv = simulated(tmp.path(), "monthly-steady", &["--assets", "50", "--history", "40", "--seed", "7"]);
    let base = rows(&csv);
    let variant = |name: &str, edit: &dyn Fn(&mut Vec<String>)| {
        let mut r = base.clone();
        r.iter_mut().skip(1).for_each(edit);
        let p = tmp.path().join(name);
        write(&p, &r);
        p
    };
    let no_returns = variant("noret.csv", &|r| r[3].clear());
    let (code, _, err, _) = measure(&no_returns, &["--no-study"]);
    assert_eq!(code, 2);
    assert!(err.contains("noret.csv") && err.contains("no returns") && err.contains("--return-column"), "{err}");
    let constant = variant("const.csv", &|r| r[2] = "1.5".into());
    let (code, _, err, _) = measure(&constant, &["--no-study"]);
    assert_eq!(code, 2);
    assert!(err.contains("does not vary") && err.contains("--forecast-column"), "{err}");
    let one: Vec<Vec<String>> =
        base.iter().enumerate().filter(|(i, r)| *i == 0 || r[1] == "A00001").map(|x| x.1.clone()).collect();
    let single = tmp.path().join("single.csv");
    write(&single, &one);
    let (code, _, err, _) = measure(&single, &["--no-study"]);
    assert_eq!(code, 2);
    assert!(err.contains("the most on one date is 1") && err.contains("--min-assets"), "{err}");
    // --min-assets above the breadth refuses a complete panel too, and below 3 is refused outright.
    let (code, _, err, _) = measure(&csv, &["--no-study", "--min-assets", "60"]);
    assert!(code == 2 && err.contains("at least 60 assets"), "{err}");
    for bad in ["2", "0"] {
        let (code, _, err, _) = measure(&csv, &["--no-study", "--min-assets", bad]);
        assert!(code == 2 && err.contains("--min-assets"), "{err}");
    }
    // A third of the fields empty: measured on what is there, every output finite.
    let holes = variant("holes.csv", &|r| {
        let h = r[1][1..].parse::<usize>().unwrap() + r[0].len();
        if h % 3 == 0 {
            r[2].clear();
        }
    });
    let (code, _, err, json) = measure(&holes, &["--paths", "20", "--min-assets", "10"]);
    assert_eq!(code, 0, "{err}");
    assert!(json.unwrap()["dates_used"].as_u64().unwrap() > 30);
    assert_all_finite(&holes.with_extension("out"));
}

#[test]
fn same_column_twice_bad_costs_and_options_that_do_not_apply_are_refused() {
    let tmp = tempfile::tempdir().unwrap();
    let csv = simulated(tmp.path(), "monthly-steady", &["--assets", "30", "--history", "40"]);
    let (code, _, err, _) = measure(&csv, &["--return-column", "forecast"]);
    assert!(code == 2 && err.contains("`forecast` is named as both the forecast and the return column"), "{err}");
    let (code, _, err, _) = measure(&csv, &["--forecast-column", "forecast,forecast"]);
    assert!(code == 2 && err.contains("`forecast` is named as both the forecast and the forecast column"), "{err}");
    let (code, _, err, _) = measure(&csv, &["--cost-bps", "5,-1"]);
    assert!(code == 2 && err.contains("must be in [0, 10000) basis points, got -1"), "{err}");
    for opt in [["--assets", "10"], ["--history", "10"]] {
        let (code, _, err, _) = measure(&csv, &[opt[0], opt[1], "--no-study"]);
        assert!(code == 2 && err.contains("which --no-study skips"), "{err}");
    }
    for opt in [["--paths", "50"], ["--threads", "2"]] {
        let (code, _, err, _) = measure(&csv, &[opt[0], opt[1], "--no-study"]);
        assert!(code == 2 && err.contains("--paths and --threads set the calibrated study"), "{err}");
    }
}

#[test]
fn assets_and_history_are_what_ifs_of_the_calibrated_study() {
    // "With twice the history, how often would I be right?": the study runs
    // at the new size, says so, and calibrated.toml keeps the panel's own.
    let tmp = tempfile::tempdir().unwrap();
    let csv = simulated(tmp.path(), "monthly-steady", &["--assets", "100", "--history", "60", "--seed", "4"]);
    let (code, out, err, json) = measure(&csv, &["--history", "120", "--paths", "20", "--bootstrap", "10"]);
    assert_eq!(code, 0, "{err}");
    let c = &json.unwrap()["calibrated_study"];
    assert_eq!((c["history"].as_u64(), c["assets"].as_u64()), (Some(120), Some(100)));
    assert!(out.contains("but with 100 assets × 120 dates instead of the panel's (what-if"), "{out}");
    let toml = std::fs::read_to_string(csv.with_extension("out").join("calibrated.toml")).unwrap();
    assert!(toml.contains("history = 60"), "{toml}");
}

#[test]
fn horizons_beyond_a_quarter_of_the_history_are_cut_with_a_warning() {
    let tmp = tempfile::tempdir().unwrap();
    let csv = simulated(tmp.path(), "monthly-steady", &["--assets", "100", "--history", "142"]);
    let (code, out, _, json) = measure(&csv, &["--horizons", "140", "--paths", "20"]);
    assert_eq!(code, 0);
    let m = json.unwrap();
    assert_eq!((m["horizons"].as_u64(), m["horizons_requested"].as_u64()), (Some(35), Some(140)));
    assert_eq!(m["lagged_ic"]["mean"].as_array().unwrap().len(), 35);
    assert!(out.contains("horizons cut from 140 to 35"), "{out}");
    assert_all_finite(&csv.with_extension("out"));
    // The calibrated scenario reads back and runs.
    lagfold()
        .arg("run")
        .arg(csv.with_extension("out").join("calibrated.toml"))
        .args(["--paths", "10", "-q", "--out"])
        .arg(tmp.path().join("r"))
        .assert()
        .success();
}

#[test]
fn missing_months_are_empty_periods_not_shifted_lags() {
    // Dropping every row of a month must measure exactly as keeping its rows
    // with empty values: lags count calendar months. One, two and six months.
    let tmp = tempfile::tempdir().unwrap();
    let csv = simulated(tmp.path(), "monthly-steady", &["--assets", "60", "--history", "60", "--seed", "2"]);
    let base = rows(&csv);
    let months: Vec<String> =
        base.iter().skip(1).map(|r| r[0].clone()).collect::<std::collections::BTreeSet<_>>().into_iter().collect();
    for drop in [vec![20], vec![20, 33], vec![5, 6, 7, 30, 41, 50]] {
        let gone: Vec<&String> = drop.iter().map(|i| &months[*i]).collect();
        let dropped: Vec<Vec<String>> = base.iter().filter(|r| !gone.contains(&&r[0])).cloned().collect();
        let blanked: Vec<Vec<String>> = base
            .iter()
            .map(|r| {
                if gone.contains(&&r[0]) {
                    vec![r[0].clone(), r[1].clone(), String::new(), String::new()]
                } else {
                    r.clone()
                }
            })
            .collect();
        let (a, b) = (tmp.path().join(format!("d{}.csv", drop.len())), tmp.path().join(format!("b{}.csv", drop.len())));
        write(&a, &dropped);
        write(&b, &blanked);
        let (code, out, err, ja) = measure(&a, &["--horizons", "6", "--no-study", "--bootstrap", "10"]);
        assert_eq!(code, 0, "{err}");
        let (_, _, _, jb) = measure(&b, &["--horizons", "6", "--no-study", "--bootstrap", "10"]);
        let (ja, jb) = (ja.unwrap(), jb.unwrap());
        assert_eq!(ja["lagged_ic"]["mean"], jb["lagged_ic"]["mean"]);
        assert_eq!(ja["horizon_ic"]["mean"], jb["horizon_ic"]["mean"]);
        assert_eq!(ja["dates"], 60);
        let listed: Vec<&str> = ja["missing_periods"].as_array().unwrap().iter().map(|v| v.as_str().unwrap()).collect();
        assert_eq!(listed, gone.iter().map(|s| s.as_str()).collect::<Vec<_>>());
        assert!(out.contains(&format!("{} monthly period(s) have no rows ({}", drop.len(), gone[0])), "{out}");
    }
}

/// A scenario whose lag-1 IC stands well above both its neighbours in time.
const FAST: &str = "name = \"fast\"\nassets = 1000\nhistory = 120\nhorizons = 6\nforecast_autocorrelation = 0.3\n\
                    ic_vol = 0.02\n[decay]\nfamily = \"exponential\"\nic1 = 0.08\nhalf_life = 1\n";

#[test]
fn a_return_timing_mistake_is_flagged_and_names_the_option() {
    let tmp = tempfile::tempdir().unwrap();
    let scenario = tmp.path().join("fast.toml");
    std::fs::write(&scenario, FAST).unwrap();
    let csv = simulated(tmp.path(), scenario.to_str().unwrap(), &["--seed", "3"]);
    // Forward returns, read as forward: no warning.
    let (_, out, _, json) = measure(&csv, &["--no-study", "--bootstrap", "10"]);
    assert!(!out.contains("backward-returns"), "{out}");
    assert_eq!(json.unwrap()["timing"]["looks_shifted"], false);
    // The same returns moved to the row of the date that ends their period
    // (backward returns), read as forward: the curve shifts by one lag.
    let mut r = rows(&csv);
    let dates: Vec<String> =
        r.iter().skip(1).map(|x| x[0].clone()).collect::<std::collections::BTreeSet<_>>().into_iter().collect();
    let next: std::collections::HashMap<&String, &String> = dates.iter().zip(dates.iter().skip(1)).collect();
    r = r
        .into_iter()
        .enumerate()
        .filter_map(|(i, mut x)| {
            if i == 0 {
                return Some(x);
            }
            let d = next.get(&x[0]).map(|d| (*d).clone())?;
            x[0] = d;
            x[2] = String::new(); // forecasts stay at their own date below
            Some(x)
        })
        .collect();
    // Rebuild: forecasts from the original rows, returns from the shifted ones.
    let orig = rows(&csv);
    let ret: std::collections::HashMap<(String, String), String> =
        r.iter().skip(1).map(|x| ((x[0].clone(), x[1].clone()), x[3].clone())).collect();
    let back: Vec<Vec<String>> = orig
        .iter()
        .enumerate()
        .map(|(i, x)| {
            if i == 0 {
                x.clone()
            } else {
                vec![
                    x[0].clone(),
                    x[1].clone(),
                    x[2].clone(),
                    ret.get(&(x[0].clone(), x[1].clone())).cloned().unwrap_or_default(),
                ]
            }
        })
        .collect();
    let bcsv = tmp.path().join("backward.csv");
    write(&bcsv, &back);
    let (_, out, _, json) = measure(&bcsv, &["--no-study", "--bootstrap", "10"]);
    assert!(out.contains("pass --backward-returns"), "{out}");
    assert_eq!(json.unwrap()["timing"]["looks_shifted"], true);
    // Read correctly: no warning, and the lag-1 IC is the original one.
    let (_, out, _, json) = measure(&bcsv, &["--no-study", "--bootstrap", "10", "--backward-returns"]);
    assert!(!out.contains("backward-returns"), "{out}");
    assert_eq!(json.unwrap()["timing"]["looks_shifted"], false);
    // Forward returns declared backward: flagged the other way.
    let (_, out, _, _) = measure(&csv, &["--no-study", "--bootstrap", "10", "--backward-returns"]);
    assert!(out.contains("drop --backward-returns"), "{out}");
}

#[test]
fn the_success_ratio_follows_sheppard_for_scores_and_grinold_kahn_for_two_values() {
    let tmp = tempfile::tempdir().unwrap();
    // Continuous: a strong signal (lag-1 IC 0.2) so the two relations differ
    // by 0.036, against a sampling error of the observed share of about
    // sqrt(0.25/59,500) = 0.002 (plus the IC's own error through arcsin).
    let scenario = tmp.path().join("strong.toml");
    std::fs::write(&scenario, FAST.replace("ic1 = 0.08", "ic1 = 0.2").replace("assets = 1000", "assets = 500"))
        .unwrap();
    let csv = simulated(tmp.path(), scenario.to_str().unwrap(), &["--seed", "5"]);
    let (_, _, _, json) = measure(&csv, &["--no-study", "--bootstrap", "10"]);
    let sr = &json.unwrap()["success_ratio"];
    assert_eq!(sr["relation"], "sheppard");
    assert!(sr["binary"].is_null());
    let (implied, observed) = (sr["implied"].as_f64().unwrap(), sr["observed"].as_f64().unwrap());
    assert!((implied - observed).abs() < 0.008, "Sheppard {implied} vs observed {observed}");
    // Two-valued forecasts of two-valued returns that agree 60% of the time:
    // Grinold and Kahn's (1+IC)/2 is the observed share.
    let mut uniform = common::uniforms(0x2545_F491_4F6C_DD1D);
    let mut u = || uniform();
    let mut text = String::from("date,asset,forecast,return\n");
    for m in 0..40u32 {
        for a in 0..200 {
            let f = if a % 2 == 0 { 1.0 } else { -1.0 };
            let r = if u() < 0.6 { f } else { -f };
            text.push_str(&format!("{}-{:02}-28,B{a},{f},{r}\n", 2001 + m / 12, m % 12 + 1));
        }
    }
    let bin = tmp.path().join("binary.csv");
    std::fs::write(&bin, text).unwrap();
    let (code, _, err, json) = measure(&bin, &["--no-study", "--bootstrap", "10"]);
    assert_eq!(code, 0, "{err}");
    let sr = &json.unwrap()["success_ratio"];
    assert_eq!(sr["relation"], "binary");
    let (implied, observed) = (sr["implied"].as_f64().unwrap(), sr["observed"].as_f64().unwrap());
    // Both estimate 0.6 from 7,800 pairs; with balanced ±1 forecasts they agree to rounding of the demeaning.
    assert!(
        (implied - observed).abs() < 0.01 && (observed - 0.6).abs() < CHECK_SIGMAS * (0.24f64 / 7800.0).sqrt(),
        "{implied} {observed}"
    );
}

#[test]
fn extreme_units_and_outliers_measure_as_ordinary_ones() {
    let tmp = tempfile::tempdir().unwrap();
    let csv = simulated(tmp.path(), "monthly-steady", &["--assets", "80", "--history", "40", "--seed", "9"]);
    let base = rows(&csv);
    let (_, _, _, plain) = measure(&csv, &["--no-study", "--bootstrap", "10"]);
    let scaled: Vec<Vec<String>> = base
        .iter()
        .enumerate()
        .map(|(i, r)| {
            if i == 0 || r[2].is_empty() {
                return r.clone();
            }
            let f: f64 = r[2].parse().unwrap();
            vec![r[0].clone(), r[1].clone(), format!("{:e}", f * 1e200), r[3].clone()]
        })
        .collect();
    let big = tmp.path().join("big.csv");
    write(&big, &scaled);
    let (code, _, _, json) = measure(&big, &["--no-study", "--bootstrap", "10"]);
    assert_eq!(code, 0);
    let (a, b) = (plain.unwrap(), json.unwrap());
    for k in 0..10 {
        let (x, y) = (a["lagged_ic"]["mean"][k].as_f64().unwrap(), b["lagged_ic"]["mean"][k].as_f64().unwrap());
        assert!((x - y).abs() < 1e-12, "lag {}: {x} vs {y}", k + 1);
    }
    // One return of 1e300 keeps its date.
    let mut outlier = base.clone();
    outlier[5][3] = "1e300".into();
    let o = tmp.path().join("outlier.csv");
    write(&o, &outlier);
    let (code, _, _, json) = measure(&o, &["--no-study", "--bootstrap", "10"]);
    assert_eq!(code, 0);
    assert_eq!(json.unwrap()["dates_used"], a["dates_used"]);
}

#[test]
fn a_panel_over_the_memory_budget_is_refused_before_it_is_built() {
    // 20,000 rows, each a new date and asset: 20,000 × 20,000 cells.
    let tmp = tempfile::tempdir().unwrap();
    let mut text = String::from("date,asset,forecast,return\n");
    for i in 0..20_000i64 {
        let (y, m, d) = (1900 + i / 365, 1 + (i % 365) / 31, 1 + (i % 365) % 28);
        text.push_str(&format!("{y}-{:02}-{:02},Z{i},0.5,0.1\n", m.min(12), d));
    }
    let csv = tmp.path().join("sparse.csv");
    std::fs::write(&csv, text).unwrap();
    let (code, _, err, _) = measure(&csv, &["--max-memory", "1G"]);
    assert_eq!(code, 2);
    assert!(
        err.contains("sparse.csv") && err.contains("over the budget of 1.0 GiB") && err.contains("--max-memory"),
        "{err}"
    );
    let (code, _, err, _) = measure(&csv, &["--max-memory", "lots"]);
    assert!(code == 2 && err.contains("--max-memory"), "{err}");
}
