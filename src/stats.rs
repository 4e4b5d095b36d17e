//! Small accumulators and summaries shared by the study and the reports.

use serde::Serialize;

/// Tolerance of the project's statistical tests, in standard errors. Each
/// test has a fixed seed, so it is deterministic; a correct estimator lands
/// beyond 4 standard errors with probability 6.3·10⁻⁵ (two-sided normal), so
/// a change of seed rarely trips a correct test, while a bias of a few
/// standard errors fails it. One constant, so that it is stated once.
pub const CHECK_SIGMAS: f64 = 4.0;

/// Running mean and variance (Welford, 1962), merged in a fixed order.
#[derive(Debug, Clone, Copy, Default)]
pub struct Moments {
    n: u64,
    mean: f64,
    m2: f64,
}

impl Moments {
    /// Adds one observation.
    pub fn push(&mut self, x: f64) {
        self.n += 1;
        let d = x - self.mean;
        self.mean += d / self.n as f64;
        self.m2 += d * (x - self.mean);
    }

    /// Mean (NaN when empty).
    pub fn mean(&self) -> f64 {
        if self.n == 0 { f64::NAN } else { self.mean }
    }

    /// Sample standard deviation, `None` with fewer than two observations.
    pub fn sd(&self) -> Option<f64> {
        (self.n > 1).then(|| (self.m2 / (self.n - 1) as f64).sqrt())
    }

    /// Monte Carlo standard error of the mean, `sd/sqrt(n)`.
    pub fn se(&self) -> Option<f64> {
        self.sd().map(|s| s / (self.n as f64).sqrt())
    }
}

/// A proportion with its binomial standard error `sqrt(p(1−p)/n)` and its
/// 95 % Wilson interval.
#[derive(Debug, Clone, Copy, Serialize)]
pub struct Proportion {
    /// Share of paths.
    pub rate: f64,
    /// Monte Carlo standard error.
    pub se: f64,
    /// 95 % Wilson score interval.
    pub ci: [f64; 2],
}

impl Proportion {
    /// `hits` out of `n`.
    pub fn new(hits: u64, n: u64) -> Self {
        let p = hits as f64 / n as f64;
        Self { rate: p, se: (p * (1.0 - p) / n as f64).sqrt(), ci: wilson(p, n as f64) }
    }
}

/// The two-sided 95 % normal quantile, `Φ⁻¹(0.975)`.
pub const Z95: f64 = 1.959_963_984_540_054;

/// The 95 % Wilson score interval of a share `p` observed in `n` trials
/// (Wilson, 1927; recommended over `p ± z·se` by Brown, Cai and DasGupta,
/// 2001): `(p + z²/2n ± z·sqrt(p(1−p)/n + z²/4n²)) / (1 + z²/n)`. It stays
/// inside [0, 1] and is not empty at 0 or 1, where `± z·se` collapses to a point.
pub fn wilson(p: f64, n: f64) -> [f64; 2] {
    if n <= 0.0 {
        return [0.0, 1.0];
    }
    let z2 = Z95 * Z95;
    let centre = p + z2 / (2.0 * n);
    let half = Z95 * (p * (1.0 - p) / n + z2 / (4.0 * n * n)).sqrt();
    let d = 1.0 + z2 / n;
    [((centre - half) / d).max(0.0), ((centre + half) / d).min(1.0)]
}

/// Quantile `q` of sorted data, linear interpolation between order statistics
/// (Hyndman and Fan, 1996, type 7; numpy's default).
pub fn quantile_sorted(sorted: &[f64], q: f64) -> f64 {
    if sorted.is_empty() {
        return f64::NAN;
    }
    let h = (sorted.len() - 1) as f64 * q;
    let (lo, frac) = (h.floor() as usize, h - h.floor());
    let hi = (lo + 1).min(sorted.len() - 1);
    sorted[lo] + frac * (sorted[hi] - sorted[lo])
}

/// The `q` quantile of a sorted sample as one of its own values: the smallest
/// `x` whose empirical distribution function reaches `q` (Hyndman and Fan,
/// 1996, definition 1). For whole-number data such as chosen horizons, so that
/// a range reads "3–9", not "3–9.05".
pub fn quantile_discrete(sorted: &[f64], q: f64) -> f64 {
    if sorted.is_empty() {
        return f64::NAN;
    }
    let rank = (q * sorted.len() as f64).ceil() as usize;
    sorted[rank.clamp(1, sorted.len()) - 1]
}

/// Quantile band levels reported for curves.
pub const BAND_LEVELS: [f64; 5] = [0.05, 0.25, 0.5, 0.75, 0.95];

/// 1-based index of the first maximum.
pub fn argmax1(xs: &[f64]) -> usize {
    let mut best = 0;
    for (i, &x) in xs.iter().enumerate() {
        if x > xs[best] {
            best = i;
        }
    }
    best + 1
}

/// 1-based horizons whose value is within `tol·peak` of the peak (`peak > 0`).
pub fn near_set(h: &[f64], tol: f64) -> Vec<usize> {
    let peak = h[argmax1(h) - 1];
    let floor = peak - tol * peak.abs();
    (1..=h.len()).filter(|&n| h[n - 1] >= floor).collect()
}

#[cfg(test)]
mod tests {

    #[test]
    fn discrete_quantiles_are_sample_values() {
        let x = [1.0, 2.0, 3.0, 4.0, 9.0, 10.0];
        assert_eq!(super::quantile_discrete(&x, 0.5), 3.0); // F(3) = 3/6 reaches 0.5
        assert_eq!(super::quantile_discrete(&x, 0.95), 10.0);
        assert_eq!(super::quantile_discrete(&x, 0.05), 1.0);
        assert!(super::quantile_discrete(&[], 0.5).is_nan());
    }

    use super::*;

    #[test]
    fn quantiles_match_numpy_type_7() {
        // numpy.quantile([1, 2, 4, 8], [0.25, 0.5, 0.9]) = [1.75, 3.0, 6.8]
        let s = [1.0, 2.0, 4.0, 8.0];
        assert_eq!(quantile_sorted(&s, 0.25), 1.75);
        assert_eq!(quantile_sorted(&s, 0.5), 3.0);
        assert!((quantile_sorted(&s, 0.9) - 6.8).abs() < 1e-12);
    }

    #[test]
    fn moments_match_two_pass_formulas() {
        let xs = [0.5, 1.5, -2.0, 4.0, 3.25];
        let mut m = Moments::default();
        xs.iter().for_each(|&x| m.push(x));
        let mean = xs.iter().sum::<f64>() / 5.0;
        let var = xs.iter().map(|x| (x - mean).powi(2)).sum::<f64>() / 4.0;
        assert!((m.mean() - mean).abs() < 1e-15 && (m.sd().unwrap() - var.sqrt()).abs() < 1e-14);
    }

    #[test]
    fn wilson_matches_statsmodels() {
        // statsmodels 0.14 `proportion_confint(k, n, alpha=0.05, method="wilson")`.
        let cases = [
            (0, 200, 0.0, 0.018_845_326_377_266_58),
            (48, 200, 0.186_066_159_924_136_9, 0.303_733_409_792_041_7),
            (200, 200, 0.981_154_673_622_733_5, 1.0),
            (3, 10, 0.107_791_267_405_801_04, 0.603_221_852_538_854_6),
            (1, 1000, 0.000_176_546_370_626_077_65, 0.005_642_558_597_957_937),
        ];
        for (k, n, lo, hi) in cases {
            let [a, b] = wilson(k as f64 / n as f64, n as f64);
            assert!((a - lo).abs() < 1e-12 && (b - hi).abs() < 1e-12, "{k}/{n}: [{a}, {b}] vs [{lo}, {hi}]");
        }
    }
}
