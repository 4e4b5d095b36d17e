//! Shared set-up for the benches: the default preset at the bench's size.

use lagfold::scenario::{self, Overrides, presets};
use lagfold::study::Setup;
use std::time::Instant;

/// The default preset at `N = 1000, T = 120, L = 24` with `paths` paths.
pub fn setup(paths: usize) -> Setup {
    let ov =
        Overrides { assets: Some(1000), history: Some(120), horizons: Some(24), paths: Some(paths), seed: Some(7) };
    let s = scenario::load(presets::text(presets::DEFAULT).unwrap(), "bench", "bench", &ov).unwrap();
    Setup::new(s).unwrap()
}

/// Median seconds per call of `a` and of `b`, interleaved so that both see the
/// same machine state; returns `(a, b)`.
pub fn interleaved(reps: usize, mut a: impl FnMut(), mut b: impl FnMut()) -> (f64, f64) {
    let (mut ta, mut tb) = (Vec::with_capacity(reps), Vec::with_capacity(reps));
    for _ in 0..reps {
        let t = Instant::now();
        a();
        ta.push(t.elapsed().as_secs_f64());
        let t = Instant::now();
        b();
        tb.push(t.elapsed().as_secs_f64());
    }
    let median = |v: &mut Vec<f64>| {
        v.sort_by(f64::total_cmp);
        v[v.len() / 2]
    };
    (median(&mut ta), median(&mut tb))
}
