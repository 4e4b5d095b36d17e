//! What a study says, in the order a committee reads it: one recommendation,
//! the key figures, warnings, why the horizon-IC peak and the best holding
//! differ, and a glossary. The terminal and the report tell the same story;
//! each figure is written by a [`Figure`] writer (plain text for the
//! terminal, a tagged figure pointing into `summary.json` for the report).

use super::html::Fmt;
use super::terminal::period_word;
use super::text::fixed;
use crate::portfolio::PortfolioTruth;
use crate::simulate::Setup;
use crate::stats::argmax1;
use crate::study::{MoreHistory, StudyResult};

/// Writes a figure: its JSON pointer in `summary.json` (empty for a value
/// derived from several), its value and its format.
pub type Figure<'a> = &'a dyn Fn(&str, f64, Fmt) -> String;

/// The plain writer of the terminal: no negative zero, percentages of shares.
pub fn plain(_: &str, v: f64, f: Fmt) -> String {
    match f {
        Fmt::Pct(d) => format!("{}%", fixed(100.0 * v, d)),
        Fmt::Num(d) => fixed(v, d),
        Fmt::Plain => format!("{v}"),
    }
}

/// Everything the story is told from.
#[derive(Clone, Copy)]
pub struct Study<'a> {
    /// Scenario, model and truth.
    pub setup: &'a Setup,
    /// The books' truth.
    pub portfolio: &'a PortfolioTruth,
    /// The Monte Carlo study.
    pub study: &'a StudyResult,
    /// The study at twice the history, when run.
    pub more: Option<&'a MoreHistory>,
}

/// "month" or "months" for a count that may be a whole-number quantile.
fn units(n: f64, unit: &str) -> String {
    super::charts::units(n.round() as usize, unit)
}

pub use super::measure_out::ranges;

/// A volatility as a percentage without trailing zeros: 0.04 → "4%", 0.045 → "4.5%".
pub fn vol_pct(v: f64) -> String {
    format!("{}%", (v * 1000.0).round() / 10.0)
}

impl Study<'_> {
    fn unit(&self) -> &'static str {
        period_word(self.setup.scenario.periods_per_year)
    }

    fn years(&self, history: usize) -> f64 {
        history as f64 / self.setup.scenario.periods_per_year
    }

    /// The sentence a committee can act on: which holdings (and horizons)
    /// this history cannot tell apart, what choosing within them costs at
    /// the book's target volatility, and what twice the history would buy.
    pub fn recommendation(&self, f: Figure) -> String {
        let (s, st) = (&self.setup.scenario, self.study);
        let unit = self.unit();
        let net = &st.rules.net_ir;
        let peak = &st.rules.horizon.peak;
        let (lo, hi) = (net.choice_quantiles[0], net.choice_quantiles[4]);
        let se = net.regret_bps_year_total_se().map_or(String::new(), |se| format!(" ± {}", f("", se, Fmt::Num(1))));
        let mut text = format!(
            "With {} years of history on {} assets, holdings from {} to {} {} cannot be told apart net of {} bps: \
             that is where one history's best measured net IR lands (5–95% of simulated histories; the true best \
             is {}). Choosing by it gives up {}{se} bps a year on average at {} annual volatility; the \
             horizon-IC peak lands from {} to {} {} (true {}).",
            f("", self.years(s.history), Fmt::Num(0)),
            f("/scenario/assets", s.assets as f64, Fmt::Num(0)),
            f("/study/rules/net_ir/choice_quantiles/0", lo, Fmt::Num(0)),
            f("/study/rules/net_ir/choice_quantiles/4", hi, Fmt::Num(0)),
            units(hi, unit),
            f("/study/cost_bps", st.cost_bps, Fmt::Plain),
            f("/truth/best_holding", self.portfolio.linear.best_holding as f64, Fmt::Num(0)),
            f("/study/rules/net_ir/regret_bps_year_mean", net.regret_bps_year_mean.unwrap_or(f64::NAN), Fmt::Num(1)),
            vol_pct(s.portfolio.target_vol),
            f("/study/rules/peak/choice_quantiles/0", peak.choice_quantiles[0], Fmt::Num(0)),
            f("/study/rules/peak/choice_quantiles/4", peak.choice_quantiles[4], Fmt::Num(0)),
            units(peak.choice_quantiles[4], unit),
            f("/truth/best_horizon", self.setup.truth.best_horizon as f64, Fmt::Num(0)),
        );
        if let Some(m) = self.more {
            let n = &m.rules.net_ir;
            text.push_str(&format!(
                " Twice the history ({} years) narrows that range to {}–{} {} and the cost to {} bps a year.",
                f("", self.years(m.history), Fmt::Num(0)),
                f("/more_history/rules/net_ir/choice_quantiles/0", n.choice_quantiles[0], Fmt::Num(0)),
                f("/more_history/rules/net_ir/choice_quantiles/4", n.choice_quantiles[4], Fmt::Num(0)),
                units(n.choice_quantiles[4], unit),
                f(
                    "/more_history/rules/net_ir/regret_bps_year_mean",
                    n.regret_bps_year_mean.unwrap_or(f64::NAN),
                    Fmt::Num(1)
                ),
            ));
        }
        text
    }

    /// The key figures, one sentence each.
    pub fn key_figures(&self, f: Figure) -> Vec<String> {
        let (t, lin, st) = (&self.setup.truth, &self.portfolio.linear, self.study);
        let unit = self.unit();
        let net = &st.rules.net_ir;
        let hold = lin.best_holding;
        let mut v = vec![
            format!(
                "True best horizon (peak of the horizon IC): {} {} (horizon IC {}).",
                f("/truth/best_horizon", t.best_horizon as f64, Fmt::Num(0)),
                units(t.best_horizon as f64, unit),
                f(&format!("/truth/horizon_ic/{}", t.best_horizon - 1), t.horizon_ic[t.best_horizon - 1], Fmt::Num(4)),
            ),
            format!(
                "True best holding net of {} bps: {} {} (net IR {} a year); the reference simulation of {} histories \
                 cannot tell it from holdings {} (gaps within 1.96 paired standard errors).",
                f("/study/cost_bps", st.cost_bps, Fmt::Plain),
                f("/truth/best_holding", hold as f64, Fmt::Num(0)),
                units(hold as f64, unit),
                f(&format!("/truth/net_ir/{}", hold - 1), lin.net_ir[hold - 1], Fmt::Num(2)),
                f("/truth/portfolio/reference_paths", self.portfolio.reference_paths as f64, Fmt::Num(0)),
                ranges(&lin.tied_with_best),
            ),
            format!(
                "Choosing the holding by one history's measured net IR: exact hit {} (95% interval {}–{}), within \
                 one {unit} {} (95% interval {}–{}).",
                f("/study/rules/net_ir/hit_rate", net.hit_rate, Fmt::Pct(1)),
                f("/study/rules/net_ir/hit_rate_ci/0", net.hit_rate_ci[0], Fmt::Pct(1)),
                f("/study/rules/net_ir/hit_rate_ci/1", net.hit_rate_ci[1], Fmt::Pct(1)),
                f("/study/rules/net_ir/near_hit_rate", net.near_hit_rate, Fmt::Pct(1)),
                f("/study/rules/net_ir/near_hit_rate_ci/0", net.near_hit_rate_ci[0], Fmt::Pct(1)),
                f("/study/rules/net_ir/near_hit_rate_ci/1", net.near_hit_rate_ci[1], Fmt::Pct(1)),
            ),
            format!(
                "Winner's curse: the chosen holding's measured net IR overstates its true net IR by {} on average \
                 ({} of the best net IR), so a backtest at the chosen holding promises more than it will deliver.",
                f("/study/rules/net_ir/winners_curse_mean", net.winners_curse_mean, Fmt::Num(2)),
                f("", net.winners_curse_mean / lin.net_ir[hold - 1], Fmt::Pct(0)),
            ),
        ];
        v.push(match &st.ranking.best {
            Some(best) => format!(
                "Among the horizon rules, {best} gives up the least horizon IC, by more than 1.96 paired standard \
                 errors against each other rule."
            ),
            None => "No horizon rule gives up measurably less than the others: their paired differences are within \
                     1.96 standard errors."
                .to_string(),
        });
        v
    }

    /// Warnings: an optimum at the longest horizon or holding studied.
    pub fn warnings(&self) -> Vec<String> {
        let (s, t, lin) = (&self.setup.scenario, &self.setup.truth, &self.portfolio.linear);
        let unit = self.unit();
        let mut v = Vec::new();
        let longer = (2 * s.horizons).max(s.horizons + 12);
        if t.best_horizon == s.horizons {
            v.push(format!(
                "The true best horizon is the longest studied ({} {}): the optimum may lie beyond it, and choices \
                 pile up at the cap, which flatters the hit rates. Rerun with --horizons {longer}.",
                s.horizons,
                units(s.horizons as f64, unit)
            ));
        }
        if lin.best_holding == s.horizons {
            v.push(format!(
                "The best holding is the longest studied ({} {}): a longer holding may do better. Rerun with \
                 --horizons {longer}.",
                s.horizons,
                units(s.horizons as f64, unit)
            ));
        }
        v
    }

    /// Why the horizon-IC peak and the best holding differ, in one paragraph.
    pub fn why_optima_differ(&self, f: Figure) -> String {
        let (t, lin) = (&self.setup.truth, &self.portfolio.linear);
        let unit = self.unit();
        let gross_best = argmax1(&lin.gross_ir);
        format!(
            "The horizon IC at n is the correlation of today's forecast with the return over the next n {unit}s; \
             its peak ({} {}) is where a single forecast's information, scaled by the risk of an n-{unit} return, \
             is used best. A book held for h {unit}s is different: it runs h overlapping tranches, each formed from \
             a forecast of a different age, so its return averages the lagged ICs 1 to h, its risk is spread across \
             tranches whose forecasts are correlated, and its trading falls roughly as 1/h. Its best holding before \
             costs ({} {}) and after {} bps of costs ({} {}) therefore need not sit at the horizon-IC peak: a \
             persistent forecast keeps older tranches useful, and costs push the holding longer.",
            f("/truth/best_horizon", t.best_horizon as f64, Fmt::Num(0)),
            units(t.best_horizon as f64, unit),
            f("", gross_best as f64, Fmt::Num(0)),
            units(gross_best as f64, unit),
            f("/study/cost_bps", self.study.cost_bps, Fmt::Plain),
            f("/truth/best_holding", lin.best_holding as f64, Fmt::Num(0)),
            units(lin.best_holding as f64, unit),
        )
    }
}

/// The short glossary: `(term, meaning)`.
pub const GLOSSARY: [(&str, &str); 7] = [
    (
        "horizon IC",
        "the cross-sectional correlation of a forecast with the return summed over the next n periods, averaged \
         over dates",
    ),
    ("lagged IC", "the correlation of a forecast with the single-period return k periods later"),
    ("net IR", "a book's annualised mean return after trading costs divided by its volatility (information ratio)"),
    ("peak rule", "choose the horizon where the measured horizon IC is largest"),
    ("formula rule", "choose the peak of the sum of measured lagged ICs over the square root of n"),
    ("fitted rule", "fit a decay curve to the measured lagged ICs and choose its optimum"),
    ("net-IR rule", "choose the holding whose measured net IR is largest"),
];

/// The glossary as every report shows it.
pub fn glossary() -> Vec<(String, String)> {
    GLOSSARY.iter().map(|(a, b)| (a.to_string(), b.to_string())).collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn plain_figures_have_no_negative_zero() {
        assert_eq!(plain("", -0.0001, Fmt::Num(2)), "0.00");
        assert_eq!(plain("", -0.0001, Fmt::Pct(1)), "0.0%");
        assert_eq!(plain("", -0.5, Fmt::Num(1)), "-0.5");
        assert_eq!((vol_pct(0.04), vol_pct(0.045)), ("4%".to_string(), "4.5%".to_string()));
        assert_eq!(ranges(&[3, 5, 6, 7, 9]), "3, 5–7, 9");
    }
}
