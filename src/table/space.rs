//! Running out of space: which failed writes mean "no room" (ENOSPC and EDQUOT: the file
//! system is full or out of inodes; EFBIG: the process's file-size limit; SQLite's
//! "database or disk is full" and its write errors with those codes), the free space of a
//! file system, and the one error every writer returns for them, [`Error::NoSpace`], whose
//! line names the file, the free space and — filled in by the command that knows it — the
//! estimated need and the work kept for resuming.
//!
//! ```
//! use qorbits::error::{Error, SpaceCause};
//! use qorbits::table::space::write_error;
//! use std::path::Path;
//! let full = std::io::Error::from_raw_os_error(libc::ENOSPC);
//! match write_error(Path::new("/tmp/x.sqlite"), full) {
//!     Error::NoSpace(n) => assert!(matches!(n.cause, SpaceCause::Full | SpaceCause::NoInodes)),
//!     e => panic!("{e}"),
//! }
//! let denied = std::io::Error::from_raw_os_error(libc::EACCES);
//! assert!(matches!(write_error(Path::new("/tmp/x"), denied), Error::Io(_)));
//! ```

use crate::error::{Error, NoSpace, SpaceCause};
use rusqlite::{Connection, ErrorCode};
use std::path::{Path, PathBuf};

/// Free bytes on the file system of `dir`, when the system says.
pub fn free_bytes(dir: &Path) -> Option<u64> {
    statvfs(dir).map(|s| s.f_bavail * s.f_frsize)
}

fn statvfs(dir: &Path) -> Option<libc::statvfs> {
    use std::os::unix::ffi::OsStrExt;
    let c = std::ffi::CString::new(dir.as_os_str().as_bytes()).ok()?;
    let mut s: libc::statvfs = unsafe { std::mem::zeroed() };
    // SAFETY: `c` is a valid C string and `s` a valid out-pointer for statvfs.
    let rc = unsafe { libc::statvfs(c.as_ptr(), &mut s) };
    (rc == 0).then_some(s)
}

/// The process's file-size limit (RLIMIT_FSIZE) in bytes, `None` when unlimited.
pub fn file_size_limit() -> Option<u64> {
    let mut r = libc::rlimit {
        rlim_cur: 0,
        rlim_max: 0,
    };
    // SAFETY: `r` is a valid out-pointer for getrlimit.
    let rc = unsafe { libc::getrlimit(libc::RLIMIT_FSIZE, &mut r) };
    (rc == 0 && r.rlim_cur != libc::RLIM_INFINITY).then_some(r.rlim_cur)
}

/// The directory whose file system holds `file`: its parent, or the nearest ancestor that
/// still exists (the file and its directory may have been removed since).
fn nearest_dir(file: &Path) -> PathBuf {
    let mut d = file.parent().unwrap_or(Path::new("."));
    loop {
        if d.as_os_str().is_empty() {
            return PathBuf::from(".");
        }
        if d.is_dir() {
            return d.to_path_buf();
        }
        match d.parent() {
            Some(p) => d = p,
            None => return d.to_path_buf(),
        }
    }
}

/// Whether an OS error number means "no room", and which kind.
fn cause_of_errno(errno: i32) -> Option<SpaceCause> {
    match errno {
        libc::ENOSPC | libc::EDQUOT => Some(SpaceCause::Full),
        libc::EFBIG => Some(SpaceCause::SizeLimit(file_size_limit())),
        _ => None,
    }
}

/// Whether a failed I/O operation found no room.
pub fn cause_of(e: &std::io::Error) -> Option<SpaceCause> {
    e.raw_os_error().and_then(cause_of_errno)
}

/// Whether a failed SQLite operation found no room: "database or disk is full", or a write
/// error whose system error (read from `conn` when given) is one of the codes above.
pub fn sqlite_cause(conn: Option<&Connection>, e: &rusqlite::Error) -> Option<SpaceCause> {
    match e.sqlite_error_code() {
        Some(ErrorCode::DiskFull) => Some(SpaceCause::Full),
        Some(ErrorCode::SystemIoFailure) => {
            // SAFETY: the handle is valid while `conn` is borrowed; the call only reads.
            let errno = conn.map(|c| unsafe { rusqlite::ffi::sqlite3_system_errno(c.handle()) });
            errno.and_then(cause_of_errno)
        }
        _ => None,
    }
}

/// The [`Error::NoSpace`] for `file`, with the free space measured now (and the cause told
/// apart: a full file system with free bytes but no free inode is out of inodes).
pub fn no_space(file: &Path, cause: SpaceCause) -> Error {
    let dir = nearest_dir(file);
    let cause = match (cause, statvfs(&dir)) {
        (SpaceCause::Full, Some(s)) if s.f_files > 0 && s.f_favail == 0 => SpaceCause::NoInodes,
        (c, _) => c,
    };
    Error::NoSpace(Box::new(NoSpace {
        file: file.to_path_buf(),
        cause,
        free: free_bytes(&dir),
        need: None,
        kept: None,
    }))
}

/// The error for a failed write of `file`: [`Error::NoSpace`] when there was no room, else
/// a one-line [`Error::Io`] naming the file.
pub fn write_error(file: &Path, e: std::io::Error) -> Error {
    match cause_of(&e) {
        Some(c) => no_space(file, c),
        None => Error::Io(format!("cannot write {}: {e}", file.display())),
    }
}

/// Fills in what was being done and its estimated need in bytes, when a no-space error does
/// not say yet; other errors pass unchanged.
pub fn with_need(e: Error, what: &str, bytes: f64) -> Error {
    match e {
        Error::NoSpace(mut n) => {
            if n.need.is_none() {
                n.need = Some((what.to_string(), bytes.max(0.0).ceil() as u64));
            }
            Error::NoSpace(n)
        }
        e => e,
    }
}

/// Measures the free space again (after the partial files are removed: what a retry has).
pub fn measure_again(n: &mut NoSpace) {
    n.free = free_bytes(&nearest_dir(&n.file)).or(n.free);
}

/// A no-space error about `file` (the caller knew the real name), measured there; other
/// errors pass unchanged.
pub fn retarget(e: Error, file: &Path) -> Error {
    match e {
        Error::NoSpace(mut n) => {
            n.file = file.to_path_buf();
            measure_again(&mut n);
            Error::NoSpace(n)
        }
        e => e,
    }
}
