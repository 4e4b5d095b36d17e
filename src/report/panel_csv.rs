//! A simulated panel in the long input format of `lagfold measure`: one row
//! per date and asset with `date,asset,forecast,return`, where `return` is the
//! asset's residual return over the period that starts at that date (a
//! forward return, in the scenario's volatility units); the last date has no
//! forward return and leaves it empty.

use crate::measure::Panel;
use std::io::Write;

/// Streams `panel` as CSV into `w`, with `dates` (one per panel date) and
/// returns scaled by `sigma`.
///
/// # Errors
/// Any write error.
pub fn write_panel(panel: &Panel, dates: &[String], sigma: f64, w: impl Write) -> csv::Result<()> {
    let mut out = csv::Writer::from_writer(w);
    out.write_record(["date", "asset", "forecast", "return"])?;
    let ids: Vec<String> = (1..=panel.assets).map(|i| format!("A{i:05}")).collect();
    for (t, date) in dates.iter().enumerate().take(panel.dates) {
        let f = panel.forecast_row(t);
        for i in 0..panel.assets {
            let r = if t + 1 < panel.dates { format!("{:.8}", sigma * panel.return_row(t)[i]) } else { String::new() };
            out.write_record([date.as_str(), ids[i].as_str(), &format!("{:.8}", f[i]), &r])?;
        }
    }
    out.flush()?;
    Ok(())
}
