//! The enumeration of a whole family of pairs at once: every candidate of the bulk loops
//! below a height X (irreducible side, `a ≠ 0`) whose invariants satisfy `48 | I` and
//! `1728 | J` — the invariants `(c4, 2c6) = (−48A, −1728B)` of the quartics of the curves
//! `y² = x³ + Ax + B`. Proved complete in `docs/family-enumeration.md`.
//!
//! The loops are the bulk loops of [`crate::enumerate::bulk`] (same tasks, same ranges of
//! c and d, [`crate::enumerate::bounds::d_ranges`], tighter than the bulk's d range but never
//! missing one of its candidates) with the congruences imposed inside:
//! `3 | I` forces `3 | c`, and then `27 | J` holds for every (a, b, d, e); and since
//! `I = 12a·e + (c² − 3bd)` and `J = (72ac − 27b²)·e + (9bcd − 27ad² − 2c³)` are linear in e,
//! `16 | I` and `64 | J` hold for e in one residue class mod a power of 2 dividing 64 or
//! for no e ([`two_adic_progression`]), so the innermost loop visits only the e that give
//! members of the family. Each candidate is one member of a translation class, as for the
//! bulk loops; the classification stage keeps the canonical ones.
//!
//! ```
//! use qorbits::enumerate::bounds::{Bounds, Task};
//! use qorbits::enumerate::congruent::for_each_congruent;
//! let b = Bounds::for_height(27_648 * 300).unwrap();
//! let mut n = 0;
//! for task in Task::all(&b, false) {
//!     for_each_congruent(&b, task, |f| {
//!         let inv = qorbits::form::Form::<i128>::new(f.map(i128::from)).invariants().unwrap();
//!         assert!(inv.i % 48 == 0 && inv.j % 1728 == 0 && inv.h4 < 4 * 27_648 * 300);
//!         n += 1;
//!     });
//! }
//! assert!(n > 0);
//! ```

use crate::enumerate::bounds::{d_ranges, linear_range, Bounds, Task};

/// The e with `u·e + w ≡ 0 (mod 2^k)` (k ≤ 6): `Some((r, s))` for `e ≡ r (mod 2^s)` (s = 0:
/// every e), or `None` when no e works.
fn linear_mod_power_of_two(u: i128, w: i128, k: u32) -> Option<(u64, u32)> {
    let m = (1u64 << k) - 1;
    let (u, w) = ((u as u64) & m, (w as u64).wrapping_neg() & m);
    if u == 0 {
        return (w == 0).then_some((0, 0));
    }
    let t = u.trailing_zeros();
    if w & ((1 << t) - 1) != 0 {
        return None;
    }
    // e·(u/2^t) ≡ w/2^t (mod 2^(k−t)); the inverse of an odd number mod 2⁶⁴ by Newton's
    // iteration (each step doubles the correct low bits: 3 → 6 → 12 → …).
    let odd = u >> t;
    let mut inv = odd;
    for _ in 0..5 {
        inv = inv.wrapping_mul(2u64.wrapping_sub(odd.wrapping_mul(inv)));
    }
    let s = k - t;
    Some((((w >> t).wrapping_mul(inv)) & ((1 << s) - 1), s))
}

/// The e for which `16 | 12a·e + i0` and `64 | kj·e + j0`: `Some((r, s))` for the class
/// `e ≡ r (mod 2^s)`, or `None`.
pub fn two_adic_progression(a: i128, i0: i128, kj: i128, j0: i128) -> Option<(u64, u32)> {
    let (r1, s1) = linear_mod_power_of_two(12 * a, i0, 4)?;
    let (r2, s2) = linear_mod_power_of_two(kj, j0, 6)?;
    // Two classes mod powers of two meet iff they agree mod the smaller one.
    let ((r_lo, s_lo), (r_hi, s_hi)) = if s1 <= s2 {
        ((r1, s1), (r2, s2))
    } else {
        ((r2, s2), (r1, s1))
    };
    ((r_hi ^ r_lo) & ((1 << s_lo) - 1) == 0).then_some((r_hi, s_hi))
}

/// Calls `emit` with every candidate of the bulk loops below the height of `hb` for this
/// task (`a ≠ 0`) with `48 | I` and `1728 | J`; returns how many. Tasks with `a = 0` have
/// none here (the family needs irreducible forms only).
pub fn for_each_congruent(hb: &Bounds, task: Task, mut emit: impl FnMut([i64; 5])) -> u64 {
    if task.a == 0 {
        return 0;
    }
    let (a, b) = (i128::from(task.a), i128::from(task.b));
    let (c_lo, c_hi) = hb.c_range(task.a, task.b);
    let mut count = 0;
    // 3 | c: the least multiple of 3 that is ≥ c_lo.
    let first = c_lo + (-c_lo).rem_euclid(3);
    for c in (first..=c_hi).step_by(3).map(i128::from) {
        let (ki, kj) = (12 * a, 72 * a * c - 27 * b * b);
        for d in d_ranges(hb, task.a, task.b, c)
            .into_iter()
            .flat_map(|(lo, hi)| lo..=hi)
        {
            let i0 = c * c - 3 * b * d;
            let j0 = 9 * b * c * d - 27 * a * d * d - 2 * c * c * c;
            let Some((r, s)) = two_adic_progression(a, i0, kj, j0) else {
                continue;
            };
            // |I| ≤ I_max and |J| ≤ J_max (bulk loops); a ≠ 0 bounds e through I.
            let (mut e_lo, mut e_hi) = linear_range(ki, i0, -hb.i_max, hb.i_max);
            if kj != 0 {
                let (lo, hi) = linear_range(kj, j0, -hb.j_max, hb.j_max);
                (e_lo, e_hi) = (e_lo.max(lo), e_hi.min(hi));
            } else if j0.abs() > hb.j_max {
                continue;
            }
            if e_lo > e_hi {
                continue;
            }
            let step = 1i128 << s;
            let mut e = e_lo + (i128::from(r) - e_lo).rem_euclid(step);
            while e <= e_hi {
                count += 1;
                emit([task.a, task.b, c as i64, d as i64, e as i64]);
                e += step;
            }
        }
    }
    count
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::form::Form;

    #[test]
    fn progressions_are_the_exact_solution_sets() {
        // Every (a, i0, kj, j0) residue pattern against a scan of e over one period.
        let mut n = 0;
        for a in -9i128..=9 {
            for i0 in [0i128, 3, 4, 8, 12, -16, 36, 100] {
                for kj in [0i128, 1, 2, 24, -27, 64, 96, 1000] {
                    for j0 in [0i128, 5, 16, -32, 64, 128, 1729] {
                        let want: Vec<i128> = (0..64)
                            .filter(|e| (12 * a * e + i0) % 16 == 0 && (kj * e + j0) % 64 == 0)
                            .collect();
                        let got: Vec<i128> = match two_adic_progression(a, i0, kj, j0) {
                            None => Vec::new(),
                            Some((r, s)) => (0..64)
                                .filter(|e| (e - r as i128).rem_euclid(1 << s) == 0)
                                .collect(),
                        };
                        assert_eq!(got, want, "a {a} i0 {i0} kj {kj} j0 {j0}");
                        n += usize::from(!want.is_empty());
                    }
                }
            }
        }
        assert!(n > 100);
    }

    #[test]
    fn the_loops_give_exactly_the_congruent_bulk_candidates() {
        // The bulk candidates below X filtered by 48 | I, 1728 | J, against these loops.
        let hb = Bounds::for_height(27_648 * 500).unwrap();
        let (mut bulk, mut ours) = (Vec::new(), Vec::new());
        for task in Task::all(&hb, false) {
            task.for_each(&hb, |f| {
                let inv = Form::<i128>::new(f.map(i128::from)).invariants().unwrap();
                if inv.i % 48 == 0 && inv.j % 1728 == 0 {
                    bulk.push(f);
                }
            });
            for_each_congruent(&hb, task, |f| ours.push(f));
        }
        bulk.sort();
        ours.sort();
        assert!(bulk.len() > 100, "{}", bulk.len());
        assert_eq!(bulk, ours);
    }
}
