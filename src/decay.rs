//! Stage 1 (truth): the user's lagged-IC decay curve, `IC_k` for `k = 1, 2, …`.
//!
//! The curve is the expected per-date cross-sectional IC that a long history
//! of the user's own estimator would show (MODEL.md §1). Six families; each
//! constructor checks its parameters and returns [`ScenarioError`] naming the
//! key and the bad value.

use crate::error::ScenarioError;

/// One decay-curve family with its parameters, as written in a scenario's
/// `[decay]` table (`family = "..."`). [`DecayCurve::new`] checks the values.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
#[serde(tag = "family", rename_all = "snake_case")]
pub enum DecayShape {
    /// `IC_k = ic1 · 2^{−(k−1)/h}`.
    Exponential {
        /// IC at lag 1.
        ic1: f64,
        /// Half-life `h` in periods.
        half_life: f64,
    },
    /// `IC_k = ic1 · (m − k)/(m − 1)` for `k ≤ m`, zero beyond.
    Linear {
        /// IC at lag 1.
        ic1: f64,
        /// Lag `m` at which the IC reaches zero.
        zero_at: f64,
    },
    /// `IC_k = peak · (k/p)^a · exp(a(1 − k/p))`, highest at lag `p`.
    Hump {
        /// Highest IC, reached at `peak_lag`.
        peak: f64,
        /// Lag `p` of the peak.
        peak_lag: f64,
        /// Shape `a` (larger is narrower; default 2).
        shape: f64,
    },
    /// `IC_k = ic1 · k^{−a}`.
    Power {
        /// IC at lag 1.
        ic1: f64,
        /// Exponent `a`.
        exponent: f64,
    },
    /// `IC_k = ic` for `k ≤ m`, zero beyond.
    Step {
        /// IC on each of the first `length` lags.
        ic: f64,
        /// Number of lags `m` with a non-zero IC.
        length: usize,
    },
    /// Explicit `IC_1, IC_2, …`, zero beyond the table.
    Table {
        /// The values, lag 1 first.
        values: Vec<f64>,
    },
}

/// A validated decay curve. Build it with one of the constructors.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
#[serde(transparent)]
pub struct DecayCurve {
    shape: DecayShape,
}

/// The hump shape `a` when the scenario gives none.
pub const DEFAULT_HUMP_SHAPE: f64 = 2.0;

fn check_ic(key: &str, v: f64) -> Result<f64, ScenarioError> {
    if v.is_finite() && v > -1.0 && v < 1.0 { Ok(v) } else { Err(out_of_range(key, v, "inside (-1, 1)")) }
}

fn check_positive(key: &str, v: f64) -> Result<f64, ScenarioError> {
    if v.is_finite() && v > 0.0 { Ok(v) } else { Err(out_of_range(key, v, "> 0")) }
}

pub(crate) fn out_of_range(key: &str, v: impl std::fmt::Display, allowed: &str) -> ScenarioError {
    let mut value = v.to_string();
    // A number of many digits (1e300 prints in full) is shown in scientific form.
    if value.len() > 12
        && let Ok(x) = value.parse::<f64>()
    {
        value = format!("{x:e}");
    }
    ScenarioError::OutOfRange { key: key.to_string(), value, allowed: allowed.to_string() }
}

impl DecayCurve {
    /// Checks a shape's parameters with the constructor of its family.
    ///
    /// # Errors
    /// The first parameter out of range, with its key path.
    pub fn new(shape: DecayShape) -> Result<Self, ScenarioError> {
        match shape {
            DecayShape::Exponential { ic1, half_life } => Self::exponential(ic1, half_life),
            DecayShape::Linear { ic1, zero_at } => Self::linear(ic1, zero_at),
            DecayShape::Hump { peak, peak_lag, shape } => Self::hump(peak, peak_lag, shape),
            DecayShape::Power { ic1, exponent } => Self::power(ic1, exponent),
            DecayShape::Step { ic, length } => Self::step(ic, length),
            DecayShape::Table { values } => Self::table(values),
        }
    }

    /// Exponential decay with half-life `h` periods.
    ///
    /// # Errors
    /// `ic1` outside (−1, 1) or `half_life ≤ 0`.
    pub fn exponential(ic1: f64, half_life: f64) -> Result<Self, ScenarioError> {
        let ic1 = check_ic("decay.ic1", ic1)?;
        let half_life = check_positive("decay.half_life", half_life)?;
        Ok(Self { shape: DecayShape::Exponential { ic1, half_life } })
    }

    /// Linear decay reaching zero at lag `zero_at`.
    ///
    /// # Errors
    /// `ic1` outside (−1, 1) or `zero_at ≤ 1`.
    pub fn linear(ic1: f64, zero_at: f64) -> Result<Self, ScenarioError> {
        let ic1 = check_ic("decay.ic1", ic1)?;
        if !(zero_at.is_finite() && zero_at > 1.0) {
            return Err(out_of_range("decay.zero_at", zero_at, "> 1"));
        }
        Ok(Self { shape: DecayShape::Linear { ic1, zero_at } })
    }

    /// Hump: slow start, highest IC `peak` at lag `peak_lag`, shape `a`.
    ///
    /// # Errors
    /// `peak` outside (−1, 1), `peak_lag ≤ 0` or `shape ≤ 0`.
    pub fn hump(peak: f64, peak_lag: f64, shape: f64) -> Result<Self, ScenarioError> {
        let peak = check_ic("decay.peak", peak)?;
        let peak_lag = check_positive("decay.peak_lag", peak_lag)?;
        let shape = check_positive("decay.shape", shape)?;
        Ok(Self { shape: DecayShape::Hump { peak, peak_lag, shape } })
    }

    /// Power-law decay `ic1 · k^{−a}`.
    ///
    /// # Errors
    /// `ic1` outside (−1, 1) or `exponent ≤ 0`.
    pub fn power(ic1: f64, exponent: f64) -> Result<Self, ScenarioError> {
        let ic1 = check_ic("decay.ic1", ic1)?;
        let exponent = check_positive("decay.exponent", exponent)?;
        Ok(Self { shape: DecayShape::Power { ic1, exponent } })
    }

    /// Constant `ic` for `length` lags, then zero.
    ///
    /// # Errors
    /// `ic` outside (−1, 1) or `length = 0`.
    pub fn step(ic: f64, length: usize) -> Result<Self, ScenarioError> {
        let ic = check_ic("decay.ic", ic)?;
        if length == 0 {
            return Err(out_of_range("decay.length", length, "at least 1"));
        }
        Ok(Self { shape: DecayShape::Step { ic, length } })
    }

    /// Explicit table, lag 1 first; may change sign.
    ///
    /// # Errors
    /// An empty table or a value outside (−1, 1).
    pub fn table(values: Vec<f64>) -> Result<Self, ScenarioError> {
        if values.is_empty() {
            return Err(out_of_range("decay.values", "[]", "a non-empty list"));
        }
        for (i, &v) in values.iter().enumerate() {
            check_ic(&format!("decay.values[{i}]"), v)?;
        }
        Ok(Self { shape: DecayShape::Table { values } })
    }

    /// The family and its parameters.
    pub fn shape(&self) -> &DecayShape {
        &self.shape
    }

    /// Short family name as written in scenario files.
    pub fn family(&self) -> &'static str {
        match self.shape {
            DecayShape::Exponential { .. } => "exponential",
            DecayShape::Linear { .. } => "linear",
            DecayShape::Hump { .. } => "hump",
            DecayShape::Power { .. } => "power",
            DecayShape::Step { .. } => "step",
            DecayShape::Table { .. } => "table",
        }
    }

    /// `IC_k` for lag `k ≥ 1` (formulas in [`DecayShape`]).
    pub fn ic(&self, k: usize) -> f64 {
        debug_assert!(k >= 1);
        let kf = k as f64;
        match self.shape {
            DecayShape::Exponential { ic1, half_life } => ic1 * (-(kf - 1.0) / half_life).exp2(),
            DecayShape::Linear { ic1, zero_at } => {
                if kf < zero_at {
                    ic1 * (zero_at - kf) / (zero_at - 1.0)
                } else {
                    0.0
                }
            }
            DecayShape::Hump { peak, peak_lag, shape } => {
                let x = kf / peak_lag;
                peak * x.powf(shape) * (shape * (1.0 - x)).exp()
            }
            DecayShape::Power { ic1, exponent } => ic1 * kf.powf(-exponent),
            DecayShape::Step { ic, length } => {
                if k <= length {
                    ic
                } else {
                    0.0
                }
            }
            DecayShape::Table { ref values } => values.get(k - 1).copied().unwrap_or(0.0),
        }
    }

    /// `IC` at a real lag `x ≥ 1`: the family's formula, a step that ends
    /// after `length`, or the table interpolated linearly (zero beyond it).
    /// Used to stretch or squeeze a curve in time.
    pub fn ic_at(&self, x: f64) -> f64 {
        match self.shape {
            DecayShape::Exponential { ic1, half_life } => ic1 * (-(x - 1.0) / half_life).exp2(),
            DecayShape::Linear { ic1, zero_at } => {
                if x < zero_at {
                    ic1 * (zero_at - x) / (zero_at - 1.0)
                } else {
                    0.0
                }
            }
            DecayShape::Hump { peak, peak_lag, shape } => {
                let r = x / peak_lag;
                peak * r.powf(shape) * (shape * (1.0 - r)).exp()
            }
            DecayShape::Power { ic1, exponent } => ic1 * x.powf(-exponent),
            DecayShape::Step { ic, length } => {
                if x <= length as f64 + 1e-9 {
                    ic
                } else {
                    0.0
                }
            }
            DecayShape::Table { ref values } => {
                let i = (x - 1.0).floor().max(0.0) as usize;
                let frac = (x - 1.0) - i as f64;
                let at = |j: usize| values.get(j).copied().unwrap_or(0.0);
                at(i) + frac * (at(i + 1) - at(i))
            }
        }
    }

    /// The last lag with a non-zero IC, for families that end by themselves.
    pub fn natural_end(&self) -> Option<usize> {
        match self.shape {
            DecayShape::Linear { zero_at, .. } => Some((zero_at.ceil() as usize - 1).max(1)),
            DecayShape::Step { length, .. } => Some(length),
            DecayShape::Table { ref values } => Some(values.len()),
            _ => None,
        }
    }

    /// `IC_1 … IC_K`.
    pub fn values(&self, k_max: usize) -> Vec<f64> {
        (1..=k_max).map(|k| self.ic(k)).collect()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn exponential_halves_every_half_life() {
        let c = DecayCurve::exponential(0.08, 3.0).unwrap();
        assert!((c.ic(4) - 0.04).abs() < 1e-15);
        assert!((c.ic(7) - 0.02).abs() < 1e-15);
    }

    #[test]
    fn hump_peaks_at_its_peak_lag() {
        let c = DecayCurve::hump(0.03, 5.0, 2.0).unwrap();
        assert!((c.ic(5) - 0.03).abs() < 1e-15);
        assert!(c.ic(4) < c.ic(5) && c.ic(6) < c.ic(5));
    }

    #[test]
    fn linear_and_step_end_where_they_say() {
        let l = DecayCurve::linear(0.05, 6.0).unwrap();
        assert_eq!(l.natural_end(), Some(5));
        assert_eq!(l.ic(6), 0.0);
        assert!((l.ic(5) - 0.01).abs() < 1e-15);
        let s = DecayCurve::step(0.02, 3).unwrap();
        assert_eq!((s.ic(3), s.ic(4)), (0.02, 0.0));
    }

    #[test]
    fn real_lags_agree_with_integer_lags_and_interpolate_tables() {
        for c in [
            DecayCurve::exponential(0.05, 3.0).unwrap(),
            DecayCurve::hump(0.03, 4.0, 2.0).unwrap(),
            DecayCurve::linear(0.05, 6.0).unwrap(),
            DecayCurve::power(0.04, 0.7).unwrap(),
            DecayCurve::step(0.02, 3).unwrap(),
        ] {
            for k in 1..10 {
                assert!((c.ic_at(k as f64) - c.ic(k)).abs() < 1e-15, "{c:?} lag {k}");
            }
        }
        let t = DecayCurve::table(vec![0.04, 0.02]).unwrap();
        assert_eq!((t.ic_at(1.5), t.ic_at(2.5), t.ic_at(4.0)), (0.03, 0.01, 0.0));
    }

    #[test]
    fn constructors_name_the_bad_key() {
        let e = DecayCurve::exponential(1.2, 3.0).unwrap_err();
        assert!(e.to_string().contains("decay.ic1"), "{e}");
        let e = DecayCurve::exponential(0.05, -3.0).unwrap_err();
        assert_eq!(e.to_string(), "`decay.half_life` must be > 0, got -3");
        let e = DecayCurve::table(vec![0.05, -1.5]).unwrap_err();
        assert!(e.to_string().contains("decay.values[1]"), "{e}");
    }
}
