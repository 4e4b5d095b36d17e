#![allow(dead_code)] // each bench uses its own part of these helpers
//! Shared set-up for the benches: the default preset at the bench's size.

use lagfold::scenario::{self, Overrides, presets};
use lagfold::simulate::Setup;
use std::time::Instant;

/// The default preset at `N = 1000, T = 120, L = 24` with `paths` paths.
pub fn setup(paths: usize) -> Setup {
    setup_of(presets::DEFAULT, paths)
}

/// Preset `name` at `N = 1000, T = 120, L = 24` with `paths` paths.
pub fn setup_of(name: &str, paths: usize) -> Setup {
    let ov = Overrides {
        assets: Some(1000),
        history: Some(120),
        horizons: Some(24),
        paths: Some(paths),
        seed: Some(7),
        ..Overrides::default()
    };
    let s = scenario::load(presets::text(name).unwrap(), "bench", "bench", &ov).unwrap();
    Setup::new(s).unwrap()
}

/// Median seconds per call of `a` and of `b`, measured in alternating blocks
/// of ten calls so that both see the same machine state while each runs warm
/// (a single call of one right after the other would charge the second with
/// the first's cache misses); returns `(a, b)`.
pub fn interleaved(blocks: usize, mut a: impl FnMut(), mut b: impl FnMut()) -> (f64, f64) {
    const CALLS: u32 = 10;
    let (mut ta, mut tb) = (Vec::with_capacity(blocks), Vec::with_capacity(blocks));
    for _ in 0..blocks {
        let t = Instant::now();
        (0..CALLS).for_each(|_| a());
        ta.push(t.elapsed().as_secs_f64() / f64::from(CALLS));
        let t = Instant::now();
        (0..CALLS).for_each(|_| b());
        tb.push(t.elapsed().as_secs_f64() / f64::from(CALLS));
    }
    let median = |v: &mut Vec<f64>| {
        v.sort_by(f64::total_cmp);
        v[v.len() / 2]
    };
    (median(&mut ta), median(&mut tb))
}
