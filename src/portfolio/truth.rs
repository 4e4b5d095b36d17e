//! The portfolios' truth per holding length: large-`N` closed forms where
//! they exist, and a reference simulation for everything else (MODEL.md §5).
//!
//! Closed forms, for weights proportional to a standardised normal score at
//! unit gross exposure (`E|f| = sqrt(2/π)`):
//! - expected gross return per period `σ·sqrt(π/2)·(1/h)·Σ_{k≤h} g_k`, with
//!   `g_k` the pooled correlation: a book earns the cross-sectional
//!   *covariance*, whose mean is `g_k`; it equals the per-date `IC_k` when
//!   `ic_vol = 0` and sits slightly above it otherwise (MODEL.md §1);
//! - traded notional per period `sqrt(2(1−ρ^h))/h`, from
//!   `E|Δ| = 2·sqrt((1−ρ)/π)` per unit of score (Qian, Sorensen and Hua, 2007).
//!
//! The volatility, and so the information ratio, has no closed form here (IC
//! shocks, overlapping tranches, finite breadth): it comes from
//! `reference_paths` histories simulated with a fixed internal seed (a
//! property of the scenario, not of `--seed`), pooled over all their dates.

use super::books::{BookBuilder, PathBooks};
use super::sums::BookSums;
use crate::simulate::{PathWorker, Setup, run_in_order};
use crate::stats::Moments;
use crate::stats::{argmax1, near_set};
use serde::Serialize;
use std::ops::Range;

/// Fixed seed of the reference simulation.
const REFERENCE_SEED: u64 = 0x7265_6665_7265_6e63;

/// One book's true figures per holding length (`[h − 1]`).
#[derive(Debug, Clone, Serialize)]
pub struct BookTruth {
    /// Annualised net information ratio at the scenario's cost.
    pub net_ir: Vec<f64>,
    /// Its Monte Carlo standard error (spread of per-history IRs / sqrt(paths)).
    pub net_ir_se: Vec<f64>,
    /// Paired Monte Carlo standard error of the gap to the best holding,
    /// `IR(best) − IR(h)`, from the same reference histories (0 at the best).
    pub net_ir_gap_se: Vec<f64>,
    /// Holding lengths the reference simulation cannot tell from the best:
    /// gap below [`TIE_SES`] paired standard errors (the best included).
    pub tied_with_best: Vec<usize>,
    /// Annualised gross information ratio.
    pub gross_ir: Vec<f64>,
    /// Mean traded notional per period (unit gross exposure).
    pub turnover: Vec<f64>,
    /// Mean gross return per period.
    pub gross_mean: Vec<f64>,
    /// Mean cost per period.
    pub cost_mean: Vec<f64>,
    /// Mean net return per period.
    pub net_mean: Vec<f64>,
    /// Volatility of the net return per period.
    pub net_vol: Vec<f64>,
    /// The best holding length by net IR (1-based).
    pub best_holding: usize,
    /// Holding lengths within the near-best tolerance of the best net IR.
    pub near_best_holding: Vec<usize>,
}

/// The true figures of both books, the closed forms and the pooled sums.
#[derive(Debug, Clone, Serialize)]
pub struct PortfolioTruth {
    /// One-way cost used for the net figures, basis points.
    pub cost_bps: f64,
    /// Histories in the reference simulation.
    pub reference_paths: usize,
    /// Dates per history that enter the comparison (`T − 1 − L`).
    pub dates_per_path: usize,
    /// The book with weights proportional to the demeaned forecast.
    pub linear: BookTruth,
    /// The equal-weighted top-minus-bottom quantile book.
    pub quantile: BookTruth,
    /// Large-`N` expected gross return per period of the linear book.
    pub gross_mean_large_n: Vec<f64>,
    /// Large-`N` traded notional per period of the linear book.
    pub turnover_large_n: Vec<f64>,
    /// Pooled sums of the linear book, per holding length (for other costs).
    #[serde(skip)]
    pub linear_sums: Vec<BookSums>,
    /// Per-history sums of the linear book (for standard errors at other costs).
    #[serde(skip)]
    pub linear_paths: Vec<Vec<BookSums>>,
}

/// True net IR per holding length at cost `c` from pooled sums, with the
/// standard error from the spread of per-history IRs.
pub fn net_ir_at(pooled: &[BookSums], per_path: &[Vec<BookSums>], c: f64, ppy: f64) -> (Vec<f64>, Vec<f64>) {
    let l = pooled.len();
    let ir = pooled.iter().map(|s| s.ir(c, ppy)).collect();
    let se = (0..l)
        .map(|h| {
            let mut m = Moments::default();
            per_path.iter().for_each(|p| m.push(p[h].ir(c, ppy)));
            m.se().unwrap_or(f64::NAN)
        })
        .collect();
    (ir, se)
}

/// Standard errors within which a holding's gap to the best counts as a tie
/// (two-sided 95 %).
pub const TIE_SES: f64 = crate::stats::Z95;

/// Paired standard errors of `IR(best) − IR(h)` at cost `c` across the
/// reference histories (the same histories price every holding, so their
/// common noise cancels in the gap).
pub fn gap_se(per_path: &[Vec<BookSums>], best: usize, c: f64, ppy: f64) -> Vec<f64> {
    let l = per_path.first().map_or(0, Vec::len);
    (1..=l)
        .map(|h| {
            let mut m = Moments::default();
            per_path.iter().for_each(|p| m.push(p[best - 1].ir(c, ppy) - p[h - 1].ir(c, ppy)));
            if h == best { 0.0 } else { m.se().unwrap_or(f64::NAN) }
        })
        .collect()
}

/// Holdings whose gap to the best is within [`TIE_SES`] of its paired standard error.
pub fn tied(net_ir: &[f64], gap_se: &[f64], best: usize) -> Vec<usize> {
    (1..=net_ir.len()).filter(|&h| h == best || net_ir[best - 1] - net_ir[h - 1] <= TIE_SES * gap_se[h - 1]).collect()
}

fn book_truth(pooled: &[BookSums], per_path: &[Vec<BookSums>], c: f64, ppy: f64, tol: f64) -> BookTruth {
    let (net_ir, net_ir_se) = net_ir_at(pooled, per_path, c, ppy);
    let best_holding = argmax1(&net_ir);
    let net_ir_gap_se = gap_se(per_path, best_holding, c, ppy);
    BookTruth {
        tied_with_best: tied(&net_ir, &net_ir_gap_se, best_holding),
        net_ir_gap_se,
        near_best_holding: near_set(&net_ir, tol),
        best_holding,
        net_ir,
        net_ir_se,
        gross_ir: pooled.iter().map(|s| s.ir(0.0, ppy)).collect(),
        turnover: pooled.iter().map(BookSums::turnover).collect(),
        gross_mean: pooled.iter().map(BookSums::gross_mean).collect(),
        cost_mean: pooled.iter().map(|s| c * s.turnover()).collect(),
        net_mean: pooled.iter().map(|s| s.net_mean_sd(c).0).collect(),
        net_vol: pooled.iter().map(|s| s.net_mean_sd(c).1).collect(),
    }
}

/// The books of reference histories `paths` (a block of
/// `0..reference_paths`), in path order, on `threads` threads; the quantile
/// book too when `quantile`. Each history's stream depends only on its index,
/// so blocks run apart and put end to end are the whole run's.
pub fn reference_books(
    setup: &Setup,
    paths: Range<usize>,
    quantile: bool,
    threads: usize,
    progress: &(dyn Fn(usize) + Sync),
) -> Vec<PathBooks> {
    let s = &setup.scenario;
    let (l, spec) = (s.horizons, s.portfolio);
    let q = quantile.then_some(spec.quantiles);
    let mut books: Vec<PathBooks> = Vec::with_capacity(paths.len());
    run_in_order(
        threads,
        paths,
        || (PathWorker::new(l, false), BookBuilder::default()),
        |(w, builder), p| {
            w.simulate_and_measure(setup, REFERENCE_SEED, p);
            builder.build(w.panel(), w.products(), s.residual_vol, q)
        },
        |b| books.push(b),
        progress,
    );
    books
}

/// Per-holding sums pooled over histories, added in path order.
pub fn pool<'a>(l: usize, per_path: impl IntoIterator<Item = &'a Vec<BookSums>>) -> Vec<BookSums> {
    let mut sums = vec![BookSums::default(); l];
    per_path.into_iter().for_each(|b| sums.iter_mut().zip(b).for_each(|(a, x)| a.merge(x)));
    sums
}

impl PortfolioTruth {
    /// Runs the reference simulation on `threads` threads.
    pub fn compute(setup: &Setup, threads: usize, progress: &(dyn Fn(usize) + Sync)) -> Self {
        let paths = 0..setup.scenario.portfolio.reference_paths;
        Self::from_books(setup, &reference_books(setup, paths, true, threads, progress))
    }

    /// The truth from every reference history's books (both books, path order).
    fn from_books(setup: &Setup, per_path: &[PathBooks]) -> Self {
        let s = &setup.scenario;
        let (l, spec) = (s.horizons, s.portfolio);
        let (lin, qua) = (pool(l, per_path.iter().map(|b| &b.linear)), pool(l, per_path.iter().map(|b| &b.quantile)));
        let lin_paths: Vec<Vec<BookSums>> = per_path.iter().map(|b| b.linear.clone()).collect();
        let qua_paths: Vec<Vec<BookSums>> = per_path.iter().map(|b| b.quantile.clone()).collect();
        let c = spec.cost_bps * 1e-4;
        let (ppy, tol) = (s.periods_per_year, s.near_best_tolerance);
        let ic = |k: usize| setup.model.g(k);
        let scale = s.residual_vol * (std::f64::consts::PI / 2.0).sqrt();
        Self {
            cost_bps: spec.cost_bps,
            reference_paths: spec.reference_paths,
            dates_per_path: s.history - 1 - l,
            linear: book_truth(&lin, &lin_paths, c, ppy, tol),
            quantile: book_truth(&qua, &qua_paths, c, ppy, tol),
            gross_mean_large_n: (1..=l).map(|h| scale * (1..=h).map(ic).sum::<f64>() / h as f64).collect(),
            turnover_large_n: (1..=l).map(|h| (2.0 * (1.0 - s.rho.powi(h as i32))).sqrt() / h as f64).collect(),
            linear_sums: lin,
            linear_paths: lin_paths,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Per-path sums whose per-period returns are `base + shift` for two books that share `base`.
    fn sums(base: &[f64], shift: f64) -> BookSums {
        let mut s = BookSums::default();
        base.iter().for_each(|&g| s.push(g + shift, 0.0));
        s
    }

    #[test]
    fn the_gap_is_paired_over_the_same_histories() {
        // Two books share each history's noise; the second earns a little less. Their IRs move
        // together from history to history, so the paired error of the gap is far below the
        // unpaired sqrt(se1² + se2²).
        let histories: Vec<Vec<BookSums>> = (0..6)
            .map(|p| {
                let base: Vec<f64> = (0..50).map(|t| ((p * 50 + t) as f64 * 0.7).sin() * 0.01 + 0.002).collect();
                vec![sums(&base, 0.0), sums(&base, -0.0005 * (1.0 + p as f64 * 0.1))]
            })
            .collect();
        let se = gap_se(&histories, 1, 0.0, 12.0);
        let mut m = Moments::default();
        histories.iter().for_each(|h| m.push(h[0].ir(0.0, 12.0) - h[1].ir(0.0, 12.0)));
        assert_eq!(se[0], 0.0);
        assert!((se[1] - m.se().unwrap()).abs() < 1e-15);
        let unpaired = (0..2)
            .map(|k| {
                let mut m = Moments::default();
                histories.iter().for_each(|h| m.push(h[k].ir(0.0, 12.0)));
                m.se().unwrap().powi(2)
            })
            .sum::<f64>()
            .sqrt();
        assert!(se[1] < 0.2 * unpaired, "paired {} vs unpaired {unpaired}", se[1]);
        assert_eq!(tied(&[1.0, 0.99, 0.5], &[0.0, 0.01, 0.01], 1), vec![1, 2]);
    }
}
