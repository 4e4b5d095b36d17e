//! Drawing the demo's charts and report from an aggregated study, against the
//! study itself (2,000 paths on every core): prints the ratio from one
//! interleaved run. The charts are off the hot path; this says what they add.

mod common;

use criterion::{Criterion, criterion_group};
use lagfold::portfolio::PortfolioTruth;
use lagfold::report::{self, ChartSet};
use lagfold::study;
use std::hint::black_box;

fn draw(setup: &lagfold::simulate::Setup, truth: &PortfolioTruth, result: &study::StudyResult) -> usize {
    let set = ChartSet::render(&report::study_charts(setup, truth, result)).expect("charts draw");
    let story = report::Study { setup, portfolio: truth, study: result, more: None };
    let page = report::html::study_page(&story, set.inline);
    set.files.len() + report::html::render(&page, &report::Made::now()).len()
}

fn benches(c: &mut Criterion) {
    let setup = common::setup(2000);
    let threads = std::thread::available_parallelism().map_or(1, |n| n.get());
    let truth = PortfolioTruth::compute(&setup, threads, &|_| {});
    let result = study::run(&setup, &truth, &[], threads, &|_| {});
    let mut g = c.benchmark_group("report");
    g.sample_size(10);
    g.bench_function("five_charts_and_report_html", |b| b.iter(|| black_box(draw(&setup, &truth, &result))));
    g.finish();
    let (charts, run) = common::interleaved(
        3,
        || {
            black_box(draw(&setup, &truth, &result));
        },
        || {
            black_box(study::run(&setup, &truth, &[], threads, &|_| {}));
        },
    );
    println!(
        "\ncharts and report / study of 2,000 paths = {:.3}×  (charts {:.3} s, study {:.2} s, {threads} threads)",
        charts / run,
        charts,
        run
    );
}

criterion_group!(group, benches);

fn main() {
    group();
    Criterion::default().configure_from_args().final_summary();
}
