//! The exponential-sum generator (`lagfold::exp_sum`) against the exact
//! convolution it stands in for: on the same scenario, the mean lagged and
//! horizon ICs measured over independent paths of each agree within
//! `CHECK_SIGMAS` standard errors of their difference at every lag and
//! horizon (the approximation's own IC error, at most 1e-5, is far below the
//! tolerance of about 2·10⁻³ here), and the approximation is what the set-up chose.

mod common;

use lagfold::generate::{Generator, Workspace};
use lagfold::measure::Measurement;
use lagfold::rng::path_rng;
use lagfold::simulate::Setup;
use lagfold::stats::CHECK_SIGMAS;

/// Per lag or horizon, the per-path means of `generator`'s paths `0..paths` of stream `seed`.
fn per_path(setup: &Setup, generator: &Generator, seed: u64, paths: usize) -> (Vec<Vec<f64>>, Vec<Vec<f64>>) {
    let l = setup.scenario.horizons();
    let (mut lagged, mut horizon) = (vec![Vec::new(); l], vec![Vec::new(); l]);
    let mut ws = Workspace::default();
    let mut m = Measurement::new(l, false);
    for p in 0..paths {
        generator.simulate(&mut path_rng(seed, p as u64), &mut ws);
        m.update(&ws.panel);
        m.lagged.means().iter().zip(&mut lagged).for_each(|(v, c)| c.push(*v));
        m.horizon.means().iter().zip(&mut horizon).for_each(|(v, c)| c.push(*v));
    }
    (lagged, horizon)
}

fn agree(decay: &str) {
    let setup = common::setup(&format!(
        "assets = 200\nhistory = 120\nhorizons = 12\nforecast_autocorrelation = 0.9\nic_vol = 0.04\n\
         ic_vol_persistence = 0.5\npaths = 400\n[decay]\n{decay}\n"
    ));
    assert!(setup.truth.generator.starts_with("recursion:"), "{decay}: {}", setup.truth.generator);
    assert!(setup.truth.generator_ic_error.unwrap() <= lagfold::exp_sum::IC_TOLERANCE);
    let m = &setup.model;
    let s = &setup.scenario;
    let exact = Generator::new(m, None, s.assets(), s.history(), s.tails());
    let (la, ha) = per_path(&setup, &setup.generator, 1, s.paths());
    let (le, he) = per_path(&setup, &exact, 2, s.paths());
    for (what, a, e) in [("lagged", &la, &le), ("horizon", &ha, &he)] {
        for k in 0..a.len() {
            let ((ma, sa), (me, se)) = (common::mean_se(&a[k]), common::mean_se(&e[k]));
            let tol = CHECK_SIGMAS * sa.hypot(se);
            assert!(
                (ma - me).abs() < tol,
                "{decay}: {what} IC {}: recursion {ma:.5} vs exact {me:.5} (±{tol:.5})",
                k + 1
            );
        }
    }
}

#[test]
fn a_hump_by_recursion_measures_as_the_exact_convolution() {
    agree("family = \"hump\"\npeak = 0.05\npeak_lag = 4\nshape = 2");
}

#[test]
fn a_power_law_by_recursion_measures_as_the_exact_convolution() {
    agree("family = \"power\"\nic1 = 0.05\nexponent = 0.6");
}
