//! Every decay family by recursion: the loadings `b_k` of a curve without a
//! closed recursive form are approximated by a short sum of exponentials,
//!
//! `b̃_k = d_k·[k ≤ s] + β·ρ^{k−1} + Σ_i a_i·λ_i^{k−1}`,
//!
//! so that the generator runs one first-order recursion per term
//! (`X_i ← λ_i·X_i + z`) and `s` explicit taps on the latest news instead of
//! a `K`-tap convolution of past news; the `ρ` term is the forecast itself
//! (`Σ_k ρ^{k−1} z_{t+1−k} = f_t/sqrt(1−ρ²)`). The first `s` loadings (where
//! humps and kinks live) are kept exactly by the taps; the rates are fixed on
//! a geometric grid of time scales and the weights fitted to the loadings
//! beyond `s` by least squares (Beylkin and Monzón, 2005, on approximation by
//! exponential sums). Taps and terms grow until the truth the
//! approximated loadings imply — per-date lagged IC and pooled horizon IC
//! for every lag and horizon studied — is within [`IC_TOLERANCE`] of the
//! exact one. Otherwise the exact convolution stays. The study's truth is
//! always computed from the exact loadings; the generator's own truth differs
//! from it by at most the stated error (`truth.generator_ic_error`).

use crate::model::Model;
use nalgebra::{DMatrix, DVector};

/// Largest absolute IC error the approximation may add to any lagged or
/// horizon IC studied: far below any study's Monte Carlo error (a study of
/// 10^4 paths of 10^3 assets over 10^3 dates measures an IC to about 3·10⁻⁵).
pub const IC_TOLERANCE: f64 = 1e-5;
/// Most exponential terms tried (beside the forecast's own `ρ` term).
const MAX_TERMS: usize = 12;

/// Loadings as `d_k·[k ≤ s] + β·ρ^{k−1} + Σ_i a_i·λ_i^{k−1}`.
#[derive(Debug, Clone, PartialEq)]
pub struct ExponentialSum {
    /// Explicit taps `d_1 … d_s` on the latest news.
    pub taps: Vec<f64>,
    /// Weight of the forecast's own rate `ρ`.
    pub beta: f64,
    /// Weights `a_i`.
    pub weights: Vec<f64>,
    /// Rates `λ_i` in (0, 1).
    pub rates: Vec<f64>,
    /// Largest absolute difference between the truth these loadings imply and
    /// the exact truth, over the lagged and horizon ICs studied.
    pub ic_error: f64,
}

impl ExponentialSum {
    /// `b̃_k` for `k = 1, 2, …` until the rest is below 1e-16 (at least `min_len`).
    pub fn loadings(&self, rho: f64, min_len: usize) -> Vec<f64> {
        let mut b = Vec::with_capacity(min_len);
        let mut powers: Vec<f64> = vec![1.0; self.rates.len()];
        let mut rp = 1.0;
        while b.len() < 1_000_000 {
            let tap = self.taps.get(b.len()).copied().unwrap_or(0.0);
            let v = tap + self.beta * rp + self.weights.iter().zip(&powers).map(|(a, p)| a * p).sum::<f64>();
            b.push(v);
            rp *= rho;
            powers.iter_mut().zip(&self.rates).for_each(|(p, l)| *p *= l);
            let rest = self.beta.abs() * rp.abs() / (1.0 - rho.abs())
                + self
                    .weights
                    .iter()
                    .zip(&powers)
                    .zip(&self.rates)
                    .map(|((a, p), l)| (a * p).abs() / (1.0 - l))
                    .sum::<f64>();
            if b.len() >= min_len.max(self.taps.len()) && rest < 1e-16 {
                break;
            }
        }
        b
    }
}

impl ExponentialSum {
    /// One line saying how the generator applies it.
    pub fn note(&self) -> String {
        format!(
            "recursion: {} exponential terms and {} explicit taps standing in for the convolution's loadings \
             (largest IC error {:.1e}, within {IC_TOLERANCE:.0e})",
            self.rates.len(),
            self.taps.len(),
            self.ic_error
        )
    }
}

/// The rates of `m` terms: time scales `τ` geometric from `shortest` to `longest`, `λ = e^{−1/τ}`.
fn rates(m: usize, shortest: f64, longest: f64) -> Vec<f64> {
    let (lo, hi) = (shortest.ln(), longest.max(shortest).ln());
    (0..m)
        .map(|i| {
            let t = if m == 1 { hi } else { lo + (hi - lo) * i as f64 / (m - 1) as f64 };
            (-1.0 / t.exp()).exp()
        })
        .collect()
}

/// Least-squares weights of `β·ρ^{k−1} + Σ a_i·λ_i^{k−1}` against `b` (zero
/// beyond its end) over `k = s+1..=rows`, by SVD with small singular values cut.
fn fit_weights(b: &[f64], rho: f64, rates: &[f64], s: usize, rows: usize) -> Option<(f64, Vec<f64>)> {
    let cols = rates.len() + 1;
    let basis = DMatrix::from_fn(rows - s, cols, |i, j| {
        let rate = if j == 0 { rho } else { rates[j - 1] };
        rate.powi((s + i) as i32)
    });
    let target = DVector::from_fn(rows - s, |i, _| b.get(s + i).copied().unwrap_or(0.0));
    let svd = basis.svd(true, true);
    let x = svd.solve(&target, 1e-13 * svd.singular_values.max()).ok()?;
    x.iter().all(|v| v.is_finite()).then(|| (x[0], x.iter().skip(1).copied().collect()))
}

/// The truth a set of loadings implies, for the error check: per-date lagged
/// ICs and pooled horizon ICs ([`crate::truth::pooled_horizon_ic`]) of lags
/// and horizons `1..=l`.
fn implied(m: &Model, l: usize) -> Vec<f64> {
    let mut out: Vec<f64> = (1..=l).map(|k| m.per_date_lagged_ic(k)).collect();
    out.extend(crate::truth::pooled_horizon_ic(m, l));
    out
}

/// Explicit taps tried, fewest first.
const TAPS: [usize; 5] = [0, 2, 4, 8, 16];

/// The cheapest exponential sum (taps plus twice the terms) standing in for
/// `model`'s loadings within [`IC_TOLERANCE`] on lags and horizons `1..=l`,
/// or `None` when the exact kernel is already a recursion, is no longer than
/// the taps would be, or no sum of up to `MAX_TERMS` (12) terms is close enough.
pub fn fit(model: &Model, l: usize) -> Option<ExponentialSum> {
    if !matches!(model.kernel(), crate::model::Kernel::Convolution) {
        return None;
    }
    let b = model.loadings();
    let rho = model.rho();
    let exact = implied(model, l);
    let spans: Vec<(f64, f64)> =
        [0.5, 1.0].into_iter().flat_map(|lo| [0.5, 1.0, 2.0, 4.0].map(|f| (lo, f * b.len() as f64))).collect();
    let rows = 2 * b.len() + 4 * (1.0 / (1.0 - rho.abs())).ceil() as usize + 16;
    let mut best: Option<(usize, ExponentialSum)> = None;
    for s in TAPS.into_iter().filter(|&s| s < b.len()) {
        for m in 1..=MAX_TERMS {
            let cost = s + 2 * m;
            if cost >= b.len() || best.as_ref().is_some_and(|(c, _)| cost >= *c) {
                break;
            }
            let found = spans.iter().find_map(|&(lo, hi)| {
                let lambdas = rates(m, lo, hi);
                let (beta, weights) = fit_weights(b, rho, &lambdas, s, rows)?;
                let mut approx =
                    ExponentialSum { taps: Vec::new(), beta, weights, rates: lambdas, ic_error: f64::INFINITY };
                let smooth = approx.loadings(rho, s);
                approx.taps = (0..s).map(|k| b[k] - smooth[k]).collect();
                let stand_in = model.with_loadings(approx.loadings(rho, b.len()))?;
                let error = implied(&stand_in, l).iter().zip(&exact).map(|(a, e)| (a - e).abs()).fold(0.0, f64::max);
                approx.ic_error = error;
                (error <= IC_TOLERANCE).then_some(approx)
            });
            if let Some(approx) = found {
                best = Some((cost, approx));
                break;
            }
        }
    }
    best.map(|(_, a)| a)
}
