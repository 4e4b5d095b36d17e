//! `lagfold measure` on a large panel, as a user runs it: 3,000 assets ×
//! 2,500 dates (7.5 M rows of CSV), once without and once with the
//! calibrated study, and once with three signals and neutralisation on two
//! numeric columns (the ratio of its time to the one-signal run is printed).
//! Prints the wall time and the peak resident memory of each run (that child
//! process's maximum RSS, from `wait4`).
//!
//! `cargo bench --bench measure`

use std::io::{BufRead, BufWriter, Write};
use std::process::Command;
use std::time::Instant;

/// Runs `cmd` to its end; returns whether it succeeded and its peak resident memory in bytes.
#[allow(clippy::zombie_processes)] // reaped by wait4 below, which also gives its rusage
fn run_measured(cmd: &mut Command) -> (bool, u64) {
    let child = cmd.spawn().unwrap();
    let (mut status, mut usage): (libc::c_int, libc::rusage) = (0, unsafe { std::mem::zeroed() });
    // SAFETY: waits for our own child, writing its status and rusage into values we own.
    let pid = unsafe { libc::wait4(child.id() as libc::pid_t, &mut status, 0, &mut usage) };
    assert_eq!(pid, child.id() as libc::pid_t);
    (libc::WIFEXITED(status) && libc::WEXITSTATUS(status) == 0, usage.ru_maxrss as u64 * 1024)
}

fn main() {
    let bin = env!("CARGO_BIN_EXE_lagfold");
    let dir = tempfile::tempdir().unwrap();
    let csv = dir.path().join("large.csv");
    let t = Instant::now();
    let ok = Command::new(bin)
        .args(["panel", "monthly-steady", "--assets", "3000", "--history", "2500", "-q", "--out"])
        .arg(&csv)
        .status()
        .unwrap();
    assert!(ok.success());
    let mb = std::fs::metadata(&csv).unwrap().len() as f64 / 1e6;
    println!("panel: 3,000 assets × 2,500 dates, {mb:.0} MB of CSV written in {:.1} s", t.elapsed().as_secs_f64());
    let wide = dir.path().join("wide.csv");
    add_columns(&csv, &wide);
    let three = ["--forecast-column", "forecast,slow,noise", "--neutralize", "size,beta", "--no-study"];
    let mut one_signal = f64::NAN;
    for (label, file, extra) in [
        ("without the calibrated study", &csv, vec!["--no-study"]),
        ("with three signals and neutralisation on size, beta", &wide, three.to_vec()),
        ("with the calibrated study", &csv, vec![]),
    ] {
        let t = Instant::now();
        let (ok, peak) = run_measured(
            Command::new(bin).arg("measure").arg(file).args(["-q", "--out"]).arg(dir.path().join("out")).args(&extra),
        );
        assert!(ok);
        let secs = t.elapsed().as_secs_f64();
        let ratio = if one_signal.is_nan() {
            one_signal = secs;
            String::new()
        } else {
            format!(" ({:.2}× the one-signal run)", secs / one_signal)
        };
        println!("measure {label}: {secs:.1} s{ratio}, peak memory {:.0} MB", peak as f64 / 1e6);
    }
}

/// Copies `from` to `to` with four invented columns: a slower signal, a pure
/// noise signal, and two exposures (size, beta), from a xorshift stream.
fn add_columns(from: &std::path::Path, to: &std::path::Path) {
    let mut x = 0x2545_f491_4f6c_dd1d_u64;
    let mut u = move || {
        x ^= x << 13;
        x ^= x >> 7;
        x ^= x << 17;
        (x >> 11) as f64 / (1u64 << 53) as f64 - 0.5
    };
    let mut out = BufWriter::new(std::fs::File::create(to).unwrap());
    let mut lines = std::io::BufReader::new(std::fs::File::open(from).unwrap()).lines();
    writeln!(out, "{},slow,noise,size,beta", lines.next().unwrap().unwrap()).unwrap();
    for line in lines {
        let line = line.unwrap();
        let f: f64 = line.split(',').nth(2).and_then(|v| v.parse().ok()).unwrap_or(0.0);
        writeln!(out, "{line},{:.6},{:.6},{:.6},{:.6}", 0.5 * f + u(), u(), u(), 1.0 + u()).unwrap();
    }
    out.flush().unwrap();
}
