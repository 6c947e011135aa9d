//! The enumerator by invariants: every class with given (I, J), at any height, without a
//! table — and an independent check of the bulk builder, since its loops differ.
//!
//! Loops (bounds from `docs/enumeration.md`, with `K = H(I, J)^{1/6}` exactly): the leading
//! coefficient a and one member b of each translation class mod 4a as in the builder, then
//! c over its range; c fixes the seminvariant `P = 8ac − 3b²`, and the syzygy
//! `27R² = 48·I·a²·P − P³ − 64·J·a³` (checked symbolically in the tests of `form`) fixes
//! `R = b³ + 8a²d − 4abc` up to sign, hence d; then `I = 12ae − 3bd + c²` fixes e, and J is
//! checked. There is no loop over d or e. For `a = 0` (reducible classes) `I = c² − 3bd`
//! fixes d and `J = 9bcd − 27eb² − 2c³` fixes e. The number of (a, b, c) visited is
//! `O(K³) = O(H^{1/2})`. Each form found is translated into the strip and kept when
//! canonical, exactly as in the builder, so every class is found once.
//!
//! ```
//! use qorbits::by_invariants::classes_with_invariants;
//! use rug::Integer;
//! // (I, J) = (10, -29): one irreducible class, the D4 form of discriminant 117.
//! let rows = classes_with_invariants(&Integer::from(10), &Integer::from(-29), false).unwrap();
//! assert_eq!(rows.len(), 1);
//! assert_eq!(rows[0].disc, 117);
//! ```

use crate::canonical::is_canonical_with;
use crate::enumerate::{int_range, poly_range, translates_into_strip, y_min, C, SLACK};
use crate::error::{Error, Result};
use crate::form::{eligible, invariants_from_ij, Form};
use crate::int::Int;
use crate::table::{annotate, order_and_label, ClassRow};
use rayon::prelude::*;
use rug::ops::Pow;
use rug::Integer;

/// The search refuses pairs with `H ≥ 10^MAX_HEIGHT_EXP` (its cost grows as H^{1/2}: about
/// 32 s at 10¹⁵ on two cores, see `benches/invariants.rs`).
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

/// Candidate forms with invariants exactly (I, J), one per translation class, for the task
/// with leading coefficient `a` and second coefficient `b`.
fn candidates(i: i128, j: i128, k: f64, a: i128, b: i128, out: &mut Vec<[i128; 5]>) -> Result<()> {
    let ym = y_min();
    let ovf = || Error::TooLarge(format!("(I, J) = ({i}, {j}) is too large for the search"));
    let (af, bf) = (a as f64, b as f64);
    if a != 0 {
        let m1 = C[1] * k / ym;
        let (u, v) = ((-m1 - bf) / (4.0 * af), (m1 - bf) / (4.0 * af));
        let (qlo, qhi) = poly_range([0.0, -3.0 * bf, -6.0 * af, 0.0], u.min(v), u.max(v));
        let (c_lo, c_hi) = int_range(qlo - C[2] * k, qhi + C[2] * k);
        let a2 = a * a;
        for c in c_lo as i128..=c_hi as i128 {
            let p = 8 * a * c - 3 * b * b;
            // 27R² = 48·I·a²·P − P³ − 64·J·a³
            let rhs = (|| {
                let t1 = 48i128.checked_mul(i)?.checked_mul(a2)?.checked_mul(p)?;
                let t2 = p.checked_mul(p)?.checked_mul(p)?;
                let t3 = 64i128.checked_mul(j)?.checked_mul(a2)?.checked_mul(a)?;
                t1.checked_sub(t2)?.checked_sub(t3)
            })()
            .ok_or_else(ovf)?;
            if rhs < 0 || rhs % 27 != 0 {
                continue;
            }
            let s = rhs / 27;
            let r = Int::isqrt(&s).expect("non-negative");
            if r * r != s {
                continue;
            }
            for r in if r == 0 { vec![0] } else { vec![r, -r] } {
                // R = b³ + 8a²d − 4abc
                let num = r - b * b * b + 4 * a * b * c;
                if num % (8 * a2) != 0 {
                    continue;
                }
                let d = num / (8 * a2);
                // I = 12ae − 3bd + c²
                let ne = i - c * c + 3 * b * d;
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
        // a = 0: translation changes c by 3bk; one c per residue class mod 3b.
        let w = 3 * b.abs();
        for c in (-(w / 2) + 1 - (w % 2))..=(w / 2) {
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

/// Every class with invariants (I, J) (irreducible, or all with `include_reducible`), each as
/// its canonical representative with every column of the table, in table order.
pub fn classes_with_invariants(
    i: &Integer,
    j: &Integer,
    include_reducible: bool,
) -> Result<Vec<ClassRow>> {
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
             about H^(1/2) steps (some 9 hours per pair at 1e21 on two cores), so it is refused \
             above that"
        )));
    }
    let k = (h4.to_f64() / 4.0).powf(1.0 / 6.0) * (1.0 + SLACK);
    let ym = y_min();
    let mut tasks = Vec::new();
    let a_max = (C[0] * k / (ym * ym) * (1.0 + SLACK)).floor() as i128;
    for a in -a_max..=a_max {
        if a == 0 {
            if include_reducible {
                let bm = (C[1] * k / ym * (1.0 + SLACK)).floor() as i128;
                tasks.extend((-bm..=bm).filter(|b| *b != 0).map(|b| (0, b)));
            }
            continue;
        }
        if (C[0] * k / a.abs() as f64).sqrt() * (1.0 + SLACK) < ym {
            continue;
        }
        tasks.extend((-2 * a.abs() + 1..=2 * a.abs()).map(|b| (a, b)));
    }
    let parts: Vec<Result<Vec<ClassRow>>> = tasks
        .par_iter()
        .map(|&(a, b)| {
            let mut found = Vec::new();
            candidates(ii, jj, k, a, b, &mut found)?;
            let mut rows = Vec::new();
            for f in found {
                for (t, hint) in translates_into_strip(&Form::new(f))? {
                    if is_canonical_with(&t, hint)? {
                        if let Some(row) = annotate(&t, include_reducible, true)? {
                            rows.push(row);
                        }
                    }
                }
            }
            Ok(rows)
        })
        .collect();
    let mut rows = Vec::new();
    for p in parts {
        rows.extend(p?);
    }
    order_and_label(&mut rows)?;
    Ok(rows)
}
