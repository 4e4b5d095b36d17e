//! `--shard K/N` and `lagfold merge`: shards merged give the single run's
//! outputs byte for byte (run, sweep and plan), whatever the shards' thread
//! counts and the order the parts are given in; parts that do not make one
//! whole run are refused, each named.

use assert_cmd::Command;
use std::path::{Path, PathBuf};

fn lagfold() -> Command {
    let mut c = Command::cargo_bin("lagfold").unwrap();
    c.env("SOURCE_DATE_EPOCH", "1700000000");
    c
}

/// Runs `args` once whole into `dir/one`, then as `n` shards (shard `k` on
/// `1 + k % 2` threads) into `dir/p<k>`; returns the shard folders.
fn one_and_shards(args: &[&str], n: usize, dir: &Path) -> Vec<PathBuf> {
    lagfold().args(args).arg("--out").arg(dir.join("one")).arg("-q").assert().success();
    (0..n)
        .map(|k| {
            let out = dir.join(format!("p{k}"));
            let threads = (1 + k % 2).to_string();
            lagfold()
                .args(args)
                .args(["--shard", &format!("{k}/{n}"), "--threads", &threads, "-q", "--out"])
                .arg(&out)
                .assert()
                .success();
            assert!(out.join("part.json").exists());
            out
        })
        .collect()
}

fn merge(parts: &[PathBuf], out: &Path) -> assert_cmd::assert::Assert {
    lagfold().arg("merge").args(parts).arg("--out").arg(out).arg("-q").assert()
}

fn same_files(a: &Path, b: &Path, files: &[&str]) {
    for f in files {
        let (x, y) = (std::fs::read(a.join(f)).unwrap(), std::fs::read(b.join(f)).unwrap());
        assert!(x == y, "{f} differs between the single run and the merged shards");
    }
}

#[test]
fn a_run_with_a_cost_sweep_merges_to_the_single_run() {
    let tmp = tempfile::tempdir().unwrap();
    let args = [
        "run",
        "monthly-steady",
        "--paths",
        "70",
        "--assets",
        "100",
        "--horizons",
        "8",
        "--seed",
        "5",
        "--cost-bps",
        "0,10,30",
        "--no-charts",
    ];
    let mut parts = one_and_shards(&args, 3, tmp.path());
    parts.reverse();
    merge(&parts, &tmp.path().join("merged")).success();
    let files = ["summary.json", "curves.csv", "choices.csv", "holding.csv", "cost_sweep.csv"];
    same_files(&tmp.path().join("one"), &tmp.path().join("merged"), &files);
    // More shards than paths of the study at twice the history leaves some
    // shards without paths there: still the single run.
    let parts = one_and_shards(&["run", "weekly-hump", "--paths", "5", "--assets", "60", "--no-charts"], 7, tmp.path());
    merge(&parts, &tmp.path().join("merged7")).success();
    same_files(&tmp.path().join("one"), &tmp.path().join("merged7"), &["summary.json", "curves.csv"]);
}

#[test]
fn a_sweep_and_a_plan_merge_to_the_single_run() {
    let tmp = tempfile::tempdir().unwrap();
    let file = tmp.path().join("grid.toml");
    std::fs::write(
        &file,
        "assets = [60, 120]\nhistory = 50\nhorizons = 6\npaths = 40\n[decay]\nfamily = \"exponential\"\n\
         ic1 = 0.05\nhalf_life = [2, 5]\n[portfolio]\nreference_paths = 10\n",
    )
    .unwrap();
    let sweep = tmp.path().join("sweep");
    std::fs::create_dir(&sweep).unwrap();
    let parts = one_and_shards(&["run", file.to_str().unwrap(), "--no-charts"], 2, &sweep);
    merge(&parts, &sweep.join("merged")).success();
    same_files(&sweep.join("one"), &sweep.join("merged"), &["sweep.json", "sweep.csv"]);

    let plan = tmp.path().join("plan");
    std::fs::create_dir(&plan).unwrap();
    let args = ["plan", "weekly-hump", "--paths", "60", "--assets", "80", "--histories", "60,90", "--no-charts"];
    let parts = one_and_shards(&args, 4, &plan);
    merge(&parts, &plan.join("merged")).success();
    same_files(&plan.join("one"), &plan.join("merged"), &["plan.json", "plan.csv"]);
}

#[test]
fn parts_that_do_not_make_one_run_are_refused_by_name() {
    let tmp = tempfile::tempdir().unwrap();
    let d = tmp.path();
    let shard = |seed: &str, k: &str, out: &str| {
        lagfold()
            .args(["run", "weekly-hump", "--paths", "12", "--assets", "40", "--no-charts", "-q"])
            .args(["--seed", seed, "--shard", k, "--out"])
            .arg(d.join(out))
            .assert()
            .success();
        d.join(out)
    };
    let (a, b, c) = (shard("1", "0/3", "a"), shard("1", "1/3", "b"), shard("2", "2/3", "c"));
    let refused = |parts: &[PathBuf], needles: &[&str]| {
        let out = merge(parts, &d.join("m")).code(2);
        let err = String::from_utf8(out.get_output().stderr.clone()).unwrap();
        for n in needles {
            assert!(err.contains(n), "`{n}` not in: {err}");
        }
        assert!(!d.join("m").exists(), "a refused merge writes nothing");
    };
    refused(&[a.clone(), b.clone(), c.clone()], &["c/part.json is a shard of another run", "seed 2", "seed 1"]);
    refused(&[a.clone(), b.clone()], &["shards missing: 2/3"]);
    refused(&[a.clone(), b.clone(), a.clone()], &["shard 0/3 is given twice", "a/part.json"]);
    let other = shard("1", "1/2", "other");
    refused(&[a.clone(), other], &["is shard 1/2 but", "one split"]);
    refused(&[a.clone(), d.join("nowhere")], &["nowhere: cannot read a shard's part"]);
    std::fs::write(d.join("x.json"), "{\"format\": 1}").unwrap();
    refused(&[a.clone(), d.join("x.json")], &["x.json: written by lagfold unknown"]);
    // A part whose tallies were cut short is refused, not a panic.
    let c = shard("1", "2/3", "c2");
    // (Edited as text: its sums are 128-bit integers, which a JSON value would turn into floats.)
    let text = std::fs::read_to_string(c.join("part.json")).unwrap();
    let at = text.find("\"families\":[").unwrap() + "\"families\":[".len();
    let end = at + text[at..].find(']').unwrap();
    let cut = format!("{}{}{}", &text[..at], text[at..end].rsplit_once(',').unwrap().0, &text[end..]);
    std::fs::create_dir(d.join("cut")).unwrap();
    std::fs::write(d.join("cut/part.json"), cut).unwrap();
    refused(&[a.clone(), b.clone(), d.join("cut")], &["do not fit the run they record"]);
    merge(&[a, b, c], &d.join("m")).success();
    // Bad shard numbers are refused before any work.
    for bad in ["3/3", "1/0", "x"] {
        let out = lagfold().args(["run", "weekly-hump", "--shard", bad]).assert().code(2);
        let err = String::from_utf8(out.get_output().stderr.clone()).unwrap();
        assert!(err.contains("a shard is K/N with 0 ≤ K < N"), "{err}");
    }
}

#[test]
fn a_stress_test_merges_to_the_single_run() {
    let tmp = tempfile::tempdir().unwrap();
    let d = tmp.path();
    let args = ["stress", "weekly-hump", "--assets", "60", "--history", "70", "--cost-bps", "15", "--no-charts"];
    let mut parts = one_and_shards(&args, 3, d);
    parts.swap(0, 2);
    merge(&parts, &d.join("merged")).success();
    same_files(&d.join("one"), &d.join("merged"), &["stress.json", "stress.csv"]);
    // A stress part is refused beside a run's, and with a reference history cut out.
    let run = d.join("run");
    lagfold()
        .args(["run", "weekly-hump", "--paths", "6", "--shard", "1/3", "-q", "--out"])
        .arg(&run)
        .assert()
        .success();
    let refused = |parts: &[PathBuf], needle: &str| {
        let out = merge(parts, &d.join("m")).code(2);
        let err = String::from_utf8(out.get_output().stderr.clone()).unwrap();
        assert!(err.contains(needle), "`{needle}` not in: {err}");
        assert!(!d.join("m").exists(), "a refused merge writes nothing");
    };
    refused(&[parts[0].clone(), run, parts[2].clone()], "is a shard of another run");
    let mut part: serde_json::Value =
        serde_json::from_slice(&std::fs::read(parts[1].join("part.json")).unwrap()).unwrap();
    part["books"][0].as_array_mut().unwrap().pop();
    std::fs::create_dir(d.join("cut")).unwrap();
    std::fs::write(d.join("cut/part.json"), serde_json::to_vec(&part).unwrap()).unwrap();
    refused(&[parts[0].clone(), d.join("cut"), parts[2].clone()], "books do not fit the stress test");
    // Two parts that trade a history keep every total, yet hold other blocks
    // than their shards': refused, naming the part.
    let read = |dir: &PathBuf| -> serde_json::Value {
        serde_json::from_slice(&std::fs::read(dir.join("part.json")).unwrap()).unwrap()
    };
    let (mut giver, mut taker) = (read(&parts[1]), read(&parts[2]));
    for (g, t) in giver["books"].as_array_mut().unwrap().iter_mut().zip(taker["books"].as_array_mut().unwrap()) {
        let moved = g.as_array_mut().unwrap().pop().unwrap();
        t.as_array_mut().unwrap().push(moved);
    }
    for (name, value) in [("giver", &giver), ("taker", &taker)] {
        std::fs::create_dir(d.join(name)).unwrap();
        std::fs::write(d.join(name).join("part.json"), serde_json::to_vec(value).unwrap()).unwrap();
    }
    refused(&[parts[0].clone(), d.join("giver"), d.join("taker")], "should hold");
}
