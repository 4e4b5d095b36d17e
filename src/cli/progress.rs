//! The progress bar: on stderr, hidden when stderr is not a terminal or with `--quiet`.

use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};
use std::io::IsTerminal;

/// A bar over `total` paths.
pub fn bar(total: usize, quiet: bool) -> ProgressBar {
    if quiet || !std::io::stderr().is_terminal() {
        return ProgressBar::hidden();
    }
    let pb = ProgressBar::with_draw_target(Some(total as u64), ProgressDrawTarget::stderr());
    pb.set_style(
        ProgressStyle::with_template(
            "{spinner} paths {pos}/{len} [{bar:30}] {per_sec} · {elapsed} elapsed · {eta} left",
        )
        .expect("valid template")
        .progress_chars("=> "),
    );
    pb
}
