//! Stage 2: simulate one history (a [`Panel`]) from the model (MODEL.md §1).
//!
//! - forecast `f[i,t] = ρ·f[i,t−1] + sqrt(1−ρ²)·z[i,t]`;
//! - return over `(t, t+1]`: `Σ_{j=1}^{K} b_j·z[i,t+1−j] + φ_{t+1}·f[i,t] + σ_e·e[i,t+1]`;
//! - `φ` an AR(1) with marginal sd `ic_vol` and coefficient `ψ`.
//!
//! The start is exactly stationary: `f` is drawn from `N(0, 1)` at date `−K`
//! and run forward over every innovation that a simulated return loads on.
//! The `K`-tap convolution of news is a banded Toeplitz matrix times the news
//! matrix, done as blocked matrix products (matrixmultiply), the fastest way
//! found on these machines (DEVELOPERS.md, "Speed").

use crate::measure::Panel;
use crate::model::Model;
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
    k: usize,
    /// `BLOCK × (BLOCK + K − 1)` Toeplitz block: `toeplitz[i][i+m] = b_{K−m}`.
    toeplitz: Vec<f64>,
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
        let k = model.loadings_used();
        let width = BLOCK + k - 1;
        let mut toeplitz = vec![0.0; BLOCK * width];
        for i in 0..BLOCK {
            for m in 0..k {
                toeplitz[i * width + i + m] = model.loadings[k - 1 - m];
            }
        }
        Self {
            assets,
            dates,
            rho: model.rho,
            ic_vol: model.ic_vol,
            psi: model.psi,
            idio_sd: model.idio_sd,
            tails,
            k,
            toeplitz,
        }
    }

    /// Normal variates drawn per path (for the bench's bare-draw baseline).
    pub fn draws_per_path(&self) -> usize {
        let (n, t) = (self.assets, self.dates);
        (t - 1) + n + n * (t + self.k - 1) + n * (t - 1)
    }

    /// Simulates one history into `ws.panel`.
    pub fn simulate(&self, rng: &mut PathRng, ws: &mut Workspace) {
        let (n, t, k) = (self.assets, self.dates, self.k);
        let news_rows = t + k - 1; // innovation dates 1−K ..= T−1
        if ws.panel.assets != n || ws.panel.dates != t {
            ws.panel = Panel::zeros(n, t);
        }
        ws.news.resize(news_rows * n, 0.0);
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
                    self.toeplitz.as_ptr(),
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

        // Signal-factor and idiosyncratic parts.
        let noise = &mut ws.news[..rows * n];
        match self.tails {
            Tails::Normal => fill_normal(rng, noise),
            Tails::StudentT { dof } => {
                let law = StudentT::new(dof).expect("dof > 2 is validated");
                let scale = ((dof - 2.0) / dof).sqrt();
                for x in noise.iter_mut() {
                    *x = scale * rng.sample(law);
                }
            }
        }
        for row in 0..rows {
            let phi = ws.phi[row];
            let f = &ws.panel.forecasts[row * n..(row + 1) * n];
            let e = &noise[row * n..(row + 1) * n];
            let r = &mut ws.panel.returns[row * n..(row + 1) * n];
            for i in 0..n {
                r[i] += phi * f[i] + self.idio_sd * e[i];
            }
        }
    }
}
