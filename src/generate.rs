//! Stage 2: simulate one history (a [`Panel`]) from the model (MODEL.md §1).
//!
//! - forecast `f[i,t] = ρ·f[i,t−1] + sqrt(1−ρ²)·z[i,t]`;
//! - return over `(t, t+1]`: `Σ_{j=1}^{K} b_j·z[i,t+1−j] + φ_{t+1}·f[i,t] + σ_e·e[i,t+1]`;
//! - `φ` an AR(1) with marginal sd `ic_vol` and coefficient `ψ`.
//!
//! Two ways to apply the loadings ([`Kernel`]):
//! - **convolution**: the start is exactly stationary because `f` is drawn
//!   from `N(0, 1)` at date `−K` and run forward over every innovation that a
//!   simulated return loads on; the `K`-tap convolution of news is a banded
//!   Toeplitz matrix times the news matrix, done as blocked matrix products
//!   (matrixmultiply), the fastest way found on these machines;
//! - **recursion** (exponential curves): with `b_k = α·λ^{k−1} + β·ρ^{k−1}`,
//!   the news part of the return over `(t, t+1]` is `α·X_{t+1} + β·f_t/sqrt(1−ρ²)`
//!   with `X_{t+1} = λ·X_t + z_t`; the stationary start draws `(f_0, X_1)`
//!   from their joint law (`Var X = 1/(1−λ²)`, `Cov(f, X) = sqrt(1−ρ²)/(1−ρλ)`).

use crate::measure::Panel;
use crate::model::{Kernel, Model};
use crate::rng::{PathRng, fill_normal};
use crate::scenario::Tails;
use rand::RngExt;
use rand_distr::StudentT;

/// Rows of the Toeplitz block in one matrix product.
const BLOCK: usize = 16;

/// Everything needed to simulate paths of one scenario.
#[derive(Debug, Clone)]
pub struct Generator {
    assets: usize,
    dates: usize,
    rho: f64,
    ic_vol: f64,
    psi: f64,
    idio_sd: f64,
    tails: Tails,
    news: News,
}

/// The generator's form of the kernel.
#[derive(Debug, Clone)]
enum News {
    Convolution {
        k: usize,
        /// `BLOCK × (BLOCK + K − 1)` Toeplitz block: `toeplitz[i][i+m] = b_{K−m}`.
        toeplitz: Vec<f64>,
    },
    Recursion {
        alpha: f64,
        lambda: f64,
        /// `β / sqrt(1−ρ²)`, the loading on the current forecast.
        beta_f: f64,
        /// `Cov(f_0, X_1)` and the residual sd of `X_1` given `f_0`.
        init: (f64, f64),
    },
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
    /// The simulated history.
    pub panel: Panel,
}

impl Generator {
    /// A generator for `assets × dates` histories.
    pub fn new(model: &Model, assets: usize, dates: usize, tails: Tails) -> Self {
        let rho = model.rho;
        let news = match model.kernel {
            Kernel::TwoExponential { alpha, lambda, beta } => {
                let c = (1.0 - rho * rho).sqrt();
                let cov = c / (1.0 - rho * lambda);
                let resid = (1.0 / (1.0 - lambda * lambda) - cov * cov).max(0.0).sqrt();
                News::Recursion { alpha, lambda, beta_f: beta / c, init: (cov, resid) }
            }
            Kernel::Convolution => {
                let k = model.loadings_used();
                let width = BLOCK + k - 1;
                let mut toeplitz = vec![0.0; BLOCK * width];
                for i in 0..BLOCK {
                    for m in 0..k {
                        toeplitz[i * width + i + m] = model.loadings[k - 1 - m];
                    }
                }
                News::Convolution { k, toeplitz }
            }
        };
        Self { assets, dates, rho, ic_vol: model.ic_vol, psi: model.psi, idio_sd: model.idio_sd, tails, news }
    }

    /// Normal variates drawn per path (for the bench's bare-draw baseline).
    pub fn draws_per_path(&self) -> usize {
        let (n, t) = (self.assets, self.dates);
        let news = match self.news {
            News::Convolution { k, .. } => n + n * (t + k - 1),
            News::Recursion { .. } => 2 * n + n * (t - 1),
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
            News::Convolution { k, toeplitz } => {
                self.convolve(rng, ws, *k, toeplitz);
                self.add_noise(rng, ws);
            }
            &News::Recursion { alpha, lambda, beta_f, init } => self.recurse(rng, ws, alpha, lambda, beta_f, init),
        }
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
        match self.tails {
            Tails::Normal => fill_normal(rng, e),
            Tails::StudentT { dof } => {
                let law = StudentT::new(dof).expect("dof > 2 is validated");
                let scale = ((dof - 2.0) / dof).sqrt();
                e.iter_mut().for_each(|x| *x = scale * rng.sample(law));
            }
        }
    }

    /// Forecasts and the news part of returns by convolution.
    fn convolve(&self, rng: &mut PathRng, ws: &mut Workspace, k: usize, toeplitz: &[f64]) {
        let (n, t) = (self.assets, self.dates);
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
        let width = BLOCK + k - 1;
        let rows = t - 1;
        let mut r0 = 0;
        while r0 < rows {
            let m = BLOCK.min(rows - r0);
            // SAFETY: a is m × (m+K−1) inside `toeplitz` (row stride `width`);
            // b is (m+K−1) × n starting at news row r0 (ends at row r0+m+K−2 ≤ T+K−2);
            // c is m × n starting at return row r0 (ends at row r0+m−1 ≤ T−2).
            unsafe {
                matrixmultiply::dgemm(
                    m,
                    m + k - 1,
                    n,
                    1.0,
                    toeplitz.as_ptr(),
                    width as isize,
                    1,
                    ws.news.as_ptr().add(r0 * n),
                    n as isize,
                    1,
                    0.0,
                    ws.panel.returns.as_mut_ptr().add(r0 * n),
                    n as isize,
                    1,
                );
            }
            r0 += m;
        }
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
