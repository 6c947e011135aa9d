//! The family of short Weierstrass curves of `selmer-stats` and the average size of the
//! 2-Selmer group over it, by height bins.
//!
//! The classes of the family's pairs `(I, J) = (−48A, −1728B)` come by one of two routes
//! with the same result: one search by invariants per curve, or one enumeration of every
//! form with `48 | I`, `1728 | J` below the family's largest height `H < 27648·Y`
//! ([`crate::table::pipeline::classes_of_congruent_pairs`]). [`cheaper_route`] picks the
//! cheaper by the cost model of `docs/family-enumeration.md` §5.

use crate::arith::poly::integer_roots;
use crate::error::{Error, Result};
use crate::progress::Progress;
use crate::selmer::{selmer_of_pair, two_selmer, Curve, Selmer};
use crate::table::pipeline::classes_of_congruent_pairs;
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

/// How [`selmer_stats_by`] finds the classes of the family's pairs.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum FamilyRoute {
    /// One search by invariants per curve.
    PerPair,
    /// One enumeration of every form with `48 | I`, `1728 | J` and `H < 27648·Y`.
    Family,
}

/// The height bound of the pairs of the family below Y: `H(−48A, −1728B) =
/// 27648·max(4|A|³, 27B²)`, since `48³ = 4·27648` and `1728²/4 = 27·27648`.
/// Saturates beyond i128, where the enumeration refuses the height anyway.
pub fn family_height(y: i128) -> i128 {
    27_648i128.saturating_mul(y)
}

/// Costs in seconds on one thread, fitted to timings of the search by invariants and of the
/// family loops on the development machine (`docs/family-enumeration.md` §5): per task and
/// per value of c of a search, and per `K⁴` of the family enumeration
/// (`K = (27648·Y)^{1/6}`).
const SECONDS_PER_TASK: f64 = 2.0e-6;
const SECONDS_PER_C: f64 = 5.0e-10;
const SECONDS_PER_K4: f64 = 2.0e-7;

/// The route with the smaller modelled cost for the family below Y (its curves given): the
/// searches cost `Σ_curves (2.37·K_E²·t_task + 47·K_E³·t_c)` with `K_E = H(E)^{1/6}`
/// (2.37·K² tasks and 47·K³ values of c per search, counted in
/// `docs/family-enumeration.md` §5); the family enumeration `K⁴·t_K4` for the largest K.
pub fn cheaper_route(y: i128, family: &[(i64, i64)]) -> FamilyRoute {
    let per_pair: f64 = family
        .iter()
        .map(|&(a, b)| {
            let k = (27_648.0 * short_height(a, b) as f64).powf(1.0 / 6.0);
            2.37 * k * k * SECONDS_PER_TASK + 47.0 * k.powi(3) * SECONDS_PER_C
        })
        .sum();
    let k = (family_height(y) as f64).powf(1.0 / 6.0);
    if k.powi(4) * SECONDS_PER_K4 < per_pair {
        FamilyRoute::Family
    } else {
        FamilyRoute::PerPair
    }
}

/// The 2-Selmer rank of every curve of [`short_family`]`(y)`, in parallel on the current
/// rayon pool (the result does not depend on the number of threads), by the route of
/// [`cheaper_route`]; `progress` advances once per curve or once per task of the family
/// enumeration.
pub fn selmer_stats(y: i128, progress: &dyn Progress) -> Result<SelmerStats> {
    positive(y)?;
    let family = short_family(y);
    let route = cheaper_route(y, &family);
    stats_of(y, family, route, progress)
}

/// An estimate of the seconds [`selmer_stats`] takes on one thread, without building the
/// family: `34.7 s · (Y/10⁶)^0.964`, fitted to whole runs at Y = 10⁵, 10⁶ and 10⁷ on the
/// development machine (3.7 s, 34.7 s and 312 s of CPU; `cargo bench --bench selmer`),
/// which include local data and the grouping over Q besides the loops. A rule of thumb for
/// the estimate printed before long work, not a bound.
pub fn estimated_seconds(y: i128) -> f64 {
    34.7 * (y.max(1) as f64 / 1e6).powf(0.964)
}

/// [`selmer_stats`] by the route given (the tests compare the two).
pub fn selmer_stats_by(
    y: i128,
    route: FamilyRoute,
    progress: &dyn Progress,
) -> Result<SelmerStats> {
    positive(y)?;
    stats_of(y, short_family(y), route, progress)
}

/// The statement of the family of [`short_family`] for a height bound, in words (as
/// `selmer-stats` prints it and the curve dataset records it).
pub fn family_statement(y: i128) -> String {
    format!(
        "all integer pairs (A, B) with max(4|A|^3, 27B^2) < {y}, 4A^3 + 27B^2 != 0, no prime p \
         with p^4 | A and p^6 | B, and x^3 + Ax + B without a rational root; each pair is one \
         curve y^2 = x^3 + Ax + B"
    )
}

/// The 2-Selmer group of every curve of [`short_family`]`(y)`, elements included, in family
/// order, by the route of [`cheaper_route`] on the current rayon pool (as [`selmer_stats`]).
pub fn family_selmer(y: i128, progress: &dyn Progress) -> Result<Vec<((i64, i64), Selmer)>> {
    positive(y)?;
    let family = short_family(y);
    let route = cheaper_route(y, &family);
    let groups = groups_of(y, &family, route, progress)?;
    Ok(family.into_iter().zip(groups).collect())
}

fn positive(y: i128) -> Result<()> {
    if y < 1 {
        return Err(Error::Input(format!(
            "the height bound must be positive, not {y}"
        )));
    }
    Ok(())
}

/// The 2-Selmer group of each curve of `family` (the family below `y`), in its order.
fn groups_of(
    y: i128,
    family: &[(i64, i64)],
    route: FamilyRoute,
    progress: &dyn Progress,
) -> Result<Vec<Selmer>> {
    let curve = |&(a, b): &(i64, i64)| Curve::short(Integer::from(a), Integer::from(b));
    match route {
        FamilyRoute::PerPair => {
            progress.start("curves", family.len() as u64);
            family
                .par_iter()
                .map(|ab| {
                    let s = two_selmer(&curve(ab)?);
                    progress.advance(1);
                    s
                })
                .collect()
        }
        FamilyRoute::Family => {
            let pairs: Vec<(i64, i64)> =
                family.iter().map(|&(a, b)| (-48 * a, -1728 * b)).collect();
            let found = classes_of_congruent_pairs(&pairs, family_height(y), progress)?;
            family
                .par_iter()
                .zip(found.par_iter())
                .map(|(ab, pair)| selmer_of_pair(&curve(ab)?, pair))
                .collect()
        }
    }
}

fn stats_of(
    y: i128,
    family: Vec<(i64, i64)>,
    route: FamilyRoute,
    progress: &dyn Progress,
) -> Result<SelmerStats> {
    let groups = groups_of(y, &family, route, progress)?;
    let ranks: Vec<((i64, i64), u32)> = family
        .into_iter()
        .zip(groups.iter().map(|s| s.rank))
        .collect();
    Ok(stats_of_ranks(y, &ranks))
}

/// The averages of [`selmer_stats`] from the groups of [`family_selmer`]`(y)` (so a caller
/// that needs the elements too computes the family once).
pub fn stats_from_groups(y: i128, groups: &[((i64, i64), Selmer)]) -> SelmerStats {
    let ranks: Vec<((i64, i64), u32)> = groups.iter().map(|(ab, s)| (*ab, s.rank)).collect();
    stats_of_ranks(y, &ranks)
}

fn stats_of_ranks(y: i128, ranks: &[((i64, i64), u32)]) -> SelmerStats {
    let empty = |lo, hi| SelmerBin {
        lo,
        hi,
        curves: 0,
        total: 0,
        by_rank: Vec::new(),
    };
    let mut all = empty(0, y);
    let mut bins: Vec<SelmerBin> = Vec::new();
    let mut curves = Vec::with_capacity(ranks.len());
    for &((a, b), r) in ranks {
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
    SelmerStats {
        height: y,
        curves,
        all,
        bins,
    }
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
