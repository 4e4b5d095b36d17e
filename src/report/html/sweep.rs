//! The report of a sweep; figures point into `sweep.json`.

use super::study::{ERRORS_NOTE, rule_error_rows, rule_name, study_methods};
use super::{Fmt, Page, Table, esc, fig, int};
use crate::report::SweepPoint;
use crate::rule::Rule;
use crate::scenario::sweep::Point;
use std::collections::BTreeMap;

/// The sweep's parameters: how many points, the values of every swept
/// field, and the first point's whole scenario.
pub fn sweep_parameters(points: &[Point]) -> serde_json::Value {
    let mut swept: BTreeMap<&str, Vec<&str>> = BTreeMap::new();
    for p in points {
        for (k, v) in &p.at {
            let vals = swept.entry(k).or_default();
            if !vals.contains(&v.as_str()) {
                vals.push(v);
            }
        }
    }
    serde_json::json!({
        "grid_points": points.len(),
        "swept": swept,
        "first_point": serde_json::to_value(&points[0].scenario).unwrap_or_default(),
    })
}

/// The report page of a sweep. `parameters` describe the grid and the base scenario.
pub fn sweep_page(
    name: &str,
    points: &[SweepPoint],
    parameters: serde_json::Value,
    charts: Vec<(String, String, String)>,
) -> Page {
    let near = |i: usize| points[i].rules.horizon.peak.near_hit_rate;
    let lo = (0..points.len()).min_by(|&a, &b| near(a).total_cmp(&near(b))).unwrap_or(0);
    let hi = (0..points.len()).max_by(|&a, &b| near(a).total_cmp(&near(b))).unwrap_or(0);
    let at = |i: usize| points[i].at.iter().map(|(k, v)| format!("{k} = {v}")).collect::<Vec<_>>().join(", ");
    let keys: Vec<&str> = points.first().map(|p| p.at.iter().map(|(k, _)| k.as_str()).collect()).unwrap_or_default();
    let summary = vec![
        format!(
            "lagfold ran the study at {} grid points, {} simulated histories each, varying {}.",
            points.len(),
            int("/grid/0/paths", points[0].paths),
            esc(&keys.join(", "))
        ),
        format!(
            "Picking the peak of the measured horizon IC lands within one period of the true best horizon in {} of \
             histories at worst (grid point #{}: {}) and {} at best (#{}: {}).",
            fig(&format!("/grid/{lo}/rules/peak/near_hit_rate"), near(lo), Fmt::Pct(1)),
            lo + 1,
            esc(&at(lo)),
            fig(&format!("/grid/{hi}/rules/peak/near_hit_rate"), near(hi), Fmt::Pct(1)),
            hi + 1,
            esc(&at(hi)),
        ),
        {
            let best = |i: usize| points[i].best_horizon;
            let a = (0..points.len()).min_by_key(|&i| best(i)).unwrap_or(0);
            let b = (0..points.len()).max_by_key(|&i| best(i)).unwrap_or(0);
            format!(
                "Across the grid the true best horizon runs from {} to {} periods, so the grid also shows how far \
                 the answer itself moves with these settings.",
                int(&format!("/grid/{a}/best_horizon"), best(a)),
                int(&format!("/grid/{b}/best_horizon"), best(b)),
            )
        },
    ];
    let mut header = vec!["#".to_string()];
    header.extend(keys.iter().map(|k| esc(k)));
    header.extend(["true best horizon", "peak: within one", "peak: mean regret"].map(String::from));
    let rows = points
        .iter()
        .enumerate()
        .map(|(i, p)| {
            let mut r = vec![format!("#{}", i + 1)];
            r.extend(p.at.iter().map(|(_, v)| esc(v)));
            r.push(int(&format!("/grid/{i}/best_horizon"), p.best_horizon));
            r.push(fig(
                &format!("/grid/{i}/rules/peak/near_hit_rate"),
                p.rules.horizon.peak.near_hit_rate,
                Fmt::Pct(1),
            ));
            r.push(fig(
                &format!("/grid/{i}/rules/peak/regret_rel_mean"),
                p.rules.horizon.peak.regret_rel_mean,
                Fmt::Pct(2),
            ));
            r
        })
        .collect();
    let mut errors = Vec::new();
    for (i, p) in points.iter().enumerate() {
        for rule in Rule::EVERY {
            let label = format!("#{} {}", i + 1, rule_name(rule));
            errors.extend(rule_error_rows(&label, p.rules.get(rule), &format!("/grid/{i}/rules/{}", rule.name())));
        }
    }
    Page {
        title: format!("lagfold sweep: {name}"),
        summary: vec![super::esc(&crate::report::advice::sweep_advice(points))],
        key_figures: summary,
        glossary: crate::report::story::glossary(),
        charts,
        tables: vec![Table { heading: "The grid points".into(), header, rows }],
        parameters,
        errors,
        errors_note: ERRORS_NOTE.into(),
        methods: study_methods(),
        ..Page::default()
    }
}
