//! The loop bounds shared by both enumerators (the bulk loops of [`crate::enumerate::bulk`]
//! and the search by invariants of [`crate::enumerate::by_invariants`]), proved in
//! `docs/enumeration.md`: the height condition as exact integer bounds, the constants
//! `C_k`, the tasks (a, b) with one member of each translation class, and the ranges of c.
//!
//! Every real-valued bound is widened by the relative slack [`SLACK`] before it is rounded
//! to integers, far more than the floating-point error of computing it.
//!
//! ```
//! use qorbits::enumerate::bounds::{Bounds, Task};
//! let b = Bounds::for_height(10_000).unwrap();
//! assert_eq!((b.i_max, b.j_max), (21, 199)); // 21³ < 10⁴ ≤ 22³, 199² < 4·10⁴ = 200²
//! assert!(Task::all(&b, false).iter().all(|t| t.a != 0));
//! ```

use crate::arith::int::Int;
use crate::error::{Error, Result};
use crate::form::canonical::y_min;

/// The largest height bound the builder takes (beyond it the loops leave machine integers).
pub const MAX_HEIGHT: i128 = 1_000_000_000_000_000_000;

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
pub const SLACK: f64 = 1e-9;

/// The bounds of one enumeration: `K ≥ H^{1/6}` for every form it must meet, and the exact
/// height condition `|I| ≤ i_max`, `|J| ≤ j_max`.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Bounds {
    /// `K`, an upper bound of `H^{1/6}` (rounded up).
    pub k: f64,
    /// The height bound X of a bulk enumeration (`H < X`); 0 for a search by invariants.
    pub x: i128,
    /// The largest `i ≥ 0` with `i³ < X`.
    pub i_max: i128,
    /// The largest `j ≥ 0` with `j² < 4X`.
    pub j_max: i128,
}

impl Bounds {
    /// The bounds of the bulk enumeration of `H < x`; refuses `x < 1` and `x >`
    /// [`MAX_HEIGHT`].
    pub fn for_height(x: i128) -> Result<Bounds> {
        if !(1..=MAX_HEIGHT).contains(&x) {
            return Err(Error::Input(format!(
                "height bound {x} is outside the range 1 to 10^18 that the builder handles; give a height in that range"
            )));
        }
        let mut i_max = (x as f64).cbrt() as i128 + 2;
        while i_max * i_max * i_max >= x {
            i_max -= 1;
        }
        let j_max = Int::isqrt(&(4 * x - 1)).expect("non-negative");
        Ok(Bounds {
            k: (x as f64).powf(1.0 / 6.0) * (1.0 + 1e-12),
            x,
            i_max,
            j_max,
        })
    }

    /// The bounds of the search for the forms of one pair with `H4 = h4` (`K = H^{1/6}`).
    pub fn for_pair(h4: f64) -> Bounds {
        Bounds {
            k: (h4 / 4.0).powf(1.0 / 6.0) * (1.0 + SLACK),
            x: 0,
            i_max: 0,
            j_max: 0,
        }
    }

    /// Whether (a, b) with `a ≠ 0` and b in the window `−2|a| < b ≤ 2|a|` is a task of
    /// [`Task::all`] for these bounds: `|a| ≤ C0·K/y_min²` and `y_max(a, b) ≥ y_min`, both
    /// widened by the slack as there.
    pub fn holds_task(&self, a: i64, b: i64) -> bool {
        let ym = y_min();
        let a_max = (C[0] * self.k / (ym * ym) * (1.0 + SLACK)).floor() as i64;
        a != 0 && a.abs() <= a_max && self.y_max(a, b) * (1.0 + SLACK) >= ym
    }

    /// `y_max` for a task: the imaginary part of the point of a canonical form with these
    /// leading coefficients is at most this (from `|a| ≤ C0·K/y0²`, or `|b| ≤ C1·K/y0` when
    /// a = 0).
    pub fn y_max(&self, a: i64, b: i64) -> f64 {
        if a != 0 {
            (C[0] * self.k / a.unsigned_abs() as f64).sqrt()
        } else {
            C[1] * self.k / b.unsigned_abs() as f64
        }
    }

    /// The interval of real parts `x0` of the point of the member of a translation class
    /// in the window of [`Task::all`] (a ≠ 0): from `g1 = b + 4·x0·a`, `|g1| ≤ C1·K/y_min`.
    pub fn x_interval(&self, a: i64, b: i64) -> (f64, f64) {
        let (af, bf) = (a as f64, b as f64);
        let m1 = C[1] * self.k / y_min();
        let (u, v) = ((-m1 - bf) / (4.0 * af), (m1 - bf) / (4.0 * af));
        (u.min(v), u.max(v))
    }

    /// The range of c for a ≠ 0: `c = g2 − 3·x0·b − 6·x0²·a` with `|g2| ≤ C2·K` over the
    /// interval of [`Bounds::x_interval`].
    pub fn c_range(&self, a: i64, b: i64) -> (i64, i64) {
        let (x_lo, x_hi) = self.x_interval(a, b);
        let (af, bf) = (a as f64, b as f64);
        let (qlo, qhi) = poly_range([0.0, -3.0 * bf, -6.0 * af, 0.0], x_lo, x_hi);
        int_range(qlo - C[2] * self.k, qhi + C[2] * self.k)
    }

    /// For a = 0: the interval of `x0` pinned by `g2 = c + 3·x0·b`, `|g2| ≤ C2·K`.
    pub fn x_interval_a0(&self, b: i64, c: i64) -> (f64, f64) {
        let (bf, cf) = (b as f64, c as f64);
        let m2 = C[2] * self.k;
        let (u, v) = ((m2 - cf) / (3.0 * bf), (-m2 - cf) / (3.0 * bf));
        (u.min(v), u.max(v))
    }
}

/// The ranges of d for a task with `a ≠ 0` and one c, below the height of a bulk
/// enumeration (`H < X`, [`Bounds::for_height`]): at most two ranges, in increasing order.
/// Every candidate of the bulk loops with these (a, b, c) has its d in one of them
/// (`docs/family-enumeration.md` §2): d from `|g3| ≤ C3·K·y_max` over the interval of
/// [`Bounds::x_interval`] (`docs/enumeration.md` §6), and `R = b³ + 8a²d − 4abc` from the
/// syzygy `27R² = 48·I·a²·P − P³ − 64·J·a³` with `|I| ≤ I_max`, `|J| ≤ J_max`:
/// `−P³ − m ≤ 27R² ≤ −P³ + m`, `m = 48·I_max·a²·|P| + 64·J_max·|a|³`, so |R| lies in
/// `[r_lo, r_hi]` — an annulus, much thinner than the disc `|R| ≤ r_hi` when −P³ ≫ m.
pub fn d_ranges(hb: &Bounds, a: i64, b: i64, c: i128) -> Vec<(i128, i128)> {
    let y_max = hb.y_max(a, b) * (1.0 + SLACK);
    let (x_lo, x_hi) = hb.x_interval(a, b);
    let (ai, bi) = (i128::from(a), i128::from(b));
    // d = g3 − 2·x0·c − 3·x0²·b − 4·x0³·a.
    let poly = [0.0, -2.0 * c as f64, -3.0 * b as f64, -4.0 * a as f64];
    let (rlo, rhi) = poly_range(poly, x_lo, x_hi);
    let g = C[3] * hb.k * y_max;
    let (g_lo, g_hi) = int_range(rlo - g, rhi + g);
    let p = 8 * ai * c - 3 * bi * bi;
    let m = 48 * hb.i_max * ai * ai * p.abs() + 64 * hb.j_max * ai.abs().pow(3);
    let (top, bottom) = (m - p.pow(3), -m - p.pow(3));
    if top < 0 {
        return Vec::new();
    }
    // r_hi = ⌊√⌊top/27⌋⌋; r_lo = the least r ≥ 0 with 27r² ≥ bottom.
    let r_hi = Int::isqrt(&(top / 27)).expect("non-negative");
    let r_lo = if bottom <= 0 {
        0
    } else {
        let q = ceil_div(bottom, 27);
        let r = Int::isqrt(&q).expect("positive");
        if r * r == q {
            r
        } else {
            r + 1
        }
    };
    // R = b³ + 8a²d − 4abc: each range of R gives one of d.
    let (k, off) = (8 * ai * ai, bi.pow(3) - 4 * ai * bi * c);
    let rs = if r_lo == 0 {
        vec![(-r_hi, r_hi)]
    } else {
        vec![(-r_hi, -r_lo), (r_lo, r_hi)]
    };
    let mut out: Vec<(i128, i128)> = rs
        .into_iter()
        .filter(|(lo, hi)| lo <= hi)
        .map(|(lo, hi)| linear_range(k, off, lo, hi))
        .map(|(lo, hi)| (lo.max(i128::from(g_lo)), hi.min(i128::from(g_hi))))
        .filter(|(lo, hi)| lo <= hi)
        .collect();
    out.sort();
    out
}

/// For a = 0 the translation `x ↦ x + ky` changes c by `3bk`: the window of c, one value
/// per residue class mod 3b.
pub fn c_window_a0(b: i64) -> std::ops::RangeInclusive<i64> {
    let w = 3 * b.abs();
    (-(w / 2) + 1 - (w % 2))..=(w / 2)
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
    /// Every task for the bounds that can hold a canonical form, in a fixed order. For
    /// `a ≠ 0`, `b` runs over the window `−2|a| < b ≤ 2|a|`, one value per residue class
    /// mod 4a: the translation `x ↦ x + ky` changes b by `4ak`, so every translation class
    /// has exactly one member there. For `a = 0` (only with `include_reducible`) all
    /// `b ≠ 0` allowed by the bounds.
    pub fn all(bounds: &Bounds, include_reducible: bool) -> Vec<Task> {
        let ym = y_min();
        let mut out = Vec::new();
        let a_max = (C[0] * bounds.k / (ym * ym) * (1.0 + SLACK)).floor() as i64;
        for a in -a_max..=a_max {
            let (lo, hi) = if a == 0 {
                if !include_reducible {
                    continue;
                }
                let m = C[1] * bounds.k / ym;
                int_range(-m, m)
            } else {
                (-2 * a.abs() + 1, 2 * a.abs())
            };
            for b in lo..=hi {
                if a == 0 && b == 0 {
                    continue; // y² divides the form: Disc = 0.
                }
                if bounds.y_max(a, b) * (1.0 + SLACK) < ym {
                    continue;
                }
                out.push(Task { a, b });
            }
        }
        out
    }
}

/// The range of `p(x) = p[0] + p[1]x + p[2]x² + p[3]x³` over `x ∈ [lo, hi]`.
pub fn poly_range(p: [f64; 4], lo: f64, hi: f64) -> (f64, f64) {
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
pub fn int_range(lo: f64, hi: f64) -> (i64, i64) {
    let w = SLACK * (1.0 + lo.abs().max(hi.abs()));
    ((lo - w).ceil() as i64, (hi + w).floor() as i64)
}

/// `⌊n/d⌋` for any signs (d ≠ 0). On 64-bit operands (almost always in the loops) it uses
/// the machine division; `i128` division is a library call several times slower.
pub fn floor_div(n: i128, d: i128) -> i128 {
    let floor = |q: i128, r: i128| {
        if r != 0 && ((r < 0) != (d < 0)) {
            q - 1
        } else {
            q
        }
    };
    if let (Ok(n64), Ok(d64)) = (i64::try_from(n), i64::try_from(d)) {
        if let Some(q) = n64.checked_div(d64) {
            return floor(i128::from(q), i128::from(n64 - q * d64));
        }
    }
    floor(n / d, n % d)
}

/// `⌈n/d⌉` for any signs (d ≠ 0).
pub fn ceil_div(n: i128, d: i128) -> i128 {
    -floor_div(-n, d)
}

/// Integers e with `lo ≤ k·e + m ≤ hi` (k ≠ 0), as an inclusive range.
pub fn linear_range(k: i128, m: i128, lo: i128, hi: i128) -> (i128, i128) {
    if k > 0 {
        (ceil_div(lo - m, k), floor_div(hi - m, k))
    } else {
        (ceil_div(hi - m, k), floor_div(lo - m, k))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn height_bound_is_exact() {
        let b = Bounds::for_height(10_000).unwrap();
        assert_eq!(b.i_max, 21); // 21³ = 9261 < 10⁴ ≤ 22³
        assert_eq!(b.j_max, 199); // 199² < 4·10⁴ = 200²
        assert!(Bounds::for_height(0).is_err());
        assert!(Bounds::for_height(MAX_HEIGHT + 1).is_err());
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

    #[test]
    fn the_a0_window_has_one_c_per_residue_class() {
        for b in [-5i64, -2, -1, 1, 2, 3, 4] {
            let w: Vec<i64> = c_window_a0(b).collect();
            assert_eq!(w.len() as i64, 3 * b.abs());
            let mut res: Vec<i64> = w.iter().map(|c| c.rem_euclid(3 * b.abs())).collect();
            res.sort();
            res.dedup();
            assert_eq!(res.len() as i64, 3 * b.abs());
        }
    }
}
