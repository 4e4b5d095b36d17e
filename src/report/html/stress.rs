//! The report of `stress`; figures point into `stress.json`.

use super::study::study_methods;
use super::{ErrRow, Fmt, Page, esc, fig, int};
use crate::report::charts::units;
use crate::report::period_word;
use crate::scenario::Scenario;
use crate::stress::{RegretMatrix, StressResult};

/// The worst relative regret of the assumed curve's choice, and the curve where it happens.
fn worst(m: &RegretMatrix) -> (usize, f64) {
    m.regret_rel[0].iter().copied().enumerate().fold((0, 0.0), |a, (j, r)| if r > a.1 { (j, r) } else { a })
}

/// The report page of a stress test.
pub fn stress_page(scenario: &Scenario, stress: &StressResult, charts: Vec<(String, String, String)>) -> Page {
    let unit = period_word(scenario.periods_per_year);
    let (h, n) = (&stress.horizon, &stress.holding);
    let (hj, hw) = worst(h);
    let (nj, nw) = worst(n);
    let summary = vec![
        format!(
            "lagfold took the horizon that is best under the assumed decay curve, {} {}, and computed what it \
             gives up if one of {} other curves is true instead; there is no estimation noise here, only the \
             question of a wrong assumption.",
            int("/horizon/chosen/0", h.chosen[0]),
            units(h.chosen[0], unit),
            stress.curves.len() - 1
        ),
        format!(
            "In the worst case, when the curve named “{}” is true, it gives up {} of the best horizon IC; the \
             horizon with the smallest worst case is {} {}, which never gives up more than {}.",
            esc(&stress.curves[hj].name),
            fig(&format!("/horizon/regret_rel/0/{hj}"), hw, Fmt::Pct(1)),
            int("/horizon/minimax", h.minimax),
            units(h.minimax, unit),
            fig("/horizon/minimax_worst_rel", h.minimax_worst_rel, Fmt::Pct(1)),
        ),
        format!(
            "For holding lengths after one-way costs of {} bps, holding {} {} as assumed gives up at most {} \
             of the best net information ratio (when “{}” is true); the safest holding length is {} {} (at \
             most {}).",
            fig("/cost_bps", stress.cost_bps, Fmt::Plain),
            int("/holding/chosen/0", n.chosen[0]),
            units(n.chosen[0], unit),
            fig(&format!("/holding/regret_rel/0/{nj}"), nw, Fmt::Pct(1)),
            esc(&stress.curves[nj].name),
            int("/holding/minimax", n.minimax),
            units(n.minimax, unit),
            fig("/holding/minimax_worst_rel", n.minimax_worst_rel, Fmt::Pct(1)),
        ),
    ];
    let mut errors = Vec::new();
    for (i, c) in stress.curves.iter().enumerate() {
        let (b, k) = (c.best_horizon, c.best_holding);
        errors.push(ErrRow::new(
            format!("{}: true horizon IC at its best horizon ({b})", c.name),
            fig(&format!("/curves/{i}/horizon_ic/{}", b - 1), c.horizon_ic[b - 1], Fmt::Num(4)),
            fig(&format!("/curves/{i}/horizon_ic_integration_se"), c.horizon_ic_integration_se, Fmt::Num(6)),
        ));
        errors.push(ErrRow::new(
            format!("{}: true net IR at its best holding length ({k})", c.name),
            fig(&format!("/curves/{i}/net_ir/{}", k - 1), c.net_ir[k - 1], Fmt::Num(3)),
            fig(&format!("/curves/{i}/net_ir_se/{}", k - 1), c.net_ir_se[k - 1], Fmt::Num(3)),
        ));
    }
    let mut methods = study_methods();
    methods.push((
        "Alternatives".into(),
        "Unless the scenario replaces them: the assumed curve decaying twice as fast and half as fast, a hump with \
         the same lag-1 IC, and the assumed curve with a reversal of a quarter of its lag-1 IC. Regret is the true \
         value given up, V_j(best under j) − V_j(chosen under i), as a share of the best; the safest choice minimises \
         the worst share over all curves."
            .into(),
    ));
    Page {
        title: format!("lagfold stress: {}", scenario.name),
        summary: vec![super::esc(&crate::report::advice::stress_advice(scenario, stress))],
        key_figures: summary,
        glossary: crate::report::story::glossary(),
        charts,
        tables: Vec::new(),
        parameters: serde_json::to_value(scenario).unwrap_or_default(),
        errors,
        errors_note: "The regrets are differences of true values: horizon ICs computed by numerical integration and \
                      net information ratios from a reference simulation per curve. Their errors are those of the \
                      values below; a regret smaller than about two of them cannot be told from zero."
            .into(),
        methods,
        ..Page::default()
    }
}
