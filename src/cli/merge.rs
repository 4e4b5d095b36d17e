//! `lagfold merge PARTS… --out DIR`: shards' partial results added into the
//! single run's outputs.

use super::{Failure, progress};
use crate::{api, report};
use std::path::{Path, PathBuf};

/// Options of `merge`.
#[derive(Debug, clap::Args)]
pub struct MergeArgs {
    /// Every shard's output folder (or its part.json), each once.
    #[arg(required = true, value_name = "PARTS")]
    pub parts: Vec<PathBuf>,
    /// Output folder for the merged results.
    #[arg(long)]
    pub out: PathBuf,
    /// Worker threads for the reference simulation (default: all cores).
    #[arg(long, value_parser = clap::value_parser!(u16).range(1..=1024))]
    pub threads: Option<u16>,
    /// No progress bar and no summary on the terminal.
    #[arg(long, short)]
    pub quiet: bool,
    /// Skip the charts (the report then has no pictures).
    #[arg(long)]
    pub no_charts: bool,
}

/// A part's bytes: `path` itself, or `path/part.json` for a folder.
fn read(path: &Path) -> Result<(String, Vec<u8>), Failure> {
    let file = if path.is_dir() { path.join(api::PART_FILE) } else { path.to_path_buf() };
    let bytes = std::fs::read(&file).map_err(|e| {
        Failure::input(format!("{}: cannot read a shard's part ({e}); give each shard's output folder", file.display()))
    })?;
    Ok((file.display().to_string(), bytes))
}

/// `lagfold merge`.
pub fn run(a: &MergeArgs) -> Result<(), Failure> {
    let parts = a.parts.iter().map(|p| read(p)).collect::<Result<Vec<_>, _>>()?;
    let out = report::OutDir::claim(&a.out).map_err(Failure::input)?;
    let threads = a.threads.map_or(0, usize::from);
    let merged = api::merge(&parts, threads, &progress::Bars::new(a.quiet))?;
    super::deliver(&merged, out, &a.out, a.no_charts, a.quiet)
}
