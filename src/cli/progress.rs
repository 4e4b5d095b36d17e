//! The progress bar: on stderr, hidden when stderr is not a terminal or with `--quiet`.

use indicatif::{ProgressBar, ProgressDrawTarget, ProgressState, ProgressStyle};
use std::io::IsTerminal;

/// A bar over `total` paths of the phase `what`.
pub fn bar(total: usize, quiet: bool, what: &str) -> ProgressBar {
    if quiet || !std::io::stderr().is_terminal() {
        return ProgressBar::hidden();
    }
    let pb = ProgressBar::with_draw_target(Some(total as u64), ProgressDrawTarget::stderr());
    pb.set_style(
        ProgressStyle::with_template("{spinner} {prefix} {pos}/{len} [{wide_bar}] {rate} · {eta} left")
            .expect("valid template")
            .with_key("rate", |s: &ProgressState, w: &mut dyn std::fmt::Write| {
                let _ = write!(w, "{:.0} paths/s", s.per_sec());
            })
            .progress_chars("=> "),
    );
    pb.set_prefix(what.to_string());
    pb
}

/// Nanoseconds per simulated asset-date on one core, all stages (generate,
/// measure, the three rules, the books): `cargo bench --bench path` measures
/// 1.75–1.93 ms for the core path and 0.38 ms for the books of one history of
/// 1,000 assets × 120 dates on the development machine, about 19 ns each.
pub const NS_PER_ASSET_DATE: f64 = 19.0;

/// The expected wall time of simulating `asset_dates` asset-dates (`what`
/// says of what) on `threads` threads, in words, when it is over a minute.
pub fn long_work(asset_dates: f64, what: &str, threads: usize) -> Option<String> {
    let secs = asset_dates * NS_PER_ASSET_DATE * 1e-9 / threads.max(1) as f64;
    if secs < 60.0 {
        return None;
    }
    let time =
        if secs < 5400.0 { format!("{:.0} minutes", secs / 60.0) } else { format!("{:.1} hours", secs / 3600.0) };
    Some(format!(
        "note: this simulates {what}: about {time} on {threads} thread{} (a rough guide from the benches); \
         fewer paths or reference_paths make it shorter",
        if threads == 1 { "" } else { "s" }
    ))
}

/// Prints [`long_work`]'s note on stderr unless `quiet`.
pub fn warn_long(asset_dates: f64, what: &str, threads: usize, quiet: bool) {
    if let Some(note) = long_work(asset_dates, what, threads)
        && !quiet
    {
        super::warn(&note);
    }
}

#[cfg(test)]
mod tests {
    use super::long_work;

    #[test]
    fn long_work_is_announced_with_its_size() {
        // The demo: 3,000 histories of 1,000 × 120 on two threads, about 3.4 s.
        assert_eq!(long_work(3000.0 * 1000.0 * 120.0, "demo", 2), None);
        // 10^5 reference histories of the demo: 1.2e10 asset-dates × 19 ns / 2 ≈ 2 minutes.
        let note = long_work(1e5 * 1000.0 * 120.0, "x", 2).unwrap();
        assert!(note.contains("this simulates x: about 2 minutes on 2 threads"), "{note}");
        assert!(long_work(1e6 * 5000.0 * 1000.0, "x", 1).unwrap().contains("hours"));
    }
}
