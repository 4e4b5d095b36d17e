//! From a measured panel back to a scenario: the breadth, history, fitted
//! decay curve, forecast autocorrelation and IC volatility of the user's own
//! data, written as a TOML file that `lagfold run` accepts unchanged.

use crate::measure::Panel;
use crate::measure::fit::{Family, Fit};
use crate::scenario::{self, Overrides, Scenario};
use std::fmt::Write;

/// What a calibrated scenario is made of.
#[derive(Debug, Clone)]
pub struct Measured<'a> {
    /// The panel.
    pub panel: &'a Panel,
    /// Its dates as days since 1970-01-01 would be ideal; the median gap in days is enough.
    pub median_gap_days: f64,
    /// Longest horizon measured.
    pub horizons: usize,
    /// The fitted decay curve.
    pub fit: &'a Fit,
    /// Measured forecast autocorrelation.
    pub forecast_autocorrelation: Option<f64>,
    /// Measured IC volatility beyond sampling noise.
    pub ic_volatility: Option<f64>,
    /// Measured IC persistence beyond sampling noise.
    pub ic_persistence: Option<f64>,
    /// Excess kurtosis of standardised returns and the Student-t degrees of freedom it implies.
    pub tails: Option<(f64, Option<f64>)>,
}

fn median(mut v: Vec<f64>) -> f64 {
    v.sort_by(f64::total_cmp);
    if v.is_empty() { f64::NAN } else { v[v.len() / 2] }
}

/// Study cost budget of the calibrated study, in asset × date × horizon
/// units: about 35–40 s on two cores (measured: 222 paths of 3,000
/// assets × 2,500 dates × 24 horizons; the demo's 2,000 paths are 5.8e9 units
/// and take about 2 s, so small panels keep the default).
const STUDY_BUDGET: f64 = 4.0e10;

/// Paths of the calibrated study when `--paths` is not given: 2,000, fewer
/// for large panels so that the study stays under a minute (its cost is
/// about linear in assets × dates × horizons), never fewer than 200.
pub fn default_paths(assets: usize, dates: usize, horizons: usize) -> usize {
    let per_path = (assets.max(1) * dates.max(1) * horizons.max(1)) as f64;
    ((STUDY_BUDGET / per_path) as usize).clamp(200, 2000)
}

/// The scenario text and its validated form.
///
/// # Errors
/// A message when the measurement cannot make a valid scenario (for example a
/// negative fitted IC).
pub fn calibrated(m: &Measured, name: &str, paths: usize, seed: u64) -> Result<(String, Scenario), String> {
    let p = m.panel;
    let assets =
        median((0..p.dates).map(|t| p.forecast_row(t).iter().filter(|x| x.is_finite()).count() as f64).collect());
    let vol = median(
        (0..p.dates - 1)
            .filter_map(|t| {
                let r: Vec<f64> = p.return_row(t).iter().copied().filter(|x| x.is_finite()).collect();
                (r.len() > 1).then(|| {
                    let mean = r.iter().sum::<f64>() / r.len() as f64;
                    (r.iter().map(|x| (x - mean).powi(2)).sum::<f64>() / (r.len() - 1) as f64).sqrt()
                })
            })
            .collect(),
    );
    let f = m.fit;
    if ![f.amplitude, f.shape1, f.shape2].iter().all(|x| x.is_finite()) {
        return Err(format!("the fitted {} curve is not finite", f.family.name()));
    }
    if !(assets.is_finite() && assets >= 3.0) {
        return Err("no date has three assets with a forecast".into());
    }
    let decay = match f.family {
        Family::Exponential => {
            format!("family = \"exponential\"\nic1 = {:.6}\nhalf_life = {:.4}", f.amplitude, f.shape1)
        }
        Family::Power => format!("family = \"power\"\nic1 = {:.6}\nexponent = {:.4}", f.amplitude, f.shape1),
        Family::Linear => format!("family = \"linear\"\nic1 = {:.6}\nzero_at = {:.4}", f.amplitude, f.shape1),
        Family::Hump => {
            format!("family = \"hump\"\npeak = {:.6}\npeak_lag = {:.4}\nshape = {:.4}", f.amplitude, f.shape1, f.shape2)
        }
    };
    let mut text = String::new();
    let ppy = crate::calendar::periods_per_year(m.median_gap_days);
    let vol = if vol.is_finite() && vol > 0.0 { vol } else { 0.01 };
    let rho = m.forecast_autocorrelation.unwrap_or(0.0).clamp(-0.98, 0.98);
    let psi = m.ic_persistence.unwrap_or(0.0).clamp(0.0, 0.95);
    let ic_vol =
        crate::measure::extras::ic_vol_parameter(m.ic_volatility.unwrap_or(0.0), psi, p.dates - 1).clamp(0.0, 0.5);
    let _ = writeln!(text, "# Calibrated by `lagfold measure` from a measured panel; edit freely.");
    let _ = writeln!(text, "name = \"{name}\"");
    let _ = writeln!(
        text,
        "description = \"Calibrated to a measured panel: breadth, history, fitted decay, persistence, IC volatility and tails\""
    );
    let _ = writeln!(text, "assets = {}  # median assets with a forecast per date", (assets as usize).max(10));
    let _ = writeln!(text, "history = {}  # periods in the panel, missing ones included", p.dates);
    let _ = writeln!(text, "horizons = {}  # longest horizon measured", m.horizons);
    let _ =
        writeln!(text, "periods_per_year = {ppy}  # from the median gap between dates ({} days)", m.median_gap_days);
    let _ = writeln!(text, "residual_vol = {vol:.6}  # median cross-sectional sd of returns per period");
    let _ = writeln!(
        text,
        "forecast_autocorrelation = {rho:.4}  # mean correlation of each date's forecasts with the previous date's"
    );
    let _ = writeln!(
        text,
        "ic_vol = {ic_vol:.4}  # sd of the per-date lag-1 IC beyond sampling noise ({:.4}), corrected for persistence and curvature",
        m.ic_volatility.unwrap_or(0.0)
    );
    let _ = writeln!(
        text,
        "ic_vol_persistence = {psi:.4}  # {}",
        match m.ic_persistence {
            Some(_) => "autocorrelation of the per-date lag-1 IC beyond sampling noise (Kendall-corrected)",
            None => "not measurable (the IC's variance is mostly sampling noise): 0",
        }
    );
    let _ =
        writeln!(text, "paths = {paths}\nseed = {seed}\n\n[decay]  # fitted to the lagged ICs, family by AIC\n{decay}");
    match m.tails {
        Some((k, Some(dof))) => {
            let _ = writeln!(
                text,
                "\n[tails]  # excess kurtosis {k:.3} of returns standardised per date; t has 6/(dof - 4), floor {}\nfamily = \"student_t\"\ndof = {dof:.2}",
                crate::measure::extras::MIN_DOF
            );
        }
        Some((k, None)) => {
            let _ = writeln!(
                text,
                "\n[tails]  # excess kurtosis {k:.3} of standardised returns: normal\nfamily = \"normal\""
            );
        }
        None => {}
    }
    // The default five quantiles need 25 assets (each leg at least five); a narrower panel gets fewer.
    let breadth = (assets as usize).max(10);
    if breadth < 25 {
        let _ = writeln!(
            text,
            "\n[portfolio]\nquantiles = {}  # as many as leave each leg at least 5 of the {breadth} assets",
            (breadth / 5).clamp(2, 5)
        );
    }
    let s = scenario::load(&text, "calibrated.toml", name, &Overrides::default()).map_err(|e| e.to_string())?;
    // The model and its truth must exist too (a negative fitted IC has no optimum).
    crate::simulate::Setup::new(s.clone()).map_err(|e| e.to_string())?;
    Ok((text, s))
}

#[cfg(test)]
mod tests {
    use super::default_paths;

    #[test]
    fn large_panels_get_fewer_calibrated_paths() {
        assert_eq!(default_paths(1000, 120, 24), 2000, "the demo's size keeps the default");
        assert_eq!(default_paths(3000, 2500, 24), 222);
        assert_eq!(default_paths(20_000, 5000, 60), 200, "never below 200");
    }
}
