//! Running sums of a book's per-period gross return and traded notional, from
//! which the net mean, volatility and information ratio follow at any cost.

use serde::{Deserialize, Serialize};

/// Sums over periods of gross return `g` and traded notional `τ`.
#[derive(Debug, Clone, Copy, Default, PartialEq, Serialize, Deserialize)]
pub struct BookSums {
    /// Periods.
    pub n: u64,
    /// `Σ g`.
    pub g: f64,
    /// `Σ g²`.
    pub gg: f64,
    /// `Σ τ`.
    pub t: f64,
    /// `Σ τ²`.
    pub tt: f64,
    /// `Σ g·τ`.
    pub gt: f64,
}

impl BookSums {
    /// Adds one period.
    pub fn push(&mut self, g: f64, t: f64) {
        self.n += 1;
        self.g += g;
        self.gg += g * g;
        self.t += t;
        self.tt += t * t;
        self.gt += g * t;
    }

    /// Adds another set of sums (pooling periods).
    pub fn merge(&mut self, o: &BookSums) {
        self.n += o.n;
        self.g += o.g;
        self.gg += o.gg;
        self.t += o.t;
        self.tt += o.tt;
        self.gt += o.gt;
    }

    /// Mean gross return per period.
    pub fn gross_mean(&self) -> f64 {
        self.g / self.n as f64
    }

    /// Mean traded notional per period.
    pub fn turnover(&self) -> f64 {
        self.t / self.n as f64
    }

    /// Mean and standard deviation (divisor `n − 1`) of the net return
    /// `g − c·τ` for a one-way cost `c` per unit traded.
    pub fn net_mean_sd(&self, c: f64) -> (f64, f64) {
        let n = self.n as f64;
        let mean = (self.g - c * self.t) / n;
        let ss = self.gg - 2.0 * c * self.gt + c * c * self.tt;
        let var = (ss - n * mean * mean) / (n - 1.0);
        (mean, var.max(0.0).sqrt())
    }

    /// Information ratio of the net return, annualised with `periods_per_year`.
    pub fn ir(&self, c: f64, periods_per_year: f64) -> f64 {
        let (m, sd) = self.net_mean_sd(c);
        m / sd * periods_per_year.sqrt()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn net_moments_match_direct_computation() {
        let data = [(0.01, 0.5), (-0.02, 0.7), (0.03, 0.4), (0.005, 0.9)];
        let mut s = BookSums::default();
        data.iter().for_each(|&(g, t)| s.push(g, t));
        let c = 0.001;
        let net: Vec<f64> = data.iter().map(|(g, t)| g - c * t).collect();
        let mean = net.iter().sum::<f64>() / 4.0;
        let sd = (net.iter().map(|x| (x - mean).powi(2)).sum::<f64>() / 3.0).sqrt();
        let (m, s2) = s.net_mean_sd(c);
        assert!((m - mean).abs() < 1e-15 && (s2 - sd).abs() < 1e-15);
    }
}
