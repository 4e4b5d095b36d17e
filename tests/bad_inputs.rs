//! A table of bad inputs (scenario files, command-line options, panels):
//! each must end with exit code 2, a message holding its key words (the file
//! and line or the option, the key, the allowed range in words), no panic
//! and nothing written. Every case runs even when an earlier one fails; the
//! failures are listed together.

use assert_cmd::Command;
use std::path::Path;

/// What the case gives the command: `{f}` in `args` is replaced by the file.
enum Input {
    /// A scenario file `bad.toml`.
    Toml(&'static str),
    /// A panel `bad.csv`.
    Csv,
    /// Only options.
    Options,
}

struct Case {
    input: Input,
    args: &'static [&'static str],
    words: &'static [&'static str],
}

const D: &str = "[decay]\nfamily = \"exponential\"\nic1 = 0.045\nhalf_life = 4\n";

fn toml(body: &str) -> String {
    body.replace("{D}", D)
}

const RUN: &[&str] = &["run", "{f}"];
const PLAN: &[&str] = &["plan", "{f}"];
const STRESS: &[&str] = &["stress", "{f}"];
const PANEL: &[&str] = &["panel", "{f}"];
const MEASURE: &[&str] = &["measure", "{f}", "--min-assets", "5", "--no-study"];

/// A small valid monthly panel (12 dates × 12 assets) with one line changed.
fn panel(edit: &str) -> String {
    let mut rows = vec!["date,asset,forecast,return".to_string()];
    for m in 1..=12 {
        for a in 0..12 {
            let f = ((m * 7 + a * 13) % 17) as f64 / 17.0 - 0.5;
            let r = ((m * 11 + a * 5) % 19) as f64 / 190.0 - 0.05;
            rows.push(format!("2020-{m:02}-28,A{a},{f:.4},{r:.4}"));
        }
    }
    let text = rows.join("\n") + "\n";
    match edit.split_once("=>") {
        Some((from, to)) => text.replacen(from, to, 1),
        None => text,
    }
}

#[rustfmt::skip]
fn cases() -> Vec<(Case, String)> {
    use Input::*;
    let c = |input, args, words| Case { input, args, words };
    let t = |args: &'static [&'static str], body: &'static str, words| (c(Toml(body), args, words), String::new());
    let p = |edit: &'static str, extra: &'static [&'static str], words| (c(Csv, extra, words), panel(edit));
    let o = |args, words| (c(Options, args, words), String::new());
    vec![
        // The scenario file: syntax, keys, types.
        t(RUN, "assets = \n{D}", &["bad.toml, line 1"]),
        t(RUN, "[decay\n", &["bad.toml, line 1"]),
        t(RUN, "assets = 100\nassets = 200\n{D}", &["line 2", "assets"]),
        t(RUN, "asets = 100\n{D}", &["line 1", "unknown key `asets`", "did you mean `assets`"]),
        t(RUN, "{D}half_lfe = 3\n", &["line 5", "unknown key `decay.half_lfe`", "half_life"]),
        t(RUN, "{D}[tails]\nfamily = \"normal\"\ndegrees = 4\n", &["line 7", "unknown key `tails.degrees`"]),
        t(RUN, "{D}[portfolio]\ncosts = 5\n", &["line 6", "unknown key `portfolio.costs`", "cost_bps"]),
        t(RUN, "{D}[stres]\n", &["line 5", "unknown key `stres`", "stress"]),
        t(RUN, "{D}[[stress.alternatives]]\nname = \"x\"\ncurve = 1\n", &["line 7", "unknown key `stress.alternatives[0].curve`"]),
        t(RUN, "{D}[[stress.alternatives]]\nname = \"x\"\ndecay = { family = \"step\", ic = 0.02, lenght = 3 }\n", &["line 7", "stress.alternatives[0].decay.lenght", "length"]),
        t(RUN, "assets = \"many\"\n{D}", &["line 1", "`assets` must be a whole number, at least 10", "got \"many\""]),
        t(RUN, "assets = -5\n{D}", &["line 1", "`assets` must be a whole number, at least 10", "got -5"]),
        t(RUN, "assets = 10.5\n{D}", &["line 1", "`assets`", "whole number", "got 10.5"]),
        t(RUN, "history = true\n{D}", &["line 1", "`history` must be a whole number", "got true"]),
        t(RUN, "horizons = 2.5\n{D}", &["line 1", "`horizons` must be a whole number, at least 1"]),
        t(RUN, "paths = \"all\"\n{D}", &["line 1", "`paths` must be a whole number, at least 1"]),
        t(RUN, "seed = -1\n{D}", &["line 1", "`seed` must be a whole number from 0 to 18446744073709551615"]),
        t(RUN, "seed = \"abc\"\n{D}", &["line 1", "`seed`", "18446744073709551615"]),
        t(RUN, "seed = 1.5\n{D}", &["line 1", "`seed`"]),
        t(RUN, "residual_vol = \"6%\"\n{D}", &["line 1", "`residual_vol` must be a number > 0", "decimal"]),
        t(RUN, "rank_ic = \"yes\"\n{D}", &["line 1", "`rank_ic` must be true or false"]),
        t(RUN, "name = 5\n{D}", &["line 1", "`name` must be text in quotes"]),
        t(RUN, "truncation = -3\n{D}", &["line 1", "`truncation` must be a whole number from 1 to 20000"]),
        t(RUN, "{D}[portfolio]\nquantiles = 2.5\n", &["line 6", "`portfolio.quantiles` must be a whole number, at least 2"]),
        t(RUN, "{D}[portfolio]\nreference_paths = \"many\"\n", &["line 6", "`portfolio.reference_paths`", "10 to 100000"]),
        t(RUN, "{D}[tails]\nfamily = \"student_t\"\ndof = \"four\"\n", &["line 7", "`tails.dof` must be a number > 2"]),
        t(RUN, "[decay]\nfamily = \"exponential\"\nic1 = \"0.04\"\nhalf_life = 4\n", &["line 3", "`decay.ic1` must be a number inside (-1, 1)"]),
        t(RUN, "[decay]\nfamily = \"step\"\nic = 0.04\nlength = 2.5\n", &["line 4", "`decay.length` must be a whole number, at least 1"]),
        t(RUN, "[decay]\nfamily = \"table\"\nvalues = 0.04\n", &["line 3", "`decay.values` must be a list of numbers"]),
        t(RUN, "decay = 5\n", &["line 1", "`decay` must be a table"]),
        t(RUN, "assets = 100\n", &["`decay` is required", "family = \"exponential\""]),
        t(RUN, "[decay]\nic1 = 0.04\nhalf_life = 4\n", &["line 1", "`decay.family` is required"]),
        t(RUN, "{D}[[stress.alternatives]]\ndecay = { family = \"step\", ic = 0.02, length = 3 }\n", &["line 5", "`stress.alternatives[0].name` is required"]),
        // Families and their parameters.
        t(RUN, "[decay]\nfamily = \"expo\"\nic1 = 0.04\nhalf_life = 4\n", &["line 2", "`decay.family` must be one of exponential, linear", "did you mean \"exponential\""]),
        t(RUN, "[decay]\nfamily = \"exponential\"\nic1 = 0.04\n", &["line 1", "`decay.half_life` is required with family exponential, which takes ic1 and half_life"]),
        t(RUN, "[decay]\nfamily = \"exponential\"\nic1 = 0.04\nhalf_life = 4\nzero_at = 9\n", &["line 5", "`decay.zero_at` = 9 has no effect with family exponential"]),
        t(RUN, "[decay]\nfamily = \"hump\"\npeak = 0.03\n", &["`decay.peak_lag` is required with family hump"]),
        t(RUN, "[decay]\nfamily = \"step\"\nic = 0.03\nlength = 3\nhalf_life = 2\n", &["line 5", "`decay.half_life` = 2 has no effect with family step"]),
        t(RUN, "{D}[tails]\nfamily = \"normal\"\ndof = 5\n", &["line 7", "`tails.dof` = 5 has no effect with family normal"]),
        t(RUN, "{D}[tails]\nfamily = \"student_t\"\n", &["line 5", "`tails.dof` is required with family student_t"]),
        t(RUN, "{D}[tails]\nfamily = \"cauchy\"\n", &["line 6", "`tails.family` must be one of normal, student_t"]),
        t(RUN, "{D}[tails]\nfamily = \"student\"\ndof = 5\n", &["did you mean \"student_t\""]),
        // Values out of range.
        t(RUN, "assets = 5\n{D}", &["line 1", "`assets` must be at least 10, got 5"]),
        t(RUN, "horizons = 0\n{D}", &["line 1", "`horizons` must be at least 1, got 0"]),
        t(RUN, "history = 27\nhorizons = 24\n{D}", &["line 1", "`history` must be at least horizons + 4 = 28"]),
        t(RUN, "assets = 100000\nhistory = 1000\n{D}", &["line 1", "`assets`", "assets × history ≤ 50000000"]),
        t(RUN, "paths = 0\n{D}", &["line 1", "`paths` must be at least 1"]),
        t(RUN, "paths = 200000000\n{D}", &["line 1", "`paths` must be at most 100000000"]),
        t(RUN, "periods_per_year = 0\n{D}", &["line 1", "`periods_per_year` must be > 0, got 0"]),
        t(RUN, "periods_per_year = 1e9\n{D}", &["line 1", "`periods_per_year` must be at most 1000000"]),
        t(RUN, "residual_vol = -0.1\n{D}", &["line 1", "`residual_vol` must be > 0"]),
        t(RUN, "residual_vol = 1e300\n{D}", &["line 1", "`residual_vol` must be at most 10", "got 1e300"]),
        t(RUN, "residual_vol = nan\n{D}", &["line 1", "`residual_vol` must be > 0, got NaN"]),
        t(RUN, "forecast_autocorrelation = 1\n{D}", &["line 1", "`forecast_autocorrelation` must be inside (-1, 1), got 1"]),
        t(RUN, "ic_vol = 1.2\n{D}", &["line 1", "`ic_vol` must be in [0, 1), got 1.2"]),
        t(RUN, "ic_vol_persistence = -1\n{D}", &["line 1", "`ic_vol_persistence` must be inside (-1, 1)"]),
        t(RUN, "near_best_tolerance = 1\n{D}", &["line 1", "`near_best_tolerance` must be in [0, 1)"]),
        t(RUN, "truncation = 0\n{D}", &["line 1", "`truncation` must be at least 1"]),
        t(RUN, "truncation = 50000\n{D}", &["line 1", "`truncation` must be at most 20000"]),
        t(RUN, "name = \".hidden\"\n{D}", &["line 1", "`name` must be 1 to 100 letters", "not starting with '.'"]),
        t(RUN, "name = \"my signal\"\n{D}", &["line 1", "`name`", "got \"my signal\""]),
        t(RUN, "name = \"\"\n{D}", &["line 1", "`name`"]),
        t(RUN, "[decay]\nfamily = \"exponential\"\nic1 = 1.5\nhalf_life = 4\n", &["line 3", "`decay.ic1` must be inside (-1, 1), got 1.5"]),
        t(RUN, "[decay]\nfamily = \"exponential\"\nic1 = 0.04\nhalf_life = 0\n", &["line 4", "`decay.half_life` must be > 0"]),
        t(RUN, "[decay]\nfamily = \"linear\"\nic1 = 0.04\nzero_at = 1\n", &["line 4", "`decay.zero_at` must be > 1"]),
        t(RUN, "[decay]\nfamily = \"hump\"\npeak = 0.03\npeak_lag = -2\n", &["line 4", "`decay.peak_lag` must be > 0"]),
        t(RUN, "[decay]\nfamily = \"power\"\nic1 = 0.04\nexponent = 0\n", &["line 4", "`decay.exponent` must be > 0"]),
        t(RUN, "[decay]\nfamily = \"step\"\nic = 0.04\nlength = 0\n", &["line 4", "`decay.length` must be at least 1"]),
        t(RUN, "[decay]\nfamily = \"table\"\nvalues = []\n", &["line 3", "`decay.values` must be a non-empty list"]),
        t(RUN, "[decay]\nfamily = \"table\"\nvalues = [0.1, 2]\n", &["line 3", "`decay.values[1]` must be inside (-1, 1), got 2"]),
        t(RUN, "[decay]\nfamily = \"exponential\"\nic1 = -0.04\nhalf_life = 4\n", &["not positive at any horizon", "flipped"]),
        t(RUN, "ic_vol = 0.9\nforecast_autocorrelation = 0.95\n[decay]\nfamily = \"step\"\nic = 0.2\nlength = 40\n", &["infeasible variance", "ic_vol"]),
        t(RUN, "{D}[tails]\nfamily = \"student_t\"\ndof = 2\n", &["line 7", "`tails.dof` must be > 2 (finite variance) and ≤ 1e6", "got 2"]),
        t(RUN, "{D}[tails]\nfamily = \"student_t\"\ndof = 1e300\n", &["line 7", "`tails.dof` must be > 2 (finite variance) and ≤ 1e6", "use family = \"normal\""]),
        t(RUN, "{D}[portfolio]\ncost_bps = -1\n", &["line 6", "`portfolio.cost_bps` must be in [0, 10000) basis points, got -1"]),
        t(RUN, "{D}[portfolio]\ntarget_vol = 0\n", &["line 6", "`portfolio.target_vol` must be above 0 and at most 1", "0.04 = 4 %"]),
        t(RUN, "assets = 20\n{D}[portfolio]\nquantiles = 5\n", &["line 7", "`portfolio.quantiles` must be between 2 and 4"]),
        t(RUN, "{D}[portfolio]\nreference_paths = 5\n", &["line 6", "`portfolio.reference_paths` must be from 10 to 100000", "got 5"]),
        t(RUN, "{D}[portfolio]\nreference_paths = 10000000\n", &["line 6", "`portfolio.reference_paths` must be from 10 to 100000", "got 10000000"]),
        t(STRESS, "{D}[[stress.alternatives]]\nname = \"a\"\ndecay = { family = \"step\", ic = 0.02, length = 3 }\n[[stress.alternatives]]\nname = \"a\"\ndecay = { family = \"step\", ic = 0.02, length = 4 }\n", &["line 9", "`stress.alternatives[1].name`", "not used by another alternative", "got \"a\""]),
        t(STRESS, "{D}[[stress.alternatives]]\nname = \"faster\"\ndecay = { family = \"step\", ic = 0.02, length = 3 }\n", &["line 6", "`stress.alternatives[0].name`", "replace_defaults"]),
        t(STRESS, "{D}[[stress.alternatives]]\nname = \" \"\ndecay = { family = \"step\", ic = 0.02, length = 3 }\n", &["line 6", "`stress.alternatives[0].name` must be a non-empty name"]),
        t(STRESS, "{D}[[stress.alternatives]]\nname = \"x\"\ndecay = { family = \"step\", ic = 2, length = 3 }\n", &["line 7", "`stress.alternatives[0].decay.ic` must be inside (-1, 1), got 2"]),
        t(STRESS, "{D}[[stress.alternatives]]\nname = \"x\"\ndecay = { family = \"exponential\", ic1 = 0.02 }\n", &["line 7", "`stress.alternatives[0].decay.half_life` is required"]),
        // A sweep where one value is needed, and sweep limits.
        t(PLAN, "assets = [100, 200]\n{D}", &["line 1", "`assets`", "got a list", "only `lagfold run` runs"]),
        t(STRESS, "{D}[portfolio]\ncost_bps = [0, 10]\n", &["line 6", "`portfolio.cost_bps`", "got a list"]),
        t(PANEL, "[decay]\nfamily = \"exponential\"\nic1 = 0.04\nhalf_life = [2, 4]\n", &["line 4", "`decay.half_life`", "got a list"]),
        t(RUN, "assets = [100, 5]\n{D}", &["grid point assets = 5", "`assets` must be at least 10"]),
        t(RUN, "assets = [10,11,12,13,14,15,16,17,18,19,20]\nhistory = [30,31,32,33,34,35,36,37,38,39,40]\npaths = [1,2,3,4,5,6,7,8,9]\n{D}", &["1089 grid points", "at most 1000"]),
        // Command-line options.
        o(&["run", "monthly-stedy"], &["monthly-stedy", "did you mean `monthly-steady`"]),
        o(&["run", "no-such-file.toml"], &["no-such-file.toml", "built-in presets"]),
        o(&["run", "monthly-steady", "--horizons", "0"], &["option --horizons", "at least 1, got 0"]),
        o(&["run", "monthly-steady", "--history", "10"], &["option --history", "at least horizons + 4 = 28"]),
        o(&["run", "monthly-steady", "--assets", "3"], &["option --assets", "at least 10, got 3"]),
        o(&["run", "monthly-steady", "--assets", "20"], &["portfolio.quantiles", "with --assets 20 from the command line"]),
        o(&["run", "monthly-steady", "--paths", "-3"], &["--paths", "whole number"]),
        o(&["run", "monthly-steady", "--paths", "ten"], &["--paths", "whole number"]),
        o(&["run", "monthly-steady", "--seed", "-1"], &["--seed", "whole number"]),
        o(&["run", "monthly-steady", "--seed", "18446744073709551616"], &["--seed"]),
        o(&["run", "monthly-steady", "--threads", "0"], &["--threads", "0"]),
        o(&["run", "monthly-steady", "--cost-bps", "-5"], &["option", "--cost-bps", "[0, 10000)"]),
        o(&["run", "monthly-steady", "--target-vol", "4"], &["option --target-vol", "above 0 and at most 1", "got 4"]),
        o(&["demo", "--target-vol", "four"], &["--target-vol", "not a number"]),
        o(&["run", "monthly-steady", "--cost-bps", "1,2,3,4,5,6,7,8,9,10,11,12,13,14,15,16,17,18,19,20,21,22,23,24,25,26,27,28,29,30,31,32,33,34,35,36,37,38,39,40,41,42,43,44,45,46,47,48,49,50,51"], &["--cost-bps", "51 levels", "at most 50"]),
        o(&["stress", "monthly-steady", "--cost-bps", "1,2"], &["--cost-bps", "2 levels", "`stress`", "at most 1"]),
        o(&["plan", "monthly-steady", "--cost-bps", "1,2"], &["--cost-bps", "`plan`", "at most 1"]),
        o(&["plan", "monthly-steady", "--histories", "10"], &["--histories", "at least horizons + 4"]),
        o(&["run", "monthly-steady", "--bogus"], &["--bogus"]),
        o(&["frobnicate"], &["frobnicate"]),
        // Panels.
        p("date,asset=>when,asset", MEASURE, &["bad.csv, line 1", "no column `date`", "--date-column"]),
        p("2020-03-28,A4,=>2020-03-28,A4,abc", MEASURE, &["bad.csv, line 30", "`forecast` must be a finite number", "got \"abc"]),
        p("2020-03-28,A4,=>2020-03-28,A4,inf", MEASURE, &["bad.csv, line 30", "`forecast` must be a finite number"]),
        p("2020-02-28,A0=>2020-02-30,A0", MEASURE, &["bad.csv, line 14", "`date` must be a date"]),
        p("2020-02-28,A1=>2020-02-28,A0", MEASURE, &["bad.csv, line 15", "asset \"A0\" appears twice on 2020-02-28"]),
        p("", &["measure", "{f}", "--no-study"], &["bad.csv", "--min-assets"]),
        p("", &["measure", "{f}", "--min-assets", "5", "--no-study", "--horizons", "0"], &["--horizons"]),
        p("", &["measure", "{f}", "--min-assets", "5", "--no-study", "--forecast-column", "nope"], &["bad.csv", "nope"]),
        p("", &["measure", "{f}", "--min-assets", "5", "--no-study", "--return-column", "forecast"], &["bad.csv", "`forecast`", "both"]),
        p("", &["measure", "{f}", "--min-assets", "5", "--no-study", "--paths", "10"], &["--paths", "--no-study"]),
        p("", &["measure", "{f}", "--min-assets", "5", "--no-study", "--blend", "forecast=x"], &["--blend"]),
        p("", &["measure", "{f}", "--min-assets", "2", "--no-study"], &["--min-assets"]),
    ]
}

/// Runs one case in its own folder; `Err` says what went wrong.
fn check(i: usize, case: &Case, csv: &str, dir: &Path) -> Result<(), String> {
    let file = match &case.input {
        Input::Toml(body) => {
            let f = dir.join("bad.toml");
            std::fs::write(&f, toml(body)).unwrap();
            f
        }
        Input::Csv => {
            let f = dir.join("bad.csv");
            std::fs::write(&f, csv).unwrap();
            f
        }
        Input::Options => dir.join("unused"),
    };
    let out = dir.join("out");
    let args: Vec<String> = case.args.iter().map(|a| a.replace("{f}", &file.to_string_lossy())).collect();
    let takes_out = !matches!(args.first().map(String::as_str), Some("frobnicate"));
    let mut cmd = Command::cargo_bin("lagfold").unwrap();
    cmd.current_dir(dir).args(&args);
    if takes_out {
        cmd.arg("--out").arg(&out).arg("-q");
    }
    let o = cmd.output().unwrap();
    let err = String::from_utf8_lossy(&o.stderr);
    let mut problems = Vec::new();
    if o.status.code() != Some(2) {
        problems.push(format!("exit {:?}", o.status.code()));
    }
    if err.contains("panicked") {
        problems.push("panicked".into());
    }
    for w in case.words {
        if !err.contains(w) {
            problems.push(format!("no {w:?}"));
        }
    }
    if out.exists() && std::fs::read_dir(&out).map(|d| d.count()).unwrap_or(0) > 0 {
        problems.push("wrote outputs".into());
    }
    if problems.is_empty() {
        Ok(())
    } else {
        Err(format!("case {i} {:?}: {}\n    stderr: {}", case.args, problems.join(", "), err.trim()))
    }
}

#[test]
fn every_bad_input_is_refused_with_its_source_and_range_in_words() {
    let cases = cases();
    assert!(cases.len() >= 80, "{} cases", cases.len());
    let failures: Vec<String> = cases
        .iter()
        .enumerate()
        .filter_map(|(i, (case, csv))| {
            let dir = tempfile::tempdir().unwrap();
            check(i, case, csv, dir.path()).err()
        })
        .collect();
    assert!(failures.is_empty(), "{} of {} cases failed:\n{}", failures.len(), cases.len(), failures.join("\n"));
}
