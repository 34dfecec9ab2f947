//! Writing a file so that readers see the old file or the whole new one,
//! never half of it, and a new target is never silently replaced.
//!
//! The bytes go to `.NAME.PID.partial` beside the target (created
//! exclusively, flushed and synced), which is then published: renamed over
//! the target when replacing is allowed, else hard-linked to the target's
//! name, which fails if the name exists (so of two runs writing one new
//! target, one wins and the other is told). On any error the partial file is
//! removed. Partial files left by runs that were killed (their process no
//! longer exists) are removed first.

use std::fs::{File, OpenOptions};
use std::io::{ErrorKind, Write};
use std::path::{Path, PathBuf};

use super::WriteError;

/// Writes `bytes` to `target` through a partial file; replaces an existing
/// target only when `replace` is true.
pub fn write_file(target: &Path, bytes: &[u8], replace: bool) -> Result<(), WriteError> {
    write_with(target, replace, |file| file.write_all(bytes))
}

/// [`write_file`] with the writing step given (tests inject faults through it).
pub(crate) fn write_with(
    target: &Path,
    replace: bool,
    fill: impl FnOnce(&mut File) -> std::io::Result<()>,
) -> Result<(), WriteError> {
    let shown = target.display().to_string();
    let io = |e: std::io::Error| WriteError::Io {
        path: shown.clone(),
        reason: e.to_string(),
    };
    check_target(target, replace)?;
    remove_stale_partials(target);
    let partial = partial_path(target, std::process::id());
    let mut file = OpenOptions::new()
        .write(true)
        .create_new(true)
        .open(&partial)
        .map_err(io)?;
    let written = fill(&mut file)
        .and_then(|()| file.flush())
        .and_then(|()| file.sync_all());
    drop(file);
    let published = written
        .map_err(io)
        .and_then(|()| publish(&partial, target, replace));
    if published.is_err() {
        let _ = std::fs::remove_file(&partial);
    }
    published?;
    sync_folder(target);
    Ok(())
}

/// Refuses a folder as the target, and an existing target unless `replace`:
/// callers check this before the work, and [`write_file`] again at the end.
pub fn check_target(target: &Path, replace: bool) -> Result<(), WriteError> {
    let shown = target.display().to_string();
    if target.is_dir() {
        return Err(WriteError::Io {
            path: shown,
            reason: "it is a folder; name a file for the result (e.g. inside it)".into(),
        });
    }
    if target.exists() && !replace {
        return Err(WriteError::Exists(shown));
    }
    Ok(())
}

/// Moves the finished partial file to the target's name.
fn publish(partial: &Path, target: &Path, replace: bool) -> Result<(), WriteError> {
    let shown = target.display().to_string();
    let io = |e: std::io::Error| WriteError::Io {
        path: shown.clone(),
        reason: e.to_string(),
    };
    if replace {
        return std::fs::rename(partial, target).map_err(io);
    }
    // A hard link is created atomically and only if the name is free.
    match std::fs::hard_link(partial, target) {
        Ok(()) => {
            let _ = std::fs::remove_file(partial);
            Ok(())
        }
        Err(e) if e.kind() == ErrorKind::AlreadyExists => Err(WriteError::Exists(shown)),
        // A file system without hard links: the check and the rename are
        // then two steps, the best it allows.
        Err(_) if !target.exists() => std::fs::rename(partial, target).map_err(io),
        Err(_) => Err(WriteError::Exists(shown)),
    }
}

/// `.NAME.PID.partial` beside `target`.
pub(crate) fn partial_path(target: &Path, pid: u32) -> PathBuf {
    target.with_file_name(format!(".{}.{pid}.partial", file_name(target)))
}

fn file_name(target: &Path) -> String {
    target
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_else(|| "result.xlsx".into())
}

/// Removes `.NAME.PID.partial` files of this target whose process has ended
/// (a run killed while writing), saying so on standard error.
fn remove_stale_partials(target: &Path) {
    let folder = match target.parent() {
        Some(p) if !p.as_os_str().is_empty() => p,
        _ => Path::new("."),
    };
    let Ok(entries) = std::fs::read_dir(folder) else {
        return;
    };
    let prefix = format!(".{}.", file_name(target));
    for entry in entries.flatten() {
        let name = entry.file_name().to_string_lossy().into_owned();
        let Some(pid) = name
            .strip_prefix(&prefix)
            .and_then(|rest| rest.strip_suffix(".partial"))
            .and_then(|pid| pid.parse::<u32>().ok())
        else {
            continue;
        };
        if pid != std::process::id()
            && !process_is_running(pid, &entry.path())
            && std::fs::remove_file(entry.path()).is_ok()
        {
            eprintln!(
                "note: removed {}, left by an earlier run (process {pid}) that stopped while writing",
                entry.path().display()
            );
        }
    }
}

/// Whether the process that owns a partial file may still be writing it.
#[cfg(target_os = "linux")]
fn process_is_running(pid: u32, _partial: &Path) -> bool {
    Path::new("/proc").join(pid.to_string()).exists()
}

/// Without a process table to ask, a partial file untouched for a day is
/// taken to be left over.
#[cfg(not(target_os = "linux"))]
fn process_is_running(_pid: u32, partial: &Path) -> bool {
    let day = std::time::Duration::from_secs(24 * 3600);
    std::fs::metadata(partial)
        .and_then(|m| m.modified())
        .map(|t| t.elapsed().unwrap_or_default() < day)
        .unwrap_or(true)
}

/// Makes the rename itself durable (best effort: not every system can sync
/// a folder).
fn sync_folder(target: &Path) {
    if let Some(folder) = target.parent().filter(|p| !p.as_os_str().is_empty())
        && let Ok(f) = File::open(folder)
    {
        let _ = f.sync_all();
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn leftovers(dir: &Path) -> Vec<String> {
        std::fs::read_dir(dir)
            .unwrap()
            .flatten()
            .map(|e| e.file_name().to_string_lossy().into_owned())
            .filter(|n| n.ends_with(".partial"))
            .collect()
    }

    #[test]
    fn a_new_target_is_written_whole_and_not_replaced_unless_asked() {
        let dir = tempfile::tempdir().unwrap();
        let target = dir.path().join("out.xlsx");
        write_file(&target, b"first", false).unwrap();
        assert_eq!(std::fs::read(&target).unwrap(), b"first");
        let refused = write_file(&target, b"second", false).unwrap_err();
        assert!(matches!(refused, WriteError::Exists(_)), "{refused}");
        assert_eq!(std::fs::read(&target).unwrap(), b"first");
        write_file(&target, b"third", true).unwrap();
        assert_eq!(std::fs::read(&target).unwrap(), b"third");
        assert!(leftovers(dir.path()).is_empty());
    }

    /// A full disk (ENOSPC after part of the bytes) and a refused sync end in
    /// an error naming the target, with no partial file and no target left.
    #[test]
    fn a_failing_write_leaves_nothing_behind() {
        let dir = tempfile::tempdir().unwrap();
        let target = dir.path().join("out.xlsx");
        let full = write_with(&target, false, |file| {
            file.write_all(b"half a workbo")?;
            Err(std::io::Error::from_raw_os_error(28))
        })
        .unwrap_err()
        .to_string();
        assert!(
            full.contains("out.xlsx") && full.contains("No space left"),
            "{full}"
        );
        assert!(!target.exists());
        assert!(leftovers(dir.path()).is_empty());
    }

    #[test]
    fn two_writers_of_one_new_target_one_wins() {
        let dir = tempfile::tempdir().unwrap();
        let target = dir.path().join("race.xlsx");
        let outcomes: Vec<bool> = std::thread::scope(|s| {
            let handles: Vec<_> = (0..8u8)
                .map(|i| {
                    let target = target.clone();
                    s.spawn(move || {
                        // Each thread its own partial name (same process id).
                        let partial = partial_path(&target, 1_000_000 + u32::from(i));
                        std::fs::write(&partial, [i]).unwrap();
                        publish(&partial, &target, false).is_ok()
                    })
                })
                .collect();
            handles.into_iter().map(|h| h.join().unwrap()).collect()
        });
        assert_eq!(outcomes.iter().filter(|&&won| won).count(), 1);
        assert!(leftovers(dir.path()).len() == 7);
    }

    #[cfg(target_os = "linux")]
    #[test]
    fn partial_files_of_ended_runs_are_removed() {
        let dir = tempfile::tempdir().unwrap();
        let target = dir.path().join("out.xlsx");
        // No process has an id this large on Linux (pid_max is at most 2^22).
        let stale = partial_path(&target, 4_000_000_000);
        let other = dir.path().join(".other.xlsx.4000000000.partial");
        std::fs::write(&stale, b"crashed").unwrap();
        std::fs::write(&other, b"not ours").unwrap();
        write_file(&target, b"fresh", false).unwrap();
        assert!(!stale.exists());
        assert!(other.exists(), "only this target's leftovers are touched");
    }

    #[test]
    fn a_folder_is_not_a_target() {
        let dir = tempfile::tempdir().unwrap();
        let e = write_file(dir.path(), b"x", true).unwrap_err().to_string();
        assert!(e.contains("is a folder"), "{e}");
    }
}
