//! How much work the loops do, counted from the same bounds they run on, for estimates of
//! time before long work starts (the rates that turn counts into seconds are measured by
//! the benchmarks and live with the commands that print estimates).
//!
//! ```
//! use qorbits::enumerate::cost::search_steps;
//! // The search visits about H^{1/2} triples (a, b, c): a hundred times more for 10⁴ × H.
//! let r = search_steps(4e16, false) / search_steps(4e12, false);
//! assert!((50.0..200.0).contains(&r), "{r}");
//! ```

use crate::enumerate::bounds::{c_window_a0, Bounds, Task};

/// Above this `H4` the count is made at this height and scaled by `(H4 / H4_EXACT)^{1/2}`,
/// the growth of the loops (`docs/enumeration.md`), so that an estimate costs milliseconds.
const H4_EXACT: f64 = 4e16;

/// The number of triples (a, b, c) the search by invariants visits for one pair with this
/// `H4` (exact up to `H4 = 4·10¹⁶`, scaled beyond).
pub fn search_steps(h4: f64, include_reducible: bool) -> f64 {
    let at = h4.min(H4_EXACT);
    let bounds = Bounds::for_pair(at);
    let steps: f64 = Task::all(&bounds, include_reducible)
        .iter()
        .map(|t| {
            if t.a != 0 {
                let (lo, hi) = bounds.c_range(t.a, t.b);
                (hi - lo + 1).max(0) as f64
            } else {
                c_window_a0(t.b).count() as f64
            }
        })
        .sum();
    steps * (h4 / at).sqrt()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_scaled_count_continues_the_exact_one() {
        let exact = search_steps(H4_EXACT, true);
        let scaled = search_steps(4.0 * H4_EXACT, true);
        assert!((scaled / exact - 2.0).abs() < 1e-9);
        assert!(search_steps(4e10, true) > search_steps(4e10, false));
    }
}
