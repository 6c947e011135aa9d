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

/// A unit of work of the bulk loops: one task (a, b) and a range of its values of c
/// (the `c` of [`Task::c_values`], in their order). Chunks are what a build distributes over
/// threads, runs and shards.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord)]
pub struct Chunk {
    /// The task.
    pub task: Task,
    /// First value of c (inclusive).
    pub c_lo: i64,
    /// Last value of c (inclusive).
    pub c_hi: i64,
}

impl Task {
    /// The values of c the loops run over for this task: the range of
    /// [`Bounds::c_range`] for a ≠ 0, one window of length 3|b| for a = 0; empty when no
    /// canonical form can have these leading coefficients.
    pub fn c_values(&self, hb: &Bounds) -> (i64, i64) {
        if hb.y_max(self.a, self.b) * (1.0 + SLACK) < y_min() {
            return (1, 0);
        }
        if self.a != 0 {
            hb.c_range(self.a, self.b)
        } else {
            let w = c_window_a0(self.b);
            (*w.start(), *w.end())
        }
    }

    /// Call `emit` with every candidate `[a, b, c, d, e]` of this task: one member of each
    /// translation class that may contain a canonical form with `H < X` (each candidate has
    /// `H < X`; [`crate::form::canonical::translates_into_strip`] then finds the member with
    /// `0 ≤ Re z ≤ ½`). Returns the number of candidates.
    pub fn for_each(&self, hb: &Bounds, emit: impl FnMut([i64; 5])) -> u64 {
        let (lo, hi) = self.c_values(hb);
        Chunk {
            task: *self,
            c_lo: lo,
            c_hi: hi,
        }
        .for_each(hb, emit)
    }
}

impl Chunk {
    /// [`Task::for_each`] on the values of c of this chunk.
    pub fn for_each(&self, hb: &Bounds, mut emit: impl FnMut([i64; 5])) -> u64 {
        let (a, b) = (self.task.a, self.task.b);
        self.walk(hb, |c, d, e_lo, e_hi| {
            for e in e_lo..=e_hi {
                emit([a, b, c as i64, d as i64, e as i64]);
            }
        })
    }

    /// The number of candidates for each value of c of the chunk, without making them (the
    /// work model of a build): `(c, candidates)` for the values of c with candidates.
    pub fn count_by_c(&self, hb: &Bounds) -> Vec<(i64, u64)> {
        let mut out: Vec<(i64, u64)> = Vec::new();
        self.walk(hb, |c, _, e_lo, e_hi| {
            let n = (e_hi - e_lo + 1) as u64;
            match out.last_mut() {
                Some((last, m)) if *last == c as i64 => *m += n,
                _ => out.push((c as i64, n)),
            }
        });
        out
    }

    /// Calls `found(c, d, e_lo, e_hi)` for every (c, d) of the chunk with a non-empty range
    /// of e (in increasing c, then d); returns the number of candidates.
    fn walk(&self, hb: &Bounds, mut found: impl FnMut(i128, i128, i128, i128)) -> u64 {
        let (ta, tb) = (self.task.a, self.task.b);
        let (a, b) = (i128::from(ta), i128::from(tb));
        let k = hb.k;
        // y0 ≤ y_max: from |a| = |g0| ≤ C0·K/y0² (a ≠ 0), or |b| = |g1| ≤ C1·K/y0 (a = 0).
        let y_max = hb.y_max(ta, tb) * (1.0 + SLACK);
        if y_max < y_min() {
            return 0;
        }
        let bf = b as f64;
        let mut count = 0;
        let mut per_c = |c: i128, x_lo: f64, x_hi: f64, count: &mut u64| {
            let ranges = if a != 0 {
                // The annulus of R from the syzygy, inside the range of g3 (bounds::d_ranges).
                d_ranges(hb, ta, tb, c)
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
                if e_lo <= e_hi {
                    *count += (e_hi - e_lo + 1) as u64;
                    found(c, d, e_lo, e_hi);
                }
            }
        };
        let (c_lo, c_hi) = self.task.c_values(hb);
        let (c_lo, c_hi) = (self.c_lo.max(c_lo), self.c_hi.min(c_hi));
        for c in c_lo..=c_hi {
            let (x_lo, x_hi) = if a != 0 {
                hb.x_interval(ta, tb)
            } else {
                hb.x_interval_a0(tb, c)
            };
            per_c(i128::from(c), x_lo, x_hi, &mut count);
        }
        count
    }
}
