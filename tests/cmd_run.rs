//! `lagfold run`, `demo` and `presets` as a user runs them.

use assert_cmd::Command;
use serde_json::Value;
use std::path::Path;

fn lagfold() -> Command {
    Command::cargo_bin("lagfold").unwrap()
}

fn summary(dir: &Path) -> Value {
    serde_json::from_slice(&std::fs::read(dir.join("summary.json")).unwrap()).unwrap()
}

#[test]
fn demo_writes_the_summary_and_tables_and_says_it_plainly() {
    let tmp = tempfile::tempdir().unwrap();
    let out = tmp.path().join("demo");
    let a = lagfold().args(["demo", "--paths", "60", "--out"]).arg(&out).assert().success();
    let stdout = String::from_utf8(a.get_output().stdout.clone()).unwrap();
    for needle in [
        "True optimal horizon",
        "exact hit",
        "within ±1",
        "Recommendation",
        "not investment advice",
        "peak",
        "formula",
        "fitted",
    ] {
        assert!(stdout.contains(needle), "missing {needle:?} in\n{stdout}");
    }
    let s = summary(&out);
    let l = s["scenario"]["horizons"].as_u64().unwrap() as usize;
    for key in ["lagged_ic", "horizon_ic", "horizon_ic_simple", "horizon_ic_pooled", "near_best"] {
        assert!(s["truth"][key].is_array(), "truth.{key}");
    }
    assert_eq!(s["truth"]["lagged_ic"].as_array().unwrap().len(), l);
    let best = s["truth"]["best_horizon"].as_u64().unwrap() as usize;
    assert!((1..=l).contains(&best));
    assert!(s["truth"]["near_best"].as_array().unwrap().iter().any(|v| v.as_u64() == Some(best as u64)));
    assert_eq!(s["study"]["paths"], 60);
    assert_eq!(s["study"]["seed"], 20261202);
    for rule in ["peak", "formula", "fitted"] {
        let r = &s["study"]["rules"][rule];
        for key in ["hit_rate", "hit_rate_se", "near_hit_rate", "near_hit_rate_se", "regret_mean", "regret_rel_mean"] {
            assert!(r[key].is_number(), "study.rules.{rule}.{key}");
        }
        let counts: Vec<u64> = r["choice_counts"].as_array().unwrap().iter().map(|v| v.as_u64().unwrap()).collect();
        assert_eq!(counts.len(), l);
        assert_eq!(counts.iter().sum::<u64>(), 60);
        let hits = counts[best - 1] as f64 / 60.0;
        assert!((r["hit_rate"].as_f64().unwrap() - hits).abs() < 1e-12, "hit rate agrees with the counts");
    }
    let curves = std::fs::read_to_string(out.join("curves.csv")).unwrap();
    assert_eq!(curves.lines().count(), l + 1);
    assert!(curves.starts_with("n,true_lagged_ic,true_horizon_ic,"));
    let choices = std::fs::read_to_string(out.join("choices.csv")).unwrap();
    assert!(choices.starts_with("horizon,is_best,near_best,true_horizon_ic,peak_count,peak_share"));
    let leftovers: Vec<_> = std::fs::read_dir(&out)
        .unwrap()
        .filter_map(|e| e.ok())
        .filter(|e| e.file_name().to_string_lossy().contains(".tmp"))
        .collect();
    assert!(leftovers.is_empty(), "temporary files left: {leftovers:?}");
}

#[test]
fn run_takes_a_preset_name_and_the_common_overrides() {
    let tmp = tempfile::tempdir().unwrap();
    let a = lagfold()
        .args([
            "run",
            "weekly-hump",
            "--paths",
            "30",
            "--assets",
            "200",
            "--history",
            "80",
            "--horizons",
            "10",
            "--seed",
            "3",
            "--quiet",
            "--out",
        ])
        .arg(tmp.path())
        .assert()
        .success();
    assert!(a.get_output().stdout.is_empty(), "--quiet prints nothing");
    let s = summary(tmp.path());
    assert_eq!(s["scenario"]["assets"], 200);
    assert_eq!(s["scenario"]["history"], 80);
    assert_eq!(s["scenario"]["horizons"], 10);
    assert_eq!(s["study"]["seed"], 3);
    assert_eq!(s["study"]["paths"], 30);
    assert_eq!(s["scenario"]["decay"]["family"], "hump");
}

#[test]
fn portfolio_truth_net_rule_and_cost_sweep_are_written() {
    let tmp = tempfile::tempdir().unwrap();
    let a = lagfold()
        .args(["run", "monthly-steady", "--paths", "40", "--assets", "150", "--history", "60", "--horizons", "8"])
        .args(["--cost-bps", "0,10,40", "--out"])
        .arg(tmp.path())
        .assert()
        .success();
    let stdout = String::from_utf8(a.get_output().stdout.clone()).unwrap();
    for needle in ["Holding-period book", "True best holding", "Net optimum by cost", "cost_sweep.csv"] {
        assert!(stdout.contains(needle), "missing {needle:?} in\n{stdout}");
    }
    let s = summary(tmp.path());
    let best = s["truth"]["best_holding"].as_u64().unwrap() as usize;
    assert!((1..=8).contains(&best));
    for key in ["net_ir", "gross_ir", "turnover"] {
        assert_eq!(s["truth"][key].as_array().unwrap().len(), 8, "truth.{key}");
    }
    let r = &s["study"]["rules"]["net_ir"];
    for key in [
        "hit_rate",
        "hit_rate_se",
        "near_hit_rate",
        "near_hit_rate_se",
        "regret_mean",
        "regret_rel_mean",
        "regret_bps_year_mean",
    ] {
        assert!(r[key].is_number(), "study.rules.net_ir.{key}");
    }
    assert_eq!(r["choice_counts"].as_array().unwrap().iter().map(|v| v.as_u64().unwrap()).sum::<u64>(), 40);
    let sweep = std::fs::read_to_string(tmp.path().join("cost_sweep.csv")).unwrap();
    assert_eq!(sweep.lines().count(), 4);
    assert!(sweep.starts_with("cost_bps,true_best_holding,true_net_ir"));
    let holding = std::fs::read_to_string(tmp.path().join("holding.csv")).unwrap();
    assert_eq!(holding.lines().count(), 9);
    // A single --cost-bps value replaces the scenario's cost and adds no sweep.
    let one = tmp.path().join("one");
    lagfold()
        .args(["run", "monthly-steady", "--paths", "20", "--assets", "150", "--history", "60", "--horizons", "8"])
        .args(["--cost-bps", "25", "-q", "--out"])
        .arg(&one)
        .assert()
        .success();
    assert_eq!(summary(&one)["truth"]["portfolio"]["cost_bps"], 25.0);
    assert!(!one.join("cost_sweep.csv").exists());
}

#[test]
fn a_file_with_lists_runs_the_grid_and_writes_one_row_per_point_and_rule() {
    let tmp = tempfile::tempdir().unwrap();
    let file = tmp.path().join("grid.toml");
    std::fs::write(
        &file,
        "assets = [100, 200]\nhistory = 50\nhorizons = 6\npaths = 30\n[decay]\nfamily = \"exponential\"\n\
         ic1 = 0.05\nhalf_life = [2, 3, 5]\n[portfolio]\nreference_paths = 10\n",
    )
    .unwrap();
    let a = lagfold().arg("run").arg(&file).arg("--out").arg(tmp.path().join("o")).assert().success();
    let out = String::from_utf8(a.get_output().stdout.clone()).unwrap();
    assert!(out.contains("assets = 200, decay.half_life = 5"), "{out}");
    let csv = std::fs::read_to_string(tmp.path().join("o/sweep.csv")).unwrap();
    assert!(csv.starts_with("assets,decay.half_life,true_best_horizon,"));
    assert_eq!(csv.lines().count(), 1 + 6 * 4);
    let json: Value = serde_json::from_slice(&std::fs::read(tmp.path().join("o/sweep.json")).unwrap()).unwrap();
    assert_eq!(json["grid"].as_array().unwrap().len(), 6);
    assert!(json["grid"][0]["rules"]["peak"]["near_hit_rate"].is_number());
}

#[test]
fn outputs_are_byte_identical_on_one_and_two_threads() {
    let tmp = tempfile::tempdir().unwrap();
    for threads in ["1", "2"] {
        // The report's date comes from SOURCE_DATE_EPOCH, so a run across midnight cannot differ.
        lagfold()
            .env("SOURCE_DATE_EPOCH", "1796256000")
            .args([
                "run",
                "monthly-regimes",
                "--paths",
                "150",
                "--assets",
                "120",
                "--history",
                "60",
                "--horizons",
                "12",
                "-q",
                "--threads",
                threads,
                "--out",
            ])
            .arg(tmp.path().join(threads))
            .assert()
            .success();
    }
    let names = |d: &str| {
        let mut v: Vec<String> = std::fs::read_dir(tmp.path().join(d))
            .unwrap()
            .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
            .collect();
        v.sort();
        v
    };
    assert_eq!(names("1"), names("2"));
    assert!(names("1").len() >= 15, "tables, report and ten chart files: {:?}", names("1"));
    for file in names("1") {
        let one = std::fs::read(tmp.path().join("1").join(&file)).unwrap();
        let two = std::fs::read(tmp.path().join("2").join(&file)).unwrap();
        assert!(one == two, "{file} differs between 1 and 2 threads");
    }
    let report = std::fs::read_to_string(tmp.path().join("1/report.html")).unwrap();
    assert!(
        report.contains("Made 2026-12-03 by lagfold")
            && report.contains(
                "<code>lagfold run monthly-regimes --paths 150 --assets 120 --history 60 --horizons 12</code>"
            ),
        "the report records its date and the command line without --out, --threads and -q"
    );
}

#[test]
fn a_scenario_file_runs_and_replaces_earlier_outputs() {
    let tmp = tempfile::tempdir().unwrap();
    let file = tmp.path().join("my-signal.toml");
    std::fs::write(
        &file,
        "assets = 100\nhistory = 40\nhorizons = 6\npaths = 20\n[decay]\nfamily = \"step\"\nic = 0.05\nlength = 3\n",
    )
    .unwrap();
    let out = tmp.path().join("out");
    std::fs::create_dir_all(&out).unwrap();
    std::fs::write(out.join("summary.json"), "old").unwrap();
    std::fs::write(out.join("keep.txt"), "mine").unwrap();
    lagfold().arg("run").arg(&file).arg("--out").arg(&out).arg("-q").assert().success();
    assert_eq!(summary(&out)["scenario"]["name"], "my-signal");
    assert_eq!(std::fs::read_to_string(out.join("keep.txt")).unwrap(), "mine");
}

#[test]
fn presets_are_listed_and_print_as_valid_scenarios() {
    let a = lagfold().arg("presets").assert().success();
    let text = String::from_utf8(a.get_output().stdout.clone()).unwrap();
    for name in ["monthly-steady", "weekly-hump", "daily-slow-burn", "monthly-regimes", "weekly-reversal"] {
        assert!(text.contains(name), "{name} listed");
        let t = lagfold().args(["presets", name]).assert().success();
        let toml = String::from_utf8(t.get_output().stdout.clone()).unwrap();
        let s = lagfold::scenario::load(&toml, name, name, &Default::default()).unwrap();
        lagfold::simulate::Setup::new(s).unwrap();
    }
    assert!(text.contains("(demo)"));
}

#[test]
fn regret_in_bps_follows_the_target_volatility_and_rules_are_ranked_by_paired_differences() {
    let tmp = tempfile::tempdir().unwrap();
    let run = |vol: &str, dir: &str| {
        lagfold()
            .args(["run", "monthly-steady", "--paths", "60", "--assets", "150", "--history", "60", "--horizons", "8"])
            .args(["--target-vol", vol, "-q", "--out"])
            .arg(tmp.path().join(dir))
            .assert()
            .success();
        summary(&tmp.path().join(dir))
    };
    let (four, eight) = (run("0.04", "four"), run("0.08", "eight"));
    let (a, b) = (&four["study"]["rules"]["net_ir"], &eight["study"]["rules"]["net_ir"]);
    let f = |v: &Value, k: &str| v[k].as_f64().unwrap_or_else(|| panic!("{k}"));
    // bps a year = IR given up × target volatility × 10^4 (Grinold and Kahn, 2000): exact, so 1e-9.
    assert!((f(a, "regret_bps_year_mean") - f(a, "regret_mean") * 0.04 * 1e4).abs() < 1e-9);
    assert!((f(b, "regret_bps_year_mean") - 2.0 * f(a, "regret_bps_year_mean")).abs() < 1e-9);
    assert!((f(a, "regret_bps_year_ref_se") - f(a, "regret_ref_se") * 400.0).abs() < 1e-9);
    assert_eq!(four["scenario"]["portfolio"]["target_vol"], 0.04);
    // The reference error is that of a mean over 1,000 reference histories: positive, and small
    // beside the regret itself.
    assert!(f(a, "regret_ref_se") > 0.0 && f(a, "regret_ref_se") < f(a, "regret_mean"));
    // Paired differences: the mean of path-by-path differences is the difference of the means.
    let rules = &four["study"]["rules"];
    let diffs = four["study"]["ranking"]["differences"].as_array().unwrap();
    assert_eq!(diffs.len(), 3);
    for d in diffs {
        let (x, y) = (d["a"].as_str().unwrap(), d["b"].as_str().unwrap());
        let want = f(&rules[x], "regret_rel_mean") - f(&rules[y], "regret_rel_mean");
        assert!((f(d, "mean") - want).abs() < 1e-12, "{x} − {y}");
    }
    if let Some(best) = four["study"]["ranking"]["best"].as_str() {
        for d in diffs {
            let sign = if d["a"] == best {
                1.0
            } else if d["b"] == best {
                -1.0
            } else {
                continue;
            };
            assert!(sign * f(d, "mean") < -1.96 * f(d, "se"), "{best} is named best without a paired difference");
        }
    }
    // The true best holding is among those the reference cannot tell from it.
    let tied: Vec<u64> = four["truth"]["portfolio"]["linear"]["tied_with_best"]
        .as_array()
        .unwrap()
        .iter()
        .map(|v| v.as_u64().unwrap())
        .collect();
    assert!(tied.contains(&four["truth"]["best_holding"].as_u64().unwrap()));
}

#[test]
fn horizons_only_studies_the_horizon_rules_without_the_books() {
    // Catches: the horizon-only study drawing other histories than the full
    // one, writing the portfolio's outputs, or taking costs it cannot use.
    let tmp = tempfile::tempdir().unwrap();
    let (full, alone) = (tmp.path().join("full"), tmp.path().join("alone"));
    let args = ["run", "weekly-hump", "--assets", "150", "--paths", "80", "--seed", "5", "--no-charts", "-q"];
    lagfold().args(args).arg("--out").arg(&full).assert().success();
    let mut a = lagfold();
    a.args(["run", "weekly-hump", "--horizons-only", "--assets", "150", "--paths", "80", "--seed", "5"]);
    let out = a.arg("--out").arg(&alone).assert().success();
    let stdout = String::from_utf8(out.get_output().stdout.clone()).unwrap();
    assert!(stdout.contains("the horizon rules alone") && stdout.contains("not investment advice"), "{stdout}");
    let h: Value = serde_json::from_slice(&std::fs::read(alone.join("horizons.json")).unwrap()).unwrap();
    let s = summary(&full);
    for rule in ["peak", "formula", "fitted"] {
        assert_eq!(h["study"]["rules"][rule], s["study"]["rules"][rule], "{rule}");
    }
    assert_eq!(h["truth"]["best_horizon"], s["truth"]["best_horizon"]);
    for f in ["curves.csv", "choices.csv"] {
        assert_eq!(std::fs::read(alone.join(f)).unwrap(), std::fs::read(full.join(f)).unwrap(), "{f}");
    }
    assert!(!alone.join("holding.csv").exists() && !alone.join("report.html").exists());
    let refused = lagfold().args(["run", "weekly-hump", "--horizons-only", "--cost-bps", "5", "-q"]).assert().code(2);
    let stderr = String::from_utf8(refused.get_output().stderr.clone()).unwrap();
    assert!(stderr.contains("--horizons-only skips"), "{stderr}");
}
