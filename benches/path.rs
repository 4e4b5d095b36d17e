//! One study path at `N = 1000, T = 120, L = 24` against drawing the same
//! number of standard normals, and the parts of a path. Prints, each from one
//! interleaved run: core path (simulate, measure, three rules) / bare draws
//! (target: at most 3); the core path against the NumPy reference of NOTES.md
//! (target: 4× faster); the portfolio layer / core path (target: at most 0.5);
//! and every preset's core path at the same size against the exponential
//! default's (target: at most 1.3), with how its generator applies the
//! loadings and the largest IC error of an exponential-sum approximation.

mod common;

use criterion::{Criterion, criterion_group};
use lagfold::generate::Workspace;
use lagfold::measure::Measurement;
use lagfold::portfolio::BookBuilder;
use lagfold::rng::{fill_normal, path_rng};
use lagfold::simulate::Setup;
use lagfold::study::Worker;
use std::hint::black_box;

/// NumPy implementation of one study path on one thread (NOTES.md), seconds.
const NUMPY_PATH: f64 = 0.010;

fn ratio_report(setup: &Setup) {
    let draws = setup.generator.draws_per_path();
    let (mut rng, mut buf) = (path_rng(8, 0), vec![0.0; draws]);
    let (mut worker, mut p) = (Worker::new(&setup.scenario), 0u64);
    let (path, bare) = common::interleaved(
        30,
        || {
            p += 1;
            black_box(worker.measure_path(setup, p));
        },
        || fill_normal(&mut rng, black_box(&mut buf)),
    );
    println!(
        "ratio  core path / bare draws ({draws} normals) = {:.2}  (path {:.3} ms, draws {:.3} ms; target ≤ 3)",
        path / bare,
        path * 1e3,
        bare * 1e3
    );
    println!(
        "speed  one core path on one thread = {:.3} ms; NumPy reference {:.0} ms (NOTES.md) → {:.1}× (target ≥ 4×)",
        path * 1e3,
        NUMPY_PATH * 1e3,
        NUMPY_PATH / path
    );
    // The portfolio layer: the linear books of every holding length, against the rest of the path.
    let (mut ws, mut meas, mut books) = (Workspace::default(), Measurement::new(24, false), BookBuilder::default());
    setup.generator.simulate(&mut path_rng(9, 0), &mut ws);
    meas.update(&ws.panel);
    let (core, layer) = common::interleaved(
        30,
        || {
            p += 1;
            black_box(worker.measure_path(setup, p));
        },
        || {
            black_box(books.build(&ws.panel, meas.products().unwrap(), 0.06, None));
        },
    );
    println!(
        "ratio  portfolio layer / core path = {:.2}  (books of all 24 holding lengths {:.3} ms, core path {:.3} ms; target ≤ 0.5)\n",
        layer / core,
        layer * 1e3,
        core * 1e3
    );
}

/// Every preset at the bench's size against the default (exponential) preset.
fn presets_report(default: &Setup) {
    println!("preset path / exponential default path at N = 1000, T = 120, L = 24 (one thread; target ≤ 1.3)");
    for (name, _) in lagfold::scenario::presets::ALL {
        let setup = common::setup_of(name, 1);
        let (mut a, mut b, mut p, mut q) = (Worker::new(&setup.scenario), Worker::new(&default.scenario), 0u64, 0u64);
        let (preset, base) = common::interleaved(
            10,
            || {
                p += 1;
                black_box(a.measure_path(&setup, p));
            },
            || {
                q += 1;
                black_box(b.measure_path(default, q));
            },
        );
        let t = &setup.truth;
        let error = t.generator_ic_error.map_or("exact".to_string(), |e| format!("IC error {e:.1e}"));
        let tails = if setup.scenario.tails() == lagfold::scenario::Tails::Normal { "normal" } else { "Student t" };
        println!(
            "  {name:<16} {:.2}×  ({:.2} ms vs {:.2} ms; {tails} noise; {error}; {})",
            preset / base,
            preset * 1e3,
            base * 1e3,
            t.generator
        );
    }
    println!();
}

fn benches(c: &mut Criterion) {
    let setup = common::setup(1);
    ratio_report(&setup);
    presets_report(&setup);
    let mut rng = path_rng(7, 0);
    let mut buf = vec![0.0; setup.generator.draws_per_path()];
    let mut worker = Worker::new(&setup.scenario);
    let mut ws = Workspace::default();
    let mut meas = Measurement::new(24, false);
    setup.generator.simulate(&mut rng, &mut ws);
    let mut g = c.benchmark_group("path");
    g.sample_size(30);
    g.bench_function("bare_normal_draws", |b| b.iter(|| fill_normal(&mut rng, black_box(&mut buf))));
    g.bench_function("simulate", |b| b.iter(|| setup.generator.simulate(&mut rng, black_box(&mut ws))));
    g.bench_function("measure", |b| b.iter(|| meas.update(black_box(&ws.panel))));
    let mut p = 0u64;
    g.bench_function("books", |b| {
        b.iter(|| black_box(BookBuilder::default().build(&ws.panel, meas.products().unwrap(), 0.06, None)))
    });
    g.bench_function("whole_path", |b| {
        b.iter(|| {
            p += 1;
            black_box(worker.run_path(&setup, p))
        })
    });
    g.finish();
}

criterion_group!(group, benches);

fn main() {
    group();
    Criterion::default().configure_from_args().final_summary();
}
