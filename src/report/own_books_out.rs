//! The tranche books on a user's own panel (`measure --cost-bps`): gross and
//! net information ratios and turnover per holding length.

use super::measure_out::paragraph;
use crate::own_data::OwnBooks;
use std::fmt::Write;

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
