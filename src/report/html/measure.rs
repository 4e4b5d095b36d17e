//! The report of `measure`; figures point into `measure.json`.

use super::study::rule_name;
use super::{ErrRow, Fmt, Page, Table, fig, fig_opt, int, share_row};
use crate::own_data::MeasureResult;
use crate::rule::Rule;

/// What the fitted family's shape parameter is.
fn shape_words(family: &str) -> &'static str {
    match family {
        "exponential" => "half-life in periods",
        "power" => "exponent",
        "linear" => "lag where the IC reaches zero",
        "hump" => "lag of the peak",
        _ => "shape parameter",
    }
}

/// The report page of a measured panel. `parameters` are the command's settings.
pub fn measure_page(m: &MeasureResult, parameters: serde_json::Value, charts: Vec<(String, String, String)>) -> Page {
    let b = &m.best_horizon;
    let bs = &m.bootstrap;
    let num = |p: &str, v: Option<f64>| fig_opt(p, v, Fmt::Num(4), "not measurable");
    let horizon = |p: &str, v: Option<usize>| {
        v.map_or("no horizon (not measurable)".into(), |h| format!("{} periods", int(p, h)))
    };
    let mut summary = vec![
        format!(
            "lagfold measured {} dates and {} assets of your panel with the estimators its simulations use: the \
             forecast's average correlation with the next period's return (the lag-1 IC) is {}, with a 95% interval \
             from {} to {}.",
            int("/dates_used", m.dates_used),
            int("/assets", m.assets),
            num("/lagged_ic/mean/0", m.lagged_ic.mean[0]),
            num("/lagged_ic/ci_low/0", m.lagged_ic.ci_low[0]),
            num("/lagged_ic/ci_high/0", m.lagged_ic.ci_high[0]),
        ),
        format!(
            "The measured horizon IC peaks at {}, and the decay curve fitted to the lagged ICs ({}{}) puts the best \
             horizon at {}.",
            horizon("/best_horizon/peak", b.peak),
            m.fitted_family,
            m.fitted_shape
                .map(|v| format!(", {} {}", shape_words(&m.fitted_family), fig("/fitted_shape", v, Fmt::Num(2))))
                .unwrap_or_default(),
            horizon("/best_horizon/fitted", b.fitted),
        ),
    ];
    if let (Some(peak), Some(share), Some([lo, hi])) = (b.peak, bs.share_at_estimate.peak, bs.range_90.peak) {
        summary.push(format!(
            "Resampling the dates, the peak rule picks the same {} periods in {} of resamples, and 90% of its \
             picks lie between {} and {} periods: that spread is how uncertain the best horizon is.",
            int("/best_horizon/peak", peak),
            fig("/bootstrap/share_at_estimate/peak", share, Fmt::Pct(0)),
            int("/bootstrap/range_90/peak/0", lo),
            int("/bootstrap/range_90/peak/1", hi),
        ));
    }
    if let Some(c) = &m.calibrated_study {
        let like = c.what_if.as_ref().map_or(String::new(), |w| format!(" but with {w}"));
        summary.push(format!(
            "In {} simulated histories built to resemble yours (calibrated.toml){like}, the peak rule landed within \
             one period of the true best horizon in {}.",
            int("/calibrated_study/paths", c.paths),
            fig("/calibrated_study/near_hit_rate/peak", c.near_hit_rate.peak, Fmt::Pct(1)),
        ));
    }
    let mut errors = vec![ErrRow::new(
        "lag-1 IC (sampling error, EWC)",
        num("/lagged_ic/mean/0", m.lagged_ic.mean[0]),
        num("/lagged_ic/se/0", m.lagged_ic.se[0]),
    )];
    if let Some(peak) = b.peak {
        errors.push(ErrRow::new(
            format!("horizon IC at the measured peak ({peak}; sampling error, EWC)"),
            num(&format!("/horizon_ic/mean/{}", peak - 1), m.horizon_ic.mean[peak - 1]),
            num(&format!("/horizon_ic/se/{}", peak - 1), m.horizon_ic.se[peak - 1]),
        ));
    }
    for rule in Rule::HORIZON {
        let i = rule.name();
        if let (Some(share), Some(se)) = (bs.share_at_estimate[rule], bs.share_at_estimate_se[rule]) {
            errors.push(ErrRow::new(
                format!("{}: share of resamples choosing the full-data horizon (Monte Carlo error)", rule_name(rule)),
                fig(&format!("/bootstrap/share_at_estimate/{i}"), share, Fmt::Pct(1)),
                fig(&format!("/bootstrap/share_at_estimate_se/{i}"), se, Fmt::Pct(2)),
            ));
        }
    }
    if let Some(c) = &m.calibrated_study {
        for rule in Rule::HORIZON {
            let i = rule.name();
            errors.push(share_row(
                format!("calibrated study, {}: within one period (Monte Carlo error)", rule_name(rule)),
                &format!("/calibrated_study/near_hit_rate/{i}"),
                &format!("/calibrated_study/near_hit_rate_ci/{i}"),
                c.near_hit_rate[rule],
                c.near_hit_rate_ci[rule],
            ));
        }
    }
    for (i, n) in m.calibrated_study.iter().flat_map(|c| c.net.iter()).enumerate() {
        errors.push(share_row(
            format!("calibrated study, net-IR rule at {} bps: exact hit (Monte Carlo error)", n.cost_bps),
            &format!("/calibrated_study/net/{i}/hit_rate"),
            &format!("/calibrated_study/net/{i}/hit_rate_ci"),
            n.hit_rate,
            n.hit_rate_ci,
        ));
    }
    let mut methods = vec![
        (
            "Estimators".into(),
            "Per-date Pearson and Spearman correlations of the forecast with the return k periods later (lagged IC) \
             and with the return summed over n periods (horizon IC), averaged over dates; standard errors and 95% \
             intervals by the equal-weighted cosine estimator with Student-t critical values (Müller, 2004; \
             Lazarus, Lewis, Stock and Watson, 2018), with fewer degrees of freedom for longer horizons and more \
             persistent series, checked to cover 93–97% over simulated histories."
                .into(),
        ),
        (
            "Rules".into(),
            "peak: the horizon with the largest measured horizon IC; formula: the peak of the sum of measured lagged \
             ICs over sqrt(n) (Qian, Hua and Sorensen, 2007); fitted: the optimum of an exponential, power, linear or \
             hump curve fitted to the lagged ICs by weighted least squares, chosen by Akaike's (1974) criterion."
                .into(),
        ),
        (
            "Bootstrap".into(),
            "The stationary bootstrap of Politis and Romano (1994) resamples blocks of dates with random lengths, \
             keeping the serial dependence of overlapping horizon returns, and repeats every rule on each resample."
                .into(),
        ),
        (
            "Calibrated study".into(),
            "calibrated.toml carries your breadth, history, forecast autocorrelation, IC volatility and the fitted \
             decay into a scenario, and the study on it asks how often a history like yours picks the true best \
             horizon."
                .into(),
        ),
    ];
    if m.books.is_some() {
        methods.push(("Tranche books".into(), crate::own_data::OWN_BOOKS_METHOD.into()));
    }
    let tables = m
        .comparison
        .as_ref()
        .map(comparison_table)
        .into_iter()
        .chain(m.books.as_ref().map(|b| books_table(b, m)))
        .collect();
    Page {
        title: format!("lagfold measure: {}", m.file),
        summary: vec![super::esc(
            &crate::report::advice::measure_advice(m, &crate::report::calendar_units(&m.frequency)).unwrap_or_default(),
        )],
        key_figures: summary,
        glossary: crate::report::story::glossary(),
        warnings: crate::report::advice::measure_edge(m).into_iter().collect(),
        charts,
        tables,
        parameters,
        errors,
        errors_heading: "Sampling error of your data's figures and Monte Carlo error of the simulations".into(),
        errors_note: "Figures measured on your data carry sampling error (the EWC standard errors); the \
                      bootstrap shares and the calibrated study are Monte Carlo averages with binomial standard \
                      errors."
            .into(),
        methods,
        ..Page::default()
    }
}

/// The signals side by side, every figure pointing into `measure.json`.
fn comparison_table(c: &crate::own_data::SignalComparison) -> Table {
    let choice = |i: usize, r: Rule, h: Option<usize>, range: Option<[usize; 2]>| match (h, range) {
        (Some(h), Some([lo, hi])) => format!(
            "{} ({}–{})",
            int(&format!("/comparison/signals/{i}/best_horizon/{}", r.name()), h),
            int(&format!("/comparison/signals/{i}/range_90/{}/0", r.name()), lo),
            int(&format!("/comparison/signals/{i}/range_90/{}/1", r.name()), hi)
        ),
        (Some(h), None) => int(&format!("/comparison/signals/{i}/best_horizon/{}", r.name()), h),
        _ => "—".into(),
    };
    let rows = c
        .signals
        .iter()
        .enumerate()
        .map(|(i, s)| {
            let b = s.best_horizon;
            let peak = b.peak.map_or("—".into(), |h| {
                fig_opt(
                    &format!("/comparison/signals/{i}/horizon_ic/mean/{}", h - 1),
                    s.horizon_ic.mean[h - 1],
                    Fmt::Num(4),
                    "—",
                )
            });
            vec![
                s.name.clone(),
                fig_opt(&format!("/comparison/signals/{i}/lagged_ic/mean/0"), s.lagged_ic.mean[0], Fmt::Num(4), "—"),
                format!(
                    "{} to {}",
                    fig_opt(
                        &format!("/comparison/signals/{i}/lagged_ic/ci_low/0"),
                        s.lagged_ic.ci_low[0],
                        Fmt::Num(4),
                        "—"
                    ),
                    fig_opt(
                        &format!("/comparison/signals/{i}/lagged_ic/ci_high/0"),
                        s.lagged_ic.ci_high[0],
                        Fmt::Num(4),
                        "—"
                    )
                ),
                peak,
                choice(i, Rule::Peak, b.peak, s.range_90.peak),
                choice(i, Rule::Formula, b.formula, s.range_90.formula),
                choice(i, Rule::Fitted, b.fitted, s.range_90.fitted),
            ]
        })
        .collect();
    Table {
        heading: if c.blend_weights.is_empty() {
            "Signals side by side".into()
        } else {
            format!("Signals side by side (blend = {} on per-date z-scores)", crate::report::blend_words(c))
        },
        header: [
            "signal",
            "lag-1 IC",
            "95% interval",
            "horizon-IC peak",
            "peak rule (90% range)",
            "Σ IC/√n (90% range)",
            "fitted (90% range)",
        ]
        .map(String::from)
        .to_vec(),
        rows,
    }
}

/// The tranche books at each cost, with the calibrated study's net-IR rule beside.
fn books_table(b: &crate::own_data::OwnBooks, m: &MeasureResult) -> Table {
    let net = m.calibrated_study.as_ref().map_or(&[][..], |c| &c.net[..]);
    let rows = b
        .costs
        .iter()
        .enumerate()
        .map(|(i, c)| {
            let best = c.best_holding.map_or("—".into(), |h| {
                format!(
                    "{} (net IR {} ± {})",
                    int(&format!("/books/costs/{i}/best_holding"), h),
                    fig_opt(&format!("/books/costs/{i}/net_ir/{}", h - 1), c.net_ir[h - 1], Fmt::Num(2), "—"),
                    fig_opt(&format!("/books/costs/{i}/net_ir_se/{}", h - 1), c.net_ir_se[h - 1], Fmt::Num(2), "—"),
                )
            });
            let (truth, hit, regret) = match net.get(i) {
                Some(n) => (
                    int(&format!("/calibrated_study/net/{i}/true_best_holding"), n.true_best_holding),
                    fig(&format!("/calibrated_study/net/{i}/hit_rate"), n.hit_rate, Fmt::Pct(1)),
                    fig_opt(
                        &format!("/calibrated_study/net/{i}/regret_bps_year_mean"),
                        n.regret_bps_year_mean,
                        Fmt::Num(1),
                        "—",
                    ),
                ),
                None => ("—".into(), "—".into(), "—".into()),
            };
            vec![
                fig(&format!("/books/costs/{i}/cost_bps"), c.cost_bps, Fmt::Num(1)),
                best,
                crate::report::measure_out_ranges(&c.within_one_se),
                truth,
                hit,
                regret,
            ]
        })
        .collect();
    Table {
        heading: format!(
            "Your signal traded in staggered tranches ({} periods), and how often a history like yours finds the best \
             holding (calibrated study)",
            b.periods
        ),
        header: [
            "cost (bps, one way)",
            "best measured holding",
            "holdings within one s.e.",
            "true best holding (calibrated)",
            "net-IR rule finds it",
            "a miss costs (bps a year)",
        ]
        .map(String::from)
        .to_vec(),
        rows,
    }
}
