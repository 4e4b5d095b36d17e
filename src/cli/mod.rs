//! The command line, apart from the engine: parse options, read the scenario,
//! run, write, report. Exit codes: 0 ok, 1 failure, 2 bad input.

mod measure;
mod merge;
mod panel;
mod plan;
mod presets_cmd;
mod progress;
mod run;
mod stress;

use clap::{Parser, Subcommand};
use std::io::Write;

/// lagfold: how often does the measured horizon-IC peak land on the true best holding horizon?
#[derive(Debug, Parser)]
#[command(name = "lagfold", version, about, long_about = None)]
pub struct Cli {
    /// What to do.
    #[command(subcommand)]
    pub command: Command,
}

/// The subcommands. Negative numbers are read as values, so `--seed -3` is
/// refused with the option's allowed range rather than a tip about `--`.
#[derive(Debug, Subcommand)]
pub enum Command {
    /// Run the study on a scenario file (or a built-in preset name).
    #[command(allow_negative_numbers = true)]
    Run(run::RunArgs),
    /// Run the study on the built-in default scenario.
    #[command(allow_negative_numbers = true)]
    Demo(run::StudyArgs),
    /// How much history is needed: every rule's record over a grid of history lengths.
    #[command(allow_negative_numbers = true)]
    Plan(plan::PlanArgs),
    /// What a choice made under the assumed decay costs when another curve is true.
    #[command(allow_negative_numbers = true)]
    Stress(stress::StressArgs),
    /// Measure your own panel's lagged and horizon ICs and its best horizon.
    #[command(allow_negative_numbers = true)]
    Measure(measure::MeasureArgs),
    /// Add shards' partial results (`--shard K/N`) into the single run's outputs.
    Merge(merge::MergeArgs),
    /// Write one simulated history as a long CSV (date, asset, forecast, return).
    #[command(allow_negative_numbers = true)]
    Panel(panel::PanelArgs),
    /// List the built-in presets, or print one as TOML.
    Presets(presets_cmd::PresetsArgs),
}

/// A count from the command line, refused in plain words: the value
/// found and what is allowed (the option's own range is checked with the
/// scenario, which names it).
pub(crate) fn whole(s: &str) -> Result<usize, String> {
    let t = s.trim();
    t.parse::<usize>().map_err(|_| match t.parse::<f64>() {
        Ok(v) if v < 0.0 => format!("`{t}` is negative; use a positive whole number such as 400"),
        Ok(_) => format!("`{t}` is not a whole number; use a positive whole number such as 400"),
        Err(_) => format!("`{t}` is not a number; use a positive whole number such as 400"),
    })
}

/// A number from the command line (its range is checked with the scenario).
pub(crate) fn number(s: &str) -> Result<f64, String> {
    s.trim().parse::<f64>().map_err(|_| format!("`{}` is not a number; use a decimal such as 0.04", s.trim()))
}

/// A seed: a whole number from 0 to 18446744073709551615 (2^64 − 1).
pub(crate) fn seed(s: &str) -> Result<u64, String> {
    s.trim()
        .parse::<u64>()
        .map_err(|_| format!("`{}`: a seed is a whole number from 0 to 18446744073709551615", s.trim()))
}

/// A command's failure with its exit code.
#[derive(Debug)]
pub struct Failure {
    /// 1 for failures, 2 for bad input.
    pub code: i32,
    /// What to tell the user.
    pub message: String,
}

impl Failure {
    /// Bad input (exit code 2).
    pub fn input(e: impl std::fmt::Display) -> Self {
        Self { code: 2, message: e.to_string() }
    }

    /// Anything else (exit code 1).
    pub fn other(e: impl std::fmt::Display) -> Self {
        Self { code: 1, message: e.to_string() }
    }
}

impl From<crate::api::Error> for Failure {
    fn from(e: crate::api::Error) -> Self {
        match e {
            crate::api::Error::Input(m) => Self { code: 2, message: m },
            crate::api::Error::Failure(m) => Self { code: 1, message: m },
        }
    }
}

/// The width to fit text to on `term`, at most
/// [`MAX_PROSE`](crate::report::text::MAX_PROSE): `COLUMNS` when set, else
/// the terminal's width; `None` (lines kept whole, for `grep`) when the
/// output goes to a file or a pipe.
pub(crate) fn columns(fd: i32) -> Option<usize> {
    let set = std::env::var("COLUMNS").ok().and_then(|c| c.trim().parse::<usize>().ok()).filter(|&c| c >= 20);
    set.or_else(|| terminal_width(fd)).map(|c| c.min(crate::report::text::MAX_PROSE))
}

/// The width of the terminal on file descriptor `fd` (`TIOCGWINSZ`), if it is one.
fn terminal_width(fd: i32) -> Option<usize> {
    // SAFETY: `TIOCGWINSZ` writes one `winsize` into the struct we own; on
    // anything but a terminal it fails and the struct is not read.
    let mut size: libc::winsize = unsafe { std::mem::zeroed() };
    let ok = unsafe { libc::ioctl(fd, libc::TIOCGWINSZ, &mut size) } == 0;
    (ok && size.ws_col >= 20).then_some(usize::from(size.ws_col))
}

/// `text` fitted to the width of the terminal on `fd` (see [`columns`]).
pub(crate) fn fitted(text: &str, fd: i32) -> String {
    columns(fd).map_or_else(|| text.to_string(), |w| crate::report::text::fit(text, w))
}

/// A warning or note on stderr, fitted to the terminal.
pub(crate) fn warn(text: &str) {
    eprint!("{}", fitted(&format!("{text}\n"), libc::STDERR_FILENO));
}

/// Writes to stdout, fitted to the terminal; a closed pipe
/// (`lagfold … | head`) is not an error.
pub(crate) fn print(text: &str) -> Result<(), Failure> {
    let text = fitted(text, libc::STDOUT_FILENO);
    let mut out = std::io::stdout().lock();
    match out.write_all(text.as_bytes()).and_then(|()| out.flush()) {
        Err(e) if e.kind() != std::io::ErrorKind::BrokenPipe => Err(Failure::other(e)),
        _ => Ok(()),
    }
}

/// Writes an outcome's files into the claimed folder `out` (at `dir`),
/// charts unless `no_charts`, and unless `quiet` prints its summary and the
/// closing line naming what was written.
pub(crate) fn deliver(
    outcome: &impl crate::api::Outcome,
    out: crate::report::OutDir,
    dir: &std::path::Path,
    no_charts: bool,
    quiet: bool,
) -> Result<(), Failure> {
    let files = outcome.files(!no_charts, &crate::report::Made::now())?;
    out.commit(&files).map_err(Failure::other)?;
    if !quiet {
        let mut text = outcome.terminal();
        text.push_str(&outputs_line(dir, &files));
        print(&text)?;
    }
    Ok(())
}

/// The closing line naming what was written: data files, then how many charts.
pub(crate) fn outputs_line(dir: &std::path::Path, files: &[(String, Vec<u8>)]) -> String {
    let data: Vec<&str> =
        files.iter().map(|(n, _)| n.as_str()).filter(|n| !n.ends_with(".png") && !n.ends_with(".svg")).collect();
    let charts = files.iter().filter(|(n, _)| n.ends_with(".png")).count();
    let drawn = match charts {
        0 => String::new(),
        1 => "; 1 chart as .png and .svg".to_string(),
        n => format!("; {n} charts as .png and .svg"),
    };
    format!("\nOutputs: {} ({}{drawn})\n", dir.display(), data.join(", "))
}

/// Parses the arguments, runs the command and returns the exit code.
pub fn main() -> i32 {
    let cli = Cli::parse();
    let result = match cli.command {
        Command::Run(a) => run::run(&a),
        Command::Demo(a) => run::demo(&a),
        Command::Plan(a) => plan::run(&a),
        Command::Stress(a) => stress::run(&a),
        Command::Measure(a) => measure::run(&a),
        Command::Merge(a) => merge::run(&a),
        Command::Panel(a) => panel::run(&a),
        Command::Presets(a) => presets_cmd::run(&a),
    };
    match result {
        Ok(()) => 0,
        Err(f) => {
            warn(&format!("lagfold: {}", f.message));
            f.code
        }
    }
}

#[cfg(test)]
mod tests {
    #[test]
    fn clap_definition_is_consistent() {
        use clap::CommandFactory;
        super::Cli::command().debug_assert();
    }
}
