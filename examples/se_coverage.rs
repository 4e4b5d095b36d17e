//! How often the 95 % intervals `measure` reports cover the truth: for every
//! preset (or the one named), simulate histories with horizons up to a
//! quarter of the history and print, per lag and horizon, the coverage of the
//! EWC intervals (lagged and horizon ICs) beside Newey–West with a normal
//! critical value (horizon ICs). 0.95 is right; the binomial error is printed.
//!
//! `cargo run --release --example se_coverage -- [preset] [paths] [assets]`

use lagfold::scenario::{self, Overrides, presets};
use lagfold::simulate::Setup;
use lagfold::study::coverage::interval_coverage;

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let names: Vec<String> = match args.get(1) {
        Some(n) if n != "all" => vec![n.clone()],
        _ => presets::ALL.iter().map(|(n, _)| n.to_string()).collect(),
    };
    let paths: usize = args.get(2).map_or(2000, |s| s.parse().expect("paths"));
    let assets: Option<usize> = args.get(3).map(|s| s.parse().expect("assets"));
    for name in names {
        let text = presets::text(&name).expect("a preset name");
        let base = scenario::load(text, &name, &name, &Overrides { assets, ..Overrides::default() }).unwrap();
        let ov = Overrides { assets, horizons: Some(base.history() / 4), ..Overrides::default() };
        let setup = Setup::new(scenario::load(text, &name, &name, &ov).unwrap()).unwrap();
        let c = interval_coverage(&setup, paths, 1, None);
        let s = &setup.scenario;
        println!(
            "\n{name}: {} assets × {} dates, horizons 1–{} (a quarter of the history), {paths} histories; ± {:.3}",
            s.assets(),
            s.history(),
            s.horizons(),
            c.rate_se()
        );
        println!("     n   lagged IC  horizon IC  horizon IC, Newey–West + 1.96");
        let step = (s.horizons() / 8).max(1);
        for n in (1..=s.horizons()).filter(|n| *n <= 3 || n % step == 0 || *n == s.horizons()) {
            println!(
                "  {n:>4}   {:>9.3}  {:>10.3}  {:>10.3}",
                c.lagged[n - 1],
                c.horizon[n - 1],
                c.horizon_newey_west[n - 1]
            );
        }
        let min = |v: &[f64]| v.iter().copied().fold(1.0, f64::min);
        println!("  lowest {:>9.3}  {:>10.3}  {:>10.3}", min(&c.lagged), min(&c.horizon), min(&c.horizon_newey_west));
    }
}
