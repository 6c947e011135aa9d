//! The error type of the library: every variant says what went wrong and what to do.
//! A write that failed for lack of space ([`NoSpace`]) carries what the user needs to act:
//! the file, the free space, the estimated need and the work kept for resuming.

use std::fmt;
use std::path::PathBuf;

/// Everything that can go wrong in qorbits, with a one-line explanation for the user.
#[derive(Debug)]
pub enum Error {
    /// The form has discriminant zero.
    ZeroDiscriminant(String),
    /// The form is too large for the numerical part of the kernel.
    TooLarge(String),
    /// A numerical computation failed to converge or to decide; a bug to report.
    Numerical(String),
    /// Bad input from the user (arguments, parameters).
    Input(String),
    /// A file could not be read or written.
    Io(String),
    /// An output file exists and replacing it was not allowed (the command line's
    /// `--force` allows it).
    Exists(std::path::PathBuf),
    /// A database is missing, corrupt or not a qorbits table.
    Database(String),
    /// A write failed for lack of space: the file system is full, out of inodes, or the
    /// process's file-size limit was reached (`table::space` makes and measures it).
    NoSpace(Box<NoSpace>),
    /// Internal: the checked `i128` fast path overflowed. The public functions retry with
    /// big integers and never return it.
    Overflow,
}

/// Result with the crate's [`Error`].
pub type Result<T> = std::result::Result<T, Error>;

impl fmt::Display for Error {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Error::ZeroDiscriminant(form) => write!(
                f,
                "the form {form} has discriminant 0 (a repeated root): it has no well-defined \
                 reduction point and is outside the table, which holds forms with Disc ≠ 0"
            ),
            Error::TooLarge(m) => write!(f, "{m}"),
            Error::Numerical(m) => write!(f, "numerical failure ({m}); please report this form"),
            Error::Input(m) => write!(f, "{m}"),
            Error::Io(m) => write!(f, "{m}"),
            Error::Exists(p) => write!(
                f,
                "{} already exists; choose another output or allow replacing it",
                p.display()
            ),
            Error::Database(m) => write!(f, "{m}"),
            Error::NoSpace(n) => write!(f, "{}", n.message("then resume the build")),
            Error::Overflow => write!(f, "internal: integer overflow on the fast path"),
        }
    }
}

impl std::error::Error for Error {}

/// Why a write found no room.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum SpaceCause {
    /// No free blocks on the file system (ENOSPC, EDQUOT, SQLite's "disk is full").
    Full,
    /// No free inodes: no new file can be made, whatever the free bytes.
    NoInodes,
    /// The file reached the process's file-size limit (EFBIG; `ulimit -f`), in bytes when
    /// the limit is known.
    SizeLimit(Option<u64>),
}

/// Completed sorted runs left in a work directory for a resumed build.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Kept {
    /// The work directory.
    pub dir: PathBuf,
    /// Completed runs in it.
    pub runs: usize,
    /// Their bytes.
    pub bytes: u64,
}

/// A write that failed for lack of space, with what the one-line message says.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct NoSpace {
    /// The file whose write failed (the name it was being written for).
    pub file: PathBuf,
    /// Why.
    pub cause: SpaceCause,
    /// Free bytes on the file system of the file, when the system says.
    pub free: Option<u64>,
    /// What was being done (`the build`, `the export` …) and the bytes it is estimated to
    /// need on that file system.
    pub need: Option<(String, u64)>,
    /// Completed runs kept for resuming, if any.
    pub kept: Option<Kept>,
}

/// Bytes in words: `512 B`, `38.4 kB`, `1.2 MB`, `3.0 GB`, `1.5 TB` (decimal units).
pub fn bytes_text(n: f64) -> String {
    match n {
        n if n < 1e3 => format!("{n:.0} B"),
        n if n < 1e6 => format!("{:.1} kB", n / 1e3),
        n if n < 1e9 => format!("{:.1} MB", n / 1e6),
        n if n < 1e12 => format!("{:.1} GB", n / 1e9),
        n => format!("{:.1} TB", n / 1e12),
    }
}

impl NoSpace {
    /// The one-line message; `resume` says how to reuse kept runs (the binary names its
    /// flag there, the library does not).
    pub fn message(&self, resume: &str) -> String {
        let file = self.file.display();
        let free = self
            .free
            .map_or("an unknown amount".to_string(), |b| bytes_text(b as f64));
        let need = match &self.need {
            Some((what, n)) => format!(", {what} needs about {}", bytes_text(*n as f64)),
            None => String::new(),
        };
        let mut s = match self.cause {
            SpaceCause::Full => {
                format!("cannot write {file}: the file system is full ({free} free on it{need})")
            }
            SpaceCause::NoInodes => format!(
                "cannot write {file}: the file system has no free inodes for new files ({free} \
                 free on it{need})"
            ),
            SpaceCause::SizeLimit(limit) => format!(
                "cannot write {file}: it reached this process's file-size limit{} (ulimit -f; \
                 {free} free on its file system{need})",
                limit.map_or(String::new(), |l| format!(" of {}", bytes_text(l as f64)))
            ),
        };
        s.push_str(match self.cause {
            SpaceCause::SizeLimit(_) => "; raise the limit or write elsewhere",
            _ => "; free space or write to a larger file system",
        });
        if let Some(k) = &self.kept {
            let d = k.dir.display();
            s.push_str(&format!(
                "; {} completed run{} ({}) {} kept in {d}: {resume}, or remove {} with rm -r {d}",
                k.runs,
                if k.runs == 1 { "" } else { "s" },
                bytes_text(k.bytes as f64),
                if k.runs == 1 { "is" } else { "are" },
                if k.runs == 1 { "it" } else { "them" },
            ));
        } else {
            s.push_str("; no partial file is left");
        }
        s
    }
}

impl From<rusqlite::Error> for Error {
    fn from(e: rusqlite::Error) -> Self {
        Error::Database(format!("database error: {e}"))
    }
}
