//! Progress on stderr for the command line: a bar with ETA for work of known length, a
//! spinner otherwise; hidden with `--quiet` (and by indicatif when stderr is not a
//! terminal).

use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};
use qorbits::progress::Progress;

/// A progress bar (or spinner) implementing the library's [`Progress`].
pub struct Bar(ProgressBar);

impl Bar {
    /// A bar on stderr, or a hidden one.
    pub fn new(quiet: bool) -> Bar {
        if quiet {
            return Bar(ProgressBar::hidden());
        }
        Bar(ProgressBar::with_draw_target(
            None,
            ProgressDrawTarget::stderr(),
        ))
    }

    /// Removes the bar from the terminal.
    pub fn finish(&self) {
        self.0.finish_and_clear();
    }
}

impl Progress for Bar {
    fn start(&self, what: &str, total: u64) {
        if total > 0 {
            self.0.set_length(total);
            self.0.set_position(0);
            self.0.set_style(
                ProgressStyle::with_template("{msg} [{bar:40}] {pos}/{len}, {elapsed} (eta {eta})")
                    .expect("valid template")
                    .progress_chars("=> "),
            );
        } else {
            self.0.set_style(
                ProgressStyle::with_template("{spinner} {msg}, {elapsed}").expect("valid template"),
            );
            self.0
                .enable_steady_tick(std::time::Duration::from_millis(200));
        }
        self.0.set_message(what.to_string());
    }

    fn advance(&self, n: u64) {
        self.0.inc(n);
    }
}

impl Drop for Bar {
    fn drop(&mut self) {
        self.0.finish_and_clear();
    }
}
