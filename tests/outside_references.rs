//! The estimators and the generator against published results (MODEL.md §7).
//! Every check uses a fixed seed and a tolerance of four standard errors,
//! with the standard error stated beside it, so it cannot flake.

use lagfold::stats::CHECK_SIGMAS;
mod common;

use common::{expected_sample_corr, for_each_path, mean_se, setup};
use lagfold::measure::sign::sign_agreement;
use lagfold::measure::{Measurement, Panel};
use lagfold::rng::{fill_normal, path_rng};
use std::f64::consts::PI;

/// Independent forecasts (ρ = 0, no IC shocks, normal noise) with IC `ic` at lag 1 only.
fn one_lag(ic: f64, assets: usize, history: usize, paths: usize) -> String {
    format!(
        "assets = {assets}\nhistory = {history}\nhorizons = 1\npaths = {paths}\nseed = 99\n\
         [decay]\nfamily = \"step\"\nic = {ic}\nlength = 1\n"
    )
}

#[test]
fn sign_agreement_follows_sheppard() {
    // Sheppard (1899): P(X·Y > 0) = 1/2 + arcsin(ρ)/π for standard normals.
    let s = setup(&one_lag(0.2, 1000, 200, 20));
    let (mut agree, mut total) = (0, 0);
    for_each_path(&s, |p, _| {
        let (a, t) = sign_agreement(p, 1, 3);
        agree += a;
        total += t;
    });
    let want = 0.5 + 0.2f64.asin() / PI;
    let got = agree as f64 / total as f64;
    let se = (want * (1.0 - want) / total as f64).sqrt(); // 2.5e-4 at 4e6 independent pairs
    assert!((got - want).abs() < CHECK_SIGMAS * se, "got {got}, Sheppard {want}, se {se}");
}

#[test]
fn per_date_ic_noise_matches_fisher_standard_error() {
    // Fisher (1921): atanh(r) of n normal pairs has standard deviation 1/sqrt(n − 3).
    let n = 50;
    let s = setup(&one_lag(0.1, n, 200, 200));
    let mut z = Vec::new();
    for_each_path(&s, |_, m| z.extend(m.lagged.series(1).iter().map(|r| r.atanh())));
    let (mean, _) = mean_se(&z);
    let sd = (z.iter().map(|x| (x - mean).powi(2)).sum::<f64>() / (z.len() - 1) as f64).sqrt();
    let want = 1.0 / ((n - 3) as f64).sqrt();
    let se = want / (2.0 * z.len() as f64).sqrt(); // sd of a normal sample sd: σ/sqrt(2m) ≈ 5e-4
    assert!((sd - want).abs() < CHECK_SIGMAS * se, "sd {sd}, Fisher {want}, se {se}");
    assert!((sd - 1.0 / (n as f64).sqrt()).abs() > CHECK_SIGMAS * se, "the test can tell n − 3 from n");
}

#[test]
fn mean_rank_ic_follows_pearson_and_moran() {
    // Pearson (1907): Spearman's correlation of a bivariate normal tends to
    // (6/π)·arcsin(ρ/2); its exact finite-n mean is
    // (6/(π(n+1)))·(arcsin ρ + (n−2)·arcsin(ρ/2)) (Moran, 1948).
    let (n, rho) = (100usize, 0.3f64);
    let s = setup(&format!("rank_ic = true\n{}", one_lag(rho, n, 200, 100)));
    let (mut rank, mut pearson) = (Vec::new(), Vec::new());
    for_each_path(&s, |_, m| {
        rank.extend_from_slice(m.rank_lagged.series(1));
        pearson.extend_from_slice(m.lagged.series(1));
    });
    let nf = n as f64;
    let moran = 6.0 / (PI * (nf + 1.0)) * (rho.asin() + (nf - 2.0) * (rho / 2.0).asin());
    let (m, se) = mean_se(&rank); // se ≈ 6.5e-4 from 19,900 independent dates
    assert!((m - moran).abs() < CHECK_SIGMAS * se, "rank mean {m}, Moran {moran}, se {se}");
    assert!((m - rho).abs() > 10.0 * se, "rank IC differs visibly from Pearson's ρ");
    let (m, se) = mean_se(&pearson);
    let want = expected_sample_corr(rho, n);
    assert!((m - want).abs() < CHECK_SIGMAS * se, "Pearson mean {m}, Fisher-corrected {want}, se {se}");
}

#[test]
fn binary_forecast_success_ratio_is_one_plus_ic_over_two() {
    // Grinold and Kahn (Active Portfolio Management, 2nd ed., 2000): for a ±1
    // forecast of a ±1 outcome, IC = 2·(success ratio) − 1. A continuous IC of
    // sin(0.2·π/2) gives a sign-sign correlation of (2/π)·arcsin(ρ) = 0.20
    // (Sheppard, 1899), and the trade's rule of thumb (common practice, no
    // source) pairs IC 0.15–0.20 with a success ratio of about 0.60.
    let rho = (0.2 * PI / 2.0).sin();
    let s = setup(&one_lag(rho, 1000, 100, 10));
    let mut m = Measurement::new(1, false);
    let (mut ics, mut agree, mut total) = (Vec::new(), 0, 0);
    for_each_path(&s, |p, _| {
        let sign = |v: &[f64]| v.iter().map(|x| x.signum()).collect::<Vec<_>>();
        let binary = Panel::new(p.assets(), p.dates(), sign(p.forecasts()), sign(p.returns())).unwrap();
        m.update(&binary);
        ics.extend_from_slice(m.lagged.series(1));
        let (a, t) = sign_agreement(&binary, 1, 3);
        agree += a;
        total += t;
    });
    let (ic, se) = mean_se(&ics); // ≈ 1e-3
    assert!((ic - 0.2).abs() < CHECK_SIGMAS * se, "binary IC {ic}, Sheppard 0.20, se {se}");
    let success = agree as f64 / total as f64;
    assert!((success - (1.0 + ic) / 2.0).abs() < 2e-3, "success {success} vs (1+IC)/2 = {}", (1.0 + ic) / 2.0);
    // "About 0.60": the success ratio moves by half the IC's error, 2·se at most.
    assert!((success - 0.60).abs() < 2.0 * CHECK_SIGMAS * se, "about 0.60: {success}");
}

#[test]
fn measured_horizon_ic_follows_the_qhs_relation_for_uncorrelated_returns() {
    // Qian, Hua and Sorensen (2007): with serially uncorrelated equal-variance
    // returns, corr(f_t, Σ_{k≤n} r_{t+k}) = Σ_{k≤n} IC_k / sqrt(n). The panel is
    // built here, not by lagfold's generator: returns are i.i.d. N(0, 1) and the
    // forecast is Σ_k IC_k·r_{t+k} + sqrt(1 − Σ IC²)·u_t.
    let ic = [0.06, 0.05, 0.04, 0.03, 0.02, 0.01];
    let (n, t, paths, l) = (500usize, 80usize, 150u64, 8usize);
    let resid = (1.0 - ic.iter().map(|x| x * x).sum::<f64>()).sqrt();
    let mut m = Measurement::new(l, false);
    let mut per_path: Vec<Vec<f64>> = Vec::new();
    for p in 0..paths {
        let mut rng = path_rng(4242, p);
        let mut returns = vec![0.0; n * (t - 1)];
        let mut forecasts = vec![0.0; n * t];
        let mut extra = vec![0.0; n * ic.len()]; // returns after the last date
        fill_normal(&mut rng, &mut returns);
        fill_normal(&mut rng, &mut extra);
        fill_normal(&mut rng, &mut forecasts);
        for date in 0..t {
            for i in 0..n {
                let mut f = resid * forecasts[date * n + i];
                for (k, c) in ic.iter().enumerate() {
                    let row = date + k;
                    let r = if row < t - 1 { returns[row * n + i] } else { extra[(row - (t - 1)) * n + i] };
                    f += c * r;
                }
                forecasts[date * n + i] = f;
            }
        }
        let panel = Panel::new(n, t, forecasts, returns).unwrap();
        m.update(&panel);
        per_path.push(m.horizon.means());
    }
    for h in 1..=l {
        let qhs = ic.iter().take(h).sum::<f64>() / (h as f64).sqrt();
        let col: Vec<f64> = per_path.iter().map(|v| v[h - 1]).collect();
        let (mean, se) = mean_se(&col); // ≈ 2e-4
        let want = expected_sample_corr(qhs, n);
        assert!((mean - want).abs() < CHECK_SIGMAS * se, "horizon {h}: measured {mean}, QHS {want}, se {se}");
    }
}
