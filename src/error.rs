//! The error type of the library: every variant says what went wrong and what to do.

use std::fmt;

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
            Error::Overflow => write!(f, "internal: integer overflow on the fast path"),
        }
    }
}

impl std::error::Error for Error {}

impl From<rusqlite::Error> for Error {
    fn from(e: rusqlite::Error) -> Self {
        Error::Database(format!("database error: {e}"))
    }
}
