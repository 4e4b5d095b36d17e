//! `lagfold measure` on a large panel, as a user runs it: 3,000 assets ×
//! 2,500 dates (7.5 M rows of CSV), once without and once with the
//! calibrated study. Prints the wall time and the peak resident memory of
//! each run (that child process's maximum RSS, from `wait4`).
//!
//! `cargo bench --bench measure`

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
    for (label, extra) in [("without the calibrated study", vec!["--no-study"]), ("with the calibrated study", vec![])]
    {
        let t = Instant::now();
        let (ok, peak) = run_measured(
            Command::new(bin).arg("measure").arg(&csv).args(["-q", "--out"]).arg(dir.path().join("out")).args(&extra),
        );
        assert!(ok);
        println!("measure {label}: {:.1} s, peak memory {:.0} MB", t.elapsed().as_secs_f64(), peak as f64 / 1e6);
    }
}
