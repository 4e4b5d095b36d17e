//! How well the overlap-aware standard errors cover the real spread: for a
//! preset, simulate 1,500 histories and print, per horizon, the root-mean-square
//! standard error of the mean divided by the actual spread of the mean across
//! histories (1.0 is perfect), beside Newey–West with only `n − 1` lags.
//!
//! `cargo run --release --example se_coverage -- monthly-regimes`

use lagfold::generate::Workspace;
use lagfold::measure::{Measurement, hac};
use lagfold::rng::path_rng;
use lagfold::scenario::{self, Overrides, presets};
use lagfold::study::Setup;
fn main() {
    let name = std::env::args().nth(1).unwrap_or("monthly-steady".into());
    let ov = Overrides { paths: Some(1500), ..Default::default() };
    let s = scenario::load(presets::text(&name).unwrap(), "x", "x", &ov).unwrap();
    let setup = Setup::new(s).unwrap();
    let l = setup.scenario.horizons;
    let mut ws = Workspace::default();
    let mut m = Measurement::new(l, false);
    let (mut means, mut ses, mut nw_n1, mut lag_means, mut lag_ses) =
        (vec![vec![]; l], vec![vec![]; l], vec![vec![]; l], vec![vec![]; l], vec![vec![]; l]);
    for p in 0..1500u64 {
        setup.generator.simulate(&mut path_rng(1, p), &mut ws);
        m.update(&ws.panel);
        for n in 1..=l {
            let x = m.horizon.series(n);
            let (mu, se) = hac::mean_and_se(x, hac::hac_lags(x, n));
            means[n - 1].push(mu);
            ses[n - 1].push(se.unwrap());
            nw_n1[n - 1].push(hac::mean_and_se(x, n - 1).1.unwrap());
            let y = m.lagged.series(n);
            let (mu, se) = hac::mean_and_se(y, hac::hac_lags(y, 1));
            lag_means[n - 1].push(mu);
            lag_ses[n - 1].push(se.unwrap());
        }
    }
    let sd = |v: &Vec<f64>| {
        let mu = v.iter().sum::<f64>() / v.len() as f64;
        (v.iter().map(|x| (x - mu).powi(2)).sum::<f64>() / (v.len() - 1) as f64).sqrt()
    };
    let rms = |v: &Vec<f64>| (v.iter().map(|x| x * x).sum::<f64>() / v.len() as f64).sqrt();
    println!("n  horizon: rmsSE/sd (ours)  (NW n-1)   lagged: rmsSE/sd");
    for n in [1, 2, 3, 6, 9, 12, 18, 24, 26, 40] {
        if n <= l {
            println!(
                "{n:>2}  {:.3}  {:.3}   {:.3}",
                rms(&ses[n - 1]) / sd(&means[n - 1]),
                rms(&nw_n1[n - 1]) / sd(&means[n - 1]),
                rms(&lag_ses[n - 1]) / sd(&lag_means[n - 1])
            );
        }
    }
}
