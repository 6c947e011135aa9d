//! The search by invariants: every form with given (I, J) that can be the canonical
//! representative of its class, one per translation class, at any height and without a
//! table — and an independent check of the bulk loops, since it reaches the forms another
//! way.
//!
//! Loops (bounds of [`crate::enumerate::bounds`], with `K = H(I, J)^{1/6}` exactly): the
//! leading coefficient a and one member b of each translation class mod 4a as in the bulk
//! loops, then c over its range; c fixes the seminvariant `P = 8ac − 3b²`, and the syzygy
//! `27R² = 48·I·a²·P − P³ − 64·J·a³` (checked symbolically in the tests of `form`) fixes
//! `R = b³ + 8a²d − 4abc` up to sign, hence d; then `I = 12ae − 3bd + c²` fixes e, and J is
//! checked. There is no loop over d or e. For `a = 0` (reducible classes) `I = c² − 3bd`
//! fixes d and `J = 9bcd − 27eb² − 2c³` fixes e. The range of (a, b, c) has `O(K³) =
//! O(H^{1/2})` points, but the c of a task are not visited one by one: the sieve of
//! [`crate::enumerate::syzygy`] removes, by residues and 64 values of c per word operation,
//! every c whose syzygy has no integer R, and only the survivors are evaluated exactly
//! (`docs/family-enumeration.md` §4). The classification stage ([`crate::table::classify`]) then
//! translates each form into the strip and keeps it when canonical, exactly as for the bulk
//! loops, so every class is found once.
//!
//! ```
//! use qorbits::enumerate::by_invariants::forms_with_invariants;
//! use rug::Integer;
//! // (I, J) = (10, −29): x⁴ − x³ + … ; every form found has exactly these invariants.
//! let forms = forms_with_invariants(&Integer::from(10), &Integer::from(-29), false).unwrap();
//! assert!(!forms.is_empty());
//! for f in forms {
//!     let inv = qorbits::form::Form::<i128>::new(f).invariants().unwrap();
//!     assert_eq!((inv.i, inv.j), (10, -29));
//! }
//! ```

use crate::enumerate::bounds::{c_window_a0, Bounds, Task};
use crate::enumerate::syzygy::{solutions, syzygy_cubic};
use crate::error::{Error, Result};
use crate::form::{eligible, invariants_from_ij, Form};
use rayon::prelude::*;
use rug::ops::Pow;
use rug::Integer;

/// The search refuses pairs with `H ≥ 10^MAX_HEIGHT_EXP` (its cost grows as H^{1/2}: about
/// 1 s at 10¹⁵ on one core, see `benches/invariants.rs`).
pub const MAX_HEIGHT_EXP: u32 = 21;

/// Why (I, J) has no classes at all, if so: not eligible, or Disc = 0.
pub fn refusal(i: &Integer, j: &Integer) -> Option<String> {
    if !eligible(i, j) {
        return Some(format!(
            "no integral form has invariants (I, J) = ({i}, {j}): a pair of invariants has \
             I ≡ 0 (mod 3) and J ≡ 0 (mod 27), or I ≡ 1, 4, 7 (mod 9) with J ≡ ±2, ±16, ±7 \
             (mod 27) respectively"
        ));
    }
    let inv = invariants_from_ij(i.clone(), j.clone()).expect("eligible");
    if inv.disc == 0 {
        return Some(format!(
            "(I, J) = ({i}, {j}) has 4I³ = J², so Disc = 0: such forms have a repeated root \
             and no canonical representative; the table holds only Disc ≠ 0"
        ));
    }
    None
}

/// Which loop over c a search runs: the fast one of [`crate::enumerate::syzygy`] or the
/// plain reference loop (one exact evaluation per c, without the sieve), the oracle of the
/// tests.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Route {
    /// Forward differences on machine integers and the residue filter.
    Fast,
    /// One exact evaluation and square test per c.
    Reference,
}

/// Candidate forms with invariants exactly (I, J), one per translation class, for one task.
fn candidates(
    i: i128,
    j: i128,
    bounds: &Bounds,
    task: Task,
    route: Route,
    out: &mut Vec<[i128; 5]>,
) -> Result<()> {
    let ovf = || Error::TooLarge(format!("(I, J) = ({i}, {j}) is too large for the search"));
    let (a, b) = (i128::from(task.a), i128::from(task.b));
    if a != 0 {
        let (c_lo, c_hi) = bounds.c_range(task.a, task.b);
        let cubic = syzygy_cubic(i, j, a, b).ok_or_else(ovf)?;
        let mut found = Vec::new();
        solutions(&cubic, (c_lo, c_hi), route == Route::Fast, &mut found).ok_or_else(ovf)?;
        let a2 = a * a;
        for (c, r) in found {
            let c = i128::from(c);
            for r in if r == 0 { vec![0] } else { vec![r, -r] } {
                // R = b³ + 8a²d − 4abc
                let num =
                    (|| r.checked_sub(b.pow(3))?.checked_add(4 * a * b * c))().ok_or_else(ovf)?;
                if num % (8 * a2) != 0 {
                    continue;
                }
                let d = num / (8 * a2);
                // I = 12ae − 3bd + c²
                let ne = (|| {
                    i.checked_sub(c * c)?
                        .checked_add(3i128.checked_mul(b)?.checked_mul(d)?)
                })()
                .ok_or_else(ovf)?;
                if ne % (12 * a) != 0 {
                    continue;
                }
                let f = [a, b, c, d, ne / (12 * a)];
                if Form::<i128>::new(f).j_invariant() == Some(j) {
                    out.push(f);
                }
            }
        }
    } else {
        for c in c_window_a0(task.b).map(i128::from) {
            let nd = c * c - i; // I = c² − 3bd
            if nd % (3 * b) != 0 {
                continue;
            }
            let d = nd / (3 * b);
            let ne = (|| {
                9i128
                    .checked_mul(b)?
                    .checked_mul(c)?
                    .checked_mul(d)?
                    .checked_sub(2 * c * c * c)?
                    .checked_sub(j)
            })()
            .ok_or_else(ovf)?;
            if ne % (27 * b * b) != 0 {
                continue;
            }
            out.push([0, b, c, d, ne / (27 * b * b)]);
        }
    }
    Ok(())
}

/// Every form with invariants (I, J) met by the loops (module doc): one member of each
/// translation class that may hold a canonical form, irreducible or, with
/// `include_reducible`, also with `a = 0`. Runs on the current rayon pool. Refuses pairs
/// without classes ([`refusal`]), pairs beyond 64 bits and pairs with `H ≥ 10^`[`MAX_HEIGHT_EXP`].
pub fn forms_with_invariants(
    i: &Integer,
    j: &Integer,
    include_reducible: bool,
) -> Result<Vec<[i128; 5]>> {
    forms_with_invariants_by(i, j, include_reducible, Route::Fast)
}

/// [`forms_with_invariants`] with the loop over c chosen: the tests compare the two routes.
pub fn forms_with_invariants_by(
    i: &Integer,
    j: &Integer,
    include_reducible: bool,
    route: Route,
) -> Result<Vec<[i128; 5]>> {
    if let Some(why) = refusal(i, j) {
        return Err(Error::Input(why));
    }
    let too_large = || {
        Error::TooLarge(format!("(I, J) = ({i}, {j}) is too large for the search by invariants (|I|, |J| must fit 64 bits)"))
    };
    let (ii, jj) = (
        i.to_i64().ok_or_else(too_large)? as i128,
        j.to_i64().ok_or_else(too_large)? as i128,
    );
    let h4 = invariants_from_ij(Integer::from(ii), Integer::from(jj))
        .expect("eligible")
        .h4;
    if h4 >= Integer::from(4) * Integer::from(10).pow(MAX_HEIGHT_EXP) {
        return Err(Error::TooLarge(format!(
            "(I, J) = ({i}, {j}) has height H ≥ 1e{MAX_HEIGHT_EXP}: the search by invariants costs \
             about H^(1/2) steps (some 20 minutes per pair at 1e21 on one core), so it is refused \
             above that"
        )));
    }
    let bounds = Bounds::for_pair(h4.to_f64());
    let tasks = Task::all(&bounds, include_reducible);
    let parts: Vec<Result<Vec<[i128; 5]>>> = tasks
        .par_iter()
        .map(|&task| {
            let mut found = Vec::new();
            candidates(ii, jj, &bounds, task, route, &mut found)?;
            Ok(found)
        })
        .collect();
    let mut out = Vec::new();
    for p in parts {
        out.extend(p?);
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_form_found_has_the_invariants_asked_for() {
        for (i, j) in [(10i64, -29i64), (63, -1647), (145, -8048), (-48, 1404)] {
            let (bi, bj) = (Integer::from(i), Integer::from(j));
            for reducible in [false, true] {
                let forms = forms_with_invariants(&bi, &bj, reducible).unwrap();
                assert!(!forms.is_empty() || !reducible, "({i}, {j})");
                for f in forms {
                    let inv = Form::<i128>::new(f).invariants().unwrap();
                    assert_eq!((inv.i, inv.j), (i128::from(i), i128::from(j)), "{f:?}");
                    assert!(reducible || f[0] != 0, "a = 0 only with reducible forms");
                }
            }
        }
    }

    #[test]
    fn pairs_without_classes_and_huge_pairs_are_refused() {
        let e = forms_with_invariants(&Integer::from(1), &Integer::from(0), true).unwrap_err();
        assert!(e.to_string().contains("no integral form"), "{e}");
        // H ≥ 10²¹: I = 10⁷ + 2 gives |I|³ > 10²¹ (eligible: I ≡ 0 mod 3, J = 0).
        let e = forms_with_invariants(&Integer::from(10_000_002), &Integer::from(0), false)
            .unwrap_err();
        assert!(e.to_string().contains("H ≥ 1e21"), "{e}");
    }
}
