//! CSV tables: curves with truth and measured bands; the chosen-horizon distribution.

use crate::portfolio::PortfolioTruth;
use crate::rule::Rule;
use crate::simulate::Setup;
use crate::stats::BAND_LEVELS;
use crate::study::{CurveStats, HorizonStudy, StudyResult};

fn band_headers(prefix: &str) -> Vec<String> {
    let mut h = vec![format!("{prefix}_mean"), format!("{prefix}_mean_se")];
    h.extend(BAND_LEVELS.iter().map(|q| format!("{prefix}_q{:02}", (q * 100.0).round() as u32)));
    h
}

fn band_cells(c: &CurveStats, i: usize) -> Vec<String> {
    let mut v = vec![fmt(c.mean[i]), c.mean_se[i].map(fmt).unwrap_or_default()];
    v.extend(c.quantiles.iter().map(|q| fmt(q[i])));
    v
}

fn fmt(x: f64) -> String {
    format!("{x:.8}")
}

fn finish(w: csv::Writer<Vec<u8>>) -> Vec<u8> {
    w.into_inner().expect("in-memory CSV")
}

/// `curves.csv`: one row per lag/horizon `n` with the true lagged IC, the three
/// true horizon-IC forms, near-best flag, and the measured means and bands.
pub fn curves_csv(setup: &Setup, study: &HorizonStudy) -> Vec<u8> {
    let t = &setup.truth;
    let mut w = csv::Writer::from_writer(Vec::new());
    let mut header: Vec<String> =
        ["n", "true_lagged_ic", "true_horizon_ic", "true_horizon_ic_pooled", "true_horizon_ic_simple", "near_best"]
            .iter()
            .map(|s| s.to_string())
            .collect();
    header.extend(band_headers("lagged_ic"));
    header.extend(band_headers("horizon_ic"));
    if study.rank_lagged_ic.is_some() {
        header.extend(band_headers("rank_lagged_ic"));
    }
    w.write_record(&header).expect("in-memory CSV");
    for i in 0..t.lagged_ic.len() {
        let mut row = vec![
            (i + 1).to_string(),
            fmt(t.lagged_ic[i]),
            fmt(t.horizon_ic[i]),
            fmt(t.horizon_ic_pooled[i]),
            fmt(t.horizon_ic_simple[i]),
            u8::from(t.is_near_best(i + 1)).to_string(),
        ];
        row.extend(band_cells(&study.lagged_ic, i));
        row.extend(band_cells(&study.horizon_ic, i));
        if let Some(r) = &study.rank_lagged_ic {
            row.extend(band_cells(r, i));
        }
        w.write_record(&row).expect("in-memory CSV");
    }
    finish(w)
}

/// `choices.csv`: per horizon, how often each rule chose it (count and share).
pub fn choices_csv(setup: &Setup, study: &HorizonStudy) -> Vec<u8> {
    let t = &setup.truth;
    let rules = [&study.rules.peak, &study.rules.formula, &study.rules.fitted];
    let mut w = csv::Writer::from_writer(Vec::new());
    let mut header = vec!["horizon".to_string(), "is_best".into(), "near_best".into(), "true_horizon_ic".into()];
    for r in Rule::HORIZON {
        header.push(format!("{}_count", r.name()));
        header.push(format!("{}_share", r.name()));
    }
    w.write_record(&header).expect("in-memory CSV");
    for i in 0..t.horizon_ic.len() {
        let mut row = vec![
            (i + 1).to_string(),
            u8::from(i + 1 == t.best_horizon).to_string(),
            u8::from(t.is_near_best(i + 1)).to_string(),
            fmt(t.horizon_ic[i]),
        ];
        for r in rules {
            row.push(r.choice_counts[i].to_string());
            row.push(format!("{:.6}", r.choice_counts[i] as f64 / study.paths as f64));
        }
        w.write_record(&row).expect("in-memory CSV");
    }
    finish(w)
}

/// `holding.csv`: per holding length, both books' true figures and the
/// measured net-IR bands and choices of the linear book.
pub fn holding_csv(p: &PortfolioTruth, study: &StudyResult) -> Vec<u8> {
    let (lin, qua) = (&p.linear, &p.quantile);
    let mut w = csv::Writer::from_writer(Vec::new());
    let mut header: Vec<String> = [
        "holding",
        "is_best",
        "near_best",
        "true_net_ir",
        "true_net_ir_se",
        "true_gross_ir",
        "true_turnover",
        "turnover_large_n",
        "true_gross_mean",
        "gross_mean_large_n",
        "true_cost_mean",
        "true_net_mean",
        "true_net_vol",
        "quantile_net_ir",
        "quantile_gross_ir",
        "quantile_turnover",
        "net_ir_count",
    ]
    .iter()
    .map(|s| s.to_string())
    .collect();
    header.extend(band_headers("measured_net_ir"));
    w.write_record(&header).expect("in-memory CSV");
    for i in 0..lin.net_ir.len() {
        let mut row = vec![
            (i + 1).to_string(),
            u8::from(i + 1 == lin.best_holding).to_string(),
            u8::from(lin.near_best_holding.contains(&(i + 1))).to_string(),
            fmt(lin.net_ir[i]),
            fmt(lin.net_ir_se[i]),
            fmt(lin.gross_ir[i]),
            fmt(lin.turnover[i]),
            fmt(p.turnover_large_n[i]),
            fmt(lin.gross_mean[i]),
            fmt(p.gross_mean_large_n[i]),
            fmt(lin.cost_mean[i]),
            fmt(lin.net_mean[i]),
            fmt(lin.net_vol[i]),
            fmt(qua.net_ir[i]),
            fmt(qua.gross_ir[i]),
            fmt(qua.turnover[i]),
            study.rules.net_ir.choice_counts[i].to_string(),
        ];
        row.extend(band_cells(&study.net_ir, i));
        w.write_record(&row).expect("in-memory CSV");
    }
    finish(w)
}

/// `cost_sweep.csv`: per cost, the true and the measured net optimum.
pub fn cost_sweep_csv(study: &StudyResult) -> Vec<u8> {
    let mut w = csv::Writer::from_writer(Vec::new());
    w.write_record([
        "cost_bps",
        "true_best_holding",
        "true_net_ir",
        "true_net_ir_se",
        "hit_rate",
        "hit_rate_se",
        "near_hit_rate",
        "near_hit_rate_se",
        "chosen_median",
        "regret_ir_mean",
        "regret_ir_mean_se",
        "regret_bps_year_mean",
        "regret_bps_year_mean_se",
    ])
    .expect("in-memory CSV");
    for r in &study.cost_sweep {
        let m = &r.measured;
        let opt = |x: Option<f64>| x.map(fmt).unwrap_or_default();
        w.write_record([
            format!("{}", r.cost_bps),
            r.true_best_holding.to_string(),
            fmt(r.true_net_ir),
            fmt(r.true_net_ir_se),
            fmt(m.hit_rate),
            fmt(m.hit_rate_se),
            fmt(m.near_hit_rate),
            fmt(m.near_hit_rate_se),
            fmt(m.choice_quantiles[2]),
            fmt(m.regret_mean),
            opt(m.regret_mean_se),
            opt(m.regret_bps_year_mean),
            opt(m.regret_bps_year_mean_se),
        ])
        .expect("in-memory CSV");
    }
    finish(w)
}
