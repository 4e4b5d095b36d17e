//! Stage 1 (truth): the lagged- and horizon-IC curves that a long history
//! would show, the true optimal horizon and the near-best set (MODEL.md §2).
//!
//! Three forms of the horizon IC are reported:
//! - **per-date** (the study's truth): the expectation over the common shocks of
//!   the large-`N` per-date correlation of `f[·,t]` with `Σ_{k≤n} r[·,t+k]`,
//!   which is what the measured mean estimates;
//! - **pooled**: `H(n) = Σ_{k≤n} g_k / sqrt(V_n)`, `V_n = n + 2·Σ_{d<n} (n−d)·γ_d`;
//! - **simple**: `Σ_{k≤n} IC_k / sqrt(n)` (Qian, Hua and Sorensen, 2007), the
//!   relation under uncorrelated equal-variance returns.

use crate::error::ScenarioError;
use crate::model::Model;
use crate::rng::{fill_normal, path_rng};
use crate::stats::{argmax1, near_set};
use serde::Serialize;

/// Antithetic pairs of shock paths used to integrate the per-date horizon IC.
const SHOCK_PAIRS: usize = 1 << 15;
/// Fixed seed of that integration (a property of the scenario, not of `--seed`).
const SHOCK_SEED: u64 = 0x6c61_6766_6f6c_6421;

/// The true curves, optimum and near-best set for horizons `1..=L`.
#[derive(Debug, Clone, Serialize)]
pub struct Truth {
    /// Expected per-date lagged IC `IC_k`, `k = 1..L` (the user's curve).
    pub lagged_ic: Vec<f64>,
    /// Expected per-date horizon IC (the study's truth).
    pub horizon_ic: Vec<f64>,
    /// Pooled horizon IC `Σ g_k / sqrt(V_n)`.
    pub horizon_ic_pooled: Vec<f64>,
    /// `Σ IC_k / sqrt(n)` from the user's curve.
    pub horizon_ic_simple: Vec<f64>,
    /// Largest Monte Carlo standard error of `horizon_ic` (0 when `ic_vol = 0`).
    pub horizon_ic_integration_se: f64,
    /// The true optimal horizon `n*` (1-based) of `horizon_ic`.
    pub best_horizon: usize,
    /// `n*` of the pooled form (1-based).
    pub best_horizon_pooled: usize,
    /// `n*` of the simple form (1-based).
    pub best_horizon_simple: usize,
    /// Horizons (1-based) whose true horizon IC is within the tolerance of the peak.
    pub near_best: Vec<usize>,
    /// The tolerance used for `near_best` (share of the peak).
    pub near_best_tolerance: f64,
    /// Lag `K` beyond which the IC is zero.
    pub truncation: usize,
    /// Loadings the truth sums over (a convolution's cut tail sums to under 1e-6).
    pub loadings_used: usize,
    /// How the generator applies the loadings.
    pub generator: String,
    /// Largest absolute difference, over the lagged and horizon ICs studied,
    /// between this truth and the truth of the loadings the generator uses,
    /// when it approximates them by an exponential sum ([`crate::exp_sum`]).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub generator_ic_error: Option<f64>,
}

impl Truth {
    /// Computes every truth for horizons `1..=horizons`.
    ///
    /// # Errors
    /// [`ScenarioError::NoPositiveHorizon`] when the horizon IC never rises above zero.
    pub fn new(m: &Model, horizons: usize, tolerance: f64) -> Result<Self, ScenarioError> {
        let l = horizons;
        let lagged_ic: Vec<f64> = (1..=l).map(|k| m.per_date_lagged_ic(k)).collect();
        let horizon_ic_simple = cumulative_over_sqrt(
            &(1..=l).map(|k| m.target.get(k - 1).copied().unwrap_or(0.0)).collect::<Vec<_>>(),
            |n| n as f64,
        );
        let horizon_ic_pooled = pooled_horizon_ic(m, l);
        let (horizon_ic, horizon_ic_integration_se) =
            if m.ic_vol == 0.0 { (horizon_ic_pooled.clone(), 0.0) } else { per_date_horizon_ic(m, l) };
        let best_horizon = argmax1(&horizon_ic);
        let peak = horizon_ic[best_horizon - 1];
        if peak.is_nan() || peak <= 0.0 {
            return Err(ScenarioError::NoPositiveHorizon { horizons: l, best: peak });
        }
        let near_best = near_set(&horizon_ic, tolerance);
        Ok(Self {
            lagged_ic,
            best_horizon_pooled: argmax1(&horizon_ic_pooled),
            best_horizon_simple: argmax1(&horizon_ic_simple),
            horizon_ic,
            horizon_ic_pooled,
            horizon_ic_simple,
            horizon_ic_integration_se,
            best_horizon,
            near_best,
            near_best_tolerance: tolerance,
            truncation: m.truncation(),
            loadings_used: m.loadings_used(),
            generator: m.kernel_note(),
            generator_ic_error: None,
        })
    }

    /// Whether horizon `n` (1-based) is in the near-best set.
    pub fn is_near_best(&self, n: usize) -> bool {
        self.near_best.binary_search(&n).is_ok()
    }

    /// True horizon IC at horizon `n` (1-based).
    pub fn h(&self, n: usize) -> f64 {
        self.horizon_ic[n - 1]
    }
}

/// `Σ_{k≤n} x_k / sqrt(var(n))` for `n = 1..=len`.
/// The pooled horizon IC `H(n) = Σ_{k≤n} g_k / sqrt(V_n)`,
/// `V_n = n + 2·Σ_{d<n} (n−d)·γ_d`, for `n = 1..=l`.
pub fn pooled_horizon_ic(m: &Model, l: usize) -> Vec<f64> {
    let gamma: Vec<f64> = (0..l).map(|d| m.return_autocov(d)).collect();
    let pooled_var = |n: usize| n as f64 + 2.0 * (1..n).map(|d| (n - d) as f64 * gamma[d]).sum::<f64>();
    cumulative_over_sqrt(&(1..=l).map(|k| m.g(k)).collect::<Vec<_>>(), pooled_var)
}

fn cumulative_over_sqrt(x: &[f64], var: impl Fn(usize) -> f64) -> Vec<f64> {
    let mut s = 0.0;
    x.iter()
        .enumerate()
        .map(|(i, v)| {
            s += v;
            s / var(i + 1).sqrt()
        })
        .collect()
}

/// Expected per-date horizon IC by Monte Carlo over the common shocks alone.
///
/// Given shocks `φ_1..φ_n` on the periods after a date, the large-`N`
/// cross-sectional covariance of `f_t` with `Σ_{k≤n} r_{t+k}` is
/// `Σ_k (g_k + φ_k·ρ^{k−1})`, and the variance of the sum is built up from
/// `Var(r_k) = 1 − v² + φ_k² + 2φ_k·g_1` and, for `k < l`, `d = l − k`,
/// `Cov(r_k, r_l) = c_d + φ_l·ρ^d·g_1 + φ_k·g_{d+1} + φ_k·φ_l·ρ^d`
/// (derived from the model of MODEL.md §1). Antithetic pairs `±φ` and the
/// horizon-1 value as a control variate; returns the curve and the largest
/// standard error.
fn per_date_horizon_ic(m: &Model, l: usize) -> (Vec<f64>, f64) {
    let (rho, v, psi) = (m.rho, m.ic_vol, m.psi);
    let g: Vec<f64> = (1..=l + 1).map(|k| m.g(k)).collect();
    let g1 = g[0];
    let c_cum: Vec<f64> = {
        let mut acc = 0.0;
        (1..=l)
            .map(|n| {
                let out = acc; // Σ_{d=1}^{n-1} c_d
                acc += m.news_autocov(n);
                out
            })
            .collect()
    };
    let rho_cum: Vec<f64> = (1..=l).map(|n| (1..n).map(|d| rho.powi(d as i32)).sum()).collect();
    let mut rng = path_rng(SHOCK_SEED, 0);
    let mut x = vec![0.0; l];
    let mut phi = vec![0.0; l];
    let mut h_pos = vec![0.0; l];
    let mut h_neg = vec![0.0; l];
    let mut sum = vec![0.0; l];
    let mut sum_sq = vec![0.0; l];
    let mut sum_cross = vec![0.0; l];
    let innov = v * (1.0 - psi * psi).sqrt();
    let eval = |phi: &[f64], out: &mut [f64]| {
        let (mut num, mut var, mut q, mut rho_pow) = (0.0, 0.0, 0.0, 1.0);
        for n in 1..=l {
            let p = phi[n - 1];
            num += g[n - 1] + p * rho_pow;
            rho_pow *= rho;
            // W_n = Σ_{k<n} φ_k·g_{n−k+1}
            let w: f64 = (1..n).map(|k| phi[k - 1] * g[n - k]).sum();
            if n > 1 {
                q = rho * (q + phi[n - 2]); // Q_n = Σ_{k<n} φ_k·ρ^{n−k}
            }
            var += 1.0 - v * v + p * p + 2.0 * p * g1 + 2.0 * (c_cum[n - 1] + p * g1 * rho_cum[n - 1] + w + p * q);
            out[n - 1] = num / var.sqrt();
        }
    };
    for _ in 0..SHOCK_PAIRS {
        fill_normal(&mut rng, &mut x);
        let mut prev = v * x[0];
        phi[0] = prev;
        for k in 1..l {
            prev = psi * prev + innov * x[k];
            phi[k] = prev;
        }
        eval(&phi, &mut h_pos);
        phi.iter_mut().for_each(|p| *p = -*p);
        eval(&phi, &mut h_neg);
        let control = 0.5 * (h_pos[0] + h_neg[0]);
        for n in 0..l {
            let pair = 0.5 * (h_pos[n] + h_neg[n]);
            sum[n] += pair;
            sum_sq[n] += pair * pair;
            sum_cross[n] += pair * control;
        }
    }
    // Control variate: the horizon-1 value, whose expectation is known exactly
    // (it is the lag-1 IC, integrated by quadrature). y − β(x − E x) with
    // β = cov(y, x)/var(x) keeps the mean and removes the shared noise; at
    // n = 1 it returns the exact value.
    let mp = SHOCK_PAIRS as f64;
    let mean_x = sum[0] / mp;
    let sxx = sum_sq[0] - mp * mean_x * mean_x;
    let exact_x = m.per_date_lagged_ic(1);
    let (mut curve, mut se) = (Vec::with_capacity(l), 0.0f64);
    for n in 0..l {
        let mean_y = sum[n] / mp;
        let syy = sum_sq[n] - mp * mean_y * mean_y;
        let sxy = sum_cross[n] - mp * mean_x * mean_y;
        let beta = if sxx > 0.0 { sxy / sxx } else { 0.0 };
        curve.push(mean_y - beta * (mean_x - exact_x));
        se = se.max(((syy - beta * sxy).max(0.0) / (mp * (mp - 1.0))).sqrt());
    }
    (curve, se)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::scenario::{Overrides, load};

    fn truth(extra: &str, decay: &str) -> (Model, Truth) {
        let text = format!("assets = 100\nhistory = 100\nhorizons = 40\n{extra}\n[decay]\n{decay}\n");
        let s = load(&text, "test", "t", &Overrides::default()).unwrap();
        let m = Model::new(&s).unwrap();
        let t = Truth::new(&m, s.horizons, s.near_best_tolerance).unwrap();
        (m, t)
    }

    #[test]
    fn exponential_optimum_is_near_1_81_half_lives() {
        // Qian, Hua and Sorensen (2007): H(n) = Σ_{k≤n} IC_k / sqrt(n). For
        // IC_k = IC_1·λ^{k−1} the continuous optimum solves
        // 2·n·ln(1/λ)·λ^n = 1 − λ^n, i.e. n ≈ 1.81 half-lives (derived; the
        // root of 2x·ln2·2^{−x} = 1 − 2^{−x} in half-lives is x = 1.8133).
        for h in [2.0f64, 3.0, 5.0, 8.0] {
            let (_, t) = truth("", &format!("family = \"exponential\"\nic1 = 0.05\nhalf_life = {h}"));
            let n = t.best_horizon_simple as f64;
            assert!((n - 1.8133 * h).abs() <= 1.0, "half-life {h}: best {n}");
        }
    }

    #[test]
    fn simple_form_matches_the_geometric_closed_form() {
        // Qian, Hua and Sorensen (2007): H(n) = Σ_{k≤n} IC_k/sqrt(n); for
        // IC_k = IC_1·λ^{k−1} the sum is geometric, H(n) = IC_1·(1 − λ^n)/((1 − λ)·sqrt(n)).
        // Catches: a lag off by one (λ^k), or dividing by n instead of sqrt(n).
        let (_, t) = truth("", "family = \"exponential\"\nic1 = 0.05\nhalf_life = 3");
        let lambda = 2f64.powf(-1.0 / 3.0);
        for n in [1usize, 5, 12, 40] {
            let want = 0.05 * (1.0 - lambda.powi(n as i32)) / ((1.0 - lambda) * (n as f64).sqrt());
            assert!(
                (t.horizon_ic_simple[n - 1] - want).abs() < 1e-14,
                "n {n}: {} vs {want}",
                t.horizon_ic_simple[n - 1]
            );
        }
    }

    #[test]
    fn without_ic_vol_and_autocorrelated_returns_pooled_equals_simple_up_to_gamma() {
        // ρ = 0 makes g = IC and b = g, so γ_d = Σ b_j·b_{j+d}; check V_n by hand at n = 2.
        let (m, t) = truth("", "family = \"exponential\"\nic1 = 0.05\nhalf_life = 10");
        let v2 = 2.0 + 2.0 * m.news_autocov(1);
        assert!((t.horizon_ic_pooled[1] - (m.g(1) + m.g(2)) / v2.sqrt()).abs() < 1e-15);
        assert_eq!(t.horizon_ic, t.horizon_ic_pooled);
        // MODEL.md §2: at ρ = 0, IC_1 = 0.05, half-life 10 the optimum moves from 18 to 15.
        assert_eq!((t.best_horizon_simple, t.best_horizon), (18, 15));
    }

    #[test]
    fn per_date_truth_with_shocks_sits_below_pooled() {
        let (_, t) = truth(
            "forecast_autocorrelation = 0.8\nic_vol = 0.2\nic_vol_persistence = 0.5",
            "family = \"exponential\"\nic1 = 0.05\nhalf_life = 6",
        );
        // 2^15 antithetic pairs with a control variate: the integration error is
        // below 5e-5 here (0.05 % of the curve), and zero at horizon 1.
        assert!((t.horizon_ic[0] - t.lagged_ic[0]).abs() < 1e-15);
        assert!(t.horizon_ic_integration_se < 5e-5, "{}", t.horizon_ic_integration_se);
        for n in 1..=40 {
            assert!(t.horizon_ic[n - 1] < t.horizon_ic_pooled[n - 1], "n = {n}");
        }
    }
}
