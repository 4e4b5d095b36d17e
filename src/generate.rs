//! Stage 2: simulate one history (a [`Panel`]) from the model (MODEL.md §1).
//!
//! - forecast `f[i,t] = ρ·f[i,t−1] + sqrt(1−ρ²)·z[i,t]`;
//! - return over `(t, t+1]`: `Σ_{j=1}^{K} b_j·z[i,t+1−j] + φ_{t+1}·f[i,t] + σ_e·e[i,t+1]`;
//! - `φ` an AR(1) with marginal sd `ic_vol` and coefficient `ψ`.
//!
//! Two ways to apply the loadings ([`Kernel`]):
//! - **convolution**: the start is exactly stationary because `f` is drawn
//!   from `N(0, 1)` at date `−K` and run forward over every innovation that a
//!   simulated return loads on; each return row sums its `K` taps of news in
//!   tap order with one rounding per term (fused multiply-add), the same bits
//!   on every CPU (a general matrix multiply, used before, picks its kernel
//!   by CPU);
//! - **recursion** (exponential curves): with `b_k = α·λ^{k−1} + β·ρ^{k−1}`,
//!   the news part of the return over `(t, t+1]` is `α·X_{t+1} + β·f_t/sqrt(1−ρ²)`
//!   with `X_{t+1} = λ·X_t + z_t`; the stationary start draws `(f_0, X_1)`
//!   from their joint law (`Var X = 1/(1−λ²)`, `Cov(f, X) = sqrt(1−ρ²)/(1−ρλ)`);
//! - **exponential sum** (every other curve, when [`crate::exp_sum`] finds one
//!   within its stated IC error): `m` such states `X_i` with weights `a_i`, plus
//!   `s` explicit taps `d_k` on the latest news; the joint start of `f` and the
//!   states (`Cov(X_i, X_j) = 1/(1−λ_iλ_j)`) is drawn `s` dates before the
//!   first, and the recursion runs over those dates to fill the taps' news.

use crate::exp_sum::ExponentialSum;
use crate::measure::Panel;
use crate::model::{Kernel, Model};
use crate::rng::{PathRng, fill_normal};
use crate::scenario::Tails;
use crate::student_t::StudentTZiggurat;

/// Everything needed to simulate paths of one scenario.
#[derive(Debug, Clone)]
pub struct Generator {
    assets: usize,
    dates: usize,
    rho: f64,
    ic_vol: f64,
    psi: f64,
    idio_sd: f64,
    noise: Noise,
    news: News,
}

/// The law of the idiosyncratic noise, ready to draw.
#[derive(Debug, Clone)]
enum Noise {
    Normal,
    /// Student t by its ziggurat, times `scale = sqrt((ν−2)/ν)` for unit variance.
    StudentT {
        law: StudentTZiggurat,
        scale: f64,
    },
}

impl Noise {
    fn new(tails: Tails) -> Self {
        match tails {
            Tails::Normal => Noise::Normal,
            Tails::StudentT { dof } => {
                Noise::StudentT { law: StudentTZiggurat::new(dof), scale: ((dof - 2.0) / dof).sqrt() }
            }
        }
    }
}

/// The generator's form of the kernel.
#[derive(Debug, Clone)]
enum News {
    Convolution {
        /// `taps[m] = b_{K−m}` for `m < K`: the loading on news row `r + m`.
        taps: Vec<f64>,
    },
    Recursion {
        alpha: f64,
        lambda: f64,
        /// `β / sqrt(1−ρ²)`, the loading on the current forecast.
        beta_f: f64,
        /// `Cov(f_0, X_1)` and the residual sd of `X_1` given `f_0`.
        init: (f64, f64),
    },
    Exponentials {
        /// `β / sqrt(1−ρ²)`, the loading on the current forecast.
        beta_f: f64,
        /// Weights `a_i` and rates `λ_i` of the states.
        weights: Vec<f64>,
        rates: Vec<f64>,
        /// Explicit taps `d_1 … d_s`.
        taps: Vec<f64>,
        /// `(m+1) × (m+1)` factor `A` (row-major) of the joint covariance of
        /// `(f, X_1 … X_m)`: a start is `A·u` for standard normal `u`.
        start: Vec<f64>,
    },
}

/// A factor `A` with `A·Aᵀ = Σ` of the stationary covariance of `(f, X_1 … X_m)`
/// (`Var f = 1`, `Cov(f, X_i) = c/(1−ρλ_i)`, `Cov(X_i, X_j) = 1/(1−λ_iλ_j)`),
/// from its eigen-decomposition (eigenvalues below zero by rounding set to zero).
fn start_factor(rho: f64, rates: &[f64]) -> Vec<f64> {
    let c = (1.0 - rho * rho).sqrt();
    let rate = |i: usize| if i == 0 { None } else { Some(rates[i - 1]) };
    let dim = rates.len() + 1;
    let cov = nalgebra::DMatrix::from_fn(dim, dim, |i, j| match (rate(i), rate(j)) {
        (None, None) => 1.0,
        (None, Some(l)) | (Some(l), None) => c / (1.0 - rho * l),
        (Some(a), Some(b)) => 1.0 / (1.0 - a * b),
    });
    let eig = cov.symmetric_eigen();
    let mut a = vec![0.0; dim * dim];
    for i in 0..dim {
        for j in 0..dim {
            a[i * dim + j] = eig.eigenvectors[(i, j)] * eig.eigenvalues[j].max(0.0).sqrt();
        }
    }
    a
}

/// One date of the exponential recursion over all assets: the return
/// `r = α·x + (β_f + φ)·f + σ_e·e`, then `f' = ρ·f + c·z` and `x' = λ·x + z`.
/// Separate slices as arguments let the compiler vectorise the loop.
fn recursion_step(r: &mut [f64], f_next: &mut [f64], x: &mut [f64], f: &[f64], z: &[f64], e: &[f64], k: [f64; 6]) {
    let [alpha, beta_phi, sd, rho, c, lambda] = k;
    let n = r.len();
    let (f_next, x, f, z, e) = (&mut f_next[..n], &mut x[..n], &f[..n], &z[..n], &e[..n]);
    for i in 0..n {
        r[i] = alpha * x[i] + beta_phi * f[i] + sd * e[i];
        f_next[i] = rho * f[i] + c * z[i];
        x[i] = lambda * x[i] + z[i];
    }
}

/// Assets per block of the fused state pass (a few SIMD registers wide).
const LANES: usize = 8;

/// `out` row `r` (rows of `n`) `= Σ_{m<K} taps[m]·news[r + m]`, summed in
/// tap order with one rounding per term (`f64::mul_add`): the same bits on
/// every CPU. An AVX2 and FMA build is chosen at run time; elsewhere the
/// fused multiply-add may be done in software (slower, same bits).
fn tap_sums(out: &mut [f64], news: &[f64], n: usize, taps: &[f64]) {
    #[cfg(target_arch = "x86_64")]
    if std::arch::is_x86_feature_detected!("avx2") && std::arch::is_x86_feature_detected!("fma") {
        // SAFETY: the CPU supports AVX2 and FMA, checked just above.
        return unsafe { tap_sums_fma(out, news, n, taps) };
    }
    tap_sums_any(out, news, n, taps);
}

/// [`tap_sums`] compiled for AVX2 and FMA.
#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx2,fma")]
unsafe fn tap_sums_fma(out: &mut [f64], news: &[f64], n: usize, taps: &[f64]) {
    tap_sums_any(out, news, n, taps);
}

/// [`tap_sums`] for any CPU (inlined into each caller's features).
#[inline(always)]
fn tap_sums_any(out: &mut [f64], news: &[f64], n: usize, taps: &[f64]) {
    // Sixteen assets at a time, their sums held in registers across the taps
    // rather than stored and reloaded once per tap. The order of each sum,
    // and so its bits, is the same either way.
    const SPAN: usize = 16;
    for (r, row) in out.chunks_exact_mut(n).enumerate() {
        for (c, o) in row.chunks_mut(SPAN).enumerate() {
            let i0 = r * n + c * SPAN;
            let mut acc = [0.0; SPAN];
            let len = o.len(); // SPAN but for a row's last span
            span_sums(&mut acc[..len], taps, |m| &news[i0 + m * n..i0 + m * n + len]);
            o.copy_from_slice(&acc[..len]);
        }
    }
}

/// `acc[i] = Σ_m taps[m]·news(m)[i]` in tap order, one rounding per term.
#[inline(always)]
fn span_sums<'a>(acc: &mut [f64], taps: &[f64], news: impl Fn(usize) -> &'a [f64]) {
    for (m, &b) in taps.iter().enumerate() {
        for (a, &x) in acc.iter_mut().zip(news(m)) {
            *a = b.mul_add(x, *a);
        }
    }
}

/// One date of the exponential sum's states over all assets, in one pass:
/// `r += Σ_i a_i·X_i`, then `X_i ← λ_i·X_i + z` (states row-major, `X_i` at
/// `x[i·n..]`). Blocks of [`LANES`] assets keep the partial sums in registers
/// while every state is visited, instead of one pass over `r` per state.
///
/// On x86-64 CPUs with AVX2 the same code is compiled for four lanes a
/// register: the arithmetic per asset is unchanged (separate multiply and
/// add, no fused multiply-add, no reordering), so every CPU gives the same bits.
fn exponential_states(r: &mut [f64], x: &mut [f64], z: &[f64], weights: &[f64], rates: &[f64]) {
    #[cfg(target_arch = "x86_64")]
    if std::arch::is_x86_feature_detected!("avx2") {
        // SAFETY: the CPU supports AVX2, checked just above.
        return unsafe { exponential_states_avx2(r, x, z, weights, rates) };
    }
    exponential_states_any(r, x, z, weights, rates);
}

/// [`exponential_states`] compiled for AVX2.
#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx2")]
unsafe fn exponential_states_avx2(r: &mut [f64], x: &mut [f64], z: &[f64], weights: &[f64], rates: &[f64]) {
    exponential_states_any(r, x, z, weights, rates);
}

/// [`exponential_states`] for any CPU (inlined into each caller's features).
#[inline(always)]
fn exponential_states_any(r: &mut [f64], x: &mut [f64], z: &[f64], weights: &[f64], rates: &[f64]) {
    let n = r.len();
    let mut a = 0;
    while a + LANES <= n {
        let mut acc: [f64; LANES] = r[a..a + LANES].try_into().expect("a block");
        let zb: [f64; LANES] = z[a..a + LANES].try_into().expect("a block");
        for (i, (&w, &l)) in weights.iter().zip(rates).enumerate() {
            let xs: &mut [f64; LANES] = (&mut x[i * n + a..i * n + a + LANES]).try_into().expect("a block");
            for j in 0..LANES {
                acc[j] += w * xs[j];
                xs[j] = l * xs[j] + zb[j];
            }
        }
        r[a..a + LANES].copy_from_slice(&acc);
        a += LANES;
    }
    for a in a..n {
        for (i, (&w, &l)) in weights.iter().zip(rates).enumerate() {
            let xa = &mut x[i * n + a];
            r[a] += w * *xa;
            *xa = l * *xa + z[a];
        }
    }
}

/// `r += φ·f + σ_e·e` over one date.
fn add_row(r: &mut [f64], f: &[f64], e: &[f64], phi: f64, sd: f64) {
    let n = r.len();
    let (f, e) = (&f[..n], &e[..n]);
    for i in 0..n {
        r[i] += phi * f[i] + sd * e[i];
    }
}

/// Reusable buffers of one worker (no allocation per path).
#[derive(Debug, Clone, Default)]
pub struct Workspace {
    news: Vec<f64>,
    phi: Vec<f64>,
    f: Vec<f64>,
    phi_noise: Vec<f64>,
    /// The simulated history.
    pub panel: Panel,
}

impl Generator {
    /// A generator for `assets × dates` histories; `approx` replaces a
    /// convolution's loadings by an exponential sum.
    pub fn new(model: &Model, approx: Option<&ExponentialSum>, assets: usize, dates: usize, tails: Tails) -> Self {
        let rho = model.rho;
        let noise = Noise::new(tails);
        if let Some(e) = approx {
            let b = e.loadings(rho, model.loadings.len());
            let sum_b2: f64 = b.iter().map(|x| x * x).sum();
            let idio_sd = (1.0 - sum_b2 - model.ic_vol * model.ic_vol).max(0.0).sqrt();
            let news = News::Exponentials {
                beta_f: e.beta / (1.0 - rho * rho).sqrt(),
                weights: e.weights.clone(),
                rates: e.rates.clone(),
                taps: e.taps.clone(),
                start: start_factor(rho, &e.rates),
            };
            return Self { assets, dates, rho, ic_vol: model.ic_vol, psi: model.psi, idio_sd, noise, news };
        }
        let news = match model.kernel {
            Kernel::TwoExponential { alpha, lambda, beta } => {
                let c = (1.0 - rho * rho).sqrt();
                let cov = c / (1.0 - rho * lambda);
                let resid = (1.0 / (1.0 - lambda * lambda) - cov * cov).max(0.0).sqrt();
                News::Recursion { alpha, lambda, beta_f: beta / c, init: (cov, resid) }
            }
            Kernel::Convolution => {
                let k = model.loadings_used();
                News::Convolution { taps: (0..k).map(|m| model.loadings[k - 1 - m]).collect() }
            }
        };
        Self { assets, dates, rho, ic_vol: model.ic_vol, psi: model.psi, idio_sd: model.idio_sd, noise, news }
    }

    /// Normal variates drawn per path (for the bench's bare-draw baseline).
    pub fn draws_per_path(&self) -> usize {
        let (n, t) = (self.assets, self.dates);
        let news = match &self.news {
            News::Convolution { taps } => n + n * (t + taps.len() - 1),
            News::Recursion { .. } => 2 * n + n * (t - 1),
            News::Exponentials { weights, taps, .. } => (weights.len() + 1 + taps.len()) * n + n * (t - 1),
        };
        (t - 1) + news + n * (t - 1)
    }

    /// Simulates one history into `ws.panel`.
    pub fn simulate(&self, rng: &mut PathRng, ws: &mut Workspace) {
        let (n, t) = (self.assets, self.dates);
        if ws.panel.assets != n || ws.panel.dates != t {
            ws.panel = Panel::zeros(n, t);
        }
        ws.phi.resize(t - 1, 0.0);
        ws.f.resize(n, 0.0);

        // Common shocks φ for the periods of return rows 0..T−2, stationary start.
        fill_normal(rng, &mut ws.phi);
        let innov = self.ic_vol * (1.0 - self.psi * self.psi).sqrt();
        let mut prev = self.ic_vol * ws.phi[0];
        ws.phi[0] = prev;
        for p in ws.phi.iter_mut().skip(1) {
            prev = self.psi * prev + innov * *p;
            *p = prev;
        }
        match &self.news {
            News::Convolution { taps } => {
                self.convolve(rng, ws, taps);
                self.add_noise(rng, ws);
            }
            &News::Recursion { alpha, lambda, beta_f, init } => self.recurse(rng, ws, alpha, lambda, beta_f, init),
            News::Exponentials { beta_f, weights, rates, taps, start } => {
                self.exponentials(rng, ws, *beta_f, (weights, rates), taps, start);
            }
        }
    }

    /// Forecasts and whole returns by the exponential sum's recursions and taps.
    fn exponentials(
        &self,
        rng: &mut PathRng,
        ws: &mut Workspace,
        beta_f: f64,
        (weights, rates): (&[f64], &[f64]),
        taps: &[f64],
        start: &[f64],
    ) {
        let (n, t, m, s) = (self.assets, self.dates, weights.len(), taps.len());
        let c = (1.0 - self.rho * self.rho).sqrt();
        // Buffers: m state rows, then news rows for dates 1−s ..= T−1 (date d at row d + s − 1).
        let news_rows = s + t - 1;
        ws.news.resize((m + news_rows) * n, 0.0);
        ws.f.resize(n, 0.0);
        let (x, z) = ws.news.split_at_mut(m * n);
        // Stationary start of (f, X) at date −s (states holding news up to date −s).
        let dim = m + 1;
        let mut u = vec![0.0; dim * n];
        fill_normal(rng, &mut u);
        let f0 = &mut ws.f;
        for a in 0..n {
            for i in 0..dim {
                let v: f64 = (0..dim).map(|j| start[i * dim + j] * u[j * n + a]).sum();
                if i == 0 { f0[a] = v } else { x[(i - 1) * n + a] = v }
            }
        }
        // Dates 1−s ..= 0: news for the taps; the forecast and states run over it.
        let step = |f: &mut [f64], x: &mut [f64], z: &[f64]| {
            for (fa, &za) in f.iter_mut().zip(z) {
                *fa = self.rho * *fa + c * za;
            }
            for (i, &l) in rates.iter().enumerate() {
                for (xa, &za) in x[i * n..(i + 1) * n].iter_mut().zip(z) {
                    *xa = l * *xa + za;
                }
            }
        };
        for row in 0..s {
            fill_normal(rng, &mut z[row * n..(row + 1) * n]);
            step(f0, x, &z[row * n..(row + 1) * n]);
        }
        ws.panel.forecasts[..n].copy_from_slice(f0);
        let mut e = std::mem::take(&mut ws.phi_noise);
        e.resize(n, 0.0);
        for row in 0..t - 1 {
            self.draw_noise(rng, &mut e);
            let (old, zrow) = z.split_at_mut((row + s) * n);
            let zrow = &mut zrow[..n];
            fill_normal(rng, zrow);
            let (done, ahead) = ws.panel.forecasts.split_at_mut((row + 1) * n);
            let f = &done[row * n..];
            let r = &mut ws.panel.returns[row * n..(row + 1) * n];
            let load = beta_f + ws.phi[row];
            for a in 0..n {
                r[a] = load * f[a] + self.idio_sd * e[a];
            }
            // Return row `row` loads d_k on the news of date row + 1 − k, at row row + s − k.
            for (k, &d) in taps.iter().enumerate() {
                let at = row + s - 1 - k;
                for (ra, &za) in r.iter_mut().zip(&old[at * n..(at + 1) * n]) {
                    *ra += d * za;
                }
            }
            exponential_states(r, x, zrow, weights, rates);
            for ((next, &fa), &za) in ahead[..n].iter_mut().zip(&f[..n]).zip(zrow.iter()) {
                *next = self.rho * fa + c * za;
            }
        }
        ws.phi_noise = e;
    }

    /// Forecasts and whole returns by recursion (exponential kernel), one
    /// date at a time so that the news and noise rows stay in cache.
    fn recurse(&self, rng: &mut PathRng, ws: &mut Workspace, alpha: f64, lambda: f64, beta_f: f64, init: (f64, f64)) {
        let (n, t) = (self.assets, self.dates);
        let c = (1.0 - self.rho * self.rho).sqrt();
        // news rows: 0 = state X, 1 = innovations z, 2 = noise e.
        ws.news.resize(3 * n, 0.0);
        let (x, rest) = ws.news.split_at_mut(n);
        let (z, e) = rest.split_at_mut(n);
        // Stationary start: f_0 ~ N(0,1), X_1 = cov·f_0 + resid·u.
        fill_normal(rng, &mut ws.panel.forecasts[..n]);
        fill_normal(rng, x);
        for (xi, &fi) in x.iter_mut().zip(&ws.panel.forecasts[..n]) {
            *xi = init.0 * fi + init.1 * *xi;
        }
        for row in 0..t - 1 {
            fill_normal(rng, z);
            self.draw_noise(rng, e);
            let (done, ahead) = ws.panel.forecasts.split_at_mut((row + 1) * n);
            let r = &mut ws.panel.returns[row * n..(row + 1) * n];
            let coef = [alpha, beta_f + ws.phi[row], self.idio_sd, self.rho, c, lambda];
            recursion_step(r, &mut ahead[..n], x, &done[row * n..], z, e, coef);
        }
    }

    /// One row of idiosyncratic noise with unit variance.
    fn draw_noise(&self, rng: &mut PathRng, e: &mut [f64]) {
        match &self.noise {
            Noise::Normal => fill_normal(rng, e),
            Noise::StudentT { law, scale } => law.fill(rng, *scale, e),
        }
    }

    /// Forecasts and the news part of returns by convolution.
    fn convolve(&self, rng: &mut PathRng, ws: &mut Workspace, taps: &[f64]) {
        let (n, t, k) = (self.assets, self.dates, taps.len());
        let news_rows = t + k - 1; // innovation dates 1−K ..= T−1
        ws.news.resize(news_rows * n, 0.0);
        // Forecasts: f at date −K from N(0,1), then forward over all news rows.
        fill_normal(rng, &mut ws.f);
        fill_normal(rng, &mut ws.news);
        let c = (1.0 - self.rho * self.rho).sqrt();
        for row in 0..news_rows {
            let z = &ws.news[row * n..(row + 1) * n];
            for (f, &zi) in ws.f.iter_mut().zip(z) {
                *f = self.rho * *f + c * zi;
            }
            if row + 1 >= k {
                let date = row + 1 - k;
                ws.panel.forecasts[date * n..(date + 1) * n].copy_from_slice(&ws.f);
            }
        }

        // News part of returns: row r = Σ_{m<K} b_{K−m}·news[r+m].
        tap_sums(&mut ws.panel.returns[..(t - 1) * n], &ws.news, n, taps);
    }

    /// Adds the signal-factor part `φ·f` and idiosyncratic noise to the returns.
    fn add_noise(&self, rng: &mut PathRng, ws: &mut Workspace) {
        let n = self.assets;
        let e = &mut ws.f; // one row of noise at a time
        let rows = ws.panel.returns.chunks_exact_mut(n).zip(ws.panel.forecasts.chunks_exact(n)).zip(&ws.phi);
        for ((r, f), &phi) in rows {
            self.draw_noise(rng, e);
            add_row(r, f, e, phi, self.idio_sd);
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::stats::CHECK_SIGMAS;
    use statrs::distribution::{ContinuousCDF, StudentsT};

    /// The state update compiled for AVX2 gives the same bits as the
    /// portable one (run where the CPU has AVX2; elsewhere only the portable
    /// one runs).
    #[test]
    fn the_avx2_state_update_matches_the_portable_one_bit_for_bit() {
        #[cfg(target_arch = "x86_64")]
        if std::arch::is_x86_feature_detected!("avx2") {
            let n = 37; // four blocks of eight and a remainder
            let mut rng = crate::rng::path_rng(5, 5);
            let mut draw = |len: usize| {
                let mut v = vec![0.0; len];
                crate::rng::fill_normal(&mut rng, &mut v);
                v
            };
            let (weights, rates) = (draw(9), draw(9).iter().map(|x| 0.5 + 0.1 * x).collect::<Vec<_>>());
            let (r0, x0, z) = (draw(n), draw(9 * n), draw(n));
            let (mut r1, mut x1, mut r2, mut x2) = (r0.clone(), x0.clone(), r0, x0);
            for _ in 0..50 {
                exponential_states_any(&mut r1, &mut x1, &z, &weights, &rates);
                // SAFETY: the CPU supports AVX2, checked above.
                unsafe { exponential_states_avx2(&mut r2, &mut x2, &z, &weights, &rates) };
            }
            let bits = |v: &[f64]| v.iter().map(|x| x.to_bits()).collect::<Vec<_>>();
            assert_eq!(bits(&r1), bits(&r2));
            assert_eq!(bits(&x1), bits(&x2));
        }
    }

    /// The convolution's sums: the AVX2 and FMA build against the portable
    /// one bit for bit (vacuous on a CPU without them), and both against a
    /// plain sum in tap order within rounding.
    #[test]
    fn tap_sums_are_the_same_bits_in_every_build() {
        let (n, rows, k) = (37, 11, 9);
        let mut rng = crate::rng::path_rng(6, 6);
        let (mut news, mut taps) = (vec![0.0; (rows + k - 1) * n], vec![0.0; k]);
        crate::rng::fill_normal(&mut rng, &mut news);
        crate::rng::fill_normal(&mut rng, &mut taps);
        let mut one = vec![f64::NAN; rows * n];
        tap_sums_any(&mut one, &news, n, &taps);
        for r in 0..rows {
            for i in 0..n {
                let plain: f64 = (0..k).map(|m| taps[m] * news[(r + m) * n + i]).sum();
                let scale: f64 = (0..k).map(|m| (taps[m] * news[(r + m) * n + i]).abs()).sum();
                // Each order errs by at most γ_k·Σ|b·x| ≈ k·ε·Σ|b·x| (Higham, 2002,
                // §3.1); the two orders differ by at most twice that.
                assert!((one[r * n + i] - plain).abs() <= 2.0 * k as f64 * f64::EPSILON * scale);
            }
        }
        #[cfg(target_arch = "x86_64")]
        if std::arch::is_x86_feature_detected!("avx2") && std::arch::is_x86_feature_detected!("fma") {
            let mut two = vec![f64::NAN; rows * n];
            // SAFETY: the CPU supports AVX2 and FMA, checked above.
            unsafe { tap_sums_fma(&mut two, &news, n, &taps) };
            let bits = |v: &[f64]| v.iter().map(|x| x.to_bits()).collect::<Vec<_>>();
            assert_eq!(bits(&one), bits(&two));
        }
    }

    /// The noise of a Student-t scenario against the t law itself (statrs):
    /// unit variance, and the share beyond each of a few points equal to the
    /// t distribution's tail, within `CHECK_SIGMAS` binomial standard errors.
    #[test]
    fn student_t_noise_follows_the_t_law() {
        for dof in [4.0, 5.0, 6.0, 7.5, 12.0] {
            let g = Generator {
                assets: 1,
                dates: 2,
                rho: 0.0,
                ic_vol: 0.0,
                psi: 0.0,
                idio_sd: 1.0,
                noise: Noise::new(Tails::StudentT { dof }),
                news: News::Convolution { taps: vec![1.0] },
            };
            let mut e = vec![0.0; 400_000];
            g.draw_noise(&mut crate::rng::path_rng(3, dof as u64), &mut e);
            let n = e.len() as f64;
            let scale = ((dof - 2.0) / dof).sqrt();
            let law = StudentsT::new(0.0, 1.0, dof).unwrap();
            for c in [0.5, 1.0, 2.0, 3.0] {
                let want = 1.0 - law.cdf(c / scale);
                let got = e.iter().filter(|&&x| x > c).count() as f64 / n;
                let se = (want * (1.0 - want) / n).sqrt();
                assert!((got - want).abs() < CHECK_SIGMAS * se, "dof {dof}, P(x > {c}) {got} vs {want} ± {se}");
            }
            let var = e.iter().map(|x| x * x).sum::<f64>() / n;
            // sd of x² is sqrt(E x⁴ − 1) = sqrt(3(ν−2)/(ν−4) − 1), finite for ν > 4; the normal
            // approximation of its mean also needs x² to have a finite skewness (E x⁶, ν > 6): at
            // ν = 5 a seed's sample variance sat 4.9 SE high while 4·10⁸ draws of the same law were
            // within 1.2 SE of one.
            if dof > 6.0 {
                let se = ((3.0 * (dof - 2.0) / (dof - 4.0) - 1.0) / n).sqrt();
                assert!((var - 1.0).abs() < CHECK_SIGMAS * se, "dof {dof}: variance {var} ± {se}");
            }
        }
    }
}
