//! The subcommands, one module each: its arguments (clap) and what it runs. Shared here: the
//! options every long-running command takes and the guard for long work.

pub mod build;
pub mod cite;
pub mod classes;
pub mod export;
pub mod merge;
pub mod plan;
pub mod plot;
pub mod reduce;
pub mod release;
pub mod selmer;
pub mod selmer_stats;
pub mod shell;
pub mod stats;
pub mod verify;

use qorbits::error::Error;

/// `--jobs N`: worker threads (default: all cores); the output never depends on it.
#[derive(clap::Args, Debug)]
pub struct Jobs {
    /// Worker threads (default: all cores). The output does not depend on it.
    #[arg(long, value_name = "N", allow_hyphen_values = true)]
    jobs: Option<String>,
}

impl Jobs {
    /// Runs `f` on a pool of the requested number of threads.
    pub fn run<T: Send>(&self, f: impl FnOnce() -> Result<T, Error> + Send) -> Result<T, Error> {
        let mut b = rayon::ThreadPoolBuilder::new();
        if let Some(s) = &self.jobs {
            let n: usize = s.trim().parse().ok().filter(|n| *n >= 1).ok_or_else(|| {
                Error::Input(format!(
                    "--jobs '{s}' is not a number of threads; give a whole number from 1 up"
                ))
            })?;
            b = b.num_threads(n);
        }
        b.build()
            .map_err(|e| Error::Input(format!("cannot start worker threads: {e}")))?
            .install(f)
    }
}

/// The estimate printed before long work, and the refusal beyond [`LIMIT_SECONDS`] unless
/// the user passed `--allow-long`.
pub const LIMIT_SECONDS: f64 = 3600.0;

/// Prints the estimated time on stderr when it is above a few seconds (unless `quiet`), and
/// refuses work estimated beyond [`LIMIT_SECONDS`] unless `allow`.
pub fn guard_long(what: &str, seconds: f64, allow: bool, quiet: bool) -> Result<(), Error> {
    if seconds > LIMIT_SECONDS && !allow {
        return Err(Error::Input(format!(
            "{what} is estimated to take {}, beyond the limit of {}; pass --allow-long to run it anyway",
            duration(seconds),
            duration(LIMIT_SECONDS)
        )));
    }
    if seconds > 5.0 && !quiet {
        eprintln!("qorbits: {what}: estimated {}", duration(seconds));
    }
    Ok(())
}

/// A duration in words: `40 s`, `12 min`, `3.5 h`, `2.1 days`, `4e3 years`.
pub fn duration(s: f64) -> String {
    match s {
        s if s < 90.0 => format!("{s:.0} s"),
        s if s < 5400.0 => format!("{:.0} min", s / 60.0),
        s if s < 172_800.0 => format!("{:.1} h", s / 3600.0),
        s if s < 3.2e7 * 3.0 => format!("{:.1} days", s / 86_400.0),
        s => format!("{:.1e} years", s / 3.156e7),
    }
}
