//! Atomic files: every file qorbits writes is built under a temporary name beside its
//! target, flushed to disk and renamed, so a target never holds a partial file; targets that
//! are not regular files (directories, symbolic links, devices) are never replaced.
//! Temporary names carry the process id (`.NAME.tmp-PID`, `qorbits-PURPOSE-PID-…`): what a
//! killed process left is removed by the next writer of the same target (or of the same
//! purpose) once no process with that id runs. A write that finds no room fails with
//! [`Error::NoSpace`] ([`crate::table::space`]) and removes its temporary file.
//!
//! ```
//! use qorbits::table::atomic::write_atomic;
//! let dir = std::env::temp_dir().join(format!("qorbits-atomic-doc-{}", std::process::id()));
//! std::fs::create_dir_all(&dir).unwrap();
//! let f = dir.join("x.txt");
//! write_atomic(&f, b"one", false).unwrap();
//! assert!(write_atomic(&f, b"two", false).is_err(), "an existing file needs replace = true");
//! write_atomic(&f, b"two", true).unwrap();
//! assert_eq!(std::fs::read(&f).unwrap(), b"two");
//! # std::fs::remove_dir_all(&dir).unwrap();
//! ```

use crate::error::{Error, Result};
use crate::table::space::{cause_of, no_space, write_error};
use std::fs::{File, OpenOptions};
use std::io::Write;
use std::path::{Path, PathBuf};

/// A temporary file beside its target, removed on drop unless committed.
pub struct TempFile {
    tmp: PathBuf,
    armed: bool,
    synced: bool,
}

/// Whether a process with this id runs (or exists and is not ours to signal).
fn process_runs(pid: i32) -> bool {
    // SAFETY: signal 0 only checks that the process exists.
    pid > 0
        && (unsafe { libc::kill(pid, 0) } == 0
            || std::io::Error::last_os_error().raw_os_error() == Some(libc::EPERM))
}

/// The process id in `name` after `prefix`, when `name` is `prefix` and a number.
fn pid_after(name: &std::ffi::OsStr, prefix: &str) -> Option<i32> {
    let rest = name.to_str()?.strip_prefix(prefix)?;
    let digits: String = rest.chars().take_while(char::is_ascii_digit).collect();
    let pid: i32 = digits.parse().ok()?;
    (pid != std::process::id() as i32 && !process_runs(pid)).then_some(pid)
}

/// The temporary files `.NAME.tmp-PID` of `name` in `dir` that a process no longer running
/// left behind (killed before it could remove them).
pub fn stale_temps(dir: &Path, name: &std::ffi::OsStr) -> Vec<PathBuf> {
    let prefix = format!(".{}.tmp-", name.to_string_lossy());
    let Ok(entries) = std::fs::read_dir(dir) else {
        return Vec::new();
    };
    entries
        .flatten()
        .filter(|e| {
            let n = e.file_name();
            pid_after(&n, &prefix).is_some_and(|pid| {
                n.to_str() == Some(&format!("{prefix}{pid}"))
                    && e.file_type().is_ok_and(|t| t.is_file())
            })
        })
        .map(|e| e.path())
        .collect()
}

impl TempFile {
    /// Checks that `target` may be written (refusing an existing file unless `replace`) and
    /// creates an empty `.<name>.tmp-<pid>` in the same directory.
    pub fn create(target: &Path, replace: bool) -> Result<TempFile> {
        let (dir, name) = check_target(target, replace)?;
        let shown = target.display();
        let mut tmp_name = std::ffi::OsString::from(".");
        tmp_name.push(&name);
        tmp_name.push(format!(".tmp-{}", std::process::id()));
        let tmp = dir.join(tmp_name);
        // A leftover of an earlier process with the same id is ours to replace, and so are
        // those of killed processes.
        let _ = std::fs::remove_file(&tmp);
        for old in stale_temps(&dir, &name) {
            let _ = std::fs::remove_file(old);
        }
        OpenOptions::new()
            .write(true)
            .create_new(true)
            .open(&tmp)
            .map_err(|e| match cause_of(&e) {
                Some(c) => no_space(target, c),
                None => Error::Io(format!(
                    "cannot write {shown}: cannot create {} ({e}); check that {} is writable",
                    tmp.display(),
                    dir.display()
                )),
            })?;
        Ok(TempFile {
            tmp,
            armed: true,
            synced: false,
        })
    }

    /// Path of the temporary file.
    pub fn path(&self) -> &Path {
        &self.tmp
    }

    /// Flushes the temporary file to disk (once; [`TempFile::commit`] does it if not yet).
    pub fn sync(&mut self, target: &Path) -> Result<()> {
        if !self.synced {
            File::open(&self.tmp)
                .and_then(|f| f.sync_all())
                .map_err(|e| match cause_of(&e) {
                    Some(c) => no_space(target, c),
                    None => Error::Io(format!(
                        "cannot write {}: cannot flush the temporary file to disk ({e})",
                        target.display()
                    )),
                })?;
            self.synced = true;
        }
        Ok(())
    }

    /// Flushes the temporary file to disk and moves it to `target`: replacing an existing
    /// file only with `replace`, never leaving a partial file at `target`.
    pub fn commit(mut self, target: &Path, replace: bool) -> Result<()> {
        let shown = target.display();
        let io = |what: &str, e: std::io::Error| match cause_of(&e) {
            Some(c) => no_space(target, c),
            None => Error::Io(format!("cannot write {shown}: {what} ({e})")),
        };
        self.sync(target)?;
        if replace {
            std::fs::rename(&self.tmp, target)
                .map_err(|e| io("cannot rename the temporary file", e))?;
        } else {
            // Never replace a file that appeared since `create`: one rename that refuses an
            // existing target where the system has it, else a hard link (which never
            // replaces), else a rename after a last look.
            match rename_noreplace(&self.tmp, target) {
                Ok(true) => {}
                Err(e) if e.kind() == std::io::ErrorKind::AlreadyExists => {
                    return Err(Error::Exists(target.to_path_buf()));
                }
                Err(e) => return Err(io("cannot rename the temporary file", e)),
                Ok(false) => match std::fs::hard_link(&self.tmp, target) {
                    Ok(()) => {
                        let _ = std::fs::remove_file(&self.tmp);
                    }
                    Err(e) if e.kind() == std::io::ErrorKind::AlreadyExists => {
                        return Err(Error::Exists(target.to_path_buf()));
                    }
                    Err(_) => {
                        if std::fs::symlink_metadata(target).is_ok() {
                            return Err(Error::Exists(target.to_path_buf()));
                        }
                        std::fs::rename(&self.tmp, target)
                            .map_err(|e| io("cannot rename the temporary file", e))?;
                    }
                },
            }
        }
        self.armed = false;
        // Make the new directory entry durable; best effort (some filesystems refuse it).
        if let Some(dir) = target.parent().filter(|d| !d.as_os_str().is_empty()) {
            let _ = File::open(dir).and_then(|d| d.sync_all());
        }
        Ok(())
    }
}

/// Renames `from` to `to` in one step that fails with `AlreadyExists` when `to` exists
/// (Linux `renameat2` with `RENAME_NOREPLACE`); `Ok(false)` where the system or the file
/// system cannot, so that the caller falls back.
pub(crate) fn rename_noreplace(from: &Path, to: &Path) -> std::io::Result<bool> {
    #[cfg(all(target_os = "linux", target_env = "gnu"))]
    {
        use std::os::unix::ffi::OsStrExt;
        let f = std::ffi::CString::new(from.as_os_str().as_bytes())?;
        let t = std::ffi::CString::new(to.as_os_str().as_bytes())?;
        // SAFETY: both are valid C strings; AT_FDCWD resolves them like rename(2).
        let rc = unsafe {
            libc::renameat2(
                libc::AT_FDCWD,
                f.as_ptr(),
                libc::AT_FDCWD,
                t.as_ptr(),
                libc::RENAME_NOREPLACE,
            )
        };
        if rc == 0 {
            return Ok(true);
        }
        let e = std::io::Error::last_os_error();
        match e.raw_os_error() {
            Some(libc::EINVAL | libc::ENOSYS | libc::EPERM) => Ok(false),
            _ => Err(e),
        }
    }
    #[cfg(not(all(target_os = "linux", target_env = "gnu")))]
    {
        let _ = (from, to);
        Ok(false)
    }
}

impl Drop for TempFile {
    fn drop(&mut self) {
        if self.armed {
            let _ = std::fs::remove_file(&self.tmp);
        }
    }
}

/// Whether `target` may be written: it has a file name, is not a directory, a symbolic
/// link or another non-regular file, exists only if `replace`, and its directory exists.
/// Returns the directory and the file name. Every writer calls it before it writes, and a
/// command that writes several files calls it for each before any work.
pub fn check_target(target: &Path, replace: bool) -> Result<(PathBuf, std::ffi::OsString)> {
    let shown = target.display();
    let name = target.file_name().ok_or_else(|| {
        Error::Input(format!(
            "{shown} is not a file name; give a path like dir/table.sqlite"
        ))
    })?;
    if let Ok(m) = std::fs::symlink_metadata(target) {
        if m.is_dir() {
            return Err(Error::Io(format!(
                "{shown} is a directory; give a file name inside it"
            )));
        }
        if m.file_type().is_symlink() {
            return Err(Error::Io(format!(
                "{shown} is a symbolic link; qorbits replaces only regular files, so give \
                 the path of the file itself or remove the link"
            )));
        }
        if !m.is_file() {
            return Err(Error::Io(format!(
                "{shown} is not a regular file (a device, socket or pipe); qorbits \
                 replaces only regular files"
            )));
        }
        if !replace {
            return Err(Error::Exists(target.to_path_buf()));
        }
    }
    let dir = match target.parent() {
        Some(d) if !d.as_os_str().is_empty() => d,
        _ => Path::new("."),
    };
    if !dir.is_dir() {
        return Err(Error::Io(format!(
            "cannot write {shown}: directory {} does not exist; create it first",
            dir.display()
        )));
    }
    Ok((dir.to_path_buf(), name.to_os_string()))
}

/// Writes `bytes` to `target` atomically (temporary file, fsync, rename).
pub fn write_atomic(target: &Path, bytes: &[u8], replace: bool) -> Result<()> {
    let tmp = TempFile::create(target, replace)?;
    OpenOptions::new()
        .write(true)
        .open(tmp.path())
        .and_then(|mut f| f.write_all(bytes))
        .map_err(|e| write_error(target, e))?;
    tmp.commit(target, replace)
}

/// A new, empty, private directory under the system's temporary directory, for work whose
/// files must not land anywhere else (a rebuild). It is created here, never reused, so
/// nothing planted beforehand can redirect what is written in it. Directories of the same
/// purpose that a killed process of this user left there are removed first.
pub fn fresh_temp_dir(purpose: &str) -> Result<PathBuf> {
    use std::os::unix::fs::{DirBuilderExt, MetadataExt};
    let base = std::env::temp_dir();
    let prefix = format!("qorbits-{purpose}-");
    // SAFETY: geteuid has no preconditions.
    let me = unsafe { libc::geteuid() };
    for e in std::fs::read_dir(&base).into_iter().flatten().flatten() {
        let ours = e
            .metadata()
            .is_ok_and(|m| m.is_dir() && m.uid() == me && !m.file_type().is_symlink());
        if ours && pid_after(&e.file_name(), &prefix).is_some() {
            let _ = std::fs::remove_dir_all(e.path());
        }
    }
    let nanos = std::time::SystemTime::now()
        .duration_since(std::time::UNIX_EPOCH)
        .map_or(0, |d| d.subsec_nanos());
    for k in 0..100u32 {
        let dir = base.join(format!(
            "qorbits-{purpose}-{}-{nanos:x}-{k}",
            std::process::id()
        ));
        match std::fs::DirBuilder::new().mode(0o700).create(&dir) {
            Ok(()) => return Ok(dir),
            Err(e) if e.kind() == std::io::ErrorKind::AlreadyExists => continue,
            Err(e) if cause_of(&e).is_some() => {
                return Err(write_error(&dir, e));
            }
            Err(e) => {
                return Err(Error::Io(format!(
                    "cannot create a directory for the {purpose} in {}: {e}",
                    base.display()
                )))
            }
        }
    }
    Err(Error::Io(format!(
        "cannot create a fresh directory for the {purpose} in {}",
        base.display()
    )))
}
