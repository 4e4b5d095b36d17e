//! The demo's terminal output at 80 and 120 columns, kept in
//! `tests/snapshots/`: every line fits the width, and any change of wording,
//! layout or figures fails here until it is made on purpose with
//!
//! ```text
//! LAGFOLD_UPDATE_PINNED=1 cargo test --test terminal_snapshots
//! ```
//!
//! (the same switch as the pinned values), after reading the new text.

use assert_cmd::Command;

/// The demo's stdout in a terminal `columns` wide (`COLUMNS`), run in a
/// fresh folder so the outputs line names the same relative path.
fn demo_at(columns: usize) -> String {
    let tmp = tempfile::tempdir().unwrap();
    let out = Command::cargo_bin("lagfold")
        .unwrap()
        .current_dir(tmp.path())
        .env("COLUMNS", columns.to_string())
        .env("SOURCE_DATE_EPOCH", "1796256000")
        .args(["demo", "--paths", "200", "--seed", "4", "--out", "r"])
        .assert()
        .success();
    String::from_utf8(out.get_output().stdout.clone()).unwrap()
}

fn check(columns: usize) {
    let text = demo_at(columns);
    let wide: Vec<&str> = text.lines().filter(|l| l.chars().count() > columns).collect();
    assert!(wide.is_empty(), "{} lines wider than {columns} columns, e.g. {:?}", wide.len(), wide.first());
    assert!(!text.contains("-0.0"), "a negative zero is printed");
    let path = format!("tests/snapshots/demo-{columns}.txt");
    if std::env::var_os("LAGFOLD_UPDATE_PINNED").is_some() {
        std::fs::write(&path, &text).unwrap();
        return;
    }
    let kept = std::fs::read_to_string(&path).unwrap_or_default();
    if kept != text {
        let first = kept.lines().zip(text.lines()).position(|(a, b)| a != b).unwrap_or(0);
        panic!(
            "the demo's {columns}-column output changed (first at line {}):\n  kept: {:?}\n  now:  {:?}\n\
             rerun with LAGFOLD_UPDATE_PINNED=1 if the change is meant",
            first + 1,
            kept.lines().nth(first),
            text.lines().nth(first)
        );
    }
}

#[test]
fn the_demo_fits_80_columns() {
    check(80);
}

#[test]
fn the_demo_fits_120_columns() {
    check(120);
}
