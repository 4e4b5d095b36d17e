//! The high-power tier: checks whose effect is too small for the default
//! tier's sample, run with many histories. Ignored by default (about a
//! minute on two cores); `.ci/run` runs them with
//! `cargo test --test high_power -- --ignored`.
//!
//! Tolerance: `CHECK_SIGMAS` standard errors of the across-path mean (fixed
//! seed), after Fisher's (1915) finite-breadth bias of a sample correlation.

mod common;

use common::{expected_sample_corr, mean_se, per_path_means, setup};
use lagfold::stats::CHECK_SIGMAS;

/// Persistent IC shocks (ic_vol 0.35, ψ = 0.6) at N = 2000, T = 400: the mean
/// lagged IC lands on the user's per-date curve and the mean horizon IC on
/// the per-date horizon truth, not on the pooled one. Catches (shown by the
/// last assertion's power check): a generator without the shock calibration,
/// or a truth that reports the pooled horizon IC, each of which the default
/// tier's persistent-shock case cannot see.
#[test]
#[ignore = "high-power tier: run by .ci/run with --ignored"]
fn per_date_truth_with_persistent_shocks_at_high_power() {
    let (n, l) = (2000usize, 12usize);
    let s = setup(&format!(
        "assets = {n}\nhistory = 400\nhorizons = {l}\npaths = 1500\nseed = 41\nforecast_autocorrelation = 0.6\n\
         ic_vol = 0.35\nic_vol_persistence = 0.6\n[decay]\nfamily = \"exponential\"\nic1 = 0.08\nhalf_life = 3\n"
    ));
    let out = per_path_means(&s);
    let (mut power, mut lag_power) = (0.0f64, 0.0f64);
    for k in 1..=l {
        let (m, se) = mean_se(&out.iter().map(|o| o.0[k - 1]).collect::<Vec<_>>());
        let want = expected_sample_corr(s.model.target()[k - 1], n);
        assert!((m - want).abs() < CHECK_SIGMAS * se, "lagged IC at {k}: {m} vs {want}, se {se}");
        // Without the calibration the per-date mean would sit near
        // target + (target − g_k): about ic_vol²·ρ^{k−1}·g_1 away.
        lag_power = lag_power.max((s.model.target()[k - 1] - s.model.g(k)).abs() / se);
        let (m, se) = mean_se(&out.iter().map(|o| o.2[k - 1]).collect::<Vec<_>>());
        let want = expected_sample_corr(s.truth.h(k), n);
        let pooled = expected_sample_corr(s.truth.horizon_ic_pooled[k - 1], n);
        assert!((m - want).abs() < CHECK_SIGMAS * se, "horizon IC at {k}: {m} vs per-date {want}, se {se}");
        power = power.max((pooled - want).abs() / se);
    }
    assert!(power > 2.0 * CHECK_SIGMAS, "the pooled truth lies {power:.1} se away at best: too little power");
    assert!(lag_power > 2.0 * CHECK_SIGMAS, "the uncalibrated curve lies {lag_power:.1} se away at best");
}
