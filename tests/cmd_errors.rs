//! Bad input: a clear message naming the file, line or field and the allowed
//! range, exit code 2, never a panic.

use assert_cmd::Command;

/// Runs `lagfold run` on a scenario text; returns stderr after checking exit code 2.
fn fails(toml: &str, extra: &[&str]) -> String {
    let tmp = tempfile::tempdir().unwrap();
    let file = tmp.path().join("bad.toml");
    std::fs::write(&file, toml).unwrap();
    let a = Command::cargo_bin("lagfold")
        .unwrap()
        .arg("run")
        .arg(&file)
        .args(extra)
        .arg("--out")
        .arg(tmp.path().join("o"))
        .arg("-q")
        .assert()
        .code(2);
    let err = String::from_utf8(a.get_output().stderr.clone()).unwrap();
    assert!(!err.contains("panicked"), "{err}");
    assert!(!tmp.path().join("o").exists(), "nothing written on bad input");
    err
}

const DECAY: &str = "[decay]\nfamily = \"exponential\"\nic1 = 0.05\nhalf_life = 3\n";

fn has(err: &str, parts: &[&str]) {
    for p in parts {
        assert!(err.contains(p), "expected {p:?} in: {err}");
    }
}

#[test]
fn an_unknown_field_names_itself_and_its_line() {
    let err = fails(&format!("assets = 100\nasets = 100\n{DECAY}"), &[]);
    has(&err, &["bad.toml", "line 2", "asets"]);
}

#[test]
fn a_wrong_type_names_its_line() {
    let err = fails(&format!("history = \"long\"\n{DECAY}"), &[]);
    has(&err, &["bad.toml", "line 1", "history"]);
}

#[test]
fn an_ic_outside_minus_one_one_is_refused_with_its_line() {
    let err = fails("assets = 100\n[decay]\nfamily = \"exponential\"\nic1 = 1.5\nhalf_life = 3\n", &[]);
    has(&err, &["bad.toml, line 4", "`decay.ic1` must be inside (-1, 1), got 1.5"]);
    let err = fails("[decay]\nfamily = \"table\"\nvalues = [0.1, -1.0]\n", &[]);
    has(&err, &["line 3", "decay.values[1]"]);
}

#[test]
fn infeasible_variance_names_the_parts() {
    let err = fails(
        "forecast_autocorrelation = 0.95\nic_vol = 0.9\n[decay]\nfamily = \"step\"\nic = 0.2\nlength = 40\n",
        &[],
    );
    has(&err, &["infeasible variance", "ic_vol", "idiosyncratic variance"]);
}

#[test]
fn horizons_must_stay_below_history() {
    let err = fails(&format!("history = 30\nhorizons = 30\n{DECAY}"), &[]);
    has(&err, &["line 1", "`history` must be at least horizons + 4 = 34", "got 30"]);
    let err = fails(&format!("history = 40\n{DECAY}"), &["--horizons", "40"]);
    has(&err, &["history", "got 40"]);
}

#[test]
fn breadth_below_ten_is_refused() {
    let err = fails(&format!("assets = 5\n{DECAY}"), &[]);
    has(&err, &["line 1", "`assets` must be at least 10, got 5"]);
}

#[test]
fn student_t_needs_more_than_two_degrees_of_freedom() {
    let err = fails(&format!("{DECAY}[tails]\nfamily = \"student_t\"\ndof = 2\n"), &[]);
    has(&err, &["line 7", "`tails.dof` must be > 2", "got 2"]);
}

#[test]
fn other_ranges_are_checked_too() {
    for (line, key) in [
        ("periods_per_year = 0", "periods_per_year"),
        ("residual_vol = -0.1", "residual_vol"),
        ("forecast_autocorrelation = 1", "forecast_autocorrelation"),
        ("ic_vol = 1.2", "ic_vol"),
        ("ic_vol_persistence = -1", "ic_vol_persistence"),
        ("near_best_tolerance = 1.5", "near_best_tolerance"),
        ("paths = 0", "paths"),
        ("truncation = 0", "truncation"),
    ] {
        let err = fails(&format!("{line}\n{DECAY}"), &[]);
        has(&err, &["line 1", &format!("`{key}` must be")]);
    }
    let err = fails("[decay]\nfamily = \"exponential\"\nic1 = 0.05\nhalf_life = -3\n", &[]);
    has(&err, &["line 4", "`decay.half_life` must be > 0, got -3"]);
    let err = fails("[decay]\nfamily = \"wiggly\"\n", &[]);
    has(&err, &["line", "wiggly"]);
    let err = fails("[decay]\nfamily = \"table\"\nvalues = [-0.05, -0.03]\n", &[]);
    has(&err, &["not positive at any horizon"]);
}

#[test]
fn portfolio_settings_are_checked() {
    let err = fails(&format!("{DECAY}[portfolio]\ncost_bps = -5\n"), &[]);
    has(&err, &["line 6", "`portfolio.cost_bps` must be in [0, 10000) basis points, got -5"]);
    let err = fails(DECAY, &["--cost-bps", "0,-2"]);
    has(&err, &["`--cost-bps value 2` must be in [0, 10000) basis points, got -2"]);
    let err = fails(&format!("assets = 40\n{DECAY}[portfolio]\nquantiles = 10\n"), &[]);
    has(
        &err,
        &[
            "line 7",
            "`portfolio.quantiles` must be between 2 and 8 (each leg needs at least 5 of the 40 assets), got 10",
        ],
    );
    let err = fails(&format!("{DECAY}[portfolio]\nreference_paths = 3\n"), &[]);
    has(
        &err,
        &[
            "`portfolio.reference_paths` must be from 10 to 100000 (each is one more simulated history with its books), got 3",
        ],
    );
    let err = fails(&format!("{DECAY}[portfolio]\nslippage = 3\n"), &[]);
    has(&err, &["line 6", "slippage"]);
}

#[test]
fn sizes_that_would_exhaust_memory_are_refused() {
    let err = fails(&format!("assets = 1000000\nhistory = 1000\n{DECAY}"), &[]);
    has(&err, &["line 1", "`assets` must be such that assets × history ≤ 50000000"]);
    let err = fails(DECAY, &["--paths", "200000000"]);
    has(&err, &["`paths` must be at most 100000000"]);
}

#[test]
fn a_missing_file_and_bad_options_exit_with_two() {
    let a = Command::cargo_bin("lagfold").unwrap().args(["run", "no-such-file.toml"]).assert().code(2);
    assert!(String::from_utf8_lossy(&a.get_output().stderr).contains("cannot read no-such-file.toml"));
    Command::cargo_bin("lagfold").unwrap().args(["demo", "--paths", "-3"]).assert().code(2);
    Command::cargo_bin("lagfold").unwrap().args(["demo", "--threads", "0"]).assert().code(2);
    let a = Command::cargo_bin("lagfold").unwrap().args(["presets", "nope"]).assert().code(2);
    assert!(String::from_utf8_lossy(&a.get_output().stderr).contains("monthly-steady"));
}

#[test]
fn stress_with_no_alternative_curve_is_refused() {
    let tmp = tempfile::tempdir().unwrap();
    let file = tmp.path().join("alone.toml");
    std::fs::write(
        &file,
        format!("assets = 100\nhistory = 30\nhorizons = 4\n{DECAY}[stress]\nreplace_defaults = true\n"),
    )
    .unwrap();
    let a = Command::cargo_bin("lagfold")
        .unwrap()
        .arg("stress")
        .arg(&file)
        .arg("--out")
        .arg(tmp.path().join("o"))
        .assert()
        .code(2);
    let err = String::from_utf8(a.get_output().stderr.clone()).unwrap();
    has(&err, &["alone.toml", "replace_defaults", "[[stress.alternatives]]"]);
    assert!(!tmp.path().join("o").exists());
}

#[test]
fn command_line_values_are_blamed_on_their_option_not_a_line() {
    let text = format!("assets = 100\nhistory = 60\nhorizons = 6\n{DECAY}");
    let err = fails(&text, &["--horizons", "0"]);
    has(&err, &["option --horizons: `horizons` must be at least 1, got 0"]);
    assert!(!err.contains("line"), "{err}");
    let err = fails(&text, &["--history", "5"]);
    has(&err, &["option --history: `history` must be at least horizons + 4 = 10"]);
    // A rule on a file value that an option moved names both.
    let err = fails(&text, &["--horizons", "100"]);
    has(&err, &["bad.toml (with --horizons 100 from the command line), line 2", "horizons + 4 = 104"]);
    // No wrapped arithmetic at the largest value.
    let err = fails(&text, &["--horizons", "18446744073709551615"]);
    has(&err, &["horizons + 4 = 18446744073709551615"]);
}

#[test]
fn a_preset_typo_suggests_the_preset_and_lists_them_all() {
    for (cmd, name) in [("run", "monthly-stedy"), ("presets", "monthly-stedy"), ("stress", "Monthly-Steady")] {
        let a = Command::cargo_bin("lagfold")
            .unwrap()
            .args([cmd, name, "-q"].iter().filter(|a| cmd != "presets" || **a != "-q"))
            .assert()
            .code(2);
        let err = String::from_utf8(a.get_output().stderr.clone()).unwrap();
        has(&err, &["did you mean `monthly-steady`?", "weekly-reversal"]);
    }
}

#[test]
fn negative_numbers_are_values_refused_by_their_option() {
    let a = Command::cargo_bin("lagfold")
        .unwrap()
        .args(["run", "monthly-steady", "--cost-bps", "-3", "-q"])
        .assert()
        .code(2);
    let err = String::from_utf8(a.get_output().stderr.clone()).unwrap();
    has(&err, &["must be in [0, 10000) basis points, got -3"]);
    let a =
        Command::cargo_bin("lagfold").unwrap().args(["run", "monthly-steady", "--paths", "-3", "-q"]).assert().code(2);
    let err = String::from_utf8(a.get_output().stderr.clone()).unwrap();
    has(&err, &["invalid value '-3' for '--paths"]);
    assert!(!err.contains("tip"), "{err}");
}

#[test]
fn counts_and_seeds_that_are_not_whole_numbers_are_refused_in_plain_words() {
    for (opt, value, words) in [
        ("--paths", "abc", "`abc` is not a number; use a positive whole number"),
        ("--assets", "1.5", "`1.5` is not a whole number"),
        ("--history", "-3", "`-3` is negative"),
        ("--seed", "-1", "a seed is a whole number from 0 to 18446744073709551615"),
    ] {
        let a =
            Command::cargo_bin("lagfold").unwrap().args(["run", "monthly-steady", opt, value, "-q"]).assert().code(2);
        let err = String::from_utf8(a.get_output().stderr.clone()).unwrap();
        has(&err, &[words, opt]);
        assert!(!err.contains("invalid digit"), "{err}");
    }
    // The largest seed is valid.
    let tmp = tempfile::tempdir().unwrap();
    Command::cargo_bin("lagfold")
        .unwrap()
        .args([
            "panel",
            "monthly-steady",
            "--assets",
            "30",
            "--history",
            "30",
            "--seed",
            "18446744073709551615",
            "-q",
            "--out",
        ])
        .arg(tmp.path().join("p.csv"))
        .assert()
        .success();
}

#[test]
fn implausible_values_warn_before_the_work_and_the_run_goes_on() {
    // ic1 = 0.45 (likely 0.045), residual_vol = 6 (likely 0.06): both allowed,
    // both implausible; `panel` is the quickest command that reads a scenario.
    let tmp = tempfile::tempdir().unwrap();
    let file = tmp.path().join("typo.toml");
    std::fs::write(&file, "residual_vol = 6\n[decay]\nfamily = \"exponential\"\nic1 = 0.45\nhalf_life = 4\n").unwrap();
    let a = Command::cargo_bin("lagfold")
        .unwrap()
        .arg("panel")
        .arg(&file)
        .args(["--assets", "40", "--history", "30", "--out", "-"])
        .assert()
        .success();
    let err = String::from_utf8_lossy(&a.get_output().stderr).to_string();
    has(
        &err,
        &[
            "warning: ",
            "typo.toml",
            "IC of 0.450 at lag 1",
            "0.045 written as 0.45",
            "residual_vol 6 is 600.0 % per period",
        ],
    );
}
