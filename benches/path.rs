//! One study path at `N = 1000, T = 120, L = 24` against drawing the same
//! number of standard normals, and the parts of a path. Prints the ratio
//! path / bare draws from one interleaved run (target: at most 3) and the
//! time of a path against the NumPy reference of NOTES.md (target: 4× faster).

mod common;

use criterion::{Criterion, criterion_group};
use lagfold::generate::Workspace;
use lagfold::measure::Measurement;
use lagfold::rng::{fill_normal, path_rng};
use lagfold::study::{Setup, Worker};
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
            black_box(worker.run_path(setup, p));
        },
        || fill_normal(&mut rng, black_box(&mut buf)),
    );
    println!(
        "ratio  whole path / bare draws ({draws} normals) = {:.2}  (path {:.3} ms, draws {:.3} ms; target ≤ 3)",
        path / bare,
        path * 1e3,
        bare * 1e3
    );
    println!(
        "speed  one path on one thread = {:.3} ms; NumPy reference {:.0} ms (NOTES.md) → {:.1}× (target ≥ 4×)\n",
        path * 1e3,
        NUMPY_PATH * 1e3,
        NUMPY_PATH / path
    );
}

fn benches(c: &mut Criterion) {
    let setup = common::setup(1);
    ratio_report(&setup);
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
