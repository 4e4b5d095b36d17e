//! Outputs of `lagfold measure`: `measure.json`, `measure_lags.csv` and the terminal summary.

use super::records::document;
use super::summary::CAUTION;
use super::text::share_words;
use crate::own_data::{MeasureResult, finite};
use crate::rule::Rule;
use std::fmt::Write;

/// `measure.json`.
pub fn measure_json(m: &MeasureResult) -> Vec<u8> {
    document::<(), _>(None, m)
}

/// `measure_lags.csv`: one row per lag/horizon; empty fields where a figure
/// is not measurable.
pub fn measure_csv(m: &MeasureResult) -> Vec<u8> {
    let mut w = csv::Writer::from_writer(Vec::new());
    let mut header = vec!["n".to_string()];
    for c in ["ic", "rank_ic", "horizon_ic"] {
        for f in ["mean", "se", "df", "ci_low", "ci_high", "dates"] {
            header.push(format!("{c}_{f}"));
        }
    }
    header.push("fitted_ic".into());
    w.write_record(&header).expect("in-memory CSV");
    let o = |x: Option<f64>| x.map(|v| format!("{v:.8}")).unwrap_or_default();
    for i in 0..m.lagged_ic.mean.len() {
        let mut row = vec![(i + 1).to_string()];
        for c in [&m.lagged_ic, &m.rank_ic, &m.horizon_ic] {
            row.extend([
                o(c.mean[i]),
                o(c.se[i]),
                c.df[i].map(|d| d.to_string()).unwrap_or_default(),
                o(c.ci_low[i]),
                o(c.ci_high[i]),
                c.dates[i].to_string(),
            ]);
        }
        row.push(o(m.fitted_curve.get(i).copied().and_then(finite)));
        w.write_record(&row).expect("in-memory CSV");
    }
    w.into_inner().expect("in-memory CSV")
}

/// `per_date.csv`: one row per date — the assets used, the IC at every lag,
/// the rank IC at every lag, the horizon IC at every horizon (all of the
/// first signal), the other signals' and the blend's lag-1 ICs, and why a
/// date was skipped; empty fields where a figure is not measured.
pub fn per_date_csv(m: &MeasureResult) -> Vec<u8> {
    let t = &m.per_date;
    let l = m.horizons;
    let mut w = csv::Writer::from_writer(Vec::new());
    let mut header = vec!["date".to_string(), "used_assets".to_string()];
    header.extend((1..=l).map(|k| format!("ic_lag{k}")));
    header.extend((1..=l).map(|k| format!("rank_ic_lag{k}")));
    header.extend((1..=l).map(|n| format!("horizon_ic_{n}")));
    // The other signals' and the blend's lag-1 ICs.
    let others: Vec<&crate::own_data::SignalSummary> =
        m.comparison.iter().flat_map(|c| c.signals.iter().skip(1)).collect();
    header.extend(others.iter().map(|s| format!("ic_lag1_{}", s.name)));
    header.push("skipped".into());
    w.write_record(&header).expect("in-memory CSV");
    let o = |x: &Option<f64>| x.map(|v| format!("{v:.8}")).unwrap_or_default();
    for (i, date) in t.dates.iter().enumerate() {
        let mut row = vec![date.clone(), t.used_assets[i].to_string()];
        for table in [&t.lagged, &t.rank, &t.horizon] {
            row.extend(table[i].iter().map(o));
        }
        row.extend(others.iter().map(|s| o(&s.lag1_by_date[i])));
        row.push(t.skipped[i].clone().unwrap_or_default());
        w.write_record(&row).expect("in-memory CSV");
    }
    w.into_inner().expect("in-memory CSV")
}

/// `text` wrapped at 78 columns, each line indented by two spaces.
pub fn paragraph(text: &str) -> String {
    let lines = crate::chart::wrap_to(text, |l| l.chars().count() <= 76);
    lines.iter().map(|l| format!("  {l}\n")).collect()
}

/// Ascending whole numbers as ranges: `1–3, 5, 7–8`.
pub fn ranges(ns: &[usize]) -> String {
    let mut parts: Vec<String> = Vec::new();
    let mut i = 0;
    while i < ns.len() {
        let mut j = i;
        while j + 1 < ns.len() && ns[j + 1] == ns[j] + 1 {
            j += 1;
        }
        parts.push(if j > i { format!("{}–{}", ns[i], ns[j]) } else { ns[i].to_string() });
        i = j + 1;
    }
    parts.join(", ")
}

/// A rule's choice in words.
fn choice(x: Option<usize>) -> String {
    x.map_or("none (not measurable)".into(), |n| n.to_string())
}

/// The terminal summary (at most 80 columns).
/// The plural period of a calendar name ("monthly" → "months"), "periods" when unknown.
pub fn calendar_units(frequency: &str) -> String {
    match frequency {
        "monthly" => "months",
        "weekly" => "weeks",
        "business-daily" => "business days",
        _ => "periods",
    }
    .into()
}

pub fn measure_terminal(m: &MeasureResult) -> String {
    let mut out = String::new();
    let _ = writeln!(out, "lagfold measure · {}", m.file);
    let missing = if m.missing_periods.is_empty() {
        String::new()
    } else {
        format!(", {} missing period(s) left empty", m.missing_periods.len())
    };
    out.push_str(&paragraph(&format!(
        "{} rows, {} dates ({} used, {} skipped), {} assets; calendar {}{missing}; returns taken as {}; horizons 1–{}.",
        m.rows, m.dates, m.dates_used, m.dates_skipped, m.assets, m.frequency, m.return_timing, m.horizons
    )));
    if let Some(c) = &m.comparison {
        out.push_str(&paragraph(&format!(
            "Signal `{}` is measured in full below; the comparison of {} follows it.",
            m.signal,
            c.signals.iter().map(|s| format!("`{}`", s.name)).collect::<Vec<_>>().join(", ")
        )));
    }
    if !m.neutralised_on.is_empty() {
        out.push_str(&paragraph(&format!(
            "Forecasts and returns neutralised on each date on: {} (least-squares residuals, before any IC).",
            m.neutralised_on.join(", ")
        )));
    }
    if let Some(advice) = super::advice::measure_advice(m, &calendar_units(&m.frequency)) {
        let _ = writeln!(out, "\nRecommendation\n  {advice}\n");
    }
    if let Some(w) = super::advice::measure_edge(m) {
        out.push_str(&paragraph(&format!("warning: {w}")));
    }
    for w in &m.warnings {
        out.push_str(&paragraph(&format!("warning: {w}")));
    }
    let _ = writeln!(
        out,
        "\n  {:>4}  {:>8}  {:>7}  {:>8}  {:>10}  {:>7}  {:>8}",
        "n", "IC", "± 95%", "rank IC", "horizon IC", "± 95%", "fitted"
    );
    let f = |x: Option<f64>| x.map_or("—".to_string(), |v| format!("{v:.4}"));
    for i in 0..m.lagged_ic.mean.len() {
        let _ = writeln!(
            out,
            "  {:>4}  {:>8}  {:>7}  {:>8}  {:>10}  {:>7}  {:>8}",
            i + 1,
            f(m.lagged_ic.mean[i]),
            f(m.lagged_ic.half_width(i)),
            f(m.rank_ic.mean[i]),
            f(m.horizon_ic.mean[i]),
            f(m.horizon_ic.half_width(i)),
            f(m.fitted_curve.get(i).copied().and_then(finite)),
        );
    }
    out.push_str(&paragraph(&format!("± 95%: half the 95% interval ({}).", m.se_method)));
    out.push('\n');
    let b = &m.best_horizon;
    out.push_str(&paragraph(&format!(
        "Estimated best horizon: {} (peak of horizon IC), {} (Σ IC/√n), {} (fitted {} curve).",
        choice(b.peak),
        choice(b.formula),
        choice(b.fitted),
        m.fitted_family
    )));
    let bs = &m.bootstrap;
    let per_rule: Vec<String> = Rule::HORIZON
        .into_iter()
        .filter_map(|r| {
            let share = bs.share_at_estimate[r]?;
            let [lo, hi] = bs.range_90[r]?;
            Some(format!("{} in {:.0}% (90% within {lo}–{hi})", r.name(), 100.0 * share))
        })
        .collect();
    if !per_rule.is_empty() {
        out.push_str(&paragraph(&format!(
            "Stationary bootstrap ({} resamples of dates, mean block {:.0}): the estimate recurs {}.",
            bs.replicates,
            bs.mean_block_length,
            per_rule.join("; ")
        )));
    }
    if let Some(c) = &m.comparison {
        out.push_str(&super::compare_out::comparison_terminal(c));
    }
    if let Some(b) = &m.books {
        out.push_str(&super::own_books_out::own_books_terminal(b));
    }
    if let Some(c) = &m.calibrated_study {
        let like = match &c.what_if {
            Some(w) => format!("A history like this one but with {w} (what-if"),
            None => "A history like this one (".to_string(),
        };
        out.push_str(&paragraph(&format!(
            "{like}{}; {} simulated, true best horizon {}): the peak rule lands within one period \
             of the truth in {} of them and gives up {:.1}% of the best horizon IC on average (formula \
             {:.0}%, fitted {:.0}%).",
            c.scenario_file,
            c.paths,
            c.true_best_horizon,
            share_words(c.near_hit_rate.peak, c.paths),
            100.0 * c.regret_rel_mean.peak,
            100.0 * c.near_hit_rate.formula,
            100.0 * c.near_hit_rate.fitted
        )));
    }
    for (n, paths) in m.calibrated_study.iter().flat_map(|c| c.net.iter().map(|n| (n, c.paths))) {
        let miss = match (n.regret_bps_year_mean, n.regret_bps_year_mean_se) {
            (Some(r), Some(se)) => format!("{r:.1} ± {se:.1} bps a year"),
            (Some(r), None) => format!("{r:.1} bps a year"),
            _ => "an unknown amount".into(),
        };
        out.push_str(&paragraph(&format!(
            "Net of {} bps in those histories, the true best holding is {}; picking the holding with the best \
             measured net IR finds it in {} of them (within one period in {:.0}%), and gives up {miss} \
             on average at {} annual volatility.",
            n.cost_bps,
            n.true_best_holding,
            share_words(n.hit_rate, paths),
            100.0 * n.near_hit_rate,
            super::story::vol_pct(n.target_vol),
        )));
    }
    if !m.se_disagreements.is_empty() {
        let at: Vec<String> = ["lagged IC", "horizon IC"]
            .iter()
            .filter_map(|curve| {
                let ns: Vec<usize> = m.se_disagreements.iter().filter(|(c, _)| c == curve).map(|(_, n)| *n).collect();
                (!ns.is_empty()).then(|| format!("{curve} at {} of {} ({})", ns.len(), m.horizons, ranges(&ns)))
            })
            .collect();
        out.push_str(&paragraph(&format!(
            "The standard error measured on your dates and the spread across the simulated histories differ by more \
             than a quarter for the {}. Few degrees of freedom make the measured error itself noisy; a large gap \
             can also mean the calibrated scenario misses a feature of your data.",
            at.join(" and the ")
        )));
    }
    let sr = &m.success_ratio;
    let relation = if sr.relation == "binary" { "(1+IC)/2, two-valued forecast" } else { "1/2 + arcsin(IC)/π" };
    out.push_str(&paragraph(&format!(
        "Success ratio implied by the lag-1 IC ({relation}): {}; observed: {}. Lag-0 IC (return over the period \
         ending at the forecast date): {}. Forecast autocorrelation {}, IC volatility beyond sampling noise {}.",
        sr.implied.map_or("—".into(), |v| format!("{v:.3}")),
        sr.observed.map_or("—".into(), |v| format!("{v:.3}")),
        f(m.timing.lag0_ic),
        m.forecast_autocorrelation.map_or("—".into(), |v| format!("{v:.3}")),
        f(m.ic_volatility),
    )));
    let _ = writeln!(out);
    out.push_str(&paragraph(CAUTION));
    out
}
