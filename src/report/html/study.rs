//! The report of a study (`run`, `demo`); figures point into `summary.json`.

use super::{ErrRow, Fmt, Page, fig, fig_opt, share_row};
use crate::report::story::{Study, plain};
use crate::rule::Rule;
use crate::study::RuleStats;

/// How the simulation, truth, estimators and rules work, with their sources.
pub fn study_methods() -> Vec<(String, String)> {
    [
        (
            "Simulation",
            "Forecasts are AR(1) standard normal scores; returns load on past forecast news so that the expected \
             per-date lagged IC follows the stated decay curve, plus a common per-period IC shock and idiosyncratic \
             noise (normal or Student t). Every history is stationary from its first date.",
        ),
        (
            "Truth",
            "The true horizon IC is the expected per-date correlation of the forecast with returns summed over n \
             periods at large breadth; the simple form sum of IC_k / sqrt(n) follows Qian, Hua and Sorensen (2007).",
        ),
        (
            "Estimators",
            "Per-date Pearson correlations (Spearman on request) averaged over dates; standard errors by Newey and \
             West (1987) with at least 2n lags at horizon n, more when Andrews' (1991) plug-in bandwidth asks.",
        ),
        (
            "Rules",
            "peak: the horizon where the measured horizon IC is largest; formula: the peak of the sum of measured \
             lagged ICs over sqrt(n) (Qian, Hua and Sorensen, 2007); fitted: the optimum of a decay curve fitted to \
             the measured lagged ICs, family chosen by Akaike's (1974) criterion; net IR: the holding length whose \
             measured net information ratio is best.",
        ),
        (
            "Holding-period books",
            "Staggered tranche books for every holding length with weights proportional to the demeaned forecast; \
             cost is the one-way cost times the traded notional. The information ratio follows Grinold and Kahn \
             (2000); the true net IR comes from a long reference simulation whose Monte Carlo error is stated.",
        ),
        (
            "Study figures",
            "Exact hit, within one period, in the near-best set, regret (the share of the best value given up) and \
             the winner's curse (compare Bailey and López de Prado, 2014). Proportions carry a 95% Wilson (1927) score \
             interval, which stays inside [0, 1] and is not a point at 0 or 100%; means carry sd/sqrt(paths). Bands are quantiles over histories (Hyndman and \
             Fan, 1996, type 7).",
        ),
        (
            "Charts",
            "Colours from the Okabe and Ito (2008) palette, distinguishable under common colour-vision deficiencies.",
        ),
    ]
    .into_iter()
    .map(|(a, b)| (a.to_string(), b.to_string()))
    .collect()
}

/// Rows of the error table for one rule's record; `at` is its JSON pointer.
pub fn rule_error_rows(name: &str, r: &RuleStats, at: &str) -> Vec<ErrRow> {
    let opt = |p: &str, v: Option<f64>, f: Fmt| fig_opt(p, v, f, "n/a (one path)");
    let mut rows = vec![
        share_row(
            format!("{name}: exact hit rate"),
            &format!("{at}/hit_rate"),
            &format!("{at}/hit_rate_ci"),
            r.hit_rate,
            r.hit_rate_ci,
        ),
        share_row(
            format!("{name}: within one period"),
            &format!("{at}/near_hit_rate"),
            &format!("{at}/near_hit_rate_ci"),
            r.near_hit_rate,
            r.near_hit_rate_ci,
        ),
        share_row(
            format!("{name}: in the near-best set"),
            &format!("{at}/near_best_rate"),
            &format!("{at}/near_best_rate_ci"),
            r.near_best_rate,
            r.near_best_rate_ci,
        ),
        ErrRow::new(
            format!("{name}: mean regret (share of best)"),
            fig(&format!("{at}/regret_rel_mean"), r.regret_rel_mean, Fmt::Pct(2)),
            opt(&format!("{at}/regret_rel_mean_se"), r.regret_rel_mean_se, Fmt::Pct(2)),
        ),
        ErrRow::new(
            format!("{name}: mean winner's curse"),
            fig(&format!("{at}/winners_curse_mean"), r.winners_curse_mean, Fmt::Num(4)),
            opt(&format!("{at}/winners_curse_mean_se"), r.winners_curse_mean_se, Fmt::Num(4)),
        ),
    ];
    if let Some(bps) = r.regret_bps_year_mean {
        rows.push(ErrRow::new(
            format!("{name}: mean regret (bps a year at the target volatility), over the study's histories"),
            fig(&format!("{at}/regret_bps_year_mean"), bps, Fmt::Num(1)),
            opt(&format!("{at}/regret_bps_year_mean_se"), r.regret_bps_year_mean_se, Fmt::Num(1)),
        ));
        rows.push(ErrRow::new(
            format!("{name}: the same regret's error from the reference simulation's truth"),
            fig(&format!("{at}/regret_bps_year_mean"), bps, Fmt::Num(1)),
            opt(&format!("{at}/regret_bps_year_ref_se"), r.regret_bps_year_ref_se, Fmt::Num(1)),
        ));
    }
    rows
}

/// The note above every error table of a simulation.
pub const ERRORS_NOTE: &str = "Each figure below is an average over simulated histories, so it carries Monte Carlo \
error: with another seed it would move by about one standard error. More paths shrink it as 1/sqrt(paths).";

/// The report page of a study: the story first (figures tagged with their
/// place in `summary.json`), then charts, glossary and the appendix.
pub fn study_page(story: &Study, charts: Vec<(String, String, String)>) -> Page {
    let (setup, portfolio, study) = (story.setup, story.portfolio, story.study);
    let (s, t, lin) = (&setup.scenario, &setup.truth, &portfolio.linear);
    let (best, hold) = (t.best_horizon, lin.best_holding);
    let tagged = |p: &str, v: f64, f: Fmt| if p.is_empty() { plain(p, v, f) } else { fig(p, v, f) };
    let summary = vec![story.recommendation(&tagged)];
    let mut errors = vec![
        ErrRow::new(
            "true horizon IC at the best horizon",
            fig(&format!("/truth/horizon_ic/{}", best - 1), t.horizon_ic[best - 1], Fmt::Num(4)),
            fig("/truth/horizon_ic_integration_se", t.horizon_ic_integration_se, Fmt::Num(6)),
        ),
        ErrRow::new(
            "true net IR at the best holding length",
            fig(&format!("/truth/net_ir/{}", hold - 1), lin.net_ir[hold - 1], Fmt::Num(3)),
            fig(&format!("/truth/portfolio/linear/net_ir_se/{}", hold - 1), lin.net_ir_se[hold - 1], Fmt::Num(3)),
        ),
    ];
    for rule in Rule::EVERY {
        errors.extend(rule_error_rows(
            rule_name(rule),
            study.rules.get(rule),
            &format!("/study/rules/{}", rule.name()),
        ));
    }
    if let Some(m) = story.more {
        errors.extend(rule_error_rows(
            &format!("net IR rule at twice the history ({} dates, {} histories)", m.history, m.paths),
            &m.rules.net_ir,
            "/more_history/rules/net_ir",
        ));
    }
    for (i, row) in study.cost_sweep.iter().enumerate() {
        errors.extend(rule_error_rows(
            &format!("net IR rule at {} bps", row.cost_bps),
            &row.measured,
            &format!("/study/cost_sweep/{i}/measured"),
        ));
    }
    Page {
        title: format!("lagfold report: {}", s.name),
        summary,
        key_figures: story.key_figures(&tagged),
        warnings: story.warnings(),
        explain: vec![("Why the horizon-IC peak and the best holding differ".into(), story.why_optima_differ(&tagged))],
        glossary: crate::report::story::glossary(),
        charts,
        tables: Vec::new(),
        parameters: serde_json::to_value(s).unwrap_or_default(),
        errors,
        errors_note: format!(
            "{ERRORS_NOTE} The true curves are computed by integration (horizon IC) and by a reference simulation \
             of {} histories (net IR), with the errors shown.",
            portfolio.reference_paths
        ),
        methods: study_methods(),
        ..Page::default()
    }
}

/// The rule's name as the report writes it.
pub fn rule_name(rule: Rule) -> &'static str {
    match rule {
        Rule::Peak => "peak",
        Rule::Formula => "formula",
        Rule::Fitted => "fitted",
        Rule::NetIr => "net IR",
    }
}
