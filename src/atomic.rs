//! Atomic file writes: every file netmargin writes (baselines, the starter configuration)
//! goes through [`write`], so a reader never sees half a file and a crash or a full disk
//! leaves the old file as it was.
//!
//! The bytes go to a new temporary file in the same folder (so the rename cannot cross file
//! systems), are flushed to the disk (`fsync`), and the temporary file is renamed over the
//! target; then the folder itself is synced so the rename survives a power cut. An existing
//! target keeps its permissions.
//!
//! A process killed mid-write (`kill -9`, a power cut) cannot remove its temporary file; the
//! next write to the same target removes such leftovers, on Linux, once the process that
//! made them is gone (its id is in the name).
//!
//! For tests only: with the environment variable [`PAUSE_ENV`]
//! (`NETMARGIN_TEST_PAUSE_BEFORE_RENAME_MS`) set to a number of milliseconds, a write waits
//! that long after the temporary file is written and synced and before the rename, so a test
//! can kill the process in the middle of a write. Unset, empty or not a number, it does
//! nothing.

use std::fs::{self, File, OpenOptions};
use std::io::{self, Write};
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicU64, Ordering};

static COUNTER: AtomicU64 = AtomicU64::new(0);

/// The test-only environment variable that makes a write pause before its rename (see the
/// module documentation).
pub const PAUSE_ENV: &str = "NETMARGIN_TEST_PAUSE_BEFORE_RENAME_MS";

/// The longest pause [`PAUSE_ENV`] can ask for, so a stray setting cannot hang a run.
const MAX_PAUSE_MS: u64 = 60_000;

/// How [`write_with`] treats an existing target.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Existing {
    /// Replace it.
    Replace,
    /// Leave it and fail with [`io::ErrorKind::AlreadyExists`].
    Keep,
}

/// Writes `bytes` to `path` atomically, replacing any file there.
pub fn write(path: &Path, bytes: &[u8]) -> io::Result<()> {
    write_with(path, bytes, Existing::Replace)
}

/// Writes `bytes` to `path` atomically. With [`Existing::Keep`] an existing file is an
/// `AlreadyExists` error and is left untouched (checked again just before the rename, so a
/// file that appears meanwhile is not replaced either: on Unix the final step is a hard
/// link, which fails when the name is taken).
pub fn write_with(path: &Path, bytes: &[u8], existing: Existing) -> io::Result<()> {
    let dir = match path.parent() {
        Some(d) if !d.as_os_str().is_empty() => d.to_path_buf(),
        _ => PathBuf::from("."),
    };
    let name = path.file_name().ok_or_else(|| {
        io::Error::new(
            io::ErrorKind::InvalidInput,
            format!("`{}` names no file", path.display()),
        )
    })?;
    if existing == Existing::Keep && path.exists() {
        return Err(io::Error::new(
            io::ErrorKind::AlreadyExists,
            format!("`{}` already exists", path.display()),
        ));
    }
    let name = name.to_string_lossy();
    remove_stale(&dir, &name);
    let (tmp, mut file) = create_temp(&dir, &name)?;
    let result = (|| {
        file.write_all(bytes)?;
        if let Ok(meta) = fs::metadata(path) {
            // keep the permissions of the file being replaced
            let _ = file.set_permissions(meta.permissions());
        }
        file.sync_all()?;
        drop(file);
        test_pause();
        finish(&tmp, path, existing)?;
        sync_dir(&dir);
        Ok(())
    })();
    if result.is_err() {
        let _ = fs::remove_file(&tmp);
    }
    result
}

/// The pause [`PAUSE_ENV`] asks for; nothing when it is unset or not a number.
fn test_pause() {
    let ms = std::env::var(PAUSE_ENV)
        .ok()
        .and_then(|v| v.trim().parse::<u64>().ok());
    if let Some(ms) = ms {
        std::thread::sleep(std::time::Duration::from_millis(ms.min(MAX_PAUSE_MS)));
    }
}

/// The process id in a temporary name [`create_temp`] gives `name`: `.{name}.{pid}.{n}.tmp`.
/// Exactly two numbers, so the temporary files of another target (`name.x`) never match.
fn temp_owner(file: &str, name: &str) -> Option<u32> {
    let middle = file
        .strip_prefix('.')?
        .strip_prefix(name)?
        .strip_prefix('.')?
        .strip_suffix(".tmp")?;
    let (pid, n) = middle.split_once('.')?;
    let digits = |s: &str| !s.is_empty() && s.bytes().all(|b| b.is_ascii_digit());
    if !digits(pid) || !digits(n) {
        return None;
    }
    pid.parse().ok()
}

/// Removes temporary files for `name` in `dir` left by processes that no longer run (a
/// write killed before its rename). Linux only, where `/proc` says which processes run;
/// elsewhere, and on any error, it leaves everything as it is.
fn remove_stale(dir: &Path, name: &str) {
    #[cfg(target_os = "linux")]
    {
        let proc_ok = Path::new("/proc/self").exists();
        let Ok(entries) = fs::read_dir(dir) else {
            return;
        };
        if !proc_ok {
            return;
        }
        let me = std::process::id();
        for e in entries.flatten() {
            let file = e.file_name();
            let Some(pid) = file.to_str().and_then(|f| temp_owner(f, name)) else {
                continue;
            };
            let is_file = e.file_type().is_ok_and(|t| t.is_file());
            if pid != me && is_file && !Path::new(&format!("/proc/{pid}")).exists() {
                let _ = fs::remove_file(e.path());
            }
        }
    }
    #[cfg(not(target_os = "linux"))]
    let _ = (dir, name);
}

fn create_temp(dir: &Path, name: &str) -> io::Result<(PathBuf, File)> {
    let pid = std::process::id();
    for _ in 0..100 {
        let n = COUNTER.fetch_add(1, Ordering::Relaxed);
        let tmp = dir.join(format!(".{name}.{pid}.{n}.tmp"));
        match OpenOptions::new().write(true).create_new(true).open(&tmp) {
            Ok(f) => return Ok((tmp, f)),
            Err(e) if e.kind() == io::ErrorKind::AlreadyExists => continue,
            Err(e) => return Err(e),
        }
    }
    Err(io::Error::new(
        io::ErrorKind::AlreadyExists,
        format!("cannot create a temporary file in `{}`", dir.display()),
    ))
}

fn finish(tmp: &Path, path: &Path, existing: Existing) -> io::Result<()> {
    match existing {
        Existing::Replace => fs::rename(tmp, path),
        Existing::Keep => {
            #[cfg(unix)]
            {
                // a hard link fails when the name is taken; the temporary name then goes
                fs::hard_link(tmp, path)?;
                let _ = fs::remove_file(tmp);
                Ok(())
            }
            #[cfg(not(unix))]
            {
                if path.exists() {
                    return Err(io::Error::new(
                        io::ErrorKind::AlreadyExists,
                        format!("`{}` already exists", path.display()),
                    ));
                }
                fs::rename(tmp, path)
            }
        }
    }
}

/// Syncs a folder so a rename in it is on the disk. Best effort: not every platform or file
/// system lets a folder be opened and synced.
fn sync_dir(dir: &Path) {
    #[cfg(unix)]
    if let Ok(d) = File::open(dir) {
        let _ = d.sync_all();
    }
    #[cfg(not(unix))]
    let _ = dir;
}

#[cfg(test)]
mod tests {
    use super::*;

    fn scratch(tag: &str) -> PathBuf {
        let d = std::env::temp_dir().join(format!("netmargin-atomic-{tag}-{}", std::process::id()));
        let _ = fs::remove_dir_all(&d);
        fs::create_dir_all(&d).expect("temp dir");
        d
    }

    fn leftovers(dir: &Path) -> Vec<String> {
        fs::read_dir(dir)
            .expect("read dir")
            .flatten()
            .map(|e| e.file_name().to_string_lossy().into_owned())
            .filter(|n| n.ends_with(".tmp"))
            .collect()
    }

    #[test]
    fn replaces_the_file_and_leaves_no_temporary() {
        let d = scratch("replace");
        let p = d.join("out.json");
        write(&p, b"one").unwrap();
        assert_eq!(fs::read(&p).unwrap(), b"one");
        write(&p, b"two, longer").unwrap();
        assert_eq!(fs::read(&p).unwrap(), b"two, longer");
        assert!(leftovers(&d).is_empty(), "{:?}", leftovers(&d));
        fs::remove_dir_all(&d).unwrap();
    }

    #[test]
    fn keep_refuses_an_existing_file_and_leaves_it() {
        let d = scratch("keep");
        let p = d.join("netmargin.toml");
        write_with(&p, b"first", Existing::Keep).unwrap();
        let e = write_with(&p, b"second", Existing::Keep).unwrap_err();
        assert_eq!(e.kind(), io::ErrorKind::AlreadyExists);
        assert_eq!(fs::read(&p).unwrap(), b"first");
        assert!(leftovers(&d).is_empty());
        fs::remove_dir_all(&d).unwrap();
    }

    #[test]
    fn a_failed_write_leaves_the_old_file() {
        let d = scratch("fail");
        let p = d.join("base.json");
        write(&p, b"old").unwrap();
        // a folder where the file should go: the rename fails, nothing is left behind
        let q = d.join("taken");
        fs::create_dir(&q).unwrap();
        fs::write(q.join("x"), b"x").unwrap();
        assert!(write(&q, b"new").is_err());
        assert_eq!(fs::read(&p).unwrap(), b"old");
        assert!(leftovers(&d).is_empty());
        // a folder that does not exist
        assert!(write(&d.join("no/such/dir/f"), b"x").is_err());
        fs::remove_dir_all(&d).unwrap();
    }

    #[cfg(unix)]
    #[test]
    fn keeps_the_permissions_of_the_file_it_replaces() {
        use std::os::unix::fs::PermissionsExt;
        let d = scratch("perm");
        let p = d.join("hook");
        write(&p, b"a").unwrap();
        fs::set_permissions(&p, fs::Permissions::from_mode(0o750)).unwrap();
        write(&p, b"b").unwrap();
        assert_eq!(
            fs::metadata(&p).unwrap().permissions().mode() & 0o777,
            0o750
        );
        fs::remove_dir_all(&d).unwrap();
    }

    #[test]
    fn reads_the_owner_only_from_its_own_temporary_names() {
        assert_eq!(temp_owner(".base.json.4321.7.tmp", "base.json"), Some(4321));
        // another target's temporary file, or other files in the folder
        assert_eq!(temp_owner(".base.json.x.4321.7.tmp", "base.json"), None);
        assert_eq!(temp_owner(".base.json.4321.7.tmp", "base"), None);
        assert_eq!(temp_owner(".base.json.4321.tmp", "base.json"), None);
        assert_eq!(temp_owner("base.json.4321.7.tmp", "base.json"), None);
        assert_eq!(temp_owner(".base.json.43a1.7.tmp", "base.json"), None);
        assert_eq!(temp_owner(".base.json.4321.7.tmp.bak", "base.json"), None);
    }

    #[cfg(target_os = "linux")]
    #[test]
    fn a_write_removes_what_a_killed_writer_left_and_nothing_else() {
        let d = scratch("stale");
        let p = d.join("base.json");
        write(&p, b"old").unwrap();
        // no process has an id this large (Linux caps ids at 2^22)
        let dead = d.join(".base.json.4294000000.0.tmp");
        // process 1 always runs: its file may be a write in progress
        let live = d.join(".base.json.1.0.tmp");
        let other = d.join(".notes.txt.4294000000.0.tmp");
        for f in [&dead, &live, &other] {
            fs::write(f, b"half").unwrap();
        }
        write(&p, b"new").unwrap();
        assert_eq!(fs::read(&p).unwrap(), b"new");
        assert!(!dead.exists(), "the dead writer's file is still there");
        assert!(live.exists(), "a running process's file was removed");
        assert!(other.exists(), "another target's file was removed");
        fs::remove_dir_all(&d).unwrap();
    }
}
