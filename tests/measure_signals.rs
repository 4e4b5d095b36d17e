//! Several signals in one pass, and their blend, against a panel whose truth
//! is known by construction.
//!
//! Each date, a fast signal `a` and a slow signal `b` are drawn across
//! assets as standard normals with correlation ρ, independent over time, and
//! the return over the period starting at date t is
//! `r_t = Σ_j α_j·a_{t−j+1} + Σ_j β_j·b_{t−j+1} + σ·ε_t`, with fast-decaying
//! α_j = 0.06·0.5^{j−1} and slow-decaying β_j = 0.02·0.9^{j−1}.
//! Then, exactly (population moments across assets):
//! - `cov(a_t, r_{t+k−1}) = α_k + ρβ_k`, `cov(b_t, r_{t+k−1}) = ρα_k + β_k`;
//! - `γ_h = cov(r_t, r_{t+h}) = Σ_j (α_j α_{j+h} + β_j β_{j+h} + ρ(α_j β_{j+h} + β_j α_{j+h})) + σ²·[h = 0]`;
//! - the lagged IC of `x = w_a a + w_b b` at lag k is
//!   `(w_a cov(a, r_k) + w_b cov(b, r_k)) / (sd(x)·√γ_0)` with
//!   `sd(x)² = w_a² + w_b² + 2 w_a w_b ρ`, and its horizon IC at n is
//!   `Σ_{k≤n} cov(x, r_k) / (sd(x)·√(n γ_0 + 2 Σ_{h<n} (n−h) γ_h))`.
//!
//! The blend is of per-date z-scores, which equal `a` and `b` up to sampling
//! error of the date's mean and spread (order 1/√N), and the IC is invariant
//! to a per-date affine map of either variable.
//!
//! Tolerance: four standard errors from theory, not the measured (EWC) ones,
//! whose few degrees of freedom make them noisy. A per-date sample
//! correlation of N pairs has variance `(1 − ρ²)²/(N − 1)` (Fisher, 1915),
//! below `1/(N − 1)`; the signals are independent over time and the returns
//! nearly so (γ_h/γ_0 ≤ 0.0052), so the mean of m lag-k ICs has
//! `σ ≤ 1/√((N − 1)·m)`. Horizon-n ICs of consecutive dates share n − 1
//! periods, a moving average whose long-run variance is n times the
//! per-date one: `σ ≤ √(n/((N − 1)·m))`. Per-date correlations also carry an
//! O(ρ/N) bias (Fisher, 1915), under 0.0002 here, far inside 4σ.

use lagfold::stats::CHECK_SIGMAS;
mod common;

use assert_cmd::Command;
use serde_json::Value;
use std::fmt::Write as _;

const RHO: f64 = 0.3;
const SIGMA: f64 = 1.0;
const ASSETS: usize = 400;
const DATES: usize = 240;
const L: usize = 10;
/// Lags of the signals in the returns (α and β are negligible beyond).
const J: usize = 24;

/// α_j and β_j (1-based), zero beyond J.
fn alpha(j: usize) -> f64 {
    if (1..=J).contains(&j) { 0.06 * 0.5f64.powi(j as i32 - 1) } else { 0.0 }
}
fn beta(j: usize) -> f64 {
    if (1..=J).contains(&j) { 0.02 * 0.9f64.powi(j as i32 - 1) } else { 0.0 }
}

/// `cov(signal, r_k)` for the fast (`a`) and slow (`b`) signal.
fn cov_a(k: usize) -> f64 {
    alpha(k) + RHO * beta(k)
}
fn cov_b(k: usize) -> f64 {
    RHO * alpha(k) + beta(k)
}

fn gamma(h: usize) -> f64 {
    let noise = if h == 0 { SIGMA * SIGMA } else { 0.0 };
    (1..=J)
        .map(|j| {
            alpha(j) * alpha(j + h) + beta(j) * beta(j + h) + RHO * (alpha(j) * beta(j + h) + beta(j) * alpha(j + h))
        })
        .sum::<f64>()
        + noise
}

/// True lagged and horizon ICs of `w_a a + w_b b`.
fn truth(wa: f64, wb: f64) -> (Vec<f64>, Vec<f64>) {
    let sd = (wa * wa + wb * wb + 2.0 * wa * wb * RHO).sqrt();
    let c = |k: usize| wa * cov_a(k) + wb * cov_b(k);
    let lagged = (1..=L).map(|k| c(k) / (sd * gamma(0).sqrt())).collect();
    let horizon = (1..=L)
        .map(|n| {
            let var: f64 = n as f64 * gamma(0) + 2.0 * (1..n).map(|h| (n - h) as f64 * gamma(h)).sum::<f64>();
            (1..=n).map(c).sum::<f64>() / (sd * var.sqrt())
        })
        .collect();
    (lagged, horizon)
}

/// The panel as CSV: date, asset, fast, slow, ret.
fn panel_csv(seed: u64) -> String {
    let mut normal = common::normals(seed);
    // Dates −J+1 … −1 first, so every return has its full sums; date t is index t + J − 1.
    let mut a = vec![vec![0.0; ASSETS]; DATES + J - 1];
    let mut b = vec![vec![0.0; ASSETS]; DATES + J - 1];
    for t in 0..DATES + J - 1 {
        for i in 0..ASSETS {
            a[t][i] = normal();
            b[t][i] = RHO * a[t][i] + (1.0 - RHO * RHO).sqrt() * normal();
        }
    }
    let mut out = String::from("date,asset,fast,slow,ret\n");
    for t in 0..DATES {
        // Month ends from 2001-01: any valid monthly calendar works.
        let (y, m) = (2001 + t / 12, t % 12 + 1);
        let day = [31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31][m - 1] + usize::from(m == 2 && y % 4 == 0);
        let now = t + J - 1;
        for i in 0..ASSETS {
            let mut r = SIGMA * normal();
            for j in 1..=J {
                r += alpha(j) * a[now + 1 - j][i] + beta(j) * b[now + 1 - j][i];
            }
            let _ = writeln!(out, "{y}-{m:02}-{day:02},A{i:03},{:.6},{:.6},{:.6}", a[now][i], b[now][i], r);
        }
    }
    out
}

fn measure(dir: &std::path::Path, blend: &str) -> Value {
    let file = dir.join("signals.csv");
    let out = dir.join("out");
    Command::cargo_bin("lagfold")
        .unwrap()
        .args(["measure", file.to_str().unwrap(), "--return-column", "ret", "--forecast-column", "fast,slow"])
        .args(["--blend", blend, "--horizons", &L.to_string(), "--no-study", "--no-charts", "-q", "--out"])
        .arg(&out)
        .assert()
        .success();
    serde_json::from_slice(&std::fs::read(out.join("measure.json")).unwrap()).unwrap()
}

fn curve(v: &Value, which: &str, field: &str) -> Vec<f64> {
    v[which][field].as_array().unwrap().iter().map(|x| x.as_f64().unwrap()).collect()
}

#[test]
fn each_signal_and_the_blend_match_their_truth_and_the_blend_moves_the_optimum() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("signals.csv"), panel_csv(2027)).unwrap();
    let v = measure(dir.path(), "fast=0.5,slow=0.5");
    let signals = v["comparison"]["signals"].as_array().unwrap();
    let names: Vec<&str> = signals.iter().map(|s| s["name"].as_str().unwrap()).collect();
    assert_eq!(names, ["fast", "slow", "blend"]);
    let mut peaks = Vec::new();
    for (s, (wa, wb)) in signals.iter().zip([(1.0, 0.0), (0.0, 1.0), (0.5, 0.5)]) {
        let (lagged, horizon) = truth(wa, wb);
        for (which, truth) in [("lagged_ic", &lagged), ("horizon_ic", &horizon)] {
            let (mean, dates) = (curve(s, which, "mean"), curve(s, which, "dates"));
            for k in 0..L {
                let overlap = if which == "horizon_ic" { (k + 1) as f64 } else { 1.0 };
                let sigma = (overlap / ((ASSETS - 1) as f64 * dates[k])).sqrt();
                let z = (mean[k] - truth[k]) / sigma;
                assert!(
                    z.abs() < CHECK_SIGMAS,
                    "{} {which} at {}: {:.4} vs truth {:.4} (z = {z:.1})",
                    names[peaks.len()],
                    k + 1,
                    mean[k],
                    truth[k]
                );
            }
        }
        let argmax = |c: &[f64]| c.iter().enumerate().max_by(|a, b| a.1.total_cmp(b.1)).unwrap().0 + 1;
        peaks.push(argmax(&horizon));
    }
    // By construction the fast signal's horizon IC peaks early (2), the slow one's late (7), the blend's between (3).
    assert!(peaks[0] < peaks[2] && peaks[2] < peaks[1], "true peaks {peaks:?}");
    // The per-date IC correlations: symmetric, 1 on the diagonal.
    let corr = v["comparison"]["ic_correlation"].as_array().unwrap();
    for (i, row) in corr.iter().enumerate() {
        assert!((row[i].as_f64().unwrap() - 1.0).abs() < 1e-12);
        for (j, v) in row.as_array().unwrap().iter().enumerate() {
            assert_eq!(*v, corr[j][i]);
        }
    }
}

#[test]
fn a_blend_weighting_one_signal_measures_exactly_that_signal() {
    // The z-scores are a per-date affine map of the signal, and the IC is invariant to it.
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("signals.csv"), panel_csv(7)).unwrap();
    let v = measure(dir.path(), "fast=2,slow=0");
    let s = v["comparison"]["signals"].as_array().unwrap();
    for which in ["lagged_ic", "horizon_ic"] {
        let (fast, blend) = (curve(&s[0], which, "mean"), curve(&s[2], which, "mean"));
        for (f, b) in fast.iter().zip(&blend) {
            assert!((f - b).abs() < 1e-10, "{which}: {f} vs {b}");
        }
    }
    let per_date = std::fs::read_to_string(dir.path().join("out/per_date.csv")).unwrap();
    assert!(per_date.lines().next().unwrap().contains("ic_lag1_slow,ic_lag1_blend"));
}
