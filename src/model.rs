//! Stage 1 (truth): from the user's lagged-IC curve to the generator's
//! parameters (MODEL.md §1).
//!
//! The user's curve `IC_k` is the *expected per-date* cross-sectional IC. With
//! a common IC shock `φ ~ N(0, ic_vol²)` the per-date large-`N` lag-`k` IC is
//!
//! `(g_k + φ·ρ^{k−1}) / sqrt(1 − ic_vol² + φ² + 2φ·g_1)`
//!
//! where `g_k` is the pooled correlation. Its expectation is
//! `g_k·E0(g_1) + ρ^{k−1}·E1(g_1)` with `E0 = E[D^{−1/2}]`, `E1 = E[φ·D^{−1/2}]`,
//! so the calibration is a scalar fixed point in `g_1` followed by a closed form
//! for every other lag. Loadings follow from the pooled curve by
//! `b_k = (g_k − ρ·g_{k+1}) / sqrt(1 − ρ²)` (the sum telescopes).

use crate::decay::DecayShape;
use crate::error::ScenarioError;
use crate::scenario::Scenario;

/// Nodes and weights for `E[h(X)]`, `X ~ N(0, 1)`: the trapezoid rule on
/// `[−10, 10]`, which converges geometrically for smooth Gaussian-weighted
/// integrands (Trefethen and Weideman, 2014); 801 nodes reach machine precision
/// for the ratios used here.
pub(crate) fn normal_quadrature() -> impl Iterator<Item = (f64, f64)> {
    const HALF: i32 = 400;
    let h = 10.0 / HALF as f64;
    let c = h / (2.0 * std::f64::consts::PI).sqrt();
    (-HALF..=HALF).map(move |i| {
        let x = i as f64 * h;
        (x, c * (-0.5 * x * x).exp())
    })
}

/// `(E0, E1)` = `(E[D^{−1/2}], E[φ·D^{−1/2}])`, `D = 1 − v² + φ² + 2φ·g1`, `φ ~ N(0, v²)`.
pub(crate) fn shock_moments(ic_vol: f64, g1: f64) -> (f64, f64) {
    if ic_vol == 0.0 {
        return (1.0, 0.0);
    }
    let v2 = ic_vol * ic_vol;
    normal_quadrature().fold((0.0, 0.0), |(e0, e1), (x, w)| {
        let phi = ic_vol * x;
        let inv = 1.0 / (1.0 - v2 + phi * phi + 2.0 * phi * g1).sqrt();
        (e0 + w * inv, e1 + w * phi * inv)
    })
}

/// Total absolute size of the loadings' tail that may be cut (IC units).
pub const TAIL: f64 = 1e-6;

/// `g_k = sqrt(1−ρ²)·Σ_{j≥k} b_j·ρ^{j−k}` for `k = 1..=k_max` (MODEL.md §1).
fn pooled_from_loadings(b: &[f64], rho: f64, k_max: usize) -> Vec<f64> {
    let c = (1.0 - rho * rho).sqrt();
    let mut g = vec![0.0; k_max.max(b.len())];
    let mut acc = 0.0;
    for k in (1..=g.len()).rev() {
        acc = acc * rho + b.get(k - 1).copied().unwrap_or(0.0);
        g[k - 1] = c * acc;
    }
    g.truncate(k_max);
    g
}

/// How the generator turns news into returns.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Kernel {
    /// Finite loadings `b_1 … b_K'`: a banded convolution of past news.
    Convolution,
    /// `b_k = α·λ^{k−1} + β·ρ^{k−1}` for every `k ≥ 1`: exact first-order
    /// recursions, no convolution and no pre-sample news. This is what the
    /// exponential family calibrates to (`g_k = (IC_1·λ^{k−1} − ρ^{k−1}·E1)/E0`),
    /// used when the curve's tail beyond `K` is below [`TAIL`].
    TwoExponential {
        /// `α = IC_1·(1 − ρλ) / (E0·sqrt(1−ρ²))`.
        alpha: f64,
        /// `λ = 2^{−1/h}`.
        lambda: f64,
        /// `β = −E1·sqrt(1−ρ²) / E0`.
        beta: f64,
    },
}

/// The exact two-exponential kernel of an exponential curve, if its tail
/// beyond `k_max` (bounded by `|α|λ^K/(1−λ) + |β||ρ|^K/(1−|ρ|)`) is below [`TAIL`].
fn two_exponential(shape: &DecayShape, rho: f64, (e0, e1): (f64, f64), k_max: usize) -> Option<Kernel> {
    let &DecayShape::Exponential { ic1, half_life } = shape else { return None };
    let lambda = (-1.0 / half_life).exp2();
    let c = (1.0 - rho * rho).sqrt();
    let (alpha, beta) = (ic1 * (1.0 - rho * lambda) / (e0 * c), -e1 * c / e0);
    let k = k_max as i32;
    let tail = alpha.abs() * lambda.powi(k) / (1.0 - lambda) + beta.abs() * rho.abs().powi(k) / (1.0 - rho.abs());
    (tail <= TAIL).then_some(Kernel::TwoExponential { alpha, lambda, beta })
}

/// The loadings of a two-exponential kernel, up to where the rest is below 1e-16.
fn two_exponential_loadings(alpha: f64, lambda: f64, beta: f64, rho: f64, k_max: usize) -> Vec<f64> {
    let mut b = Vec::with_capacity(k_max);
    let (mut lp, mut rp) = (1.0, 1.0);
    while b.len() < 1_000_000 {
        b.push(alpha * lp + beta * rp);
        lp *= lambda;
        rp *= rho;
        let rest = alpha.abs() * lp / (1.0 - lambda) + beta.abs() * rp.abs() / (1.0 - rho.abs());
        if b.len() >= k_max && rest < 1e-16 {
            break;
        }
    }
    b
}

/// The generator's parameters, derived from a validated scenario by
/// [`Model::new`] (its only constructor); read through the methods of the
/// fields' names.
#[derive(Debug, Clone)]
pub struct Model {
    /// Forecast autocorrelation `ρ`.
    pub(crate) rho: f64,
    /// IC volatility `v` (sd of the common shock `φ`).
    pub(crate) ic_vol: f64,
    /// Persistence `ψ` of `φ`.
    pub(crate) psi: f64,
    /// The user's curve `IC_1 … IC_K` (expected per-date IC).
    pub(crate) target: Vec<f64>,
    /// Pooled correlations `g_1 … g_K` calibrated so that the per-date mean is `target`.
    pub(crate) pooled: Vec<f64>,
    /// Loadings `b_1 … b_K` of returns on past news.
    pub(crate) loadings: Vec<f64>,
    /// Idiosyncratic standard deviation `σ_e = sqrt(1 − Σb² − v²)`.
    pub(crate) idio_sd: f64,
    /// `E0` and `E1` at the calibrated `g_1`.
    pub(crate) shock_moments: (f64, f64),
    /// How the generator applies the loadings.
    pub(crate) kernel: Kernel,
}

impl Model {
    /// Forecast autocorrelation `ρ`.
    pub fn rho(&self) -> f64 {
        self.rho
    }

    /// IC volatility `v` (sd of the common shock `φ`).
    pub fn ic_vol(&self) -> f64 {
        self.ic_vol
    }

    /// Persistence `ψ` of `φ`.
    pub fn psi(&self) -> f64 {
        self.psi
    }

    /// The user's curve `IC_1 … IC_K` (expected per-date IC).
    pub fn target(&self) -> &[f64] {
        &self.target
    }

    /// Pooled correlations `g_1 … g_K` calibrated so that the per-date mean is `target`.
    pub fn pooled(&self) -> &[f64] {
        &self.pooled
    }

    /// Loadings `b_1 … b_K` of returns on past news.
    pub fn loadings(&self) -> &[f64] {
        &self.loadings
    }

    /// Idiosyncratic standard deviation `σ_e = sqrt(1 − Σb² − v²)`.
    pub fn idio_sd(&self) -> f64 {
        self.idio_sd
    }

    /// `E0` and `E1` at the calibrated `g_1`.
    pub fn shock_moments(&self) -> (f64, f64) {
        self.shock_moments
    }

    /// How the generator applies the loadings.
    pub fn kernel(&self) -> Kernel {
        self.kernel
    }
}

impl Model {
    /// Calibrates the pooled curve and derives the loadings.
    ///
    /// # Errors
    /// [`ScenarioError::Infeasible`] when `Σ b² + ic_vol² ≥ 1`.
    pub fn new(s: &Scenario) -> Result<Self, ScenarioError> {
        let k_max = s.truncation;
        let target = s.decay.values(k_max);
        let (rho, v) = (s.rho, s.ic_vol);
        // Fixed point in g1: IC1 = g1·E0(g1) + E1(g1). The map is a contraction
        // with factor O(v²·IC), so a handful of steps reach machine precision.
        let mut g1 = target[0];
        let mut moments = shock_moments(v, g1);
        for _ in 0..60 {
            let next = (target[0] - moments.1) / moments.0;
            let done = (next - g1).abs() <= 1e-16;
            g1 = next;
            moments = shock_moments(v, g1);
            if done {
                break;
            }
        }
        let (e0, e1) = moments;
        let mut rho_pow = 1.0;
        let pooled: Vec<f64> = target
            .iter()
            .map(|&ic| {
                let g = (ic - rho_pow * e1) / e0;
                rho_pow *= rho;
                g
            })
            .collect();
        let scale = 1.0 / (1.0 - rho * rho).sqrt();
        let mut loadings: Vec<f64> =
            (0..k_max).map(|k| (pooled[k] - rho * pooled.get(k + 1).copied().unwrap_or(0.0)) * scale).collect();
        let kernel = two_exponential(s.decay.shape(), rho, moments, k_max).unwrap_or(Kernel::Convolution);
        if let Kernel::TwoExponential { alpha, lambda, beta } = kernel {
            loadings = two_exponential_loadings(alpha, lambda, beta, rho, k_max);
        } else {
            // Cut the tail of loadings whose total size is below TAIL: every pooled
            // correlation moves by at most sqrt(1−ρ²)·TAIL, far below any Monte Carlo
            // error, and the generator's convolution gets shorter.
            let mut tail = 0.0;
            let mut used = loadings.len();
            while used > 1 && tail + loadings[used - 1].abs() <= TAIL {
                tail += loadings[used - 1].abs();
                used -= 1;
            }
            loadings.truncate(used);
        }
        // The truth is computed from the loadings actually used.
        let pooled = pooled_from_loadings(&loadings, rho, k_max);
        let moments = shock_moments(v, pooled[0]);
        let sum_b2: f64 = loadings.iter().map(|b| b * b).sum();
        let implied = 1.0 - sum_b2 - v * v;
        if implied.is_nan() || implied <= 1e-6 {
            return Err(ScenarioError::Infeasible { sum_b2, ic_vol_sq: v * v, implied });
        }
        Ok(Self {
            rho,
            ic_vol: v,
            psi: s.ic_vol_persistence,
            target,
            pooled,
            loadings,
            idio_sd: implied.sqrt(),
            shock_moments: moments,
            kernel,
        })
    }

    /// Truncation lag `K` of the user's curve (IC zero beyond).
    pub fn truncation(&self) -> usize {
        self.target.len()
    }

    /// Loadings actually used by the generator: `≤ K` for a convolution (the
    /// rest below [`TAIL`]); for a recursion, as many as the truth needs.
    pub fn loadings_used(&self) -> usize {
        self.loadings.len()
    }

    /// One line saying how the generator applies the loadings.
    pub fn kernel_note(&self) -> String {
        match self.kernel {
            Kernel::Convolution => format!("convolution of past news with {} loadings", self.loadings.len()),
            Kernel::TwoExponential { .. } => {
                "exact two-exponential recursion (exponential curve; its tail beyond the truncation is below 1e-6)"
                    .into()
            }
        }
    }

    /// Pooled `g_k` for `k ≥ 1` (zero beyond `K`).
    pub fn g(&self, k: usize) -> f64 {
        self.pooled.get(k - 1).copied().unwrap_or(0.0)
    }

    /// `c_d = Σ_j b_j·b_{j+d}`, the news part of the return autocovariance.
    pub fn news_autocov(&self, d: usize) -> f64 {
        let b = &self.loadings;
        if d >= b.len() {
            return 0.0;
        }
        b.iter().zip(&b[d..]).map(|(x, y)| x * y).sum()
    }

    /// Pooled return autocovariance `γ_d = c_d + v²·(ψρ)^d` (MODEL.md §2).
    pub fn return_autocov(&self, d: usize) -> f64 {
        self.news_autocov(d) + self.ic_vol * self.ic_vol * (self.psi * self.rho).powi(d as i32)
    }

    /// The same model with other loadings (an approximation's): pooled
    /// correlations, shock moments and idiosyncratic sd follow from them;
    /// `None` when they leave no room for noise.
    pub fn with_loadings(&self, loadings: Vec<f64>) -> Option<Self> {
        let pooled = pooled_from_loadings(&loadings, self.rho, loadings.len());
        let sum_b2: f64 = loadings.iter().map(|b| b * b).sum();
        let implied = 1.0 - sum_b2 - self.ic_vol * self.ic_vol;
        (implied > 1e-6).then(|| Self {
            shock_moments: shock_moments(self.ic_vol, pooled[0]),
            pooled,
            loadings,
            idio_sd: implied.sqrt(),
            kernel: Kernel::Convolution,
            ..self.clone()
        })
    }

    /// Expected per-date lag-`k` IC at large `N`: `g_k·E0 + ρ^{k−1}·E1`.
    pub fn per_date_lagged_ic(&self, k: usize) -> f64 {
        let (e0, e1) = self.shock_moments;
        self.g(k) * e0 + self.rho.powi(k as i32 - 1) * e1
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::scenario::{Overrides, load};

    fn scenario(extra: &str) -> Scenario {
        let text = format!(
            "assets = 100\nhistory = 60\nhorizons = 12\n{extra}\n[decay]\nfamily = \"exponential\"\nic1 = 0.05\nhalf_life = 3\n"
        );
        load(&text, "test", "t", &Overrides::default()).unwrap()
    }

    #[test]
    fn quadrature_integrates_normal_moments() {
        let (m0, m2, m4) =
            normal_quadrature().fold((0.0, 0.0, 0.0), |a, (x, w)| (a.0 + w, a.1 + w * x * x, a.2 + w * x.powi(4)));
        assert!((m0 - 1.0).abs() < 1e-14 && (m2 - 1.0).abs() < 1e-14 && (m4 - 3.0).abs() < 1e-13);
    }

    #[test]
    fn loadings_reproduce_the_calibrated_pooled_curve() {
        // The calibration gives g_k = (IC_k − ρ^{k−1}·E1)/E0 (MODEL.md §1); the
        // loadings are its inverse b_k = (g_k − ρ·g_{k+1})/sqrt(1−ρ²) (or the
        // exact two-exponential form), and the forward sum
        // sqrt(1−ρ²)·Σ_{j≥k} b_j·ρ^{j−k} must give g_k back up to the cut tail.
        // Catches: loadings without the 1/sqrt(1−ρ²) scale, a wrong sign of ρ in
        // the inverse, or a calibration that ignores E1.
        for decay in ["exponential\"\nic1 = 0.05\nhalf_life = 3", "hump\"\npeak = 0.04\npeak_lag = 3"] {
            let text = format!(
                "assets = 100\nhistory = 60\nhorizons = 12\nforecast_autocorrelation = 0.7\nic_vol = 0.2\n\
                 [decay]\nfamily = \"{decay}\n"
            );
            let m = Model::new(&load(&text, "test", "t", &Overrides::default()).unwrap()).unwrap();
            let (e0, e1) = m.shock_moments;
            let c = (1.0 - m.rho * m.rho).sqrt();
            for k in 1..=m.truncation() {
                let calibrated = (m.target[k - 1] - m.rho.powi(k as i32 - 1) * e1) / e0;
                let g: f64 = (k..=m.loadings_used()).map(|j| m.loadings[j - 1] * m.rho.powi((j - k) as i32)).sum();
                assert!((c * g - calibrated).abs() < 4.0 * TAIL, "{decay} lag {k}: {} vs {calibrated}", c * g);
            }
        }
    }

    #[test]
    fn calibration_hits_the_per_date_target_and_matches_the_second_order_gap() {
        for v in [0.05, 0.2] {
            let m = Model::new(&scenario(&format!("forecast_autocorrelation = 0.7\nic_vol = {v}"))).unwrap();
            for k in 1..=12 {
                // Cutting the loadings' tail moves the curve by at most TAIL.
                assert!((m.per_date_lagged_ic(k) - m.target[k - 1]).abs() <= TAIL);
                // MODEL.md §1: per-date ≈ g_k − v²·ρ^{k−1}·g_1 to second order. Expanding
                // D^{−1/2} to fourth order (derived here) leaves a remainder of about
                // g_k·(3/4·v⁴ + 3/2·v²·g_1²) + 3·v⁴·ρ^{k−1}·g_1 (3e-5 of g at v = 0.05,
                // 0.6 % at v = 0.2); allow 1.5 times that for the higher orders.
                let rk = 0.7f64.powi(k as i32 - 1);
                let (gk, g1) = (m.g(k), m.g(1));
                let approx = gk - v * v * rk * g1;
                let tol = 1.5 * (gk * (0.75 * v.powi(4) + 1.5 * v * v * g1 * g1) + 3.0 * v.powi(4) * rk * g1);
                assert!((approx - m.target[k - 1]).abs() < tol, "v {v} lag {k}: {approx} vs {}", m.target[k - 1]);
            }
        }
    }

    #[test]
    fn exponential_curves_use_the_exact_recursion_with_the_same_loadings() {
        // Half-life 3 cut at K = 96: the tail beyond K is about 1e-11.
        let s = scenario("forecast_autocorrelation = 0.7\nic_vol = 0.2\ntruncation = 96");
        let m = Model::new(&s).unwrap();
        let Kernel::TwoExponential { alpha, lambda, beta } = m.kernel else { panic!("{:?}", m.kernel) };
        // The closed form must equal the telescoped loadings of the calibrated curve.
        let (e0, e1) = m.shock_moments;
        let g = |k: i32| (0.05 * lambda.powi(k - 1) - 0.7f64.powi(k - 1) * e1) / e0;
        for k in 1..40 {
            let b = (g(k) - 0.7 * g(k + 1)) / (1.0 - 0.49f64).sqrt();
            assert!((alpha * lambda.powi(k - 1) + beta * 0.7f64.powi(k - 1) - b).abs() < 1e-15);
        }
        let long = scenario("forecast_autocorrelation = 0.7\ntruncation = 10");
        assert_eq!(Model::new(&long).unwrap().kernel, Kernel::Convolution, "a visible cut keeps the convolution");
    }

    #[test]
    fn infeasible_variance_names_both_parts() {
        let text = "assets = 100\nforecast_autocorrelation = 0.99\nic_vol = 0.9\n[decay]\nfamily = \"step\"\nic = 0.3\nlength = 30\n";
        let s = load(text, "t", "t", &Overrides::default()).unwrap();
        let e = Model::new(&s).unwrap_err().to_string();
        assert!(e.contains("infeasible variance") && e.contains("ic_vol"), "{e}");
    }
}
