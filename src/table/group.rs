//! From classified rows to pairs: table order, the split into pairs (I, J), labels, the
//! grouping over Q and the factorisation of each pair's discriminant — everything that
//! needs all classes of one pair, which are consecutive in table order (DESIGN §4, §7).
//!
//! Labels (schema/labels.md): `Q<I>_<J>_<N>` for the N-th irreducible class with
//! invariants (I, J) and `R<I>_<J>_<N>` for the N-th reducible one, counting in
//! lexicographic order of the canonical forms, N written with at least three digits. All
//! classes with given (I, J) have the same height, so a label never depends on the height
//! bound of the table, nor on whether reducible classes are included.
//!
//! ```
//! use qorbits::table::group::{label, parse_label};
//! assert_eq!(label(10, -29, true, 1), "Q10_-29_001");
//! assert_eq!(parse_label("R-48_1404_012"), Some((-48, 1404, false, 12)));
//! ```

use crate::arith::factor64::factor_u64;
use crate::error::Result;
use crate::form::invariants_from_ij;
use crate::form::rational::Algebra;
use crate::form::Form;
use crate::table::row::{ClassRow, Pair};
use rayon::prelude::*;
use rug::Integer;

/// The label of the `n`-th (from 1) irreducible or reducible class of a pair.
pub fn label(i: i64, j: i64, irreducible: bool, n: usize) -> String {
    let kind = if irreducible { 'Q' } else { 'R' };
    format!("{kind}{i}_{j}_{n:03}")
}

/// `(I, J, irreducible, N)` of a label, or `None` when it is not one.
pub fn parse_label(s: &str) -> Option<(i64, i64, bool, usize)> {
    let irreducible = match s.as_bytes().first()? {
        b'Q' => true,
        b'R' => false,
        _ => return None,
    };
    let mut parts = s[1..].split('_');
    let int = |t: &str| -> Option<i64> {
        let digits = t.strip_prefix('-').unwrap_or(t);
        let canonical = !digits.is_empty()
            && digits.bytes().all(|b| b.is_ascii_digit())
            && (digits == "0" || !digits.starts_with('0'))
            && t != "-0";
        canonical.then(|| t.parse().ok()).flatten()
    };
    let (i, j) = (int(parts.next()?)?, int(parts.next()?)?);
    let n = parts.next()?;
    if parts.next().is_some() || n.len() < 3 || !n.bytes().all(|b| b.is_ascii_digit()) {
        return None;
    }
    let n: usize = n.parse().ok()?;
    (n >= 1 && label(i, j, irreducible, n) == s).then_some((i, j, irreducible, n))
}

/// Splits rows in table order into runs with the same (I, J).
pub fn split_pairs(rows: Vec<ClassRow>) -> Vec<Vec<ClassRow>> {
    let mut out: Vec<Vec<ClassRow>> = Vec::new();
    for r in rows {
        match out.last_mut() {
            Some(run) if (run[0].i, run[0].j) == (r.i, r.j) => run.push(r),
            _ => out.push(vec![r]),
        }
    }
    out
}

/// Puts rows in table order and groups them into labelled pairs (in parallel over the pairs,
/// on the current rayon pool).
pub fn group_rows(mut rows: Vec<ClassRow>) -> Result<Vec<Pair>> {
    rows.sort_by_key(ClassRow::key);
    split_pairs(rows)
        .into_par_iter()
        .map(|classes| {
            let (i, j) = (classes[0].i, classes[0].j);
            make_pair(i, j, classes)
        })
        .collect()
}

/// The pair (I, J) of `classes` (all with these invariants, in table order): labels, the
/// grouping over Q and the factorisation of the discriminant.
pub fn make_pair(i: i64, j: i64, mut classes: Vec<ClassRow>) -> Result<Pair> {
    let (mut ni, mut nr) = (0, 0);
    for r in &mut classes {
        let n = if r.irreducible() {
            ni += 1;
            ni
        } else {
            nr += 1;
            nr
        };
        r.label = label(r.i, r.j, r.irreducible(), n);
    }
    let over_q = classes_over_q(&classes)?;
    for class in &over_q {
        let first = classes[class[0]].label.clone();
        for &k in class {
            classes[k].rational = Some(first.clone());
        }
    }
    let inv = invariants_from_ij(i128::from(i), i128::from(j)).expect("the invariants of a table");
    let disc = i64::try_from(inv.disc).expect("the discriminant of a table fits i64");
    Ok(Pair {
        i,
        j,
        disc,
        h4: i64::try_from(inv.h4).expect("the height of a table fits i64"),
        disc_factors: factor_u64(disc.unsigned_abs())
            .iter()
            .map(|&(p, e)| (p as i64, e)) // a prime factor of an i64 is below 2⁶³
            .collect(),
        classes,
        over_q,
    })
}

/// The classes over Q of the rows grouped over Q ([`ClassRow::grouped_over_q`]) of one
/// pair: lists of positions, in table order, in order of first member.
fn classes_over_q(rows: &[ClassRow]) -> Result<Vec<Vec<usize>>> {
    let members: Vec<usize> = (0..rows.len())
        .filter(|&k| rows[k].grouped_over_q())
        .collect();
    match members.as_slice() {
        [] => return Ok(Vec::new()),
        [k] => return Ok(vec![vec![*k]]),
        _ => {}
    }
    let (i, j) = (Integer::from(rows[0].i), Integer::from(rows[0].j));
    let algebra = Algebra::new(&i, &j)?;
    let elements = members
        .iter()
        .map(|&k| algebra.element(&Form::<Integer>::from_i64(rows[k].form)))
        .collect::<Result<Vec<_>>>()?;
    let mut out: Vec<Vec<usize>> = Vec::new();
    for (&k, c) in members.iter().zip(algebra.classes(&elements)?) {
        if c == out.len() {
            out.push(Vec::new());
        }
        out[c].push(k);
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn labels_are_reversible_shell_safe_and_sort_within_a_pair() {
        for (i, j, irr, n) in [
            (10, -29, true, 1),
            (-48, 1404, false, 13),
            (0, 0, true, 999),
            (7, -7, true, 1234),
        ] {
            let l = label(i, j, irr, n);
            assert_eq!(parse_label(&l), Some((i, j, irr, n)), "{l}");
            assert!(
                l.bytes()
                    .all(|b| b.is_ascii_alphanumeric() || b == b'_' || b == b'-'),
                "{l}"
            );
            assert!(!l.starts_with('-'), "{l} would read as an option");
        }
        let mut within: Vec<String> = (1..=999).map(|n| label(3, -27, true, n)).collect();
        let want = within.clone();
        within.sort();
        assert_eq!(within, want, "labels of a pair sort in N order");
        assert!(
            label(3, -27, true, 999) < label(3, -27, false, 1),
            "irreducible first"
        );
        for bad in [
            "",
            "Q1_2",
            "Q1_2_3",
            "Q01_2_001",
            "Q1_2_000",
            "X1_2_001",
            "Q1_2_001_4",
            "Q-0_2_001",
            "Q1_+2_001",
        ] {
            assert_eq!(parse_label(bad), None, "{bad}");
        }
    }
}
