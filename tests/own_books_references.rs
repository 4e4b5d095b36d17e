//! The tranche books on a user's panel (`measure --cost-bps`) against
//! closed forms, on a panel with forecasts independent over time.
//!
//! Forecasts `z` are standard normal across N assets and over time; the
//! return over the period starting at each date is `r = IC·z + √(1 − IC²)·ε`.
//! - Fundamental law (Grinold, 1989) for the unit-gross book (weights
//!   `z/Σ|z|`): the one-period book's per-period IR is
//!   `IC·√(N/(1 − (2 − π/2)·IC²))` to O(1/N) (derived by the delta method, see
//!   `tests/portfolio_references.rs`; MODEL.md §7's `IC·√(N/(1 + IC²))` is
//!   for weights proportional to `z` without the scaling; at IC = 0.05 the
//!   three forms differ by less than a tenth of a standard error).
//! - With forecasts independent over time, the tranche opened j > 0 periods
//!   ago adds noise but no mean, so the h-period book's per-period IR is
//!   that over √h (the horizon IC `IC/√h` times √N, MODEL.md §7).
//! - Turnover of standardised normal scores, independent over time:
//!   `E|Δz| / E|z| = √2`, so `√(2(1 − ρ^h))/h = √2/h` per period at ρ = 0
//!   (Qian, Sorensen and Hua, 2007).
//!
//! Tolerances: four standard errors. An IR measured from n periods has
//! `σ = √((1 + SR²/2)/n)` (Lo, 2002); the mean turnover's σ is the spread of
//! the per-period turnovers over √n (independent periods), plus 2/N for the
//! O(1/N) bias of a ratio of sums over N assets.

use lagfold::stats::CHECK_SIGMAS;
mod common;

use lagfold::measure::Panel;
use lagfold::portfolio::own::own_books;

const N: usize = 500;
const T: usize = 400;
const IC: f64 = 0.05;
const L: usize = 6;

fn panel(seed: u64) -> Panel {
    let mut normal = common::normals(seed);
    let forecasts: Vec<f64> = (0..T * N).map(|_| normal()).collect();
    let returns = (0..(T - 1) * N).map(|i| IC * forecasts[i] + (1.0 - IC * IC).sqrt() * normal()).collect();
    Panel::new(N, T, forecasts, returns).unwrap()
}

#[test]
fn information_ratio_and_turnover_follow_the_closed_forms() {
    let books = own_books(&panel(11), L, 20);
    let sr1 = IC * (N as f64 / (1.0 - (2.0 - std::f64::consts::FRAC_PI_2) * IC * IC)).sqrt();
    for (i, b) in books.iter().enumerate() {
        let h = (i + 1) as f64;
        let (mean, sd) = b.net_mean_sd(0.0);
        let sr = mean / sd;
        let want = sr1 / h.sqrt();
        let sigma = ((1.0 + want * want / 2.0) / b.n as f64).sqrt();
        assert!(
            (sr - want).abs() < CHECK_SIGMAS * sigma,
            "holding {h}: per-period IR {sr:.3}, closed form {want:.3} (σ {sigma:.3})"
        );
        let turnover = b.turnover();
        let spread = (b.tt / b.n as f64 - turnover * turnover).max(0.0).sqrt();
        let tol = CHECK_SIGMAS * spread / (b.n as f64).sqrt() + 2.0 / N as f64;
        let want = 2f64.sqrt() / h;
        assert!(
            (turnover - want).abs() < tol,
            "holding {h}: turnover {turnover:.4}, closed form {want:.4} (± {tol:.4})"
        );
    }
}

#[test]
fn missing_values_thin_the_book_without_breaking_it() {
    // A tenth of forecasts and returns missing: every period still books, and the
    // one-period IR stays within reach of the full panel's (the same draws). Dropped
    // forecasts and returns taken as the date's mean lose roughly 10–20 % of the
    // signal, against a per-period IR of 1.1 with σ 0.075 (Lo, 2002); the bound of a
    // half is a loose robustness check, not a closed form.
    let full = panel(12);
    let mut u = common::uniforms(13);
    let mut thinned = |xs: &[f64]| xs.iter().map(|&x| if u() < 0.1 { f64::NAN } else { x }).collect::<Vec<_>>();
    let (f, r) = (thinned(full.forecasts()), thinned(full.returns()));
    let thin = Panel::new(full.assets(), full.dates(), f, r).unwrap();
    assert!(thin.has_missing());
    let (a, b) = (own_books(&full, L, 20), own_books(&thin, L, 20));
    assert_eq!(a[0].n, b[0].n);
    let ir = |s: &lagfold::portfolio::BookSums| {
        let (m, sd) = s.net_mean_sd(0.0);
        m / sd
    };
    assert!(ir(&b[0]).is_finite() && ir(&b[0]) > 0.5 * ir(&a[0]), "{} vs {}", ir(&b[0]), ir(&a[0]));
}
