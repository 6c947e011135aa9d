//! From classified rows to pairs: table order, the split into pairs (I, J), labels, the
//! grouping over Q and the factorisation of each pair's discriminant — everything that
//! needs all classes of one pair, which are consecutive in table order (DESIGN §4, §7).
//!
//! Labels are `I.J.iN` for the N-th irreducible class with invariants (I, J) and `I.J.rN`
//! for the N-th reducible one, counting in lexicographic order of the canonical forms. All
//! classes with given (I, J) have the same height, so a label never depends on the height
//! bound of the table, nor on whether reducible classes are included.
//!
//! ```
//! use qorbits::table::group::label;
//! assert_eq!(label(10, -29, true, 1), "10.-29.i1");
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
    let tag = if irreducible { 'i' } else { 'r' };
    format!("{i}.{j}.{tag}{n}")
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
