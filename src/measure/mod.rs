//! Stage 3: the estimators (MODEL.md §3). Takes any [`Panel`], simulated or
//! real; knows nothing of simulation.
//!
//! For `T` dates (0-based `t`), lag `k` and horizon `n`:
//! - `IC_k(t)` = Pearson correlation across assets of forecast row `t` and
//!   return row `t + k − 1`, for the `T − k` dates with `t + k ≤ T − 1`;
//! - `H_n(t)` = correlation of forecast row `t` with the sum of return rows
//!   `t .. t + n − 1`, for the `T − n` dates with `t + n ≤ T − 1`;
//! - rank IC: the same on average ranks (Spearman), lags only, when asked;
//! - means over dates with overlap-aware standard errors ([`hac`]).

mod banded;
pub mod blend;
pub mod bootstrap;
pub mod ewc;
pub mod extras;
pub mod fit;
pub mod hac;
mod masked;
pub mod neutralise;
mod panel;
pub mod rank;
pub mod rules;
pub mod sign;
pub(crate) mod sums;

pub use panel::Panel;

pub use banded::banded_products;

/// Per-date series for each lag (or horizon), one row of `dates` per lag.
#[derive(Debug, Clone, Default)]
pub struct PerDate {
    width: usize,
    values: Vec<f64>,
    dates: Vec<u32>,
    counts: Vec<usize>,
}

impl PerDate {
    pub(crate) fn reset(&mut self, lags: usize, width: usize) {
        self.width = width;
        self.values.clear();
        self.values.resize(lags * width, f64::NAN);
        self.dates.clear();
        self.dates.resize(lags * width, 0);
        self.counts.clear();
        self.counts.resize(lags, 0);
    }

    /// Number of lags (or horizons).
    pub fn len(&self) -> usize {
        self.counts.len()
    }

    /// Whether there are none.
    pub fn is_empty(&self) -> bool {
        self.counts.is_empty()
    }

    /// The per-date values at lag (or horizon) `k` (1-based), dates in order.
    pub fn series(&self, k: usize) -> &[f64] {
        let row = &self.values[(k - 1) * self.width..k * self.width];
        &row[..self.counts[k - 1]]
    }

    /// The dates (0-based) of [`PerDate::series`] at lag `k`.
    pub fn dates(&self, k: usize) -> &[u32] {
        &self.dates[(k - 1) * self.width..(k - 1) * self.width + self.counts[k - 1]]
    }

    /// The values at lag `k` of the first `dates` dates of the panel, as if
    /// the history had ended there (lag `k` keeps `dates − k` of them). Exact
    /// when no date was skipped, as in simulated panels.
    pub fn series_upto(&self, k: usize, dates: usize) -> &[f64] {
        let s = self.series(k);
        &s[..s.len().min(dates.saturating_sub(k))]
    }

    /// Mean over dates at every lag (index 0 = lag 1).
    pub fn means(&self) -> Vec<f64> {
        self.means_upto(usize::MAX)
    }

    /// [`PerDate::means`] over the first `dates` dates.
    pub fn means_upto(&self, dates: usize) -> Vec<f64> {
        (1..=self.len())
            .map(|k| {
                let s = self.series_upto(k, dates);
                s.iter().sum::<f64>() / s.len() as f64
            })
            .collect()
    }

    /// Means with overlap-aware standard errors ([`hac::mean_and_se`] with
    /// [`hac::hac_lags`]); `overlap` is true for horizon ICs (lag count from
    /// the horizon) and false for lagged ICs (lag count as for horizon 1).
    pub fn means_and_se(&self, overlap: bool) -> (Vec<f64>, Vec<Option<f64>>) {
        self.means_and_se_upto(overlap, usize::MAX)
    }

    /// Means with EWC standard errors and 95 % intervals ([`ewc::interval`]),
    /// `None` where a lag has too few dates; `overlap` as in
    /// [`PerDate::means_and_se`]. The reported errors of `measure`.
    pub fn intervals(&self, overlap: bool) -> Vec<Option<ewc::Interval>> {
        (1..=self.len()).map(|k| ewc::interval(self.series(k), if overlap { k } else { 1 })).collect()
    }

    /// [`PerDate::means_and_se`] over the first `dates` dates.
    pub fn means_and_se_upto(&self, overlap: bool, dates: usize) -> (Vec<f64>, Vec<Option<f64>>) {
        (1..=self.len())
            .map(|k| {
                let s = self.series_upto(k, dates);
                hac::mean_and_se(s, hac::hac_lags(s, if overlap { k } else { 1 }))
            })
            .unzip()
    }
}

/// Per-date lagged, horizon and (optionally) rank ICs of one panel.
///
/// Owns its scratch buffers, so repeated [`Measurement::update`] calls on
/// panels of the same size do not allocate.
#[derive(Debug, Clone, Default)]
pub struct Measurement {
    horizons: usize,
    with_rank: bool,
    min_assets: usize,
    /// Lagged Pearson ICs.
    pub lagged: PerDate,
    /// Horizon ICs.
    pub horizon: PerDate,
    /// Lagged rank ICs (empty unless asked for).
    pub rank_lagged: PerDate,
    fdm: Vec<f64>,
    /// Demeaned returns times `ret_scale`.
    rdm: Vec<f64>,
    /// The power of two the demeaned returns were multiplied by.
    ret_scale: f64,
    rank_f: Vec<f64>,
    rank_r: Vec<f64>,
    cross: Vec<f64>,
    gram: Vec<f64>,
    order: Vec<usize>,
    /// Whether `fdm` and `cross` hold the last update's products (a complete
    /// panel with enough assets).
    has_products: bool,
    /// Measure pair by pair even on complete panels.
    pair_by_pair: bool,
}

/// The forecast-by-return products of a measured complete panel, which the
/// portfolio books reuse; see [`Measurement::products`].
#[derive(Debug, Clone, Copy)]
pub struct Products<'a> {
    horizons: usize,
    fdm: &'a [f64],
    cross: &'a [f64],
    ret_scale: f64,
}

impl Products<'_> {
    /// Longest lag measured.
    pub fn horizons(&self) -> usize {
        self.horizons
    }

    /// `⟨f̃_t, r_{t+k−1}⟩`: the demeaned forecasts at date `t` against the
    /// returns `k` periods later (`t + k ≤ dates − 1`).
    pub fn lagged_cov(&self, t: usize, k: usize) -> f64 {
        self.cross[t * self.horizons + k - 1] / self.ret_scale
    }

    /// The demeaned forecasts at dates `0..dates − 1` (row-major; the last
    /// date, which has no return, is left out), each date's row multiplied by
    /// its own power of two.
    pub fn demeaned_forecasts(&self) -> &[f64] {
        self.fdm
    }
}

/// Writes `src` minus its mean into `dst`.
fn demean_into(src: &[f64], dst: &mut [f64]) {
    let mean = sums::sum(src) / src.len() as f64;
    dst.iter_mut().zip(src).for_each(|(d, s)| *d = s - mean);
}

/// Largest magnitude of a slice.
fn max_abs(x: &[f64]) -> f64 {
    x.iter().fold(0.0, |m, v| v.abs().max(m))
}

/// Whether a sum of squares is a usable normal number (neither overflowed
/// nor near underflow); otherwise the values are rescaled first.
fn usable(ss: f64) -> bool {
    ss.is_finite() && ss > 1e-250
}

/// Multiplies `x` by the power of two that brings its largest magnitude into
/// `[0.5, 1)` (exact); returns that power.
fn rescale(x: &mut [f64]) -> f64 {
    let scale = sums::pow2_scale(max_abs(x));
    x.iter_mut().for_each(|v| *v *= scale);
    scale
}

impl Measurement {
    /// Measures up to lag and horizon `horizons`; rank ICs when `with_rank`.
    pub fn new(horizons: usize, with_rank: bool) -> Self {
        Self { horizons, with_rank, min_assets: 3, ..Self::default() }
    }

    /// Pairs of dates with fewer common assets than this give no IC, on
    /// complete and incomplete panels alike. At least 3 (a correlation of two
    /// points is ±1); smaller values are raised to 3, so callers refuse them first.
    pub fn with_min_assets(mut self, min_assets: usize) -> Self {
        self.min_assets = min_assets.max(3);
        self
    }

    /// Measures every date pair by pair on the assets with both values even
    /// on a complete panel: the path of panels with missing values, which
    /// must agree with the complete-panel path there (for checks).
    pub fn pair_by_pair(mut self, yes: bool) -> Self {
        self.pair_by_pair = yes;
        self
    }

    /// Longest lag and horizon measured.
    pub fn horizons(&self) -> usize {
        self.horizons
    }

    /// The last update's forecast-by-return products, or `None` when it was
    /// of a panel with missing values or too few assets (measured pair by
    /// pair, or not at all, so there are none).
    pub fn products(&self) -> Option<Products<'_>> {
        self.has_products.then_some(Products {
            horizons: self.horizons,
            fdm: &self.fdm,
            cross: &self.cross,
            ret_scale: self.ret_scale,
        })
    }

    /// Measures `panel` (needs `panel.dates ≥ horizons + 2`). Dates on which a
    /// cross-section has no variance give no IC and are left out of the means.
    /// A panel with missing values (`has_missing`) is measured pair by pair on
    /// the assets that have both values (rank ICs re-ranked on them); the
    /// forecast-by-return products are then not available.
    pub fn update(&mut self, panel: &Panel) {
        let (n, t, l) = (panel.assets, panel.dates, self.horizons);
        assert!(t >= l + 2, "panel has {t} dates, needs at least {}", l + 2);
        self.has_products = false;
        if panel.has_missing || self.pair_by_pair {
            self.lagged.reset(l, t);
            self.horizon.reset(l, t);
            self.rank_lagged.reset(l, t);
            self.cross.clear();
            let (lagged, horizon) = (&mut self.lagged, &mut self.horizon);
            masked::lagged_and_horizon(&panel.forecasts, &panel.returns, n, l, self.min_assets, lagged, horizon);
            if self.with_rank {
                masked::rank_lagged(&panel.forecasts, &panel.returns, n, l, self.min_assets, &mut self.rank_lagged);
            }
            return;
        }
        if n < self.min_assets {
            // Every date has the same `n` assets: none is usable.
            self.lagged.reset(l, t);
            self.horizon.reset(l, t);
            self.rank_lagged.reset(l, t);
            self.cross.clear();
            self.cross.resize((t - 1) * l, 0.0);
            self.ret_scale = 1.0;
            return;
        }
        self.pearson_and_horizon(panel, n, t);
        self.has_products = true;
        if self.with_rank {
            self.rank(panel, n, t);
        }
    }

    /// Pearson lagged and horizon ICs, scale-free at no cost for ordinary
    /// data: each forecast row is demeaned and, when its sum of squares
    /// overflows or nears underflow, multiplied by its own power of two; the
    /// returns are demeaned per row and, when the largest row's sum of squares
    /// does, all multiplied by one common power of two (horizon sums add
    /// rows, so they must share a scale) before the products are redone; a
    /// lagged IC whose return row underflows at that scale takes the row's
    /// norm at its own power of two. All scalings are exact, so nothing
    /// overflows or underflows for data in any units (tested at 1e±200) and
    /// results equal the unscaled arithmetic.
    fn pearson_and_horizon(&mut self, panel: &Panel, n: usize, t: usize) {
        let l = self.horizons;
        self.fdm.resize((t - 1) * n, 0.0);
        for (date, f_out) in self.fdm.chunks_exact_mut(n).enumerate() {
            demean_into(panel.forecast_row(date), f_out);
            if !usable(sums::sum_sq(f_out)) {
                rescale(f_out);
            }
        }
        self.rdm.resize(panel.returns.len(), 0.0);
        for (src, dst) in panel.returns.chunks_exact(n).zip(self.rdm.chunks_exact_mut(n)) {
            demean_into(src, dst);
        }
        self.ret_scale = 1.0;
        banded_products(&self.fdm, &self.rdm, n, l, &mut self.cross);
        banded_products(&self.rdm, &self.rdm, n, l, &mut self.gram);
        // Returns in extreme units (the largest row's sum of squares overflows
        // or nears underflow): one common power of two, and the products again.
        let largest =
            self.gram.iter().step_by(l).fold(0.0f64, |m, g| if g.is_nan() { f64::INFINITY } else { m.max(*g) });
        if !usable(largest) {
            self.ret_scale = rescale(&mut self.rdm);
            banded_products(&self.fdm, &self.rdm, n, l, &mut self.cross);
            banded_products(&self.rdm, &self.rdm, n, l, &mut self.gram);
        }
        let scale = self.ret_scale;
        self.lagged.reset(l, t);
        self.horizon.reset(l, t);
        let (cross, gram) = (&self.cross, &self.gram);
        let fdm = &self.fdm;
        for date in 0..t - 1 {
            let f_ss = sums::sum_sq(&fdm[date * n..(date + 1) * n]);
            let (mut cov, mut var) = (0.0, 0.0);
            for k in 1..=l.min(t - 1 - date) {
                let r = date + k - 1; // return row of lag k
                let c = cross[date * l + k - 1];
                let r_ss = gram[r * l];
                cov += c;
                // ‖Σ_{j<k} r_j‖² grows by ‖r‖² + 2·Σ_{j<k−1} ⟨r_{date+j}, r⟩
                var += gram[r * l] + 2.0 * (0..k - 1).map(|j| gram[(date + j) * l + (k - 1 - j)]).sum::<f64>();
                let lag = if r_ss > 1e-250 {
                    c / (f_ss * r_ss).sqrt()
                } else {
                    // A row far smaller than the largest (its squares underflow
                    // at the common scale): its norm at its own power of two.
                    let row = &self.rdm[r * n..(r + 1) * n];
                    let own = sums::pow2_scale(max_abs(row) / scale) / scale;
                    c * own / (f_ss * sums::sum_of(row, |v| (v * own) * (v * own))).sqrt()
                };
                self.lagged.push(k, date, lag);
                self.horizon.push(k, date, cov / (f_ss * var).sqrt());
            }
        }
    }

    fn rank(&mut self, panel: &Panel, n: usize, t: usize) {
        let l = self.horizons;
        let centre = (n as f64 + 1.0) / 2.0;
        let ranked = |src: &[f64], dst: &mut Vec<f64>, order: &mut Vec<usize>| {
            dst.clear();
            dst.extend_from_slice(src);
            for row in dst.chunks_exact_mut(n) {
                rank::rank_in_place(row, order);
                row.iter_mut().for_each(|x| *x -= centre);
            }
        };
        let mut order = std::mem::take(&mut self.order);
        ranked(&panel.forecasts, &mut self.rank_f, &mut order);
        ranked(&panel.returns, &mut self.rank_r, &mut order);
        self.order = order;
        let mut cross = Vec::new();
        banded_products(&self.rank_f, &self.rank_r, n, l, &mut cross);
        self.rank_lagged.reset(l, t);
        let r_ss: Vec<f64> = self.rank_r.chunks_exact(n).map(sums::sum_sq).collect();
        for date in 0..t - 1 {
            let f_ss = sums::sum_sq(&self.rank_f[date * n..(date + 1) * n]);
            for k in 1..=l.min(t - 1 - date) {
                self.rank_lagged.push(k, date, cross[date * l + k - 1] / (f_ss * r_ss[date + k - 1]).sqrt());
            }
        }
    }
}

impl PerDate {
    /// Appends date `date`'s value at lag `k` (dates in order; non-finite
    /// values are skipped).
    pub(crate) fn push(&mut self, k: usize, date: usize, v: f64) {
        if v.is_finite() {
            let c = &mut self.counts[k - 1];
            let at = (k - 1) * self.width + *c;
            self.values[at] = v;
            self.dates[at] = date as u32;
            *c += 1;
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn pearson(x: &[f64], y: &[f64]) -> f64 {
        let n = x.len() as f64;
        let (mx, my) = (x.iter().sum::<f64>() / n, y.iter().sum::<f64>() / n);
        let sxy: f64 = x.iter().zip(y).map(|(a, b)| (a - mx) * (b - my)).sum();
        let sxx: f64 = x.iter().map(|a| (a - mx).powi(2)).sum();
        let syy: f64 = y.iter().map(|b| (b - my).powi(2)).sum();
        sxy / (sxx * syy).sqrt()
    }

    fn toy_panel() -> Panel {
        let (n, t) = (12, 9);
        let mut p = Panel::zeros(n, t);
        for (i, x) in p.forecasts.iter_mut().enumerate() {
            *x = ((i * 7919) % 23) as f64 / 7.0 - 1.0;
        }
        for (i, x) in p.returns.iter_mut().enumerate() {
            *x = ((i * 104_729) % 31) as f64 / 13.0 - 1.1 + 0.2 * p.forecasts[i];
        }
        p
    }

    #[test]
    fn the_missing_value_path_agrees_with_the_dense_one_and_skips_what_is_missing() {
        // Catches: the masked sums dropping or double-counting a pair when
        // nothing is missing, and the rank-free dense path disagreeing with the
        // ranked one on the Pearson ICs.
        let p = toy_panel();
        let mut plain = Measurement::new(3, false);
        plain.update(&p);
        let mut dense = Measurement::new(3, true);
        dense.update(&p);
        let mut masked = Measurement::new(3, true).pair_by_pair(true);
        masked.update(&p);
        for k in 1..=3 {
            for (a, b) in dense.rank_lagged.series(k).iter().zip(masked.rank_lagged.series(k)) {
                assert!((a - b).abs() < 1e-12);
            }
            for (a, b) in dense.lagged.series(k).iter().zip(masked.lagged.series(k)) {
                assert!((a - b).abs() < 1e-12);
            }
            assert_eq!(plain.lagged.series(k), dense.lagged.series(k), "lag {k}: ranks change no Pearson IC");
            assert_eq!(plain.horizon.series(k), dense.horizon.series(k));
            for (a, b) in dense.horizon.series(k).iter().zip(masked.horizon.series(k)) {
                assert!((a - b).abs() < 1e-12);
            }
        }
        // Remove asset 0's forecast at date 2 and asset 1's return over (3, 4].
        let mut holed = p.clone();
        holed.forecasts[2 * p.assets] = f64::NAN;
        holed.returns[3 * p.assets + 1] = f64::NAN;
        holed.refresh_missing();
        masked.update(&holed);
        let keep = |skip: &[usize]| (0..p.assets).filter(|i| !skip.contains(i)).collect::<Vec<_>>();
        let pick = |row: &[f64], idx: &[usize]| idx.iter().map(|&i| row[i]).collect::<Vec<_>>();
        // Lag 2 at date 2 uses returns over (3, 4]: drop assets 0 and 1.
        let idx = keep(&[0, 1]);
        let want = pearson(&pick(p.forecast_row(2), &idx), &pick(p.return_row(3), &idx));
        assert!((masked.lagged.series(2)[2] - want).abs() < 1e-12);
        // Horizon 3 at date 1 sums returns over (1, 4]: asset 1 drops out.
        let idx = keep(&[1]);
        let cum: Vec<f64> = idx.iter().map(|&i| (1..4).map(|s| p.return_row(s)[i]).sum()).collect();
        let want = pearson(&pick(p.forecast_row(1), &idx), &cum);
        assert!((masked.horizon.series(3)[1] - want).abs() < 1e-12);
    }

    #[test]
    fn only_a_complete_panel_lends_its_products_to_the_books() {
        // Catches: books built from a panel measured pair by pair, whose
        // product buffers are empty or left over from an earlier panel.
        let p = toy_panel();
        let mut m = Measurement::new(3, false);
        m.update(&p);
        let products = m.products().expect("a complete panel has products");
        assert_eq!(products.demeaned_forecasts().len(), (p.dates - 1) * p.assets);
        let mut holed = p.clone();
        holed.forecasts[0] = f64::NAN;
        holed.refresh_missing();
        m.update(&holed);
        assert!(m.products().is_none(), "a panel with missing values has none");
        let mut few = Measurement::new(3, false).with_min_assets(p.assets + 1);
        few.update(&p);
        assert!(few.products().is_none(), "nor one with too few assets");
    }

    #[test]
    fn per_date_ics_equal_direct_correlations() {
        let p = toy_panel();
        let mut m = Measurement::new(3, true);
        m.update(&p);
        for k in 1..=3 {
            assert_eq!(m.lagged.series(k).len(), p.dates - k);
            for date in 0..p.dates - k {
                let f = p.forecast_row(date);
                let r = p.return_row(date + k - 1);
                assert!((m.lagged.series(k)[date] - pearson(f, r)).abs() < 1e-13);
                let cum: Vec<f64> = (0..p.assets).map(|i| (0..k).map(|j| p.return_row(date + j)[i]).sum()).collect();
                assert!((m.horizon.series(k)[date] - pearson(f, &cum)).abs() < 1e-13);
                let mut fr = f.to_vec();
                let mut rr = r.to_vec();
                rank::rank_in_place(&mut fr, &mut Vec::new());
                rank::rank_in_place(&mut rr, &mut Vec::new());
                assert!((m.rank_lagged.series(k)[date] - pearson(&fr, &rr)).abs() < 1e-13);
            }
        }
    }
}
