//! Neutralisation before any IC: each date's forecasts and returns are
//! replaced by their residuals on the date's group memberships (a sector
//! column: demeaning within each group) and on named numeric exposures (size,
//! beta, …) with an intercept, by least squares on the date's assets that
//! have every value. With both, the regression is joint: by the
//! Frisch–Waugh–Lovell theorem (Frisch and Waugh, 1933; Lovell, 1963),
//! demeaning the values and the exposures within groups and then regressing
//! the one on the others gives the residuals of the regression on group
//! dummies and exposures together. Assets without every covariate on a date
//! become missing there. Returns in row `t` (the period starting at date
//! `t`) use date `t`'s covariates, known when the period starts.

use super::Panel;
use nalgebra::{DMatrix, DVector};

/// The covariates of a panel: per date and asset (row-major, `dates × assets`).
#[derive(Debug, Clone, Default)]
pub struct Covariates {
    /// Group ids (`u32::MAX` where missing); `None`: no grouping.
    pub groups: Option<Vec<u32>>,
    /// Numeric exposures, one `dates × assets` matrix each (NaN where missing).
    pub exposures: Vec<Vec<f64>>,
}

impl Covariates {
    /// Whether there is anything to neutralise on.
    pub fn is_empty(&self) -> bool {
        self.groups.is_none() && self.exposures.is_empty()
    }
}

/// Replaces `values` (one date's row) by its residuals on the covariates of
/// that date (`at` = index of the row's first cell in the covariate matrices);
/// cells without every covariate become NaN. Fewer assets than parameters
/// plus one leave the whole row missing.
fn residualise_row(values: &mut [f64], cov: &Covariates, at: usize) {
    let n = values.len();
    let k = cov.exposures.len();
    let group = |i: usize| cov.groups.as_ref().map(|g| g[at + i]);
    let keep: Vec<usize> = (0..n)
        .filter(|&i| {
            values[i].is_finite() && group(i) != Some(u32::MAX) && cov.exposures.iter().all(|x| x[at + i].is_finite())
        })
        .collect();
    // The value and the exposures of the kept assets, column by column.
    let mut cols: Vec<Vec<f64>> = std::iter::once(keep.iter().map(|&i| values[i]).collect())
        .chain(cov.exposures.iter().map(|x| keep.iter().map(|&i| x[at + i]).collect()))
        .collect();
    let mut groups_used = 1;
    if let Some(g) = &cov.groups {
        let ids: Vec<u32> = keep.iter().map(|&i| g[at + i]).collect();
        let mut distinct = ids.clone();
        distinct.sort_unstable();
        distinct.dedup();
        groups_used = distinct.len();
        for col in &mut cols {
            let mut sum = vec![0.0; distinct.len()];
            let mut count = vec![0usize; distinct.len()];
            let slot: Vec<usize> = ids.iter().map(|id| distinct.binary_search(id).unwrap_or(0)).collect();
            for (v, &s) in col.iter().zip(&slot) {
                sum[s] += v;
                count[s] += 1;
            }
            for (v, &s) in col.iter_mut().zip(&slot) {
                *v -= sum[s] / count[s] as f64;
            }
        }
    } else {
        // The intercept: demean every column.
        for col in &mut cols {
            let mean = col.iter().sum::<f64>() / col.len().max(1) as f64;
            col.iter_mut().for_each(|v| *v -= mean);
        }
    }
    let resid: Option<Vec<f64>> = if keep.len() < groups_used + k + 1 {
        None
    } else if k == 0 {
        Some(cols[0].clone())
    } else {
        let m = keep.len();
        let x = DMatrix::from_fn(m, k, |r, c| cols[c + 1][r]);
        let y = DVector::from_column_slice(&cols[0]);
        x.clone().svd(true, true).solve(&y, 1e-12).ok().map(|beta| (y - x * beta).iter().copied().collect())
    };
    values.iter_mut().for_each(|v| *v = f64::NAN);
    if let Some(r) = resid {
        for (&i, v) in keep.iter().zip(r) {
            values[i] = v;
        }
    }
}

/// Neutralises every forecast row and every return row of `panel` on `cov`
/// (whose matrices are `dates × assets`).
pub fn neutralise(panel: &mut Panel, cov: &Covariates) {
    if cov.is_empty() {
        return;
    }
    let n = panel.assets;
    for t in 0..panel.dates {
        residualise_row(&mut panel.forecasts[t * n..(t + 1) * n], cov, t * n);
        if t + 1 < panel.dates {
            residualise_row(&mut panel.returns[t * n..(t + 1) * n], cov, t * n);
        }
    }
    panel.refresh_missing();
}

/// Neutralises one more forecast matrix (`dates × assets`, row-major) on
/// `cov`, as [`neutralise`] does the panel's own forecasts.
pub fn neutralise_forecasts(forecasts: &mut [f64], assets: usize, cov: &Covariates) {
    if cov.is_empty() || assets == 0 {
        return;
    }
    for (t, row) in forecasts.chunks_mut(assets).enumerate() {
        residualise_row(row, cov, t * assets);
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn residuals_are_orthogonal_to_groups_and_exposures() {
        let n = 12;
        let values: Vec<f64> = (0..n).map(|i| ((i * 7919) % 13) as f64 / 3.0).collect();
        let size: Vec<f64> = (0..n).map(|i| ((i * 104_729) % 11) as f64).collect();
        let groups: Vec<u32> = (0..n).map(|i| (i % 3) as u32).collect();
        let cov = Covariates { groups: Some(groups.clone()), exposures: vec![size.clone()] };
        let mut v = values.clone();
        residualise_row(&mut v, &cov, 0);
        for g in 0..3 {
            let s: f64 = (0..n).filter(|i| groups[*i] == g).map(|i| v[i]).sum();
            assert!(s.abs() < 1e-12, "group {g} sums to {s}");
        }
        let dot: f64 = v.iter().zip(&size).map(|(a, b)| a * b).sum();
        assert!(dot.abs() < 1e-10, "{dot}");
    }
}
