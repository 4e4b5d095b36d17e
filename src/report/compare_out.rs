//! Several signals measured in one pass, and their blend: the comparison in
//! `measure.json`, `signals.csv`, the terminal and the `signals` chart.

use super::measure_out::paragraph;
use crate::own_data::SignalComparison;
use std::fmt::Write;

/// The blend in words: `0.5·fast + 0.5·slow`.
pub fn blend_words(c: &SignalComparison) -> String {
    let terms: Vec<String> = c.blend_weights.iter().map(|w| format!("{}·{}", trim(w.weight), w.signal)).collect();
    terms.join(" + ").replace("+ -", "− ")
}

fn trim(x: f64) -> String {
    super::charts::parts::trim_to(x, 4)
}

/// `name` cut to `width` characters (an ellipsis marks a cut).
fn cut(name: &str, width: usize) -> String {
    if name.chars().count() <= width {
        name.to_string()
    } else {
        let mut s: String = name.chars().take(width - 1).collect();
        s.push('…');
        s
    }
}

/// A rule's choice with its 90 % bootstrap range: `9 (6–12)`.
fn choice_range(h: Option<usize>, range: Option<[usize; 2]>) -> String {
    match (h, range) {
        (Some(h), Some([lo, hi])) => format!("{h} ({lo}–{hi})"),
        (Some(h), None) => h.to_string(),
        _ => "—".into(),
    }
}

/// The terminal table of the comparison (at most 80 columns).
pub fn comparison_terminal(c: &SignalComparison) -> String {
    let mut out = String::new();
    out.push('\n');
    out.push_str(&paragraph(
        "Signals compared: lag-1 IC ± half its 95% interval, the horizon-IC peak, and each rule's best horizon with \
         its 90% bootstrap range (same resampled dates for every signal).",
    ));
    let _ = writeln!(
        out,
        "\n  {:<12}  {:>16}  {:>7}  {:>9}  {:>9}  {:>9}",
        "signal", "lag-1 IC", "peak IC", "peak", "Σ IC/√n", "fitted"
    );
    for s in &c.signals {
        let ic = match (s.lagged_ic.mean.first().copied().flatten(), s.lagged_ic.half_width(0)) {
            (Some(m), Some(h)) => format!("{m:.4} ± {h:.4}"),
            (Some(m), None) => format!("{m:.4}"),
            _ => "—".into(),
        };
        let peak_ic =
            s.best_horizon.peak.and_then(|h| s.horizon_ic.mean[h - 1]).map_or("—".into(), |v| format!("{v:.4}"));
        let _ = writeln!(
            out,
            "  {:<12}  {:>16}  {:>7}  {:>9}  {:>9}  {:>9}",
            cut(&s.name, 12),
            ic,
            peak_ic,
            choice_range(s.best_horizon.peak, s.range_90.peak),
            choice_range(s.best_horizon.formula, s.range_90.formula),
            choice_range(s.best_horizon.fitted, s.range_90.fitted),
        );
    }
    if !c.blend_weights.is_empty() {
        out.push_str(&paragraph(&format!(
            "blend = {}, on each date's z-scores of the signals (after any neutralisation).",
            blend_words(c)
        )));
    }
    // The correlation matrix, at most six columns wide on screen (all of it in measure.json).
    let shown = c.signals.len().min(6);
    let _ = write!(out, "\n  Correlation of per-date lag-1 ICs\n  {:<12}", "");
    for s in &c.signals[..shown] {
        let _ = write!(out, "  {:>8}", cut(&s.name, 8));
    }
    out.push('\n');
    for (s, row) in c.signals.iter().zip(&c.ic_correlation) {
        let _ = write!(out, "  {:<12}", cut(&s.name, 12));
        for v in &row[..shown] {
            let _ = write!(out, "  {:>8}", v.map_or("—".into(), |v| format!("{v:.2}")));
        }
        out.push('\n');
    }
    if c.signals.len() > shown {
        out.push_str(&paragraph("(first six columns shown; the whole matrix is in measure.json)"));
    }
    out.push('\n');
    out
}

/// `signals.csv`: one row per signal and lag/horizon.
pub fn signals_csv(c: &SignalComparison) -> Vec<u8> {
    let mut w = csv::Writer::from_writer(Vec::new());
    let header = [
        "signal",
        "kind",
        "n",
        "ic_mean",
        "ic_ci_low",
        "ic_ci_high",
        "horizon_ic_mean",
        "horizon_ic_ci_low",
        "horizon_ic_ci_high",
    ];
    w.write_record(header).expect("in-memory CSV");
    let o = |x: Option<f64>| x.map(|v| format!("{v:.8}")).unwrap_or_default();
    for s in &c.signals {
        for i in 0..s.lagged_ic.mean.len() {
            let (l, h) = (&s.lagged_ic, &s.horizon_ic);
            w.write_record([
                s.name.clone(),
                s.kind.clone(),
                (i + 1).to_string(),
                o(l.mean[i]),
                o(l.ci_low[i]),
                o(l.ci_high[i]),
                o(h.mean[i]),
                o(h.ci_low[i]),
                o(h.ci_high[i]),
            ])
            .expect("in-memory CSV");
        }
    }
    w.into_inner().expect("in-memory CSV")
}
