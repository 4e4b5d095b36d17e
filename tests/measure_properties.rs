//! Properties of the estimators on any panel: the complete-panel path equals
//! the missing-value path on complete data (with `--min-assets` applied
//! alike), raising `--min-assets` never adds dates, and Pearson ICs are
//! unchanged by scaling forecasts or returns by 1e±200, by shifting them, and
//! by reordering assets.

use lagfold::measure::{Measurement, Panel};
use proptest::prelude::*;

/// A panel of `n` assets and `t` dates from a seed (values of mixed sign and size).
fn panel(n: usize, t: usize, seed: u64) -> Panel {
    let mut x = seed.wrapping_mul(0x9E37_79B9_7F4A_7C15) | 1;
    let mut next = move || {
        x ^= x << 13;
        x ^= x >> 7;
        x ^= x << 17;
        (x >> 11) as f64 / (1u64 << 53) as f64 - 0.5
    };
    let forecasts: Vec<f64> = (0..n * t).map(|_| next()).collect();
    let returns = (0..n * (t - 1)).map(|i| 0.05 * next() + 0.01 * forecasts[i % (n * (t - 1))]).collect();
    Panel::new(n, t, forecasts, returns).unwrap()
}

fn measured(p: &Panel, l: usize, min: usize) -> Measurement {
    measured_as(p, l, min, false)
}

/// Measured pair by pair (the missing-value path) when `pairwise`.
fn measured_as(p: &Panel, l: usize, min: usize, pairwise: bool) -> Measurement {
    let mut m = Measurement::new(l, true).with_min_assets(min).pair_by_pair(pairwise);
    m.update(p);
    m
}

/// Every per-date series of `a` equals `b`'s within `tol` (relative to 1), dates alike.
fn same(a: &Measurement, b: &Measurement, tol: f64) -> Result<(), TestCaseError> {
    for (x, y) in [(&a.lagged, &b.lagged), (&a.horizon, &b.horizon), (&a.rank_lagged, &b.rank_lagged)] {
        for k in 1..=x.len() {
            prop_assert_eq!(x.dates(k), y.dates(k), "lag {}", k);
            for (u, v) in x.series(k).iter().zip(y.series(k)) {
                prop_assert!((u - v).abs() <= tol, "lag {k}: {u} vs {v}");
            }
        }
    }
    Ok(())
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 64, failure_persistence: None, rng_seed: proptest::test_runner::RngSeed::Fixed(7), ..ProptestConfig::default() })]

    #[test]
    fn complete_and_missing_value_paths_agree(seed in 0u64..1_000_000, n in 3usize..40, t in 6usize..20, min in 3usize..45) {
        let p = panel(n, t, seed);
        same(&measured(&p, 3, min), &measured_as(&p, 3, min, true), 1e-10)?;
    }

    #[test]
    fn raising_min_assets_never_adds_dates(seed in 0u64..1_000_000, n in 5usize..40, lo in 3usize..30, step in 0usize..10) {
        let full = panel(n, 12, seed);
        // Blank a seed-dependent set of cells so dates differ in breadth.
        let blanked = full.forecasts().iter().enumerate().map(|(i, &f)| {
            if (i as u64).wrapping_mul(seed | 1).is_multiple_of(7) { f64::NAN } else { f }
        });
        let p = Panel::new(n, 12, blanked.collect(), full.returns().to_vec()).unwrap();
        let (a, b) = (measured(&p, 3, lo), measured(&p, 3, lo + step));
        for k in 1..=3 {
            prop_assert!(b.lagged.dates(k).iter().all(|d| a.lagged.dates(k).contains(d)));
            prop_assert!(b.horizon.dates(k).iter().all(|d| a.horizon.dates(k).contains(d)));
        }
    }

    #[test]
    fn pearson_ics_ignore_units_shifts_and_asset_order(seed in 0u64..1_000_000, missing in any::<bool>(), e in prop::sample::select(vec![-200i32, -50, 0, 50, 200])) {
        let p = panel(30, 10, seed);
        let (scale, shift) = (10f64.powi(e), 3.0);
        let mut f: Vec<f64> = p.forecasts().iter().map(|f| *f * scale + shift * scale).collect();
        let mut r: Vec<f64> = p.returns().iter().map(|r| *r / scale - shift / scale).collect();
        // Reverse the asset order on every date.
        for row in f.chunks_exact_mut(30).chain(r.chunks_exact_mut(30)) {
            row.reverse();
        }
        let q = Panel::new(30, 10, f, r).unwrap();
        let (a, b) = (measured_as(&p, 3, 3, missing), measured_as(&q, 3, 3, missing));
        // Shifts of 3 against a spread of 0.3 cost a few digits to cancellation.
        same(&a, &b, 1e-9)?;
        prop_assert_eq!(a.lagged.series(1).len(), 9);
    }
}
