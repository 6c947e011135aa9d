//! The bulk loops: every form that can be the canonical representative of a class with
//! height below X, with the loop bounds of [`crate::enumerate::bounds`] (proved in
//! `docs/enumeration.md`).
//!
//! The outer coefficients (a, b, c and a first range for d) are bounded by the reduction
//! theory of the covariant point; the innermost ranges come exactly from the height
//! condition `|I| ≤ I_max`, `|J| ≤ J_max` (d through the syzygy
//! `27R² = 48·I·a²·P − P³ − 64·J·a³`, e through the linear dependence of I and J on e), so
//! every form produced has `H < X`. Each form is a *candidate*: one member of a translation
//! class, which the classification stage ([`crate::table::classify`]) translates into the
//! strip and keeps when canonical, so each class is met exactly once and no
//! de-duplication is needed.
//!
//! ```
//! use qorbits::enumerate::bounds::{Bounds, Task};
//! let b = Bounds::for_height(10_000).unwrap();
//! let mut n = 0;
//! for task in Task::all(&b, false) {
//!     task.for_each(&b, |f| {
//!         assert!(qorbits::form::Form::<i128>::new(f.map(i128::from)).invariants().unwrap().h4 < 40_000);
//!         n += 1;
//!     });
//! }
//! assert!(n > 0);
//! ```

use crate::enumerate::bounds::{c_window_a0, d_ranges, int_range, linear_range, poly_range};
use crate::enumerate::bounds::{Bounds, Task, C, SLACK};
use crate::form::canonical::y_min;

impl Task {
    /// Call `emit` with every candidate `[a, b, c, d, e]` of this task: one member of each
    /// translation class that may contain a canonical form with `H < X` (each candidate has
    /// `H < X`; [`crate::form::canonical::translates_into_strip`] then finds the member with
    /// `0 ≤ Re z ≤ ½`). Returns the number of candidates.
    pub fn for_each(&self, hb: &Bounds, mut emit: impl FnMut([i64; 5])) -> u64 {
        let (a, b) = (self.a as i128, self.b as i128);
        let k = hb.k;
        // y0 ≤ y_max: from |a| = |g0| ≤ C0·K/y0² (a ≠ 0), or |b| = |g1| ≤ C1·K/y0 (a = 0).
        let y_max = hb.y_max(self.a, self.b) * (1.0 + SLACK);
        if y_max < y_min() {
            return 0;
        }
        let bf = b as f64;
        let mut count = 0;
        let mut per_c = |c: i128, x_lo: f64, x_hi: f64, count: &mut u64| {
            let ranges = if a != 0 {
                // The annulus of R from the syzygy, inside the range of g3 (bounds::d_ranges).
                d_ranges(hb, self.a, self.b, c)
            } else {
                // d = g3 − 2·x0·c − 3·x0²·b with |g3| ≤ C3·K·y0, and I = c² − 3bd.
                let (rlo, rhi) = poly_range([0.0, -2.0 * c as f64, -3.0 * bf, 0.0], x_lo, x_hi);
                let m = C[3] * k * y_max;
                let (d_lo, d_hi) = int_range(rlo - m, rhi + m);
                let (lo, hi) = linear_range(-3 * b, c * c, -hb.i_max, hb.i_max);
                vec![(i128::from(d_lo).max(lo), i128::from(d_hi).min(hi))]
            };
            for d in ranges.into_iter().flat_map(|(lo, hi)| lo..=hi) {
                // I = 12a·e + (c² − 3bd), J = (72ac − 27b²)·e + (9bcd − 27ad² − 2c³).
                let (i0, j0) = (
                    c * c - 3 * b * d,
                    9 * b * c * d - 27 * a * d * d - 2 * c * c * c,
                );
                let (ki, kj) = (12 * a, 72 * a * c - 27 * b * b);
                let (mut e_lo, mut e_hi) = (i128::MIN, i128::MAX);
                let mut empty = false;
                for (k, m, max) in [(ki, i0, hb.i_max), (kj, j0, hb.j_max)] {
                    if k != 0 {
                        let (lo, hi) = linear_range(k, m, -max, max);
                        e_lo = e_lo.max(lo);
                        e_hi = e_hi.min(hi);
                    } else {
                        // |m| ≤ max holds for every e or for none.
                        empty |= m.abs() > max;
                    }
                }
                if empty {
                    continue;
                }
                // a ≠ 0 bounds e through I; a = 0 has b ≠ 0, so 27b² ≠ 0 bounds it through J.
                assert!(e_lo > i128::MIN && e_hi < i128::MAX, "unbounded e range");
                for e in e_lo..=e_hi {
                    *count += 1;
                    emit([a as i64, b as i64, c as i64, d as i64, e as i64]);
                }
            }
        };
        if a != 0 {
            let (x_lo, x_hi) = hb.x_interval(self.a, self.b);
            let (c_lo, c_hi) = hb.c_range(self.a, self.b);
            for c in c_lo..=c_hi {
                per_c(c as i128, x_lo, x_hi, &mut count);
            }
        } else {
            for c in c_window_a0(self.b) {
                let (x_lo, x_hi) = hb.x_interval_a0(self.b, c);
                per_c(i128::from(c), x_lo, x_hi, &mut count);
            }
        }
        count
    }
}
