//! `lagfold panel <scenario>`: one simulated history written as a long CSV in
//! the input format, for demos and for testing a pipeline.

use super::run::read_scenario;
use super::{Failure, print};
use crate::api;
use crate::scenario::Overrides;
use std::path::{Path, PathBuf};

/// Options of `panel`.
#[derive(Debug, clap::Args)]
pub struct PanelArgs {
    /// Scenario file (TOML), or the name of a built-in preset.
    pub scenario: PathBuf,
    /// Output file, `-` for standard output (default:
    /// lagfold-out/<scenario name>-panel.csv); only a plain file is replaced.
    #[arg(long)]
    pub out: Option<PathBuf>,
    /// Breadth N.
    #[arg(long, value_parser = super::whole)]
    pub assets: Option<usize>,
    /// Dates in the history.
    #[arg(long, value_parser = super::whole)]
    pub history: Option<usize>,
    /// Master seed.
    #[arg(long, value_parser = super::seed)]
    pub seed: Option<u64>,
    /// Which simulated history of the study to write (its path index).
    #[arg(long, default_value_t = 0)]
    pub path: u64,
    /// Print nothing.
    #[arg(long, short)]
    pub quiet: bool,
}

/// `lagfold panel`.
pub fn run(a: &PanelArgs) -> Result<(), Failure> {
    let ov = Overrides { assets: a.assets, history: a.history, seed: a.seed, ..Overrides::default() };
    let (scenario, origin) = read_scenario(&a.scenario, &ov)?;
    let out = a.out.clone().unwrap_or_else(|| Path::new("lagfold-out").join(format!("{}-panel.csv", scenario.name)));
    // The destination is checked, and its temporary file created, before any work.
    let target = if out.as_os_str() == "-" { None } else { Some(Target::claim(&out).map_err(Failure::input)?) };
    let sim = api::simulate_panel(&scenario, &origin, a.path)?;
    let Some(target) = target else {
        let stdout = std::io::stdout().lock();
        return match sim.write_csv(std::io::BufWriter::new(stdout)) {
            Err(e) if matches!(e.kind(), csv::ErrorKind::Io(io) if io.kind() == std::io::ErrorKind::BrokenPipe) => {
                Ok(())
            }
            r => r.map_err(|e| Failure::other(format!("standard output: {e}"))),
        };
    };
    let file = target.file.try_clone().map_err(|e| Failure::other(format!("{}: {e}", target.tmp.display())))?;
    sim.write_csv(std::io::BufWriter::new(file))
        .and_then(|()| target.file.sync_all().map_err(csv::Error::from))
        .map_err(|e| Failure::other(format!("{}: {e}", target.tmp.display())))?;
    target.finish()?;
    if !a.quiet {
        print(&format!(
            "Wrote {} ({} dates × {} assets, history {} of seed {}): date, asset, forecast, forward return over the period starting at the date.\n",
            out.display(),
            sim.dates.len(),
            sim.panel.assets,
            a.path,
            sim.seed
        ))?;
    }
    Ok(())
}

/// A plain-file destination with its temporary sibling, removed unless finished.
struct Target {
    out: PathBuf,
    tmp: PathBuf,
    file: std::fs::File,
    done: bool,
}

impl Target {
    /// Refuses anything but a plain file or a new name; creates the temporary file.
    fn claim(out: &Path) -> Result<Self, String> {
        if let Ok(m) = std::fs::symlink_metadata(out) {
            let t = m.file_type();
            let what = if t.is_symlink() {
                Some("a symbolic link")
            } else if t.is_dir() {
                Some("a folder")
            } else if !t.is_file() {
                Some("a named pipe, socket or device")
            } else {
                None
            };
            if let Some(what) = what {
                return Err(format!(
                    "--out {}: that is {what}; panel replaces only a plain file (use `--out -` for standard output)",
                    out.display()
                ));
            }
        }
        let dir = out.parent().filter(|p| !p.as_os_str().is_empty()).unwrap_or(Path::new("."));
        std::fs::create_dir_all(dir)
            .map_err(|e| format!("--out {}: cannot create {}: {e}", out.display(), dir.display()))?;
        let name = out.file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_else(|| "panel.csv".into());
        let tmp = dir.join(format!(".{name}.tmp-{}", std::process::id()));
        let file = std::fs::File::create(&tmp)
            .map_err(|e| format!("--out {}: cannot write in {}: {e}", out.display(), dir.display()))?;
        Ok(Self { out: out.to_path_buf(), tmp, file, done: false })
    }

    /// Renames the temporary file into place.
    fn finish(mut self) -> Result<(), Failure> {
        std::fs::rename(&self.tmp, &self.out).map_err(|e| Failure::other(format!("{}: {e}", self.out.display())))?;
        self.done = true;
        Ok(())
    }
}

impl Drop for Target {
    fn drop(&mut self) {
        if !self.done {
            let _ = std::fs::remove_file(&self.tmp);
        }
    }
}
