//! A 6-point history grid (`lagfold plan`) against a single study at the
//! longest history, same scenario and paths; prints the ratio from one
//! interleaved run (target: at most 1.5).

mod common;

use criterion::{Criterion, criterion_group};
use lagfold::plan::{self, Goal};
use lagfold::portfolio::PortfolioTruth;
use lagfold::scenario::{self, Overrides, presets};
use lagfold::simulate::Setup;
use lagfold::study;
use std::hint::black_box;
use std::time::Instant;

fn benches(c: &mut Criterion) {
    let ov = Overrides {
        assets: Some(1000),
        history: Some(360),
        horizons: Some(24),
        paths: Some(200),
        seed: Some(7),
        ..Overrides::default()
    };
    let s = scenario::load(presets::text(presets::DEFAULT).unwrap(), "bench", "bench", &ov).unwrap();
    let setup = Setup::new(s).unwrap();
    let truth = PortfolioTruth::compute(&setup, 1, &|_| {});
    let grid = [60, 90, 120, 180, 240, 360];
    let goal = Goal::parse("near-hit>=0.8").unwrap();
    let time = |f: &mut dyn FnMut()| {
        let t = Instant::now();
        f();
        t.elapsed().as_secs_f64()
    };
    let (mut p, mut r) = (Vec::new(), Vec::new());
    for _ in 0..3 {
        p.push(time(&mut || {
            black_box(plan::run(&setup, &truth, &grid, goal, 1, &|_| {}));
        }));
        r.push(time(&mut || {
            black_box(study::run(&setup, &truth, &[], 1, &|_| {}));
        }));
    }
    p.sort_by(f64::total_cmp);
    r.sort_by(f64::total_cmp);
    println!(
        "ratio  6-point history grid / single study at T = 360 = {:.2}  (grid {:.2} s, single {:.2} s, 200 paths, 1 thread; target ≤ 1.5)\n",
        p[1] / r[1],
        p[1],
        r[1]
    );
    let mut g = c.benchmark_group("plan_200_paths");
    g.sample_size(10);
    g.bench_function("grid_6_points", |b| b.iter(|| black_box(plan::run(&setup, &truth, &grid, goal, 1, &|_| {}))));
    g.finish();
}

criterion_group!(group, benches);

fn main() {
    group();
    Criterion::default().configure_from_args().final_summary();
}
