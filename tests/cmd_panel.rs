//! `lagfold panel` writes a simulated history in the long input format.

use assert_cmd::Command;

#[test]
fn panel_writes_one_row_per_date_and_asset_with_forward_returns() {
    let tmp = tempfile::tempdir().unwrap();
    let out = tmp.path().join("sub/panel.csv");
    Command::cargo_bin("lagfold")
        .unwrap()
        .args(["panel", "monthly-steady", "--assets", "30", "--history", "40", "--seed", "9", "-q", "--out"])
        .arg(&out)
        .assert()
        .success();
    let text = std::fs::read_to_string(&out).unwrap();
    let lines: Vec<&str> = text.lines().collect();
    assert_eq!(lines[0], "date,asset,forecast,return");
    assert_eq!(lines.len(), 1 + 30 * 40);
    assert!(lines[1].starts_with("2001-01-31,A00001,"));
    assert!(
        lines[30 * 39 + 1].starts_with("2004-04-30,A00001,") && lines[30 * 39 + 1].ends_with(','),
        "{}",
        lines[30 * 39 + 1]
    );
    // Forward returns are in the scenario's units (6 % a month): their spread is near 0.06.
    let r: Vec<f64> = lines[1..=30 * 39].iter().map(|l| l.rsplit(',').next().unwrap().parse().unwrap()).collect();
    let sd = (r.iter().map(|x| x * x).sum::<f64>() / r.len() as f64).sqrt();
    // 1,170 draws of unit-variance returns: the sd of their sd is 0.06/sqrt(2·1170) ≈ 0.0012; allow 4 of it.
    assert!((sd - 0.06).abs() < 0.005, "sd {sd}");
    let again = tmp.path().join("again.csv");
    Command::cargo_bin("lagfold")
        .unwrap()
        .args(["panel", "monthly-steady", "--assets", "30", "--history", "40", "--seed", "9", "-q", "--out"])
        .arg(&again)
        .assert()
        .success();
    assert_eq!(std::fs::read(&out).unwrap(), std::fs::read(&again).unwrap(), "same seed, same bytes");
}
