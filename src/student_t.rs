//! Student-t draws by the ziggurat method (Marsaglia and Tsang, 2000), with
//! tables built for the scenario's degrees of freedom.
//!
//! The unnormalised density `f(x) = (1 + x²/ν)^{−(ν+1)/2}` (`f(0) = 1`) is
//! covered by [`LAYERS`] horizontal layers of equal area `V`: layer `i`
//! spans `[0, x_i] × [f(x_i), f(x_{i+1})]`, `x_{i+1} = f⁻¹(f(x_i) + V/x_i)`,
//! from `x_1 = r` up to `x_LAYERS = 0`; the base layer is the rectangle
//! `[0, r] × [0, f(r)]` with the tail beyond `r`, so
//! `V = r·f(r) + ∫_r^∞ f`. `r` is found by bisection so that the top layer
//! closes at `f(0)`. A draw picks a layer and a point in it: nearly always
//! inside the density without evaluating it (one 64-bit random number); else
//! the density is compared, or the tail is sampled by rejection from the
//! envelope `(1 + r·x/ν)^{−(ν+1)/2} ≥ f(x)` for `x ≥ r` (inverted in closed
//! form). The result is exact up to the tables' rounding: about 2.5 times
//! cheaper than a normal divided by the root of a gamma (rand_distr's
//! `StudentT`; `cargo bench --bench path` prints both).

use crate::rng::{PathRng, fill_with};
use rand::{Rng, RngExt};
use rand_distr::Open01;
use statrs::distribution::{Continuous, ContinuousCDF, StudentsT};

/// Layers of the ziggurat (the low eight bits of a draw pick one).
pub const LAYERS: usize = 256;

/// Student-t draws with `dof` degrees of freedom.
#[derive(Debug, Clone)]
pub struct StudentTZiggurat {
    dof: f64,
    /// `(ν + 1)/2`.
    power: f64,
    /// Right edge of each layer, `x[0] = V/f(r)` (the base strip's width), `x[LAYERS] = 0`.
    x: Vec<f64>,
    /// `f(x[i])`.
    f: Vec<f64>,
}

/// `f(x) = (1 + x²/ν)^{−(ν+1)/2}`.
fn density(x: f64, dof: f64, power: f64) -> f64 {
    (-power * (x * x / dof).ln_1p()).exp()
}

/// `f⁻¹(y)` for `0 < y ≤ 1`: `sqrt(ν·(y^{−1/power} − 1))`.
fn inverse(y: f64, dof: f64, power: f64) -> f64 {
    (dof * (-y.ln() / power).exp_m1()).max(0.0).sqrt()
}

/// The layers' right edges for base edge `r` and how far the top layer
/// misses `f(0)`: `f(x_{LAYERS−1}) + V/x_{LAYERS−1} − 1`, positive (and the
/// edges unfinished) when the layers reach the peak early (`r` too small).
fn edges(r: f64, dof: f64, power: f64, tail: &dyn Fn(f64) -> f64) -> (Vec<f64>, f64) {
    let v = r * density(r, dof, power) + tail(r);
    let mut x = vec![0.0; LAYERS + 1];
    x[0] = v / density(r, dof, power);
    x[1] = r;
    for i in 1..LAYERS - 1 {
        let y = density(x[i], dof, power) + v / x[i];
        if y >= 1.0 {
            return (x, 1.0 + (LAYERS - i) as f64);
        }
        x[i + 1] = inverse(y, dof, power);
    }
    let excess = density(x[LAYERS - 1], dof, power) + v / x[LAYERS - 1] - 1.0;
    (x, excess)
}

impl StudentTZiggurat {
    /// Tables for `dof > 2` degrees of freedom (finite). Probed exact up to
    /// 10¹⁰ degrees of freedom; at 10¹⁵ statrs's t tail area has lost digits
    /// (variance 1.012). Scenarios stop at [`crate::scenario::MAX_DOF`] = 10⁶.
    ///
    /// # Panics
    /// `dof` not finite or not above 2 (scenarios validate it first).
    pub fn new(dof: f64) -> Self {
        assert!(dof.is_finite() && dof > 2.0, "Student-t degrees of freedom {dof} must be finite and above 2");
        let power = (dof + 1.0) / 2.0;
        let law = StudentsT::new(0.0, 1.0, dof).expect("dof > 2");
        // ∫_r^∞ f = P(T > r) / c_ν, with c_ν = the t density at 0.
        let norm = law.pdf(0.0);
        let tail = move |r: f64| law.sf(r) / norm;
        let (mut lo, mut hi) = (0.1, 1.0);
        while edges(hi, dof, power, &tail).1 > 0.0 {
            (lo, hi) = (hi, 2.0 * hi);
        }
        // Bisection to the last bit: at `hi` the layers always finish.
        while hi - lo > f64::EPSILON * hi {
            let mid = 0.5 * (lo + hi);
            if edges(mid, dof, power, &tail).1 > 0.0 { lo = mid } else { hi = mid }
        }
        let x = edges(hi, dof, power, &tail).0;
        let f = x.iter().map(|&x| density(x, dof, power)).collect();
        Self { dof, power, x, f }
    }

    /// Base edge `r`: the start of the tail.
    pub fn tail_start(&self) -> f64 {
        self.x[1]
    }

    /// One draw of Student's t with `ν` degrees of freedom (variance `ν/(ν−2)`).
    #[inline]
    pub fn sample(&self, rng: &mut PathRng) -> f64 {
        loop {
            let bits = rng.next_u64();
            let i = (bits & 0xff) as usize;
            // 52 high bits as a float in [2, 4), shifted to [−1, 1).
            let u = f64::from_bits(0x4000_0000_0000_0000 | (bits >> 12)) - 3.0;
            let x = u * self.x[i];
            if x.abs() < self.x[i + 1] {
                return x;
            }
            if i == 0 {
                return self.tail(rng, u);
            }
            let y: f64 = rng.random();
            if self.f[i] + (self.f[i + 1] - self.f[i]) * y < density(x, self.dof, self.power) {
                return x;
            }
        }
    }

    /// A draw beyond `r` with the sign of `u`: rejection from the envelope
    /// `g(x) = (1 + r·x/ν)^{−(ν+1)/2}`, whose tail area from `x` is
    /// proportional to `(1 + r·x/ν)^{−(ν−1)/2}`; accepted with `f(x)/g(x)`.
    #[cold]
    fn tail(&self, rng: &mut PathRng, u: f64) -> f64 {
        let (nu, r, a) = (self.dof, self.x[1], self.power);
        let start = 1.0 + r * r / nu;
        loop {
            let w: f64 = rng.sample(Open01);
            let x = nu / r * (start * w.powf(-1.0 / (a - 1.0)) - 1.0);
            let v: f64 = rng.sample(Open01);
            if v < ((1.0 + r * x / nu) / (1.0 + x * x / nu)).powf(a) {
                return if u < 0.0 { -x } else { x };
            }
        }
    }

    /// Fills `out` with draws scaled by `scale`.
    pub fn fill(&self, rng: &mut PathRng, scale: f64, out: &mut [f64]) {
        fill_with(rng, out, |r| scale * self.sample(r));
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::rng::path_rng;
    use statrs::distribution::{Continuous, ContinuousCDF};

    #[test]
    fn every_layer_has_the_same_area_and_the_top_closes_at_the_peak() {
        for dof in [2.05, 3.0, 4.0, 6.0, 30.0, 1e6] {
            let z = StudentTZiggurat::new(dof);
            let law = StudentsT::new(0.0, 1.0, dof).unwrap();
            // Tolerances: the base strip is one sum (a few ulps); each layer's edge is solved from
            // the previous one, so rounding accumulates over 255 layers and the bisection stops at
            // the last bit of `r` (measured: at most 6e-13 relative over these ν; 1e-9 leaves room).
            let v = z.x[0] * z.f[1];
            let tail = law.sf(z.x[1]) / law.pdf(0.0);
            assert!((z.x[1] * z.f[1] + tail - v).abs() < 1e-12 * v, "base strip, dof {dof}");
            for i in 1..LAYERS {
                let area = z.x[i] * (z.f[i + 1] - z.f[i]);
                assert!((area - v).abs() < 1e-9 * v, "layer {i} of dof {dof}: {area} vs {v}");
            }
            assert_eq!(z.x[LAYERS], 0.0);
            assert!((z.f[LAYERS] - 1.0).abs() < 1e-15);
            assert!(z.x.windows(2).skip(1).all(|w| w[0] > w[1]), "edges decrease, dof {dof}");
        }
    }

    /// The draws against the t law itself (statrs): the share below each of
    /// 41 points — the quantiles 10⁻⁴ … 1 − 10⁻⁴, the tail start `±r` and
    /// points beyond it — within four binomial standard errors of the CDF
    /// (`sqrt(p(1−p)/n)`; 41 points at 4 SE fail by chance about once in
    /// 400 seeds, and the seed is fixed).
    #[test]
    fn draws_follow_the_t_law_in_the_body_and_the_tail() {
        let n = 2_000_000;
        for dof in [2.5, 4.0, 6.0] {
            let z = StudentTZiggurat::new(dof);
            let law = StudentsT::new(0.0, 1.0, dof).unwrap();
            let mut rng = path_rng(17, dof as u64);
            let mut draws = vec![0.0; n];
            z.fill(&mut rng, 1.0, &mut draws);
            draws.sort_by(f64::total_cmp);
            let r = z.tail_start();
            let mut points: Vec<f64> = [1e-4, 1e-3, 0.01, 0.05, 0.1, 0.2, 0.3, 0.4, 0.5]
                .iter()
                .flat_map(|&p| [law.inverse_cdf(p), -law.inverse_cdf(p)])
                .collect();
            points.extend([r, -r, 1.5 * r, -1.5 * r, 3.0 * r, -3.0 * r, 0.05, -0.05, 0.25, -0.25]);
            points.extend((1..=12).map(|k| -2.0 + k as f64 * 0.3));
            for x in points {
                let p = law.cdf(x);
                let share = draws.partition_point(|&d| d < x) as f64 / n as f64;
                let se = (p * (1.0 - p) / n as f64).sqrt();
                assert!((share - p).abs() < 4.0 * se, "dof {dof}, x {x}: share {share} vs cdf {p} (se {se})");
            }
        }
    }
}
