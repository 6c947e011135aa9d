//! 2-Selmer groups of elliptic curves over Q from the classes of integral binary quartic
//! forms with invariants `(I, J) = (c4, 2·c6)`, and the average size of the 2-Selmer group
//! over a family of short Weierstrass curves.
//!
//! The curve `E: y² + a1xy + a3y = x³ + a2x² + a4x + a6` is isomorphic over Q to
//! `E_{I,J}: y² = x³ − 27Ix − 27J` for `(I, J) = (c4, 2c6)` (substitute x ↦ x/36 − b2/12
//! and scale by u = 1/6). A form with these invariants gives a 2-covering of E; the
//! everywhere locally soluble ones give elements of the 2-Selmer group, and two forms give
//! the same element exactly when they are equivalent over Q ([`crate::rational`]). A form
//! with a rational root gives the trivial element, so the non-trivial elements are the
//! classes over Q of the everywhere locally soluble forms without a rational root, and
//! `#Sel² = 1 + (number of those classes over Q)`. Without rational 2-torsion these forms
//! are irreducible (a form with two quadratic factors over Q pairs its roots rationally,
//! which is a rational root of the resolvent); with it, forms with two quadratic factors
//! occur too, and the search includes reducible forms. That every element has an integral
//! representative with exactly these invariants is a published fact of 2-descent, recalled
//! from memory and checked by the tests against PARI/GP.
//!
//! ```
//! use qorbits::selmer::{two_selmer, Curve};
//! use rug::Integer;
//! // y² = x³ − x + 1 has rank 1 and trivial 2-torsion; its 2-Selmer group has order 2.
//! let e = Curve::short(Integer::from(-1), Integer::from(1)).unwrap();
//! let s = two_selmer(&e).unwrap();
//! assert_eq!((s.rank, s.elements.len()), (1, 1));
//! ```

use crate::by_invariants::classes_with_invariants;
use crate::error::{Error, Result};
use crate::galois::resolvent_roots;
use crate::poly::integer_roots;
use crate::table::{without_rational_root, ClassRow};
use indicatif::ProgressBar;
use rayon::prelude::*;
use rug::Integer;

/// An elliptic curve over Q by integral Weierstrass coefficients `[a1, a2, a3, a4, a6]`.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Curve {
    /// `[a1, a2, a3, a4, a6]`.
    pub ainvs: [Integer; 5],
}

impl Curve {
    /// The curve with these coefficients; an input error when it is singular.
    pub fn new(ainvs: [Integer; 5]) -> Result<Curve> {
        let e = Curve { ainvs };
        if e.discriminant() == 0 {
            let [a1, a2, a3, a4, a6] = &e.ainvs;
            return Err(Error::Input(format!(
                "the curve [{a1}, {a2}, {a3}, {a4}, {a6}] is singular (discriminant 0)"
            )));
        }
        Ok(e)
    }

    /// `y² = x³ + Ax + B`.
    pub fn short(a: Integer, b: Integer) -> Result<Curve> {
        Curve::new([Integer::new(), Integer::new(), Integer::new(), a, b])
    }

    fn b_invariants(&self) -> (Integer, Integer, Integer) {
        let [a1, a2, a3, a4, a6] = &self.ainvs;
        let b2 = Integer::from(a1 * a1) + Integer::from(4) * a2;
        let b4 = Integer::from(2) * a4 + Integer::from(a1 * a3);
        let b6 = Integer::from(a3 * a3) + Integer::from(4) * a6;
        (b2, b4, b6)
    }

    /// `c4 = b2² − 24·b4`.
    pub fn c4(&self) -> Integer {
        let (b2, b4, _) = self.b_invariants();
        Integer::from(&b2 * &b2) - Integer::from(24) * b4
    }

    /// `c6 = −b2³ + 36·b2·b4 − 216·b6`.
    pub fn c6(&self) -> Integer {
        let (b2, b4, b6) = self.b_invariants();
        let b2c: Integer = b2.clone() * &b2 * &b2;
        Integer::from(36) * b2 * b4 - b2c - Integer::from(216) * b6
    }

    /// The discriminant `Δ = (c4³ − c6²)/1728`.
    pub fn discriminant(&self) -> Integer {
        let (c4, c6) = (self.c4(), self.c6());
        (c4.clone() * &c4 * &c4 - c6.clone() * &c6) / 1728
    }

    /// The invariants `(I, J) = (c4, 2·c6)` of the quartics whose 2-coverings are E's.
    pub fn quartic_invariants(&self) -> (Integer, Integer) {
        (self.c4(), Integer::from(2) * self.c6())
    }

    /// The x-coordinate of a rational point of order 2 on the model `y² = x³ − 27c4·x −
    /// 54c6`, if there is one.
    pub fn two_torsion(&self) -> Option<Integer> {
        let (i, j) = self.quartic_invariants();
        let roots = resolvent_roots(&i, &j).expect("big integers do not overflow");
        // The roots of x³ − 27Ix − 27J are −3φ for the resolvent roots φ.
        roots.into_iter().next().map(|phi| Integer::from(-3) * phi)
    }

    /// The rank of E(Q)[2]: 0, 1 or 2 for 0, 1 or 3 rational roots of the resolvent.
    pub fn two_torsion_rank(&self) -> u32 {
        let (i, j) = self.quartic_invariants();
        match resolvent_roots(&i, &j)
            .expect("big integers do not overflow")
            .len()
        {
            0 => 0,
            1 => 1,
            _ => 2,
        }
    }

    /// The curve as `[a1, a2, a3, a4, a6]` text.
    pub fn name(&self) -> String {
        let [a1, a2, a3, a4, a6] = &self.ainvs;
        format!("[{a1}, {a2}, {a3}, {a4}, {a6}]")
    }
}

/// The 2-Selmer group of a curve.
#[derive(Clone, Debug)]
pub struct Selmer {
    /// The rank of E(Q)[2]: 0, 1 or 2.
    pub two_torsion_rank: u32,
    /// Invariant I = c4 of the quartics.
    pub i: Integer,
    /// Invariant J = 2·c6 of the quartics.
    pub j: Integer,
    /// The 2-Selmer rank: `#Sel² = 2^rank`.
    pub rank: u32,
    /// One canonical quartic per non-trivial element: the first class (in table order) of
    /// each class over Q (irreducible, or `2+2` when E has rational 2-torsion).
    pub elements: Vec<ClassRow>,
    /// All everywhere locally soluble classes without a rational root with these
    /// invariants.
    pub els_classes: usize,
    /// All classes without a rational root (irreducible, or `2+2`) with these invariants.
    pub irreducible_classes: usize,
}

/// The 2-Selmer group of `curve`.
pub fn two_selmer(curve: &Curve) -> Result<Selmer> {
    let (i, j) = curve.quartic_invariants();
    let two_torsion_rank = curve.two_torsion_rank();
    let rows = classes_with_invariants(&i, &j, two_torsion_rank > 0)?;
    let irreducible_classes = rows
        .iter()
        .filter(|r| without_rational_root(r.pattern))
        .count();
    let els_classes = rows.iter().filter(|r| r.rational.is_some()).count();
    let elements: Vec<ClassRow> = rows.into_iter().filter(|r| r.first_over_q()).collect();
    let size = elements.len() + 1;
    if !size.is_power_of_two() {
        return Err(Error::Numerical(format!(
            "the curve {} gave {} non-trivial Selmer elements, so the group would have order {size}, \
             not a power of 2; please report this curve",
            curve.name(),
            elements.len()
        )));
    }
    Ok(Selmer {
        two_torsion_rank,
        i,
        j,
        rank: size.trailing_zeros(),
        elements,
        els_classes,
        irreducible_classes,
    })
}

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
pub fn selmer_stats(y: i128, progress: Option<&ProgressBar>) -> Result<SelmerStats> {
    if y < 1 {
        return Err(Error::Input(format!(
            "the height bound must be positive, not {y}"
        )));
    }
    let family = short_family(y);
    if let Some(p) = progress {
        p.set_length(family.len() as u64);
    }
    let ranks: Vec<Result<u32>> = family
        .par_iter()
        .map(|&(a, b)| {
            let e = Curve::short(Integer::from(a), Integer::from(b))?;
            let r = two_selmer(&e).map(|s| s.rank);
            if let Some(p) = progress {
                p.inc(1);
            }
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
    fn invariants_of_a_general_model() {
        // y² + y = x³ − x (conductor 37): c4 = 48, c6 = −216, Δ = 37 (from memory, the
        // standard first curve of rank 1).
        let ai = [0, 0, 1, -1, 0].map(Integer::from);
        let e = Curve::new(ai).unwrap();
        assert_eq!(
            (e.c4(), e.c6(), e.discriminant()),
            (48.into(), (-216).into(), 37.into())
        );
        assert!(e.two_torsion().is_none());
        // y² = x³ − x has three points of order 2.
        let e = Curve::short((-1).into(), 0.into()).unwrap();
        assert!(e.two_torsion().is_some());
        assert!(Curve::short(0.into(), 0.into()).is_err());
        assert!(
            Curve::short((-3).into(), 2.into()).is_err(),
            "4·(−27) + 27·4 = 0"
        );
    }

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
