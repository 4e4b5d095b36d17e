//! The value-stability tier: seeded outputs pinned in `tests/pinned/values.json`.
//! A change in any of them fails here until it is made on purpose:
//!
//! ```text
//! LAGFOLD_UPDATE_PINNED=1 cargo test --test pinned_values
//! ```
//!
//! rewrites the file; commit it with a note saying why the values moved. The
//! comparison allows a relative 1e-9, so that a different libm's last bits do
//! not fail it while any change of method, seed use or order of draws does.

use assert_cmd::Command;
use serde_json::{Map, Value};
use std::path::Path;

const PINNED: &str = "tests/pinned/values.json";

/// Runs lagfold with `args` and `--out dir`, then reads `file` from it.
fn json_of(args: &[&str], dir: &Path, file: &str) -> Value {
    Command::cargo_bin("lagfold").unwrap().args(args).arg("--out").arg(dir).arg("-q").assert().success();
    serde_json::from_slice(&std::fs::read(dir.join(file)).unwrap()).unwrap()
}

/// FNV-1a (Fowler, Noll and Vo) of a byte string: pins a whole file in one number.
fn fnv1a(bytes: &[u8]) -> u64 {
    bytes.iter().fold(0xcbf2_9ce4_8422_2325, |h, &b| (h ^ u64::from(b)).wrapping_mul(0x0100_0000_01b3))
}

fn values() -> Map<String, Value> {
    let tmp = tempfile::tempdir().unwrap();
    let mut out = Map::new();
    let run = json_of(
        &["run", "monthly-steady", "--paths", "100", "--assets", "200", "--horizons", "12", "--no-charts"],
        &tmp.path().join("run"),
        "summary.json",
    );
    let mut take = |prefix: &str, doc: &Value, pointers: &[&str]| {
        for p in pointers {
            out.insert(format!("{prefix}{p}"), doc.pointer(p).cloned().unwrap_or(Value::Null));
        }
    };
    take("run", &run, &["/truth/horizon_ic", "/truth/best_horizon", "/truth/net_ir", "/truth/best_holding"]);
    take("run", &run, &["/study/lagged_ic", "/study/horizon_ic", "/study/net_ir"]);
    for rule in ["peak", "formula", "fitted", "net_ir"] {
        for field in ["hit_rate", "near_hit_rate", "regret_mean", "choice_counts"] {
            take("run", &run, &[&format!("/study/rules/{rule}/{field}")]);
        }
    }
    let measure = json_of(
        &["measure", "tests/fixtures/reference_panel.csv", "--min-assets", "3", "--no-study", "--no-charts"],
        &tmp.path().join("measure"),
        "measure.json",
    );
    take("measure", &measure, &["/lagged_ic", "/horizon_ic", "/best_horizon", "/bootstrap", "/fitted_curve"]);
    let panel = Command::cargo_bin("lagfold")
        .unwrap()
        .args(["panel", "weekly-hump", "--assets", "30", "--history", "40", "--seed", "7", "--out", "-"])
        .output()
        .unwrap();
    assert!(panel.status.success());
    out.insert("panel/fnv1a".into(), Value::from(format!("{:016x}", fnv1a(&panel.stdout))));
    out
}

/// Whether two pinned values agree (numbers to a relative 1e-9).
fn same(a: &Value, b: &Value) -> bool {
    match (a, b) {
        (Value::Number(x), Value::Number(y)) => {
            let (x, y) = (x.as_f64().unwrap(), y.as_f64().unwrap());
            x == y || (x - y).abs() <= 1e-9 * x.abs().max(y.abs())
        }
        (Value::Array(x), Value::Array(y)) => x.len() == y.len() && x.iter().zip(y).all(|(a, b)| same(a, b)),
        (Value::Object(x), Value::Object(y)) => {
            x.len() == y.len() && x.iter().all(|(k, v)| y.get(k).is_some_and(|w| same(v, w)))
        }
        _ => a == b,
    }
}

#[test]
fn seeded_outputs_match_their_pinned_values() {
    let now = values();
    if std::env::var_os("LAGFOLD_UPDATE_PINNED").is_some() {
        let text = serde_json::to_string_pretty(&Value::Object(now)).unwrap() + "\n";
        std::fs::write(PINNED, text).unwrap();
        eprintln!("wrote {PINNED}: commit it with the reason the values moved");
        return;
    }
    let pinned: Map<String, Value> = serde_json::from_str(
        &std::fs::read_to_string(PINNED).expect("tests/pinned/values.json (make it with LAGFOLD_UPDATE_PINNED=1)"),
    )
    .unwrap();
    let moved: Vec<String> = pinned
        .iter()
        .filter(|(k, v)| !now.get(*k).is_some_and(|w| same(v, w)))
        .map(|(k, v)| format!("{k}: pinned {v}, now {}", now.get(k).map_or("absent".into(), Value::to_string)))
        .collect();
    assert!(
        moved.is_empty() && pinned.len() == now.len(),
        "{} pinned values moved (LAGFOLD_UPDATE_PINNED=1 rewrites them, on purpose only):\n{}",
        moved.len(),
        moved.join("\n")
    );
}
