//! The staggered-tranche books of one history, for every holding length.
//!
//! At date `t` a tranche opens with weights `w_t = f̃_t / Σ|f̃_t|` (demeaned
//! forecast, unit gross exposure) — or, for the quantile book, `+1/(2m)` on the
//! top `m` assets and `−1/(2m)` on the bottom `m`, `m = ⌊N/q⌋`. The book for
//! holding length `h` is the average of the `h` live tranches, so over
//! `(t, t+1]` it earns `σ·(1/h)·Σ_{j<h} ⟨w_{t−j}, r_{t+1}⟩` and trades
//! `(1/h)·Σ_i |w_{t,i} − w_{t−h,i}|` (the oldest tranche is swapped for the
//! new one). All holding lengths are compared over the same dates
//! `t = L … T−2`, so that none of them gets a luckier window.

use super::sums::BookSums;
use crate::measure::sums::sum_of;
use crate::measure::{Panel, Products, banded_products};

/// Both books of one history: `[h − 1]` is holding length `h`.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct PathBooks {
    /// Weights proportional to the demeaned forecast.
    pub linear: Vec<BookSums>,
    /// Equal-weighted top-minus-bottom quantile.
    pub quantile: Vec<BookSums>,
}

/// Reusable buffers for building the books of one history after another.
#[derive(Debug, Clone, Default)]
pub struct BookBuilder {
    weights: Vec<f32>,
    gross_norm: Vec<f64>,
    members: Vec<i8>,
    q_weights: Vec<f64>,
    q_cross: Vec<f64>,
    order: Vec<usize>,
}

/// `Σ_i |a_i − b_i|` in eight interleaved chains (vectorises).
fn l1_distance(a: &[f32], b: &[f32]) -> f32 {
    let n = a.len().min(b.len());
    let (a, b) = (&a[..n], &b[..n]);
    let mut acc = [0.0f32; 8];
    let (ca, cb) = (a.chunks_exact(8), b.chunks_exact(8));
    let rest: f32 = ca.remainder().iter().zip(cb.remainder()).map(|(x, y)| (x - y).abs()).sum();
    for (x, y) in ca.zip(cb) {
        for j in 0..8 {
            acc[j] += (x[j] - y[j]).abs();
        }
    }
    acc.iter().sum::<f32>() + rest
}

/// `Σ_i |a_i − b_i|` of membership codes in {−1, 0, 1}.
fn code_distance(a: &[i8], b: &[i8]) -> u32 {
    a.iter().zip(b).map(|(x, y)| u32::from((x - y).unsigned_abs())).sum()
}

impl BookBuilder {
    /// Books for holding lengths `1..=L` of the history in `panel`, already
    /// measured (its forecast-by-return products `meas` are reused), with
    /// residual volatility `sigma`; the quantile book too when `q` (the number
    /// of quantiles) is given.
    pub fn build(&mut self, panel: &Panel, meas: Products<'_>, sigma: f64, q: Option<usize>) -> PathBooks {
        let linear = self.linear_prefixes(panel, meas, sigma, &[panel.dates]).pop().unwrap_or_default();
        let quantile = q.map(|q| self.quantile_book(panel, meas.demeaned_forecasts(), q, meas.horizons(), sigma));
        PathBooks { linear, quantile: quantile.unwrap_or_default() }
    }

    /// The linear book's sums as if the history had ended after each of the
    /// `ends` dates (ascending, each at least `L + 2`): the books of a shorter
    /// history are a prefix of the longer one's, so one pass serves all.
    pub fn linear_prefixes(
        &mut self,
        panel: &Panel,
        meas: Products<'_>,
        sigma: f64,
        ends: &[usize],
    ) -> Vec<Vec<BookSums>> {
        let (n, l) = (panel.assets, meas.horizons());
        let rows = panel.dates - 1; // dates with a forward return
        let fdm = meas.demeaned_forecasts();
        self.gross_norm.clear();
        self.gross_norm.extend(fdm.chunks_exact(n).map(|f| sum_of(f, f64::abs)));
        self.weights.clear();
        for (f, a) in fdm.chunks_exact(n).zip(&self.gross_norm) {
            self.weights.extend(f.iter().map(|x| (x / a) as f32));
        }
        let mut linear = vec![BookSums::default(); l];
        let mut out = Vec::with_capacity(ends.len());
        let mut next = ends.iter().peekable();
        for t in l..rows {
            let mut g = 0.0;
            let w_t = &self.weights[t * n..(t + 1) * n];
            for h in 1..=l {
                let s = t + 1 - h; // the tranche opened h − 1 periods ago earns lag h
                g += meas.lagged_cov(s, h) / self.gross_norm[s];
                let back = &self.weights[(t - h) * n..(t - h + 1) * n];
                linear[h - 1].push(sigma * g / h as f64, f64::from(l1_distance(w_t, back)) / h as f64);
            }
            while next.peek().is_some_and(|&&end| end == t + 2) {
                out.push(linear.clone());
                next.next();
            }
        }
        out
    }

    /// The top-minus-bottom quantile book.
    fn quantile_book(&mut self, panel: &Panel, fdm: &[f64], q: usize, l: usize, sigma: f64) -> Vec<BookSums> {
        let n = panel.assets;
        self.quantile_weights(fdm, n, q);
        let m = (n / q) as f64;
        banded_products(&self.q_weights, &panel.returns, n, l, &mut self.q_cross);
        let mut books = vec![BookSums::default(); l];
        for t in l..panel.dates - 1 {
            let mut g = 0.0;
            let c_t = &self.members[t * n..(t + 1) * n];
            for h in 1..=l {
                g += self.q_cross[(t + 1 - h) * l + h - 1];
                let back = &self.members[(t - h) * n..(t - h + 1) * n];
                books[h - 1].push(sigma * g / h as f64, f64::from(code_distance(c_t, back)) * 0.5 / (m * h as f64));
            }
        }
        books
    }

    /// Membership codes (+1 top `m`, −1 bottom `m`, else 0) and the quantile
    /// book's weights `code/(2m)` for every date with a return.
    fn quantile_weights(&mut self, fdm: &[f64], n: usize, q: usize) {
        let m = n / q;
        let rows = fdm.len() / n;
        self.members.clear();
        self.members.resize(rows * n, 0);
        self.q_weights.clear();
        self.q_weights.resize(rows * n, 0.0);
        let w = 0.5 / m as f64;
        for (s, f) in fdm.chunks_exact(n).enumerate() {
            self.order.clear();
            self.order.extend(0..n);
            // Descending by forecast, ties by asset index, so the split is reproducible.
            let by = |a: &usize, b: &usize| f[*b].total_cmp(&f[*a]).then(a.cmp(b));
            self.order.select_nth_unstable_by(m - 1, by);
            for &i in &self.order[..m] {
                self.members[s * n + i] = 1;
                self.q_weights[s * n + i] = w;
            }
            let tail = &mut self.order[m..];
            let k = tail.len() - m;
            tail.select_nth_unstable_by(k, by);
            for &i in &tail[k..] {
                self.members[s * n + i] = -1;
                self.q_weights[s * n + i] = -w;
            }
        }
    }
}
