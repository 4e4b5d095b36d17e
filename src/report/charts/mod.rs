//! Which charts each command draws, built from its aggregated results and
//! rendered once, after the simulation, as SVG and PNG.

mod measure;
pub(crate) mod parts;
mod plan;
mod stress;
mod study;

pub use measure::measure_charts;
pub use parts::{plural, trim, units};
pub use plan::{plan_charts, sweep_charts};
pub use stress::stress_charts;
pub use study::{regret_bin_names, regret_shares, study_charts};

use crate::chart::{Chart, ChartError};

/// Charts drawn: their files and, for the report, each chart's SVG and caption.
#[derive(Debug, Default)]
pub struct ChartSet {
    /// `(file name, bytes)`: `name.svg` and `name.png` per chart.
    pub files: Vec<(String, Vec<u8>)>,
    /// `(title, caption, svg)` per chart, in order.
    pub inline: Vec<(String, String, String)>,
}

impl ChartSet {
    /// Renders every chart (in parallel; each chart's bytes do not depend on it).
    ///
    /// # Errors
    /// When a chart cannot be drawn.
    pub fn render(charts: &[Chart]) -> Result<Self, ChartError> {
        use rayon::prelude::*;
        let drawn: Vec<_> = charts.par_iter().map(Chart::render).collect::<Result<_, _>>()?;
        let mut set = Self::default();
        for (c, r) in charts.iter().zip(drawn) {
            set.files.push((format!("{}.svg", c.name), r.svg.clone().into_bytes()));
            set.files.push((format!("{}.png", c.name), r.png));
            set.inline.push((c.title.clone(), c.caption.clone(), r.svg));
        }
        Ok(set)
    }
}
