//! Output folders that are replaced whole, never half.
//!
//! [`OutDir::claim`] runs before any work: it checks that the target is a
//! folder (or absent) with no subfolders, that its parent can be written, and takes a
//! lock (`flock` on a sibling `.<name>.lock`, released by the kernel if the
//! process dies) so a second writer fails at once. Leftover staging folders
//! of an earlier run that was killed are removed then. [`OutDir::commit`]
//! writes every file into a sibling staging folder, syncs it, and swaps it
//! with the target in one `renameat2(RENAME_EXCHANGE)` (two renames where the
//! file system cannot exchange), then removes the old folder. A failure at
//! any point leaves the old folder as it was and removes the staging folder;
//! a kill leaves either the old or the new folder whole, and the next run
//! removes what the killed one left beside it.
//!
//! Files a user put in the folder are kept: each run lists what it wrote in
//! `.lagfold-output`, and the next run carries every other file over into
//! the new folder (as a hard link, so nothing is copied). Files an earlier
//! run wrote and this one does not (charts after `--no-charts`, say) are not
//! carried over, so no output of one run sits beside another's.
//!
//! `LAGFOLD_TEST_PAUSE=staged` or `=swapped` makes the process print
//! `paused at <stage>` to standard error and sleep for a minute at that
//! point, so tests can kill it there.

use std::fs::File;
use std::io::Write;
use std::os::unix::ffi::OsStrExt;
use std::os::unix::io::AsRawFd;
use std::path::{Path, PathBuf};

/// The file that marks a folder as lagfold's output.
pub const MARKER: &str = ".lagfold-output";

/// A claimed output folder: checked, locked, ready to be replaced.
#[derive(Debug)]
pub struct OutDir {
    dir: PathBuf,
    lock_path: PathBuf,
    _lock: File,
}

/// `dir`'s parent (`.` for a bare name) and its file name.
fn parent_and_name(dir: &Path) -> Result<(PathBuf, String), String> {
    let name = dir
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .filter(|n| n != "." && n != "..")
        .ok_or_else(|| format!("--out {}: name a folder (not `.`, `..` or `/`)", dir.display()))?;
    let parent = dir.parent().filter(|p| !p.as_os_str().is_empty()).unwrap_or(Path::new(".")).to_path_buf();
    Ok((parent, name))
}

/// Sleeps at `stage` when the test hook asks for it.
fn pause(stage: &str) {
    if std::env::var("LAGFOLD_TEST_PAUSE").is_ok_and(|s| s == stage) {
        eprintln!("paused at {stage}");
        std::thread::sleep(std::time::Duration::from_secs(60));
    }
}

/// Swaps two paths atomically; `false` when the file system cannot.
fn exchange(a: &Path, b: &Path) -> std::io::Result<bool> {
    let c = |p: &Path| std::ffi::CString::new(p.as_os_str().as_bytes()).map_err(std::io::Error::other);
    let (ca, cb) = (c(a)?, c(b)?);
    // SAFETY: two valid NUL-terminated paths, relative to the working directory.
    let rc =
        unsafe { libc::renameat2(libc::AT_FDCWD, ca.as_ptr(), libc::AT_FDCWD, cb.as_ptr(), libc::RENAME_EXCHANGE) };
    if rc == 0 {
        return Ok(true);
    }
    let e = std::io::Error::last_os_error();
    match e.raw_os_error() {
        Some(libc::EINVAL | libc::ENOSYS | libc::ENOTSUP) => Ok(false),
        _ => Err(e),
    }
}

impl OutDir {
    /// Checks and locks `dir` before any work.
    ///
    /// # Errors
    /// A message naming the folder and what to do: it is a file, a folder
    /// lagfold did not write, unwritable, or locked by another run.
    pub fn claim(dir: &Path) -> Result<Self, String> {
        let (parent, name) = parent_and_name(dir)?;
        match std::fs::symlink_metadata(dir) {
            Ok(m) if m.is_dir() => {
                let entries = std::fs::read_dir(dir).map_err(|e| format!("--out {}: {e}", dir.display()))?;
                if let Some(sub) = entries.flatten().find(|e| e.file_type().is_ok_and(|t| t.is_dir())) {
                    return Err(format!(
                        "--out {}: the folder holds a folder ({}) that lagfold did not write; lagfold replaces \
                         its output folder whole, keeping only plain files, so name a new folder",
                        dir.display(),
                        sub.file_name().to_string_lossy()
                    ));
                }
            }
            Ok(_) => {
                return Err(format!(
                    "--out {}: there is a file (or link) of that name; lagfold writes a folder there, so name a \
                     new folder or remove the file",
                    dir.display()
                ));
            }
            Err(_) => {}
        }
        std::fs::create_dir_all(&parent)
            .map_err(|e| format!("--out {}: cannot create {}: {e}", dir.display(), parent.display()))?;
        let lock_path = parent.join(format!(".{name}.lock"));
        let lock = std::fs::OpenOptions::new()
            .create(true)
            .truncate(false)
            .write(true)
            .open(&lock_path)
            .map_err(|e| format!("--out {}: cannot write in {}: {e}", dir.display(), parent.display()))?;
        // SAFETY: flock on a descriptor we own.
        if unsafe { libc::flock(lock.as_raw_fd(), libc::LOCK_EX | libc::LOCK_NB) } != 0 {
            return Err(format!(
                "--out {}: another lagfold run is writing this folder right now; wait for it to finish or name \
                 another folder",
                dir.display()
            ));
        }
        // Holding the lock, anything staged for this name is a killed run's.
        let stale = format!(".{name}.staging-");
        if let Ok(entries) = std::fs::read_dir(&parent) {
            for e in entries.flatten() {
                if e.file_name().to_string_lossy().starts_with(&stale) {
                    let _ = std::fs::remove_dir_all(e.path());
                }
            }
        }
        Ok(Self { dir: dir.to_path_buf(), lock_path, _lock: lock })
    }

    /// The folder.
    pub fn path(&self) -> &Path {
        &self.dir
    }

    /// Writes `files` into a staging folder and swaps it in for the target.
    ///
    /// # Errors
    /// Any I/O error, naming the file; the old folder is then untouched and
    /// the staging folder removed.
    pub fn commit<N: AsRef<str>>(self, files: &[(N, Vec<u8>)]) -> std::io::Result<()> {
        let (parent, name) = parent_and_name(&self.dir).map_err(std::io::Error::other)?;
        let staging = parent.join(format!(".{name}.staging-{}", std::process::id()));
        let result = self.stage_and_swap(&staging, files);
        let _ = std::fs::remove_dir_all(&staging);
        result
    }

    fn stage_and_swap<N: AsRef<str>>(&self, staging: &Path, files: &[(N, Vec<u8>)]) -> std::io::Result<()> {
        let named = |e: std::io::Error, p: &Path| std::io::Error::new(e.kind(), format!("{}: {e}", p.display()));
        let _ = std::fs::remove_dir_all(staging);
        std::fs::create_dir(staging).map_err(|e| named(e, staging))?;
        let mut listing = String::from("# written by lagfold; the next run replaces these and keeps any other file\n");
        files.iter().for_each(|(n, _)| {
            listing.push_str(n.as_ref());
            listing.push('\n');
        });
        let marker = [(MARKER, listing.into_bytes())];
        for (name, bytes) in files.iter().map(|(n, b)| (n.as_ref(), b)).chain(marker.iter().map(|(n, b)| (*n, b))) {
            let path = staging.join(name);
            let mut f = File::create(&path).map_err(|e| named(e, &path))?;
            f.write_all(bytes).and_then(|()| f.sync_all()).map_err(|e| named(e, &path))?;
        }
        self.carry_over(staging, files).map_err(|e| named(e, &self.dir))?;
        File::open(staging).and_then(|d| d.sync_all()).map_err(|e| named(e, staging))?;
        pause("staged");
        if !self.dir.exists() {
            std::fs::rename(staging, &self.dir).map_err(|e| named(e, &self.dir))?;
        } else if !exchange(staging, &self.dir).map_err(|e| named(e, &self.dir))? {
            // No atomic exchange here: move the old folder aside, then the new one in.
            let aside = staging.with_extension("old");
            std::fs::rename(&self.dir, &aside).map_err(|e| named(e, &self.dir))?;
            if let Err(e) = std::fs::rename(staging, &self.dir) {
                let _ = std::fs::rename(&aside, &self.dir);
                return Err(named(e, &self.dir));
            }
            let _ = std::fs::remove_dir_all(&aside);
        }
        pause("swapped");
        Ok(())
    }
}

impl OutDir {
    /// Hard-links into `staging` every file of the old folder that neither
    /// this run nor the last one wrote.
    fn carry_over<N: AsRef<str>>(&self, staging: &Path, files: &[(N, Vec<u8>)]) -> std::io::Result<()> {
        let Ok(entries) = std::fs::read_dir(&self.dir) else { return Ok(()) };
        let last = std::fs::read_to_string(self.dir.join(MARKER)).unwrap_or_default();
        let ours = |name: &str| {
            // Temporary files of older lagfold versions are dropped too.
            name == MARKER
                || (name.starts_with('.') && name.contains(".tmp-"))
                || files.iter().any(|(n, _)| n.as_ref() == name)
                || last.lines().any(|l| !l.starts_with('#') && l == name)
        };
        for e in entries.flatten() {
            let name = e.file_name();
            if e.file_type().is_ok_and(|t| !t.is_dir()) && !ours(&name.to_string_lossy()) {
                std::fs::hard_link(e.path(), staging.join(&name))
                    .or_else(|_| std::fs::copy(e.path(), staging.join(&name)).map(|_| ()))?;
            }
        }
        Ok(())
    }
}

impl Drop for OutDir {
    fn drop(&mut self) {
        let _ = std::fs::remove_file(&self.lock_path);
    }
}
