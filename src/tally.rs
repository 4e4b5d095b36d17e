//! Accumulators that merge exactly: the same numbers whatever the order in
//! which values arrive or parts are merged, so that a study split over threads
//! or over cluster shards gives byte-identical results to one run, in memory
//! that does not grow with the number of paths.
//!
//! - [`ExactSums`]: count, `Σx` and `Σx²` in 64-bit-fraction fixed point held
//!   in `i128`: integer addition is associative, floating-point addition is not.
//!   Each value is rounded to a multiple of 2⁻⁶⁴ (about 5·10⁻²⁰) once, on entry.
//! - [`Histogram`]: counts in at most [`BINS`] bins of width `2^e`, with `e`
//!   the smallest power of two (from 2⁻⁶⁴ up) that spans the data seen. Halving
//!   the resolution merges pairs of aligned bins exactly, and the width only
//!   depends on the data's range, so the counts do not depend on the order.
//!   Quantiles read from it are within one bin width of the sample's own
//!   (type 7, Hyndman and Fan, 1996), and the width is at most
//!   `2·range/BINS`: under 0.1 % of the sample's range.

use serde::{Deserialize, Serialize};

/// Scale of the fixed point: values are held as integer multiples of 2⁻⁶⁴.
const SCALE: f64 = 18_446_744_073_709_551_616.0; // 2^64
/// Exponent of the finest histogram bin width, 2⁻⁶⁴.
const FINEST: i32 = -64;
/// Most bins a histogram holds.
pub const BINS: usize = 2048;

/// `x` in fixed point (a multiple of 2⁻⁶⁴, rounded down; saturating far out).
fn fixed(x: f64) -> i128 {
    (x * SCALE).floor() as i128
}

/// Count, sum and sum of squares of the finite values, and how many were not
/// finite, in exact fixed point.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, Serialize, Deserialize)]
pub struct ExactSums {
    /// Finite values.
    pub n: u64,
    /// Values that were NaN or infinite.
    pub other: u64,
    /// `Σx`, in units of 2⁻⁶⁴.
    pub sum: i128,
    /// `Σx²`, in units of 2⁻⁶⁴.
    pub squares: i128,
}

impl ExactSums {
    /// Adds one value.
    pub fn push(&mut self, x: f64) {
        if x.is_finite() {
            self.n += 1;
            self.sum = self.sum.saturating_add(fixed(x));
            self.squares = self.squares.saturating_add(fixed(x * x));
        } else {
            self.other += 1;
        }
    }

    /// Adds another part's values.
    pub fn merge(&mut self, o: &Self) {
        self.n += o.n;
        self.other += o.other;
        self.sum = self.sum.saturating_add(o.sum);
        self.squares = self.squares.saturating_add(o.squares);
    }

    /// Every value, finite or not.
    pub fn count(&self) -> u64 {
        self.n + self.other
    }

    /// `Σx` (NaN when a value was not finite).
    pub fn total(&self) -> f64 {
        if self.other > 0 { f64::NAN } else { self.sum as f64 / SCALE }
    }

    /// Mean (NaN when empty or when a value was not finite).
    pub fn mean(&self) -> f64 {
        if self.count() == 0 { f64::NAN } else { self.total() / self.n as f64 }
    }

    /// Sum of squared deviations from the mean, `Σx² − (Σx)²/n`.
    pub fn centred_squares(&self) -> f64 {
        if self.other > 0 {
            return f64::NAN;
        }
        let (s, n) = (self.sum as f64 / SCALE, self.n as f64);
        (self.squares as f64 / SCALE - s * s / n).max(0.0)
    }

    /// Sample standard deviation, `None` with fewer than two values.
    pub fn sd(&self) -> Option<f64> {
        (self.count() > 1).then(|| (self.centred_squares() / (self.n as f64 - 1.0)).sqrt())
    }

    /// Monte Carlo standard error of the mean, `sd/sqrt(n)`.
    pub fn se(&self) -> Option<f64> {
        self.sd().map(|s| s / (self.count() as f64).sqrt())
    }
}

/// Counts of values in aligned bins of width `2^exp` (see the module's notes).
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct Histogram {
    /// Bin width is `2^exp`.
    exp: i32,
    /// Index of the first bin held (`floor(x / 2^exp)` of its values).
    first: i128,
    /// Counts from `first` on; the first and last are never zero.
    counts: Vec<u32>,
    /// Values at −∞.
    below: u64,
    /// Values at +∞.
    above: u64,
    /// NaN values (sorted last).
    nan: u64,
}

impl Default for Histogram {
    fn default() -> Self {
        Self { exp: FINEST, first: 0, counts: Vec::new(), below: 0, above: 0, nan: 0 }
    }
}

impl Histogram {
    /// Adds one value.
    pub fn push(&mut self, x: f64) {
        if x.is_nan() {
            self.nan += 1;
        } else if x == f64::NEG_INFINITY {
            self.below += 1;
        } else if x == f64::INFINITY {
            self.above += 1;
        } else {
            self.add(fixed(x), 1);
        }
    }

    /// Adds `count` values whose bin at the finest width is `raw`, first
    /// coarsening while the bins held and the new one would pass [`BINS`].
    fn add(&mut self, raw: i128, count: u32) {
        let mut key = raw >> (self.exp - FINEST);
        if self.counts.is_empty() {
            self.first = key;
            self.counts.push(count);
            return;
        }
        while self.last().max(key) - self.first.min(key) >= BINS as i128 {
            self.coarsen();
            key = raw >> (self.exp - FINEST);
        }
        if key < self.first {
            let grow = (self.first - key) as usize;
            self.counts.splice(0..0, std::iter::repeat_n(0, grow));
            self.first = key;
        } else if key > self.last() {
            self.counts.resize((key - self.first) as usize + 1, 0);
        }
        let i = (key - self.first) as usize;
        self.counts[i] = self.counts[i].saturating_add(count);
    }

    /// Index of the last bin held.
    fn last(&self) -> i128 {
        self.first + self.counts.len() as i128 - 1
    }

    /// Halves the resolution: pairs of aligned bins become one.
    fn coarsen(&mut self) {
        self.exp += 1;
        let first = self.first >> 1;
        let mut counts = vec![0u32; ((self.last() >> 1) - first) as usize + 1];
        for (i, &c) in self.counts.iter().enumerate() {
            let j = (((self.first + i as i128) >> 1) - first) as usize;
            counts[j] = counts[j].saturating_add(c);
        }
        self.first = first;
        self.counts = counts;
    }

    /// Adds another part's values.
    pub fn merge(&mut self, o: &Self) {
        self.below += o.below;
        self.above += o.above;
        self.nan += o.nan;
        if o.counts.is_empty() {
            return;
        }
        let mut o = o.clone();
        while o.exp < self.exp {
            o.coarsen();
        }
        while self.exp < o.exp && !self.counts.is_empty() {
            self.coarsen();
        }
        if self.counts.is_empty() {
            self.exp = o.exp;
        }
        let shift = self.exp - FINEST;
        for (i, &c) in o.counts.iter().enumerate() {
            if c > 0 {
                // The bin's lowest value at the finest width, so that `add`
                // places it in the same bin at any coarser width.
                let raw = (o.first + i as i128) << shift;
                self.add(raw, c);
            }
        }
    }

    /// Values held, finite or not.
    pub fn count(&self) -> u64 {
        self.counts.iter().map(|&c| u64::from(c)).sum::<u64>() + self.below + self.above + self.nan
    }

    /// The `k`-th smallest value (0-based), placed within its bin by its rank
    /// there: the `j`-th of `c` values in bin `b` reads `(b + (j + ½)/c)·2^exp`.
    fn order_statistic(&self, mut k: u64) -> f64 {
        if k < self.below {
            return f64::NEG_INFINITY;
        }
        k -= self.below;
        let width = 2f64.powi(self.exp);
        for (i, &c) in self.counts.iter().enumerate() {
            let c = u64::from(c);
            if k < c {
                let bin = (self.first + i as i128) as f64;
                return (bin + (k as f64 + 0.5) / c as f64) * width;
            }
            k -= c;
        }
        if k < self.above { f64::INFINITY } else { f64::NAN }
    }

    /// The `q` quantile, interpolated between order statistics as
    /// [`crate::stats::quantile_sorted`] does (NaN when empty).
    pub fn quantile(&self, q: f64) -> f64 {
        let n = self.count();
        if n == 0 {
            return f64::NAN;
        }
        let h = (n - 1) as f64 * q;
        let (lo, frac) = (h.floor() as u64, h - h.floor());
        let a = self.order_statistic(lo);
        if frac == 0.0 {
            return a;
        }
        a + frac * (self.order_statistic((lo + 1).min(n - 1)) - a)
    }

    /// Whether the histogram keeps its invariants (a part read from a file
    /// may not): a width from 2⁻⁶⁴ to 2¹⁰²⁴, at most [`BINS`] bins, the
    /// first and last of them not empty.
    pub fn is_valid(&self) -> bool {
        (FINEST..=1024).contains(&self.exp)
            && self.counts.len() <= BINS
            && self.counts.first().is_none_or(|&c| c > 0)
            && self.counts.last().is_none_or(|&c| c > 0)
            && self.first.checked_add(self.counts.len() as i128).is_some()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::stats::{BAND_LEVELS, quantile_sorted};
    use rand::{RngExt, SeedableRng, seq::SliceRandom};

    fn sample(n: usize, seed: u64) -> Vec<f64> {
        let mut rng = rand::rngs::StdRng::seed_from_u64(seed);
        (0..n).map(|_| 0.03 + 0.01 * (rng.random::<f64>() - 0.5) * rng.random::<f64>().ln()).collect()
    }

    #[test]
    fn sums_and_histograms_do_not_depend_on_order_or_split() {
        let xs = sample(5000, 1);
        let whole = |xs: &[f64]| {
            let (mut s, mut h) = (ExactSums::default(), Histogram::default());
            xs.iter().for_each(|&x| {
                s.push(x);
                h.push(x);
            });
            (s, h)
        };
        let (s, h) = whole(&xs);
        let mut shuffled = xs.clone();
        shuffled.shuffle(&mut rand::rngs::StdRng::seed_from_u64(2));
        assert_eq!(whole(&shuffled), (s, h.clone()));
        // Split in three uneven parts, merged in two orders.
        for order in [[0, 1, 2], [2, 0, 1]] {
            let parts = [&shuffled[..7], &shuffled[7..3100], &shuffled[3100..]];
            let (mut s2, mut h2) = (ExactSums::default(), Histogram::default());
            for i in order {
                let (a, b) = whole(parts[i]);
                s2.merge(&a);
                h2.merge(&b);
            }
            assert_eq!((s2, h2), (s, h.clone()));
        }
        assert!(h.counts.len() <= BINS && h.count() == 5000);
    }

    #[test]
    fn quantiles_are_within_a_bin_of_the_sample_and_sums_exact() {
        for (n, seed) in [(1, 3), (2, 4), (57, 5), (20_000, 6)] {
            let xs = sample(n, seed);
            let (mut s, mut h) = (ExactSums::default(), Histogram::default());
            xs.iter().for_each(|&x| {
                s.push(x);
                h.push(x);
            });
            let mut sorted = xs.clone();
            sorted.sort_by(f64::total_cmp);
            let width = 2f64.powi(h.exp);
            // The width is the smallest power of two spanning the range in BINS bins.
            assert!(width <= 2.0 * (sorted[n - 1] - sorted[0]) / (BINS - 1) as f64 || n == 1, "{width}");
            for q in BAND_LEVELS {
                let (got, want) = (h.quantile(q), quantile_sorted(&sorted, q));
                assert!((got - want).abs() <= width, "n {n} q {q}: {got} vs {want}");
            }
            let mean = xs.iter().sum::<f64>() / n as f64;
            assert!((s.mean() - mean).abs() < 1e-15, "{} vs {mean}", s.mean());
            if n > 1 {
                let var = xs.iter().map(|x| (x - mean).powi(2)).sum::<f64>() / (n - 1) as f64;
                assert!((s.sd().unwrap() - var.sqrt()).abs() < 1e-12 * var.sqrt().max(1e-3));
            }
        }
    }

    #[test]
    fn values_that_are_not_finite_are_kept_apart() {
        let (mut s, mut h) = (ExactSums::default(), Histogram::default());
        for x in [1.0, f64::NAN, 2.0, f64::INFINITY, f64::NEG_INFINITY] {
            s.push(x);
            h.push(x);
        }
        assert!(s.mean().is_nan() && s.count() == 5);
        // Sorted: −∞, 1, 2, +∞, NaN; the finite ones read at their bins' middles.
        assert_eq!(h.quantile(0.0), f64::NEG_INFINITY);
        assert!(h.quantile(1.0).is_nan());
        assert_eq!(h.quantile(0.75), f64::INFINITY);
        let width = 2f64.powi(h.exp);
        // Bins 2048 and 4096 of width 2^-11 would be 2049 bins: one too many.
        assert_eq!(width, 2f64.powi(-10));
        assert_eq!(h.quantile(0.5), 2.0 + width / 2.0);
    }
}

#[cfg(test)]
mod accuracy {
    use super::*;
    use crate::stats::{BAND_LEVELS, quantile_sorted};
    use rand::SeedableRng;
    use rand_distr::{Distribution, StandardNormal};

    /// The bands' error against the exact sample quantile, in units of the
    /// quantile's own Monte Carlo standard error `sqrt(q(1−q)/n)/φ(z_q)`
    /// (normal data, σ = 1), at the path counts of a default study and a big one.
    #[test]
    fn band_error_is_a_small_part_of_the_monte_carlo_error() {
        for (n, worst) in [(2_000, 0.2), (1_000_000, 0.2)] {
            let mut rng = rand::rngs::StdRng::seed_from_u64(11);
            let mut xs: Vec<f64> =
                (0..n).map(|_| 0.03 + 0.01 * Distribution::<f64>::sample(&StandardNormal, &mut rng)).collect();
            let mut h = Histogram::default();
            xs.iter().for_each(|&x| h.push(x));
            xs.sort_by(f64::total_cmp);
            // Standard normal quantiles at the band levels (scipy.stats.norm.ppf).
            let zs: [f64; 5] = [
                -1.644_853_626_951_472_2,
                -0.674_489_750_196_081_7,
                0.0,
                0.674_489_750_196_081_7,
                1.644_853_626_951_472_2,
            ];
            for (q, z) in BAND_LEVELS.into_iter().zip(zs) {
                let density = (-z * z / 2.0).exp() / (2.0 * std::f64::consts::PI).sqrt();
                let se = 0.01 * (q * (1.0 - q) / n as f64).sqrt() / density;
                let err = (h.quantile(q) - quantile_sorted(&xs, q)).abs() / se;
                println!("n {n} q {q}: error {err:.4} standard errors");
                assert!(err < worst, "n {n} q {q}: {err} standard errors");
            }
        }
    }
}
