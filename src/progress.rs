//! How long work reports its progress to whoever runs it: a callback trait, so that no
//! library signature names a progress-bar crate. The command line implements it with a
//! bar on stderr; [`Silent`] ignores it.
//!
//! ```
//! use qorbits::progress::{Progress, Silent};
//! use std::sync::atomic::{AtomicU64, Ordering};
//! struct Count(AtomicU64);
//! impl Progress for Count {
//!     fn advance(&self, n: u64) {
//!         self.0.fetch_add(n, Ordering::Relaxed);
//!     }
//! }
//! let c = Count(AtomicU64::new(0));
//! c.start("work", 2);
//! c.advance(2);
//! assert_eq!(c.0.load(Ordering::Relaxed), 2);
//! Silent.advance(1);
//! ```

/// Receives progress reports; called from worker threads, so it must be `Sync`.
pub trait Progress: Sync {
    /// A phase begins: what it does, and how many steps it has (0 when unknown).
    fn start(&self, _what: &str, _total: u64) {}
    /// `n` more steps are done.
    fn advance(&self, _n: u64) {}
}

/// Progress that nobody watches.
#[derive(Clone, Copy, Debug, Default)]
pub struct Silent;

impl Progress for Silent {}
