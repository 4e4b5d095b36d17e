//! A whole study of 2,000 paths at `N = 1000, T = 120, L = 24` on 1 and 2
//! threads; prints the speed-up from one interleaved run.

mod common;

use criterion::{Criterion, criterion_group};
use lagfold::portfolio::PortfolioTruth;
use lagfold::study;
use std::hint::black_box;

fn benches(c: &mut Criterion) {
    let setup = common::setup(2000);
    let truth = PortfolioTruth::compute(&setup, 2, &|_| {});
    let mut g = c.benchmark_group("study_2000_paths");
    g.sample_size(10);
    for threads in [1usize, 2] {
        g.bench_function(format!("threads_{threads}"), |b| {
            b.iter(|| black_box(study::run(&setup, &truth, &[], threads, &|_| {})))
        });
    }
    g.finish();
    let (one, two) = common::interleaved(
        3,
        || {
            black_box(study::run(&setup, &truth, &[], 1, &|_| {}));
        },
        || {
            black_box(study::run(&setup, &truth, &[], 2, &|_| {}));
        },
    );
    println!(
        "\nspeed-up  2 threads / 1 thread = {:.2}×  (1 thread {:.2} s, 2 threads {:.2} s; two vCPUs may share a core, NOTES.md)",
        one / two,
        one,
        two
    );
}

criterion_group!(group, benches);

fn main() {
    group();
    Criterion::default().configure_from_args().final_summary();
}
