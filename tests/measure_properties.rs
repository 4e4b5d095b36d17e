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
    let mut p = Panel::zeros(n, t);
    p.forecasts.iter_mut().for_each(|f| *f = next());
    for (i, r) in p.returns.iter_mut().enumerate() {
        *r = 0.05 * next() + 0.01 * p.forecasts[i % (n * (t - 1))];
    }
    p
}

fn measured(p: &Panel, l: usize, min: usize) -> Measurement {
    let mut m = Measurement::new(l, true).with_min_assets(min);
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
        let mut flagged = p.clone();
        flagged.has_missing = true;
        same(&measured(&p, 3, min), &measured(&flagged, 3, min), 1e-10)?;
    }

    #[test]
    fn raising_min_assets_never_adds_dates(seed in 0u64..1_000_000, n in 5usize..40, lo in 3usize..30, step in 0usize..10) {
        let mut p = panel(n, 12, seed);
        // Blank a seed-dependent set of cells so dates differ in breadth.
        for (i, f) in p.forecasts.iter_mut().enumerate() {
            if (i as u64).wrapping_mul(seed | 1).is_multiple_of(7) {
                *f = f64::NAN;
            }
        }
        p.has_missing = true;
        let (a, b) = (measured(&p, 3, lo), measured(&p, 3, lo + step));
        for k in 1..=3 {
            prop_assert!(b.lagged.dates(k).iter().all(|d| a.lagged.dates(k).contains(d)));
            prop_assert!(b.horizon.dates(k).iter().all(|d| a.horizon.dates(k).contains(d)));
        }
    }

    #[test]
    fn pearson_ics_ignore_units_shifts_and_asset_order(seed in 0u64..1_000_000, missing in any::<bool>(), e in prop::sample::select(vec![-200i32, -50, 0, 50, 200])) {
        let p = panel(30, 10, seed);
        let mut q = p.clone();
        let (scale, shift) = (10f64.powi(e), 3.0);
        q.forecasts.iter_mut().for_each(|f| *f = *f * scale + shift * scale);
        q.returns.iter_mut().for_each(|r| *r = *r / scale - shift / scale);
        // Reverse the asset order on every date.
        for row in q.forecasts.chunks_exact_mut(30).chain(q.returns.chunks_exact_mut(30)) {
            row.reverse();
        }
        let (mut p, mut q) = (p, q);
        p.has_missing = missing;
        q.has_missing = missing;
        let (a, b) = (measured(&p, 3, 3), measured(&q, 3, 3));
        // Shifts of 3 against a spread of 0.3 cost a few digits to cancellation.
        same(&a, &b, 1e-9)?;
        prop_assert_eq!(a.lagged.series(1).len(), 9);
    }
}
