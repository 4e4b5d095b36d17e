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
        ProgressStyle::with_template("{spinner} {prefix} {pos}/{len} paths [{bar:25}] {rate} · {elapsed} · {eta} left")
            .expect("valid template")
            .with_key("rate", |s: &ProgressState, w: &mut dyn std::fmt::Write| {
                let _ = write!(w, "{:.0} paths/s", s.per_sec());
            })
            .progress_chars("=> "),
    );
    pb.set_prefix(what.to_string());
    pb
}
