//! The family of short Weierstrass curves of `selmer-stats` and the average size of the
//! 2-Selmer group over it, by height bins.

use crate::arith::poly::integer_roots;
use crate::error::{Error, Result};
use crate::progress::Progress;
use crate::selmer::{two_selmer, Curve};
use rayon::prelude::*;
use rug::Integer;

/// Height of `y² = x³ + Ax + B`: `max(4|A|³, 27B²)`.
pub fn short_height(a: i64, b: i64) -> i128 {
    let (a, b) = (i128::from(a), i128::from(b));
    (4 * a.abs().pow(3)).max(27 * b * b)
}

/// Whether some prime p has `p⁴ | A` and `p⁶ | B` (the model is not minimal at p).
fn non_minimal(a: i64, b: i64) -> bool {
    let (a, b) = (i128::from(a).abs(), i128::from(b).abs());
    let mut p = 2i128;
    while (a != 0 && p.pow(4) <= a) || (a == 0 && p.pow(6) <= b) {
        if a % p.pow(4) == 0 && b % p.pow(6) == 0 {
            return true;
        }
        p += 1;
    }
    false
}

/// The family of [`selmer_stats`]: every pair of integers (A, B) with
/// `max(4|A|³, 27B²) < Y`, `4A³ + 27B² ≠ 0`, no prime p with `p⁴ | A` and `p⁶ | B`, and
/// `x³ + Ax + B` without a rational root. In order of (height, A, B).
pub fn short_family(y: i128) -> Vec<(i64, i64)> {
    let mut out = Vec::new();
    let a_max = (0i64..)
        .take_while(|a| 4 * i128::from(*a).pow(3) < y)
        .last()
        .unwrap_or(0);
    let b_max = (0i64..)
        .take_while(|b| 27 * i128::from(*b).pow(2) < y)
        .last()
        .unwrap_or(0);
    for a in -a_max..=a_max {
        for b in -b_max..=b_max {
            let (a1, b1) = (i128::from(a), i128::from(b));
            if short_height(a, b) >= y || 4 * a1.pow(3) + 27 * b1 * b1 == 0 || non_minimal(a, b) {
                continue;
            }
            // A rational root of the monic cubic is an integer.
            let roots = integer_roots(&[1, 0, a1, b1]).expect("small coefficients");
            if roots.is_empty() {
                out.push((a, b));
            }
        }
    }
    out.sort_by_key(|&(a, b)| (short_height(a, b), a, b));
    out
}

/// The curves of one height bin of [`SelmerStats`].
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct SelmerBin {
    /// Heights in `lo ≤ H < hi`.
    pub lo: i128,
    /// Upper end (exclusive).
    pub hi: i128,
    /// Curves in the bin.
    pub curves: u64,
    /// Sum of `#Sel²` over the bin.
    pub total: u64,
    /// Curves by 2-Selmer rank 0, 1, 2, ….
    pub by_rank: Vec<u64>,
}

impl SelmerBin {
    fn add(&mut self, rank: u32) {
        self.curves += 1;
        self.total += 1 << rank;
        let r = rank as usize;
        if self.by_rank.len() <= r {
            self.by_rank.resize(r + 1, 0);
        }
        self.by_rank[r] += 1;
    }

    /// Average size of the 2-Selmer group in the bin (0 for an empty bin).
    pub fn average(&self) -> f64 {
        if self.curves == 0 {
            0.0
        } else {
            self.total as f64 / self.curves as f64
        }
    }
}

/// The 2-Selmer groups of the family [`short_family`] below a height.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct SelmerStats {
    /// The height bound Y.
    pub height: i128,
    /// Every curve `(A, B, rank)` in family order.
    pub curves: Vec<(i64, i64, u32)>,
    /// All curves together.
    pub all: SelmerBin,
    /// Bins `[10^k, 10^(k+1))` cut at Y, from the first non-empty one.
    pub bins: Vec<SelmerBin>,
}

/// The 2-Selmer rank of every curve of [`short_family`]`(y)`, in parallel on the current
/// rayon pool (the result does not depend on the number of threads); `progress` advances
/// once per curve.
pub fn selmer_stats(y: i128, progress: &dyn Progress) -> Result<SelmerStats> {
    if y < 1 {
        return Err(Error::Input(format!(
            "the height bound must be positive, not {y}"
        )));
    }
    let family = short_family(y);
    progress.start("curves", family.len() as u64);
    let ranks: Vec<Result<u32>> = family
        .par_iter()
        .map(|&(a, b)| {
            let e = Curve::short(Integer::from(a), Integer::from(b))?;
            let r = two_selmer(&e).map(|s| s.rank);
            progress.advance(1);
            r
        })
        .collect();
    let empty = |lo, hi| SelmerBin {
        lo,
        hi,
        curves: 0,
        total: 0,
        by_rank: Vec::new(),
    };
    let mut all = empty(0, y);
    let mut bins: Vec<SelmerBin> = Vec::new();
    let mut curves = Vec::with_capacity(family.len());
    for (&(a, b), r) in family.iter().zip(ranks) {
        let r = r?;
        let h = short_height(a, b);
        all.add(r);
        if bins.last().is_none_or(|bin| h >= bin.hi) {
            let mut lo = 1i128;
            while lo * 10 <= h {
                lo *= 10;
            }
            bins.push(empty(lo, (lo * 10).min(y)));
        }
        bins.last_mut().expect("pushed").add(r);
        curves.push((a, b, r));
    }
    Ok(SelmerStats {
        height: y,
        curves,
        all,
        bins,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn family_rules() {
        let f = short_family(1000);
        assert!(f.iter().all(|&(a, b)| short_height(a, b) < 1000));
        assert!(!f.contains(&(-1, 0)), "x³ − x has roots");
        assert!(!f.contains(&(0, 1)), "x³ + 1 has the root −1");
        assert!(f.contains(&(-1, 1)));
        assert!(f.contains(&(0, 2)));
        assert!(non_minimal(16, 64) && non_minimal(0, 64) && !non_minimal(16, 32));
        let mut sorted = f.clone();
        sorted.sort_by_key(|&(a, b)| (short_height(a, b), a, b));
        assert_eq!(f, sorted);
    }
}
