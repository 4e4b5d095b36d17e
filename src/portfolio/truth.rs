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
use crate::generate::Workspace;
use crate::measure::Measurement;
use crate::rng::path_rng;
use crate::stats::Moments;
use crate::study::{Setup, run_in_order};
use crate::truth::{argmax1, near_set};
use serde::Serialize;

/// Fixed seed of the reference simulation.
const REFERENCE_SEED: u64 = 0x7265_6665_7265_6e63;

/// One book's true figures per holding length (`[h − 1]`).
#[derive(Debug, Clone, Serialize)]
pub struct BookTruth {
    /// Annualised net information ratio at the scenario's cost.
    pub net_ir: Vec<f64>,
    /// Its Monte Carlo standard error (spread of per-history IRs / sqrt(paths)).
    pub net_ir_se: Vec<f64>,
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

/// Per-history buffers of the reference simulation.
struct RefWorker {
    ws: Workspace,
    meas: Measurement,
    books: BookBuilder,
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

fn book_truth(pooled: &[BookSums], per_path: &[Vec<BookSums>], c: f64, ppy: f64, tol: f64) -> BookTruth {
    let (net_ir, net_ir_se) = net_ir_at(pooled, per_path, c, ppy);
    let best_holding = argmax1(&net_ir);
    BookTruth {
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

impl PortfolioTruth {
    /// Runs the reference simulation on `threads` threads.
    pub fn compute(setup: &Setup, threads: usize, progress: &(dyn Fn(usize) + Sync)) -> Self {
        let s = &setup.scenario;
        let (l, spec) = (s.horizons, s.portfolio);
        let mut per_path: Vec<PathBooks> = Vec::with_capacity(spec.reference_paths);
        run_in_order(
            threads,
            spec.reference_paths,
            || RefWorker { ws: Workspace::default(), meas: Measurement::new(l, false), books: BookBuilder::default() },
            |w, p| {
                setup.generator.simulate(&mut path_rng(REFERENCE_SEED, p), &mut w.ws);
                w.meas.update(&w.ws.panel);
                w.books.build(&w.ws.panel, &w.meas, s.residual_vol, Some(spec.quantiles))
            },
            |b| per_path.push(b),
            progress,
        );
        let pool = |pick: fn(&PathBooks) -> &Vec<BookSums>| {
            let mut sums = vec![BookSums::default(); l];
            per_path.iter().for_each(|b| sums.iter_mut().zip(pick(b)).for_each(|(a, x)| a.merge(x)));
            sums
        };
        let (lin, qua) = (pool(|b| &b.linear), pool(|b| &b.quantile));
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
