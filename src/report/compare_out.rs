//! Several signals measured in one pass, and their blend: the comparison in
//! `measure.json`, `signals.csv`, the terminal and the `signals` chart.

use super::measure_out::{BestHorizon, Curve, paragraph};
use serde::Serialize;
use std::fmt::Write;

/// One signal's (or the blend's) curves and choices.
#[derive(Debug, Clone, Serialize)]
pub struct SignalSummary {
    /// The forecast column, or `blend`.
    pub name: String,
    /// `signal` or `blend`.
    pub kind: String,
    /// Dates with a lag-1 IC.
    pub dates_used: usize,
    /// Lagged ICs with EWC errors.
    pub lagged_ic: Curve,
    /// Horizon ICs with EWC errors.
    pub horizon_ic: Curve,
    /// Each rule's horizon.
    pub best_horizon: BestHorizon,
    /// 5 % and 95 % points of each rule's horizon over the stationary
    /// bootstrap (peak, formula, fitted; the same resampled dates for every
    /// signal, so the ranges compare like with like).
    pub range_90: [Option<[usize; 2]>; 3],
    /// The decay family fitted to the lagged ICs (`none` when none fits).
    pub fitted_family: String,
    /// Each date's lag-1 IC (for the correlations; not in `measure.json`).
    #[serde(skip)]
    pub lag1_by_date: Vec<Option<f64>>,
}

/// One weight of the blend.
#[derive(Debug, Clone, Serialize)]
pub struct BlendWeight {
    /// The forecast column.
    pub signal: String,
    /// Its weight on the date's z-scores.
    pub weight: f64,
}

/// Every signal measured, side by side.
#[derive(Debug, Clone, Serialize)]
pub struct SignalComparison {
    /// The signals in the order given, then the blend (if any).
    pub signals: Vec<SignalSummary>,
    /// The blend's weights (empty: no blend).
    pub blend_weights: Vec<BlendWeight>,
    /// Pearson correlation between the signals' per-date lag-1 ICs, over the
    /// dates both have (`None` with fewer than three), in the order of `signals`.
    pub ic_correlation: Vec<Vec<Option<f64>>>,
}

/// The Pearson correlation of two per-date series over the dates both have
/// (at least three, and both varying).
pub fn paired_correlation(a: &[Option<f64>], b: &[Option<f64>]) -> Option<f64> {
    let pairs: Vec<(f64, f64)> = a.iter().zip(b).filter_map(|(x, y)| Some(((*x)?, (*y)?))).collect();
    if pairs.len() < 3 {
        return None;
    }
    let n = pairs.len() as f64;
    let (mx, my) = (pairs.iter().map(|p| p.0).sum::<f64>() / n, pairs.iter().map(|p| p.1).sum::<f64>() / n);
    let (mut sxy, mut sxx, mut syy) = (0.0, 0.0, 0.0);
    for (x, y) in &pairs {
        sxy += (x - mx) * (y - my);
        sxx += (x - mx) * (x - mx);
        syy += (y - my) * (y - my);
    }
    super::finite(sxy / (sxx * syy).sqrt())
}

impl SignalComparison {
    /// The comparison of `signals`, with their per-date IC correlations.
    pub fn new(signals: Vec<SignalSummary>, blend_weights: Vec<BlendWeight>) -> Self {
        let ic_correlation = signals
            .iter()
            .map(|a| signals.iter().map(|b| paired_correlation(&a.lag1_by_date, &b.lag1_by_date)).collect())
            .collect();
        Self { signals, blend_weights, ic_correlation }
    }

    /// The blend in words: `0.5·fast + 0.5·slow`.
    pub fn blend_words(&self) -> String {
        let terms: Vec<String> =
            self.blend_weights.iter().map(|w| format!("{}·{}", trim(w.weight), w.signal)).collect();
        terms.join(" + ").replace("+ -", "− ")
    }
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
        let b = s.best_horizon.as_array();
        let _ = writeln!(
            out,
            "  {:<12}  {:>16}  {:>7}  {:>9}  {:>9}  {:>9}",
            cut(&s.name, 12),
            ic,
            peak_ic,
            choice_range(b[0], s.range_90[0]),
            choice_range(b[1], s.range_90[1]),
            choice_range(b[2], s.range_90[2]),
        );
    }
    if !c.blend_weights.is_empty() {
        out.push_str(&paragraph(&format!(
            "blend = {}, on each date's z-scores of the signals (after any neutralisation).",
            c.blend_words()
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

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn correlation_uses_only_dates_both_have() {
        let a = [Some(1.0), Some(2.0), None, Some(3.0), Some(4.0)];
        let b = [Some(2.0), Some(4.0), Some(100.0), Some(6.0), None];
        assert!((paired_correlation(&a, &b).unwrap() - 1.0).abs() < 1e-12);
        let c = [Some(3.0), Some(2.0), Some(0.0), Some(1.0), None];
        assert!((paired_correlation(&a, &c).unwrap() + 1.0).abs() < 1e-12);
        assert_eq!(paired_correlation(&a[..2], &b[..2]), None);
    }
}
