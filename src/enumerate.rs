//! Bulk enumeration: every form that can be the canonical representative of a class with
//! height below X, with loop bounds proved in `docs/enumeration.md`.
//!
//! The outer coefficients (a, b, c and a first range for d) are bounded by the reduction
//! theory of the covariant point; the innermost ranges come exactly from the height
//! condition `|I| ≤ I_max`, `|J| ≤ J_max` (d through the syzygy
//! `27R² = 48·I·a²·P − P³ − 64·J·a³`, e through the linear dependence of I and J on e), so
//! every form produced has `H < X`. Each form is a *candidate*; the caller keeps those that
//! are canonical (`crate::canonical::is_canonical`), so each class is met exactly once and
//! no de-duplication is needed.
//!
//! ```
//! use qorbits::enumerate::{HeightBound, Task};
//! let hb = HeightBound::new(10_000).unwrap();
//! let mut n = 0;
//! for task in Task::all(&hb, false) {
//!     task.for_each(&hb, |f| {
//!         assert!(qorbits::form::Form::<i128>::new(f.map(i128::from)).invariants().unwrap().h4 < 40_000);
//!         n += 1;
//!     });
//! }
//! assert!(n > 0);
//! ```

use crate::canonical::{approximate_point_f64, ETA, WINDOW};
use crate::covariant::{point_f64, Point};
use crate::error::{Error, Result};
use crate::form::{Form, Gl2};
use crate::int::Int;

/// The height condition `H < X` as exact integer bounds: `H4 < 4X` iff `|I| ≤ i_max` and
/// `|J| ≤ j_max`.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct HeightBound {
    /// The bound X (an integer ≥ 1).
    pub x: i128,
    /// The largest `i ≥ 0` with `4i³ < 4X`.
    pub i_max: i128,
    /// The largest `j ≥ 0` with `j² < 4X`.
    pub j_max: i128,
}

/// The largest height bound the builder takes (beyond it the loops leave machine integers).
pub const MAX_HEIGHT: i128 = 1_000_000_000_000_000_000;

impl HeightBound {
    /// The bound for `H < x`; refuses `x < 1` and `x >` [`MAX_HEIGHT`].
    pub fn new(x: i128) -> Result<HeightBound> {
        if !(1..=MAX_HEIGHT).contains(&x) {
            return Err(Error::Input(format!(
                "height bound {x} is outside 1 ..= 1e18, the range the builder handles"
            )));
        }
        let mut i_max = (x as f64).cbrt() as i128 + 2;
        while i_max * i_max * i_max >= x {
            i_max -= 1;
        }
        let j_max = Int::isqrt(&(4 * x - 1)).expect("non-negative");
        Ok(HeightBound { x, i_max, j_max })
    }

    /// `K = X^{1/6}`, rounded up.
    fn k(&self) -> f64 {
        (self.x as f64).powf(1.0 / 6.0) * (1.0 + 1e-12)
    }
}

/// `C_k` with `|h_k| ≤ C_k·H^{1/6}` for every real form h with covariant point i
/// (`docs/enumeration.md`, Lemma 3): `(4/√3)·(1/4, 5/4, 2, 5/4, 1/4)`.
pub const C: [f64; 5] = [
    0.577_350_269_189_626,
    2.886_751_345_948_129,
    4.618_802_153_517_006,
    2.886_751_345_948_129,
    0.577_350_269_189_626,
];

/// Relative slack added to every real bound before rounding it to an integer range.
pub(crate) const SLACK: f64 = 1e-9;

pub(crate) fn y_min() -> f64 {
    let (r, x) = (1.0 - ETA, 0.5 + ETA);
    (r * r - x * x).sqrt() * (1.0 - 1e-12)
}

/// The range of `p(x) = p[0] + p[1]x + p[2]x² + p[3]x³` over `x ∈ [lo, hi]`.
pub(crate) fn poly_range(p: [f64; 4], lo: f64, hi: f64) -> (f64, f64) {
    let eval = |x: f64| p[0] + x * (p[1] + x * (p[2] + x * p[3]));
    let mut pts = vec![lo, hi];
    // Critical points: p'(x) = p1 + 2p2 x + 3p3 x².
    let (qa, qb, qc) = (3.0 * p[3], 2.0 * p[2], p[1]);
    if qa != 0.0 {
        let disc = qb * qb - 4.0 * qa * qc;
        if disc >= 0.0 {
            let s = disc.sqrt();
            pts.push((-qb + s) / (2.0 * qa));
            pts.push((-qb - s) / (2.0 * qa));
        }
    } else if qb != 0.0 {
        pts.push(-qc / qb);
    }
    let vals: Vec<f64> = pts
        .into_iter()
        .filter(|x| *x >= lo && *x <= hi)
        .map(eval)
        .collect();
    let mn = vals.iter().cloned().fold(f64::INFINITY, f64::min);
    let mx = vals.iter().cloned().fold(f64::NEG_INFINITY, f64::max);
    (mn, mx)
}

/// Integers in `[lo, hi]`, widened by the slack.
pub(crate) fn int_range(lo: f64, hi: f64) -> (i64, i64) {
    let w = SLACK * (1.0 + lo.abs().max(hi.abs()));
    ((lo - w).ceil() as i64, (hi + w).floor() as i64)
}

/// `⌊n/d⌋` for any signs (d ≠ 0). On 64-bit operands (almost always in the loops) it uses
/// the machine division; `i128` division is a library call several times slower.
fn floor_div(n: i128, d: i128) -> i128 {
    if let (Ok(n), Ok(d)) = (i64::try_from(n), i64::try_from(d)) {
        if let Some(q) = n.checked_div(d) {
            let r = n - q * d;
            return i128::from(if r != 0 && ((r < 0) != (d < 0)) {
                q - 1
            } else {
                q
            });
        }
    }
    let q = n / d;
    let r = n - q * d;
    if r != 0 && ((r < 0) != (d < 0)) {
        q - 1
    } else {
        q
    }
}

/// `⌈n/d⌉` for any signs (d ≠ 0).
fn ceil_div(n: i128, d: i128) -> i128 {
    -floor_div(-n, d)
}

/// Integers e with `lo ≤ k·e + m ≤ hi` (k ≠ 0), as an inclusive range.
pub(crate) fn linear_range(k: i128, m: i128, lo: i128, hi: i128) -> (i128, i128) {
    if k > 0 {
        (ceil_div(lo - m, k), floor_div(hi - m, k))
    } else {
        (ceil_div(hi - m, k), floor_div(lo - m, k))
    }
}

/// One unit of work: all candidates with given `a` and `b`.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord)]
pub struct Task {
    /// Leading coefficient.
    pub a: i64,
    /// Second coefficient.
    pub b: i64,
}

impl Task {
    /// Every task for the bound, in a fixed order. For `a ≠ 0`, `b` runs over the window
    /// `−2|a| < b ≤ 2|a|`, one value per residue class mod 4a: the translation
    /// `x ↦ x + ky` changes b by `4ak`, so every translation class has exactly one member
    /// there. For `a = 0` (only with `include_reducible`) all `b ≠ 0` allowed by the bounds.
    pub fn all(hb: &HeightBound, include_reducible: bool) -> Vec<Task> {
        let k = hb.k();
        let ym = y_min();
        let mut out = Vec::new();
        let a_max = (C[0] * k / (ym * ym) * (1.0 + SLACK)).floor() as i64;
        for a in -a_max..=a_max {
            if a == 0 && !include_reducible {
                continue;
            }
            let (lo, hi) = if a == 0 {
                let m = C[1] * k / ym;
                int_range(-m, m)
            } else {
                (-2 * a.abs() + 1, 2 * a.abs())
            };
            for b in lo..=hi {
                if a == 0 && b == 0 {
                    continue; // y² divides the form: Disc = 0.
                }
                out.push(Task { a, b });
            }
        }
        out
    }

    /// Call `emit` with every candidate `[a, b, c, d, e]` of this task: one member of each
    /// translation class that may contain a canonical form with `H < X` (each candidate has
    /// `H < X`; [`translates_into_strip`] then finds the member with `0 ≤ Re z ≤ ½`).
    /// Returns the number of candidates.
    pub fn for_each(&self, hb: &HeightBound, mut emit: impl FnMut([i64; 5])) -> u64 {
        let (a, b) = (self.a as i128, self.b as i128);
        let k = hb.k();
        let ym = y_min();
        // y0 ≤ y_max: from |a| = |g0| ≤ C0·K/y0² (a ≠ 0), or |b| = |g1| ≤ C1·K/y0 (a = 0).
        let y_max = if a != 0 {
            (C[0] * k / a.abs() as f64).sqrt()
        } else {
            C[1] * k / b.abs() as f64
        } * (1.0 + SLACK);
        if y_max < ym {
            return 0;
        }
        let (af, bf) = (a as f64, b as f64);
        let mut count = 0;
        let mut per_c = |c: i128, x_lo: f64, x_hi: f64, count: &mut u64| {
            let cf = c as f64;
            // d = g3 − 2·x0·c − 3·x0²·b − 4·x0³·a with |g3| ≤ C3·K·y0.
            let (rlo, rhi) = poly_range([0.0, -2.0 * cf, -3.0 * bf, -4.0 * af], x_lo, x_hi);
            let m = C[3] * k * y_max;
            let (d_lo, d_hi) = int_range(rlo - m, rhi + m);
            let (mut d_lo, mut d_hi) = (d_lo as i128, d_hi as i128);
            let (lo, hi) = if a != 0 {
                // Syzygy: 27R² = 48·I·a²·P − P³ − 64·J·a³ ≤ 48·I_max·a²·|P| − P³ + 64·J_max·|a|³.
                let p = 8 * a * c - 3 * b * b;
                let rhs =
                    48 * hb.i_max * a * a * p.abs() - p * p * p + 64 * hb.j_max * a.abs().pow(3);
                if rhs < 0 {
                    return;
                }
                let r_max = Int::isqrt(&(rhs / 27)).expect("non-negative");
                // R = b³ + 8a²d − 4abc.
                linear_range(8 * a * a, b * b * b - 4 * a * b * c, -r_max, r_max)
            } else {
                // I = c² − 3bd.
                linear_range(-3 * b, c * c, -hb.i_max, hb.i_max)
            };
            d_lo = d_lo.max(lo);
            d_hi = d_hi.min(hi);
            for d in d_lo..=d_hi {
                // I = 12a·e + (c² − 3bd), J = (72ac − 27b²)·e + (9bcd − 27ad² − 2c³).
                let (i0, j0) = (
                    c * c - 3 * b * d,
                    9 * b * c * d - 27 * a * d * d - 2 * c * c * c,
                );
                let (ki, kj) = (12 * a, 72 * a * c - 27 * b * b);
                let (mut e_lo, mut e_hi) = (i128::MIN, i128::MAX);
                if ki != 0 {
                    let (lo, hi) = linear_range(ki, i0, -hb.i_max, hb.i_max);
                    e_lo = e_lo.max(lo);
                    e_hi = e_hi.min(hi);
                } else if i0.abs() > hb.i_max {
                    continue;
                }
                if kj != 0 {
                    let (lo, hi) = linear_range(kj, j0, -hb.j_max, hb.j_max);
                    e_lo = e_lo.max(lo);
                    e_hi = e_hi.min(hi);
                } else if j0.abs() > hb.j_max {
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
            // g1 = b + 4·x0·a with |g1| ≤ C1·K/y_min: the translate in the window has its
            // point's real part x0 in this interval.
            let m1 = C[1] * k / ym;
            let (u, v) = ((-m1 - bf) / (4.0 * af), (m1 - bf) / (4.0 * af));
            let (x_lo, x_hi) = (u.min(v), u.max(v));
            // c = g2 − 3·x0·b − 6·x0²·a with |g2| ≤ C2·K.
            let (qlo, qhi) = poly_range([0.0, -3.0 * bf, -6.0 * af, 0.0], x_lo, x_hi);
            let (c_lo, c_hi) = int_range(qlo - C[2] * k, qhi + C[2] * k);
            for c in c_lo..=c_hi {
                per_c(c as i128, x_lo, x_hi, &mut count);
            }
        } else {
            // a = 0: translation changes c by 3bk, so c runs over one window of length 3|b|;
            // c = g2 − 3·x0·b with |g2| ≤ C2·K places x0.
            let w = 3 * b.abs();
            for c in (-(w / 2) + 1 - (w % 2))..=(w / 2) {
                let cf = c as f64;
                let m2 = C[2] * k;
                let (u, v) = ((m2 - cf) / (3.0 * bf), (-m2 - cf) / (3.0 * bf));
                per_c(c, u.min(v), u.max(v), &mut count);
            }
        }
        count
    }
}

/// A member of a translation class with its covariant point (when f64 is reliable).
pub type Translate = (Form<i128>, Option<Point<f64>>);

/// The members of the translation class of `f` whose covariant point has real part in
/// `[−η, ½ + η]` (at most one; up to two are returned when the point is within 10⁻⁶ of the
/// strip's edge, to be decided exactly by the caller). Each comes with its moved point.
pub fn translates_into_strip(f: &Form<i128>) -> Result<Vec<Translate>> {
    let p = point_f64(&f.c.map(|v| v as f64));
    let (x, y) = match &p {
        Some(p) => (p.x, p.y),
        None => approximate_point_f64(f)?,
    };
    if y < y_min() - WINDOW {
        // |z| ≥ 1 − η forces Im z ≥ y_min in the strip, whatever the translation.
        return Ok(Vec::new());
    }
    let lo = (x - 0.5 - ETA - WINDOW).ceil() as i64;
    let hi = (x + ETA + WINDOW).floor() as i64;
    let mut out = Vec::new();
    for k in lo..=hi {
        let t = f.act(&Gl2::new(1, 0, k, 1)).ok_or(Error::Overflow)?;
        let moved = p.as_ref().map(|p| Point {
            x: p.x - k as f64,
            y: p.y,
            err: p.err,
        });
        out.push((t, moved));
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn height_bound_is_exact() {
        let hb = HeightBound::new(10_000).unwrap();
        assert_eq!(hb.i_max, 21); // 21³ = 9261 < 10⁴ ≤ 22³
        assert_eq!(hb.j_max, 199); // 199² < 4·10⁴ = 200²
        assert!(HeightBound::new(0).is_err());
    }

    #[test]
    fn rounding_divisions_for_all_signs() {
        for (n, d) in [
            (17i128, -24i128),
            (-17, 24),
            (-17, -24),
            (17, 24),
            (48, -24),
            (-48, 24),
        ] {
            let q = n as f64 / d as f64;
            assert_eq!(floor_div(n, d), q.floor() as i128, "{n}/{d}");
            assert_eq!(ceil_div(n, d), q.ceil() as i128, "{n}/{d}");
        }
        // −24·e + 4 ∈ [−21, 21]  ⇔  e ∈ {0, 1}
        assert_eq!(linear_range(-24, 4, -21, 21), (0, 1));
        // The i64 fast path and the i128 path agree, also at the edges of i64.
        let m = i128::from(i64::MIN);
        assert_eq!(floor_div(m, -1), -m, "i64::MIN / −1 overflows i64");
        assert_eq!(floor_div(m, 7), (m - 6) / 7);
        let big = 10i128.pow(30) + 1;
        assert_eq!(floor_div(-big, 10), -(10i128.pow(29)) - 1);
        assert_eq!(ceil_div(big, 10), 10i128.pow(29) + 1);
        assert_eq!(floor_div(big, -big), -1);
    }

    #[test]
    fn poly_range_finds_interior_extremes() {
        // x − x³ on [0, 1] peaks at 1/√3.
        let (lo, hi) = poly_range([0.0, 1.0, 0.0, -1.0], 0.0, 1.0);
        assert!(lo.abs() < 1e-15 && (hi - 2.0 / (3.0 * 3f64.sqrt())).abs() < 1e-12);
    }
}
