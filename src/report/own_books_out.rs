//! The tranche books on a user's own panel (`measure --cost-bps`): gross and
//! net information ratios and turnover per holding length.

use super::measure_out::{finite, paragraph};
use crate::portfolio::BookSums;
use crate::portfolio::own::ir_se;
use serde::Serialize;
use std::fmt::Write;

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

/// The terminal table of the books (at most 80 columns; up to three costs).
pub fn own_books_terminal(b: &OwnBooks) -> String {
    let mut out = String::from("\n");
    out.push_str(&paragraph(&format!(
        "Tranche books on your panel ({} periods, annualised at {} a year): turnover per period and \
         information ratios ± one standard error.",
        b.periods, b.periods_per_year
    )));
    let shown = &b.costs[..b.costs.len().min(3)];
    let _ = write!(out, "\n  {:>4}  {:>8}  {:>13}", "hold", "turnover", "gross IR");
    for c in shown {
        let _ = write!(out, "  {:>13}", format!("net {} bps", trim(c.cost_bps)));
    }
    out.push('\n');
    let pm = |v: Option<f64>, se: Option<f64>| match (v, se) {
        (Some(v), Some(se)) => format!("{v:.2} ± {se:.2}"),
        (Some(v), None) => format!("{v:.2}"),
        _ => "—".into(),
    };
    for h in 0..b.gross_ir.len() {
        let _ = write!(
            out,
            "  {:>4}  {:>8}  {:>13}",
            h + 1,
            b.turnover[h].map_or("—".into(), |t| format!("{t:.3}")),
            pm(b.gross_ir[h], b.gross_ir_se[h])
        );
        for c in shown {
            let mark = if c.best_holding == Some(h + 1) { "*" } else { " " };
            let _ = write!(out, "  {:>12}{mark}", pm(c.net_ir[h], c.net_ir_se[h]));
        }
        out.push('\n');
    }
    for c in &b.costs {
        if let Some(best) = c.best_holding {
            out.push_str(&paragraph(&format!(
                "Net of {} bps: best measured holding {best} (*); holdings {} are within one standard error of it.",
                trim(c.cost_bps),
                super::measure_out::ranges(&c.within_one_se)
            )));
        }
    }
    if b.costs.len() > shown.len() {
        out.push_str(&paragraph("(first three costs shown; all of them are in measure.json)"));
    }
    out
}

fn trim(x: f64) -> String {
    super::charts::parts::trim_to(x, 2)
}

/// `holdings.csv`: one row per holding length — turnover, gross IR and its
/// error, and the net IR and its error at each cost.
pub fn holdings_csv(b: &OwnBooks) -> Vec<u8> {
    let mut w = csv::Writer::from_writer(Vec::new());
    let mut header: Vec<String> = ["holding", "turnover", "gross_ir", "gross_ir_se"].map(String::from).to_vec();
    for c in &b.costs {
        header.push(format!("net_ir_{}bps", trim(c.cost_bps)));
        header.push(format!("net_ir_se_{}bps", trim(c.cost_bps)));
    }
    w.write_record(&header).expect("in-memory CSV");
    let o = |x: Option<f64>| x.map(|v| format!("{v:.6}")).unwrap_or_default();
    for h in 0..b.gross_ir.len() {
        let mut row = vec![(h + 1).to_string(), o(b.turnover[h]), o(b.gross_ir[h]), o(b.gross_ir_se[h])];
        for c in &b.costs {
            row.push(o(c.net_ir[h]));
            row.push(o(c.net_ir_se[h]));
        }
        w.write_record(&row).expect("in-memory CSV");
    }
    w.into_inner().expect("in-memory CSV")
}
