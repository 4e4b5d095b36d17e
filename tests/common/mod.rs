//! Helpers shared by the integration tests.
#![allow(dead_code)]

use lagfold::generate::Workspace;
use lagfold::measure::{Measurement, Panel};
use lagfold::rng::path_rng;
use lagfold::scenario::{self, Overrides};
use lagfold::simulate::Setup;

/// A set-up from a scenario text.
pub fn setup(toml: &str) -> Setup {
    let s = scenario::load(toml, "test", "test", &Overrides::default()).unwrap();
    Setup::new(s).unwrap()
}

/// Calls `each` with every simulated panel of the scenario and its measurement.
pub fn for_each_path(setup: &Setup, mut each: impl FnMut(&Panel, &Measurement)) {
    let mut ws = Workspace::default();
    let mut m = Measurement::new(setup.scenario.horizons(), setup.scenario.rank_ic());
    for p in 0..setup.scenario.paths() {
        let mut rng = path_rng(setup.scenario.seed(), p as u64);
        setup.generator.simulate(&mut rng, &mut ws);
        m.update(&ws.panel);
        each(&ws.panel, &m);
    }
}

/// Per path, in parallel (each path's stream depends only on its index):
/// (mean lagged IC per lag, lagged IC on the first date, mean horizon IC per horizon).
pub fn per_path_means(s: &Setup) -> Vec<(Vec<f64>, Vec<f64>, Vec<f64>)> {
    use rayon::prelude::*;
    (0..s.scenario.paths())
        .into_par_iter()
        .map_init(
            || (Workspace::default(), Measurement::new(s.scenario.horizons(), false)),
            |(ws, m), p| {
                s.generator.simulate(&mut path_rng(s.scenario.seed(), p as u64), ws);
                m.update(&ws.panel);
                let first = (1..=s.scenario.horizons()).map(|k| m.lagged.series(k)[0]).collect();
                (m.lagged.means(), first, m.horizon.means())
            },
        )
        .collect()
}

/// Expected sample correlation of `n` bivariate-normal pairs with correlation
/// `rho`: `ρ·(1 − (1 − ρ²)/(2n))` to order `1/n` (Fisher, 1915).
pub fn expected_sample_corr(rho: f64, n: usize) -> f64 {
    rho * (1.0 - (1.0 - rho * rho) / (2.0 * n as f64))
}

/// Mean and standard error of the mean.
pub fn mean_se(xs: &[f64]) -> (f64, f64) {
    let n = xs.len() as f64;
    let m = xs.iter().sum::<f64>() / n;
    let v = xs.iter().map(|x| (x - m).powi(2)).sum::<f64>() / (n - 1.0);
    (m, (v / n).sqrt())
}

/// A xorshift stream of uniforms on `[0, 1)` from `seed` (Marsaglia, 2003):
/// invented test data that needs no simulator.
pub fn uniforms(seed: u64) -> impl FnMut() -> f64 {
    let mut x = seed | 1;
    move || {
        x ^= x << 13;
        x ^= x >> 7;
        x ^= x << 17;
        (x >> 11) as f64 / (1u64 << 53) as f64
    }
}

/// Standard normals from [`uniforms`] by the Box–Muller transform (Box and Muller, 1958).
pub fn normals(seed: u64) -> impl FnMut() -> f64 {
    let mut u = uniforms(seed);
    move || {
        let (u1, u2) = (u().max(1e-300), u());
        (-2.0 * u1.ln()).sqrt() * (2.0 * std::f64::consts::PI * u2).cos()
    }
}
