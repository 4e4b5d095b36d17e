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

/// Progress bars for the stages of an [`api`](crate::api) operation, and
/// its notes as warnings; nothing with `--quiet`.
pub struct Bars {
    quiet: bool,
    current: std::sync::Mutex<ProgressBar>,
}

impl Bars {
    /// Bars on stderr unless `quiet`.
    pub fn new(quiet: bool) -> Self {
        Self { quiet, current: std::sync::Mutex::new(ProgressBar::hidden()) }
    }

    fn with(&self, f: impl FnOnce(&mut ProgressBar)) {
        if let Ok(mut b) = self.current.lock() {
            f(&mut b);
        }
    }
}

impl crate::api::Progress for Bars {
    fn begin(&self, stage: &str, total: usize) {
        let bar = bar(total, self.quiet, stage);
        self.with(|b| *b = bar);
    }

    fn advance(&self, done: usize) {
        self.with(|b| b.set_position(done as u64));
    }

    fn end(&self) {
        self.with(|b| b.finish_and_clear());
    }

    fn note(&self, text: &str) {
        if !self.quiet {
            super::warn(text);
        }
    }
}
