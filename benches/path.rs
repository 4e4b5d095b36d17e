//! One study path at `N = 1000, T = 120, L = 24` against drawing the same
//! number of standard normals, and the parts of a path. Prints, each from one
//! interleaved run: core path (simulate, measure, three rules) / bare draws
//! (target: at most 3); the whole path with the books against the same path
//! in plain NumPy (`benches/numpy_path.py`, run in the same session; target:
//! 5× faster); the portfolio layer / core path (target: at most 0.5); a
//! Student-t draw against a normal one; the band of products a path measures
//! by its fixed-order kernel against the former general matrix multiply;
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
use lagfold::student_t::StudentTZiggurat;
use lagfold::study::Worker;
use rand::RngExt;
use std::hint::black_box;

/// Seconds per path of `benches/numpy_path.py` (the same path in plain NumPy,
/// one BLAS thread) on `setup`'s scenario, or why it could not run. Python is
/// `LAGFOLD_PYTHON`, else the virtual environment `scripts/check-python`
/// makes, else `python3`.
fn numpy_path(setup: &Setup) -> Result<f64, String> {
    let root = std::path::Path::new(env!("CARGO_MANIFEST_DIR"));
    let venv = root.join("target/python-venv/bin/python");
    let python = std::env::var("LAGFOLD_PYTHON")
        .unwrap_or_else(|_| if venv.exists() { venv.display().to_string() } else { "python3".into() });
    let m = &setup.model;
    let lagfold::model::Kernel::TwoExponential { alpha, lambda, beta } = m.kernel() else {
        return Err("the default preset is no longer exponential".into());
    };
    let s = &setup.scenario;
    let params = serde_json::json!({
        "assets": s.assets(), "history": s.history(), "horizons": s.horizons(),
        "rho": m.rho(), "lambda": lambda, "alpha": alpha, "beta_f": beta / (1.0 - m.rho() * m.rho()).sqrt(),
        "ic_vol": m.ic_vol(), "psi": m.psi(), "idio_sd": m.idio_sd(),
    });
    let out = std::process::Command::new(&python)
        .arg(root.join("benches/numpy_path.py"))
        .arg(params.to_string())
        .arg("40")
        .envs([("OPENBLAS_NUM_THREADS", "1"), ("OMP_NUM_THREADS", "1"), ("MKL_NUM_THREADS", "1")])
        .output()
        .map_err(|e| format!("{python}: {e}"))?;
    if !out.status.success() {
        let err = String::from_utf8_lossy(&out.stderr);
        return Err(format!("{python}: {}", err.lines().last().unwrap_or("failed")));
    }
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).map_err(|e| e.to_string())?;
    v["seconds_per_path"].as_f64().ok_or_else(|| "no seconds_per_path in its output".into())
}

/// Median seconds of a whole path (with the books) over `calls` calls.
fn whole_path_seconds(setup: &Setup, worker: &mut Worker, p: &mut u64, calls: usize) -> f64 {
    let mut t: Vec<f64> = (0..calls)
        .map(|_| {
            *p += 1;
            let start = std::time::Instant::now();
            black_box(worker.run_path(setup, *p));
            start.elapsed().as_secs_f64()
        })
        .collect();
    t.sort_by(f64::total_cmp);
    t[t.len() / 2]
}

/// lagfold's whole path against the NumPy script's, timed back to back:
/// lagfold's before and after the script, averaged.
fn numpy_report(setup: &Setup) {
    let (mut worker, mut p) = (Worker::new(&setup.scenario), 1_000u64);
    let before = whole_path_seconds(setup, &mut worker, &mut p, 200);
    match numpy_path(setup) {
        Ok(numpy) => {
            let after = whole_path_seconds(setup, &mut worker, &mut p, 200);
            let ours = 0.5 * (before + after);
            println!(
                "speed  whole path with the books, one thread: {:.2} ms; benches/numpy_path.py {:.2} ms → {:.1}× (target ≥ 5×)",
                ours * 1e3,
                numpy * 1e3,
                numpy / ours
            );
        }
        Err(why) => println!("speed  NumPy comparison skipped ({why}); run scripts/check-python first"),
    }
}

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
    numpy_report(setup);
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

/// Student-t draws by the ziggurat against normal draws and against
/// rand_distr's normal-over-root-gamma `StudentT`, 120,000 of each.
fn student_t_report() {
    let dof = 6.0;
    let law = StudentTZiggurat::new(dof);
    let reference = rand_distr::StudentT::new(dof).expect("dof > 0");
    let (mut r1, mut r2) = (path_rng(1, 0), path_rng(2, 0));
    let (mut a, mut b) = (vec![0.0; 120_000], vec![0.0; 120_000]);
    let (t, normal) = common::interleaved(
        20,
        || law.fill(&mut r1, 1.0, black_box(&mut a)),
        || fill_normal(&mut r2, black_box(&mut b)),
    );
    let (_, gamma) = common::interleaved(
        20,
        || law.fill(&mut r1, 1.0, black_box(&mut a)),
        || b.iter_mut().for_each(|x| *x = r2.sample(reference)),
    );
    let ns = |s: f64| s * 1e9 / 120_000.0;
    println!(
        "ratio  Student t draw (ziggurat, ν = {dof}) / normal draw = {:.2}  ({:.2} ns vs {:.2} ns; rand_distr's \
         StudentT {:.2} ns, {:.1}× slower than the ziggurat)",
        t / normal,
        ns(t),
        ns(normal),
        ns(gamma),
        gamma / t
    );
}

/// The band of products `⟨a_t, b_{t+d}⟩` one measured path needs (`T = 120`
/// dates of `N = 1000` assets, `L = 24` lags), by `banded_products` (fixed
/// order on every CPU) against a general matrix multiply of blocks of 16 rows
/// (`matrixmultiply::dgemm`, which picks a kernel by CPU and computes the
/// products off the band too): the way it was done before.
fn banded_report() {
    let (n, t, w) = (1000, 120, 24);
    let mut rng = path_rng(3, 0);
    let (mut a, mut b) = (vec![0.0; n * t], vec![0.0; n * t]);
    fill_normal(&mut rng, &mut a);
    fill_normal(&mut rng, &mut b);
    let (mut one, mut two, mut tmp) = (Vec::new(), Vec::new(), Vec::new());
    let (ours, gemm) = common::interleaved(
        20,
        || lagfold::measure::banded_products(black_box(&a), &b, n, w, &mut one),
        || gemm_band(black_box(&a), &b, n, w, &mut tmp, &mut two),
    );
    let worst = one.iter().zip(&two).map(|(x, y)| (x - y).abs()).fold(0.0, f64::max);
    println!(
        "ratio  banded products (fixed order) / matrix-multiply blocks = {:.2}  ({:.0} µs vs {:.0} µs; largest \
         difference {worst:.1e})",
        ours / gemm,
        ours * 1e6,
        gemm * 1e6
    );
}

/// The band through `dgemm` on blocks of 16 rows of `a` (the former way).
fn gemm_band(a: &[f64], b: &[f64], n: usize, w: usize, tmp: &mut Vec<f64>, out: &mut Vec<f64>) {
    const BLOCK: usize = 16;
    let (rows_a, rows_b) = (a.len() / n, b.len() / n);
    out.clear();
    out.resize(rows_a * w, 0.0);
    let mut t0 = 0;
    while t0 < rows_a && t0 < rows_b {
        let m = BLOCK.min(rows_a - t0);
        let c1 = (t0 + m + w - 1).min(rows_b);
        let cols = c1 - t0;
        tmp.resize(m * cols, 0.0);
        // SAFETY: a rows t0..t0+m and b rows t0..c1 are in bounds; tmp holds m × cols.
        unsafe {
            matrixmultiply::dgemm(
                m,
                n,
                cols,
                1.0,
                a.as_ptr().add(t0 * n),
                n as isize,
                1,
                b.as_ptr().add(t0 * n),
                1,
                n as isize,
                0.0,
                tmp.as_mut_ptr(),
                cols as isize,
                1,
            );
        }
        for i in 0..m {
            for d in 0..w.min(cols.saturating_sub(i)) {
                out[(t0 + i) * w + d] = tmp[i * cols + i + d];
            }
        }
        t0 += m;
    }
}

/// Every preset at the bench's size against the default (exponential) preset.
fn presets_report(default: &Setup) {
    student_t_report();
    banded_report();
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
