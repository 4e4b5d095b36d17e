//! The tranche books on a user's own panel (`measure --cost-bps`): gross and
//! net information ratios and turnover per holding length.

use super::result::finite;
use crate::portfolio::BookSums;
use crate::portfolio::own::ir_se;
use serde::Serialize;

/// The net figures at one cost.
#[derive(Debug, Clone, Serialize)]
pub struct OwnNet {
    /// One-way cost, basis points of traded notional.
    pub cost_bps: f64,
    /// Annualised net IR per holding length (index 0 = holding 1).
    pub net_ir: Vec<Option<f64>>,
    /// Its standard error (Lo, 2002).
    pub net_ir_se: Vec<Option<f64>>,
    /// The holding length with the best measured net IR.
    pub best_holding: Option<usize>,
    /// Holding lengths whose net IR is within one standard error of the best
    /// (the one-standard-error rule: Breiman, Friedman, Olshen and Stone, 1984).
    pub within_one_se: Vec<usize>,
}

/// The books measured on the user's panel.
#[derive(Debug, Clone, Serialize)]
pub struct OwnBooks {
    /// How the books are built, in words.
    pub method: String,
    /// Periods compared (the same for every holding length).
    pub periods: u64,
    /// Periods a year used to annualise.
    pub periods_per_year: f64,
    /// Mean one-way traded notional per period, per unit gross exposure.
    pub turnover: Vec<Option<f64>>,
    /// Annualised gross IR per holding length.
    pub gross_ir: Vec<Option<f64>>,
    /// Its standard error (Lo, 2002).
    pub gross_ir_se: Vec<Option<f64>>,
    /// Net figures at each cost asked for.
    pub costs: Vec<OwnNet>,
}

/// How the books are built.
pub const OWN_BOOKS_METHOD: &str = "staggered tranches of weights proportional to the demeaned forecast at unit gross \
    exposure, averaged over the holding length; returns demeaned across each date's assets (a missing return counts \
    as the mean); cost = one-way bps × traded notional; IR annualised, standard error √((1 + SR²/2)/n) for \
    independent normal period returns (Lo, 2002)";

/// Net IR and its standard error per holding length at one-way cost `c`.
fn net_at(books: &[BookSums], c: f64, ppy: f64) -> (Vec<Option<f64>>, Vec<Option<f64>>) {
    books
        .iter()
        .map(|b| {
            if b.n < 3 {
                return (None, None);
            }
            let (m, sd) = b.net_mean_sd(c);
            let sr = finite(m / sd);
            (sr.map(|s| s * ppy.sqrt()), sr.and_then(|s| finite(ir_se(s, b.n, ppy))))
        })
        .unzip()
}

impl OwnBooks {
    /// The figures of `books` at every cost in `costs_bps`.
    pub fn new(books: &[BookSums], costs_bps: &[f64], ppy: f64) -> Self {
        let (gross_ir, gross_ir_se) = net_at(books, 0.0, ppy);
        let costs = costs_bps
            .iter()
            .map(|&bps| {
                let (net_ir, net_ir_se) = net_at(books, bps * 1e-4, ppy);
                let best = net_ir
                    .iter()
                    .enumerate()
                    .filter_map(|(i, v)| Some((i, (*v)?)))
                    .max_by(|a, b| a.1.total_cmp(&b.1).then(b.0.cmp(&a.0)));
                let within_one_se = match best {
                    Some((i, top)) => {
                        let bar = top - net_ir_se[i].unwrap_or(0.0);
                        (0..net_ir.len()).filter(|&j| net_ir[j].is_some_and(|v| v >= bar)).map(|j| j + 1).collect()
                    }
                    None => Vec::new(),
                };
                OwnNet { cost_bps: bps, net_ir, net_ir_se, best_holding: best.map(|b| b.0 + 1), within_one_se }
            })
            .collect();
        Self {
            method: OWN_BOOKS_METHOD.into(),
            periods: books.first().map_or(0, |b| b.n),
            periods_per_year: ppy,
            turnover: books.iter().map(|b| if b.n > 0 { finite(b.turnover()) } else { None }).collect(),
            gross_ir,
            gross_ir_se,
            costs,
        }
    }
}
