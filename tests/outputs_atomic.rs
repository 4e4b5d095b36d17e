//! Output folders are replaced whole or not at all: a kill at each stage, a
//! second writer, a full disk and a read-only place; `panel --out` replaces
//! only plain files; `-` is standard output for `panel` and standard input
//! for `measure`.

use assert_cmd::Command;
use std::io::{BufRead, BufReader};
use std::path::Path;
use std::process::Stdio;
use std::time::{Duration, Instant};

fn bin() -> std::process::Command {
    std::process::Command::new(assert_cmd::cargo::cargo_bin("lagfold"))
}

/// A quick study into `out` with `paths` histories.
fn run(out: &Path, paths: &str) -> assert_cmd::assert::Assert {
    Command::cargo_bin("lagfold")
        .unwrap()
        .args(["run", "monthly-steady", "--assets", "50", "--history", "40", "--horizons", "6", "--paths", paths])
        .args(["-q", "--no-charts", "--out"])
        .arg(out)
        .assert()
}

fn paths_in(out: &Path) -> u64 {
    let v: serde_json::Value = serde_json::from_slice(&std::fs::read(out.join("summary.json")).unwrap()).unwrap();
    v["study"]["paths"].as_u64().unwrap()
}

/// Starts a run that pauses at `stage`; returns once it has paused there.
fn paused(out: &Path, paths: &str, stage: &str) -> std::process::Child {
    let mut child = bin()
        .args(["run", "monthly-steady", "--assets", "50", "--history", "40", "--horizons", "6", "--paths", paths])
        .args(["-q", "--no-charts", "--out"])
        .arg(out)
        .env("LAGFOLD_TEST_PAUSE", stage)
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    let mut line = String::new();
    BufReader::new(child.stderr.as_mut().unwrap()).read_line(&mut line).unwrap();
    assert_eq!(line.trim(), format!("paused at {stage}"));
    child
}

fn leftovers(parent: &Path) -> Vec<String> {
    std::fs::read_dir(parent)
        .unwrap()
        .flatten()
        .map(|e| e.file_name().to_string_lossy().into_owned())
        .filter(|n| n.starts_with('.'))
        .collect()
}

#[test]
fn a_kill_at_either_stage_leaves_one_whole_folder_and_the_next_run_cleans_up() {
    let tmp = tempfile::tempdir().unwrap();
    let out = tmp.path().join("out");
    run(&out, "20").success();
    // Killed with everything staged but nothing swapped: the old folder stands.
    let mut child = paused(&out, "30", "staged");
    child.kill().unwrap();
    child.wait().unwrap();
    assert_eq!(paths_in(&out), 20);
    assert!(leftovers(tmp.path()).iter().any(|n| n.starts_with(".out.staging-")));
    // Killed just after the swap: the new folder stands whole.
    let mut child = paused(&out, "30", "swapped");
    child.kill().unwrap();
    child.wait().unwrap();
    assert_eq!(paths_in(&out), 30);
    // The next run removes what the killed ones left.
    run(&out, "40").success();
    assert_eq!(paths_in(&out), 40);
    assert_eq!(leftovers(tmp.path()), Vec::<String>::new());
}

#[test]
fn a_second_writer_fails_at_once() {
    let tmp = tempfile::tempdir().unwrap();
    let out = tmp.path().join("out");
    let mut first = paused(&out, "20", "staged");
    let t = Instant::now();
    let a = run(&out, "20").code(2);
    assert!(t.elapsed() < Duration::from_secs(5));
    let err = String::from_utf8(a.get_output().stderr.clone()).unwrap();
    assert!(err.contains("another lagfold run is writing this folder"), "{err}");
    first.kill().unwrap();
    first.wait().unwrap();
    run(&out, "20").success();
}

#[test]
fn user_files_are_kept_and_a_previous_runs_outputs_are_not() {
    let tmp = tempfile::tempdir().unwrap();
    let out = tmp.path().join("out");
    Command::cargo_bin("lagfold")
        .unwrap()
        .args(["run", "monthly-steady", "--assets", "50", "--history", "40", "--horizons", "6", "--paths", "20"])
        .args(["-q", "--out"])
        .arg(&out)
        .assert()
        .success();
    assert!(out.join("regret.png").exists());
    std::fs::write(out.join("notes.txt"), "mine").unwrap();
    run(&out, "20").success(); // --no-charts: last run's charts must go
    assert!(!out.join("regret.png").exists());
    assert_eq!(std::fs::read_to_string(out.join("notes.txt")).unwrap(), "mine");
    // A folder holding a folder is not lagfold's to replace; a file is not a folder.
    std::fs::create_dir(out.join("sub")).unwrap();
    let err = String::from_utf8(run(&out, "20").code(2).get_output().stderr.clone()).unwrap();
    assert!(err.contains("holds a folder (sub)"), "{err}");
    let err = String::from_utf8(run(&out.join("notes.txt"), "20").code(2).get_output().stderr.clone()).unwrap();
    assert!(err.contains("there is a file"), "{err}");
}

/// Mounts a tmpfs with `opts` at `at`; `false` where this machine does not allow it.
fn mount_tmpfs(at: &Path, opts: &str) -> bool {
    std::fs::create_dir_all(at).unwrap();
    let ok = std::process::Command::new("mount")
        .args(["-t", "tmpfs", "-o", opts, "tmpfs"])
        .arg(at)
        .stderr(Stdio::null())
        .status()
        .is_ok_and(|s| s.success());
    if !ok {
        eprintln!("skipped: cannot mount a tmpfs here (needs root); the check runs where it can");
    }
    ok
}

fn unmount(at: &Path) {
    let _ = std::process::Command::new("umount").arg(at).status();
}

#[test]
fn a_full_disk_fails_cleanly_and_keeps_the_old_folder() {
    let tmp = tempfile::tempdir().unwrap();
    let disk = tmp.path().join("disk");
    if !mount_tmpfs(&disk, "size=64k") {
        return;
    }
    let out = disk.join("out");
    std::fs::create_dir(&out).unwrap();
    std::fs::write(out.join("notes.txt"), "mine").unwrap();
    let a = Command::cargo_bin("lagfold")
        .unwrap()
        .args(["run", "monthly-steady", "--assets", "50", "--history", "40", "--horizons", "6", "--paths", "20"])
        .args(["-q", "--out"])
        .arg(&out)
        .assert()
        .code(1);
    let err = String::from_utf8(a.get_output().stderr.clone()).unwrap();
    let left = leftovers(&disk);
    let kept = std::fs::read_to_string(out.join("notes.txt")).ok();
    unmount(&disk);
    assert!(err.contains("No space left"), "{err}");
    assert_eq!(left, Vec::<String>::new());
    assert_eq!(kept.as_deref(), Some("mine"));
}

#[test]
fn a_read_only_place_is_refused_before_any_work() {
    let tmp = tempfile::tempdir().unwrap();
    let place = tmp.path().join("ro");
    // As root a mode of 555 does not stop writes, so a read-only tmpfs stands in.
    let mounted = mount_tmpfs(&place, "ro,size=64k");
    if !mounted {
        std::fs::create_dir_all(&place).unwrap();
        let mut perms = std::fs::metadata(&place).unwrap().permissions();
        std::os::unix::fs::PermissionsExt::set_mode(&mut perms, 0o555);
        std::fs::set_permissions(&place, perms).unwrap();
    }
    let t = Instant::now();
    let a = Command::cargo_bin("lagfold")
        .unwrap()
        .args(["run", "monthly-steady", "--paths", "4000", "-q", "--out"])
        .arg(place.join("out"))
        .assert();
    let elapsed = t.elapsed();
    if mounted {
        unmount(&place);
    }
    let out = a.get_output();
    let err = String::from_utf8(out.stderr.clone()).unwrap();
    if !mounted && out.status.success() {
        eprintln!("skipped: this user can write a 555 folder");
        return;
    }
    assert_eq!(out.status.code(), Some(2), "{err}");
    assert!(err.contains("cannot"), "{err}");
    assert!(elapsed < Duration::from_secs(3), "refused only after {elapsed:?}");
}

#[test]
fn panel_replaces_only_plain_files_and_dash_is_standard_output() {
    let tmp = tempfile::tempdir().unwrap();
    let real = tmp.path().join("real.csv");
    std::fs::write(&real, "keep").unwrap();
    let link = tmp.path().join("link.csv");
    std::os::unix::fs::symlink(&real, &link).unwrap();
    let panel = |out: &Path| {
        Command::cargo_bin("lagfold")
            .unwrap()
            .args(["panel", "monthly-steady", "--assets", "30", "--history", "30", "-q", "--out"])
            .arg(out)
            .assert()
    };
    let err = String::from_utf8(panel(&link).code(2).get_output().stderr.clone()).unwrap();
    assert!(err.contains("a symbolic link") && err.contains("--out -"), "{err}");
    assert_eq!(std::fs::read_to_string(&real).unwrap(), "keep");
    let err = String::from_utf8(panel(tmp.path()).code(2).get_output().stderr.clone()).unwrap();
    assert!(err.contains("a folder"), "{err}");
    panel(&real).success();
    assert!(std::fs::read_to_string(&real).unwrap().starts_with("date,asset,forecast,return"));
    assert_eq!(leftovers(tmp.path()), Vec::<String>::new());
    // `-`: the CSV on standard output, which `measure -` reads back.
    let a = panel(Path::new("-")).success();
    let csv = a.get_output().stdout.clone();
    assert!(csv.starts_with(b"date,asset,forecast,return\n") && !Path::new("-").exists());
    Command::cargo_bin("lagfold")
        .unwrap()
        .args(["measure", "-", "--min-assets", "5", "--no-study", "--no-charts", "-q", "--out"])
        .arg(tmp.path().join("m"))
        .write_stdin(csv)
        .assert()
        .success();
    assert!(tmp.path().join("m/measure.json").exists());
}
