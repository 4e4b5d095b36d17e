//! The generator obeys the user's curve: for every decay family, with and
//! without persistent IC shocks, the mean measured lagged IC equals the target
//! curve and the mean measured horizon IC equals the truth, on average over
//! dates and on the very first simulated date (the start is stationary).
//!
//! Tolerance: four Monte Carlo standard errors of the across-path mean (fixed
//! seed), after the finite-breadth bias of a sample correlation,
//! `E r ≈ ρ·(1 − (1−ρ²)/(2N))` (Fisher, 1915).

use lagfold::stats::CHECK_SIGMAS;
mod common;

use common::{expected_sample_corr, mean_se, per_path_means as simulate, setup};
use lagfold::model::Kernel;

/// Every family; the two exponentials cover both kernels (half-life 3 cut at
/// lag 48 keeps a visible tail, so it is convolved; half-life 2 is generated
/// by the exact recursion).
const FAMILIES: [&str; 7] = [
    "family = \"exponential\"\nic1 = 0.06\nhalf_life = 3",
    "family = \"exponential\"\nic1 = 0.06\nhalf_life = 2",
    "family = \"linear\"\nic1 = 0.06\nzero_at = 8",
    "family = \"hump\"\npeak = 0.05\npeak_lag = 4",
    "family = \"power\"\nic1 = 0.06\nexponent = 0.7",
    "family = \"step\"\nic = 0.04\nlength = 5",
    "family = \"table\"\nvalues = [0.05, 0.03, 0.01, -0.01, -0.02, -0.01]",
];

fn check(extra: &str, assets: usize) {
    let mut kernels = Vec::new();
    for fam in FAMILIES {
        let text = format!(
            "assets = {assets}\nhistory = 60\nhorizons = 12\npaths = 1500\nseed = 17\n{extra}\n[decay]\n{fam}\n"
        );
        let s = setup(&text);
        kernels.push(s.model.kernel());
        let out = simulate(&s);
        let t = &s.truth;
        for k in 1..=12 {
            let target = s.model.target().get(k - 1).copied().unwrap_or(0.0);
            let want = expected_sample_corr(target, assets);
            for (what, col) in [
                ("mean lagged IC", out.iter().map(|o| o.0[k - 1]).collect::<Vec<_>>()),
                ("first-date lagged IC", out.iter().map(|o| o.1[k - 1]).collect()),
            ] {
                let (m, se) = mean_se(&col);
                assert!(
                    (m - want).abs() < CHECK_SIGMAS * se,
                    "{fam} {extra}: {what} at lag {k} = {m}, target {want}, se {se}"
                );
            }
            let col: Vec<f64> = out.iter().map(|o| o.2[k - 1]).collect();
            let (m, se) = mean_se(&col);
            let want = expected_sample_corr(t.h(k), assets);
            assert!(
                (m - want).abs() < CHECK_SIGMAS * se,
                "{fam} {extra}: mean horizon IC at {k} = {m}, truth {want}, se {se}"
            );
        }
    }
    assert!(matches!(kernels[0], Kernel::Convolution) && matches!(kernels[1], Kernel::TwoExponential { .. }));
}

#[test]
fn every_family_is_reproduced_without_ic_shocks() {
    check("forecast_autocorrelation = 0.6", 500);
}

/// What this case can and cannot see (probed by mutation): a Student-t law
/// left at variance ν/(ν−2) instead of 1 moves the lag-2 IC by 6 standard
/// errors and fails it. The shock calibration's own shift, about
/// `ic_vol²·g_1` = 0.0024 at lag 1, is only 2 standard errors here (persistent
/// shocks make every history's mean noisy), so removing the calibration
/// passes this case; `calibration_for_ic_shocks_is_visible_and_right` below
/// (ψ = 0, ten standard errors) and the high-power tier
/// (`tests/high_power.rs`) catch that.
#[test]
fn every_family_is_reproduced_with_persistent_ic_shocks_and_fat_tails() {
    check(
        "forecast_autocorrelation = 0.6\nic_vol = 0.2\nic_vol_persistence = 0.9\n[tails]\nfamily = \"student_t\"\ndof = 5",
        500,
    );
}

#[test]
fn calibration_for_ic_shocks_is_visible_and_right() {
    // Strong independent shocks (ic_vol 0.4, ψ = 0) over many dates: the
    // per-date mean sits about ic_vol²·g_1 ≈ 0.01 below the pooled correlation
    // (MODEL.md §1), about ten standard errors; the calibrated curve must land
    // on the target while the uncalibrated pooled value must not.
    let text = "assets = 200\nhistory = 400\nhorizons = 3\npaths = 400\nseed = 5\nic_vol = 0.4\n\
                [decay]\nfamily = \"exponential\"\nic1 = 0.06\nhalf_life = 2\n";
    let s = setup(text);
    let out = simulate(&s);
    let col: Vec<f64> = out.iter().map(|o| o.0[0]).collect();
    let (m, se) = mean_se(&col); // ≈ 1e-3
    let want = expected_sample_corr(0.06, 200);
    assert!((m - want).abs() < CHECK_SIGMAS * se, "mean lagged IC {m}, target {want}, se {se}");
    assert!((m - s.model.g(1)).abs() > 6.0 * se, "pooled g1 {} is distinguishable from {m}", s.model.g(1));
}
