//! Decay stress: regret is zero on the diagonal and never negative, the
//! default alternatives are what they say, user curves are read from the file.

use assert_cmd::Command;
use lagfold::scenario::{self, Overrides};
use lagfold::stress;

const BASE: &str = "assets = 200\nhistory = 80\nhorizons = 12\nforecast_autocorrelation = 0.6\n\
                    [decay]\nfamily = \"exponential\"\nic1 = 0.05\nhalf_life = 3\n[portfolio]\nreference_paths = 20\n";

#[test]
fn regret_is_zero_on_the_diagonal_and_never_negative() {
    let s = scenario::load(BASE, "t", "t", &Overrides::default()).unwrap();
    let r = stress::run(&s, 2, &|_| {}).unwrap();
    let names: Vec<&str> = r.curves.iter().map(|c| c.name.as_str()).collect();
    assert_eq!(names, ["assumed", "faster", "slower", "hump", "reversal"]);
    // Regret from the curves themselves (not from the matrix's own code): row
    // i, column j is how far below curve j's best horizon IC its value at row
    // i's chosen horizon falls. Catches: a transposed matrix, a chosen horizon
    // off by one, regret against the wrong curve, a minimax that maximises.
    let h = |j: usize| &r.curves[j].horizon_ic;
    let top = |j: usize| h(j).iter().copied().fold(f64::MIN, f64::max);
    for (i, row) in r.horizon.regret.iter().enumerate() {
        let chosen = r.curves[i].best_horizon;
        assert_eq!(r.horizon.chosen[i], chosen);
        for (j, &x) in row.iter().enumerate() {
            assert!((x - (top(j) - h(j)[chosen - 1])).abs() < 1e-15, "horizon regret [{i}][{j}]");
        }
    }
    assert!(r.horizon.regret[1][2] > 0.0, "choosing the faster curve's horizon costs under the slower one");
    let worst = |n: usize| (0..r.curves.len()).map(|j| (top(j) - h(j)[n - 1]) / top(j)).fold(f64::MIN, f64::max);
    let brute = (1..=12).map(worst).fold(f64::MAX, f64::min);
    assert!((r.horizon.minimax_worst_rel - brute).abs() < 1e-15, "minimax {} vs {brute}", r.horizon.minimax_worst_rel);
    assert!(r.horizon.minimax_worst_rel < worst(r.curves[0].best_horizon) + 1e-15);
    // The hump alternative peaks near a third of the assumed best horizon.
    let hump = &r.curves[3].lagged_ic;
    let peak = 1 + (0..hump.len()).max_by(|&a, &b| hump[a].total_cmp(&hump[b])).unwrap();
    let third = (r.curves[0].best_horizon as f64 / 3.0).max(2.0);
    assert!((peak as f64 - third).abs() <= 1.0, "hump peaks at {peak}, a third of the best is {third}");
    // Faster decay shortens the best horizon, slower decay lengthens it.
    let best = |n: &str| r.curves.iter().find(|c| c.name == n).unwrap().best_horizon;
    assert!(best("faster") < best("assumed") && best("assumed") < best("slower"));
    // Doubling the speed of an exponential halves its half-life: lag k of
    // "faster" is lag 2k−1 of the assumed (each true curve may differ from its
    // stated values by the cut loadings' tail, at most model::TAIL).
    let (a, f) = (&r.curves[0].lagged_ic, &r.curves[1].lagged_ic);
    assert!((f[2] - a[4]).abs() < 2.0 * lagfold::model::TAIL, "{} vs {}", f[2], a[4]);
}

#[test]
fn user_alternatives_are_read_and_can_replace_the_defaults() {
    let text = format!(
        "{BASE}[stress]\nreplace_defaults = true\n[[stress.alternatives]]\nname = \"long memory\"\n\
         decay = {{ family = \"power\", ic1 = 0.05, exponent = 0.6 }}\n"
    );
    let s = scenario::load(&text, "t", "t", &Overrides::default()).unwrap();
    let r = stress::run(&s, 2, &|_| {}).unwrap();
    assert_eq!(r.curves.iter().map(|c| c.name.as_str()).collect::<Vec<_>>(), ["assumed", "long memory"]);
    let bad = format!(
        "{BASE}[[stress.alternatives]]\nname = \"x\"\ndecay = {{ family = \"power\", ic1 = 2, exponent = 1 }}\n"
    );
    let e = scenario::load(&bad, "t", "t", &Overrides::default()).unwrap_err().to_string();
    assert!(e.contains("`stress.alternatives[0].decay.ic1` must be inside (-1, 1), got 2"), "{e}");
}

#[test]
fn the_stress_command_writes_its_tables() {
    let tmp = tempfile::tempdir().unwrap();
    let file = tmp.path().join("s.toml");
    std::fs::write(&file, BASE).unwrap();
    let a = Command::cargo_bin("lagfold")
        .unwrap()
        .arg("stress")
        .arg(&file)
        .arg("--out")
        .arg(tmp.path().join("o"))
        .assert()
        .success();
    let out = String::from_utf8(a.get_output().stdout.clone()).unwrap();
    assert!(out.contains("smallest worst case") && out.contains("not investment advice"), "{out}");
    let json: serde_json::Value =
        serde_json::from_slice(&std::fs::read(tmp.path().join("o/stress.json")).unwrap()).unwrap();
    assert_eq!(json["horizon"]["regret"].as_array().unwrap().len(), 5);
    let csv = std::fs::read_to_string(tmp.path().join("o/stress.csv")).unwrap();
    assert_eq!(csv.lines().count(), 1 + 2 * 25);
}
