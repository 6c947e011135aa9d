//! The rows of the table: enumerate → canonicalise → annotate, in parallel, then put in
//! table order `(H4, I, J, a, b, c, d, e)` and labelled (DESIGN §4).
//!
//! Labels are `I.J.iN` for the N-th irreducible class with invariants (I, J) and `I.J.rN`
//! for the N-th reducible one, counting in lexicographic order of the canonical forms. All
//! classes with given (I, J) have the same height, so a label never depends on the height
//! bound of the table, nor on whether reducible classes are included.
//!
//! ```
//! use qorbits::table::{enumerate_classes, Params};
//! let out = enumerate_classes(&Params { height: 2000, include_reducible: false }, None).unwrap();
//! assert!(out.rows.iter().all(|r| r.h4 < 8000 && r.galois.is_some()));
//! ```

use crate::canonical::{is_canonical_with, stabiliser_of_member};
use crate::enumerate::{translates_into_strip, HeightBound, Task};
use crate::error::{Error, Result};
use crate::form::{Form, Signature};
use crate::galois::{factor_pattern, galois_group, FactorPattern, GaloisGroup};
use crate::local::local_data;
use crate::primes::factor;
use crate::rational::Algebra;
use indicatif::ProgressBar;
use rayon::prelude::*;
use rug::Integer;

/// What a table is built from.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Params {
    /// Classes with `H < height`.
    pub height: i128,
    /// Also the classes with a rational linear or quadratic factor (Disc ≠ 0).
    pub include_reducible: bool,
}

/// One class: canonical representative and everything the kernel computes about it.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct ClassRow {
    /// Canonical representative `[a, b, c, d, e]`.
    pub form: [i64; 5],
    /// Invariant I.
    pub i: i64,
    /// Invariant J.
    pub j: i64,
    /// Discriminant.
    pub disc: i64,
    /// Four times the height.
    pub h4: i64,
    /// Real roots and definiteness.
    pub signature: Signature,
    /// Factorisation pattern over Q.
    pub pattern: FactorPattern,
    /// Galois group (irreducible classes).
    pub galois: Option<GaloisGroup>,
    /// Order of the PGL2(Z)-stabiliser.
    pub stabiliser: u8,
    /// Stable label (module doc).
    pub label: String,
    /// For an everywhere locally soluble class without a rational root (irreducible, or
    /// `2+2`): the label of the first class (in table order) of its class over Q among the
    /// classes with the same (I, J) (module doc of [`crate::rational`]); `None` otherwise.
    pub rational: Option<String>,
    /// Local data: every prime dividing 2·Disc in increasing order, then infinity.
    pub local: Vec<LocalRow>,
}

/// The local data of a class at one place (DESIGN §4).
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct LocalRow {
    /// The prime, or 0 for the real place.
    pub p: i64,
    /// `v_p(Disc)`; `None` at infinity.
    pub v_disc: Option<i64>,
    /// Factorisation pattern of f mod p (e.g. `1 1^3`, `0` if f vanishes mod p); the
    /// signature name at infinity.
    pub pattern: String,
    /// Whether z² = f(x, y) has a point over Q_p (over R at infinity).
    pub soluble: bool,
}

impl LocalRow {
    /// `2`, `3`, … or `inf`.
    pub fn place(&self) -> String {
        if self.p == 0 {
            "inf".into()
        } else {
            self.p.to_string()
        }
    }
}

impl ClassRow {
    /// Everywhere locally soluble.
    pub fn els(&self) -> bool {
        self.local.iter().all(|l| l.soluble)
    }

    /// The places without a point, comma-separated (`""` when ELS), e.g. `2,inf`.
    pub fn insoluble_at(&self) -> String {
        self.local
            .iter()
            .filter(|l| !l.soluble)
            .map(LocalRow::place)
            .collect::<Vec<_>>()
            .join(",")
    }

    /// Whether the class is grouped over Q (has a `rational` class): everywhere locally
    /// soluble, with local data, and without a rational root.
    pub fn grouped_over_q(&self) -> bool {
        without_rational_root(self.pattern) && !self.local.is_empty() && self.els()
    }

    /// Whether the class is the first of its class over Q (the one the others name).
    pub fn first_over_q(&self) -> bool {
        self.rational.as_ref() == Some(&self.label)
    }

    /// The sort key of the table.
    pub fn key(&self) -> (i64, i64, i64, [i64; 5]) {
        (self.h4, self.i, self.j, self.form)
    }
}

/// The classes of a table, in table order, and how many candidates were examined.
#[derive(Debug)]
pub struct Enumeration {
    /// Rows in table order, labelled.
    pub rows: Vec<ClassRow>,
    /// Candidate forms examined (every form met by the loops).
    pub candidates: u64,
}

/// The local rows of a form from the factorisation of its discriminant.
pub fn local_rows(
    f: &Form<rug::Integer>,
    factors: &[(rug::Integer, u32)],
    s: Signature,
) -> Vec<LocalRow> {
    local_data(f, factors, s)
        .places
        .into_iter()
        .map(|p| LocalRow {
            p: p.prime
                .map(|q| q.to_i64().expect("table primes fit i64"))
                .unwrap_or(0),
            v_disc: p.v_disc.map(i64::from),
            pattern: p.pattern,
            soluble: p.soluble,
        })
        .collect()
}

pub(crate) fn annotate(
    f: &Form<i128>,
    include_reducible: bool,
    with_local: bool,
) -> Result<Option<ClassRow>> {
    let inv = f.invariants().ok_or(Error::Overflow)?;
    let pattern = factor_pattern(f)
        .or_else(|| factor_pattern(&f.to_big()))
        .expect("big integers do not overflow");
    if pattern != FactorPattern::Irreducible && !include_reducible {
        return Ok(None);
    }
    let galois = galois_group(f)
        .or_else(|| galois_group(&f.to_big()))
        .expect("big integers do not overflow");
    let signature = f.signature(&inv).ok_or(Error::Overflow)?;
    let stabiliser = stabiliser_of_member(f)?.len() as u8;
    let small = |v: i128| i64::try_from(v).map_err(|_| Error::Overflow);
    let local = if with_local {
        let big = f.to_big();
        let factors = factor(&big.invariants().expect("big integers").disc);
        local_rows(&big, &factors, signature)
    } else {
        Vec::new()
    };
    Ok(Some(ClassRow {
        form: f.c.map(|v| v as i64),
        i: small(inv.i)?,
        j: small(inv.j)?,
        disc: small(inv.disc)?,
        h4: small(inv.h4)?,
        signature,
        pattern,
        galois,
        stabiliser,
        label: String::new(),
        rational: None,
        local,
    }))
}

fn run_task(
    task: &Task,
    hb: &HeightBound,
    include_reducible: bool,
    with_local: bool,
) -> Result<(Vec<ClassRow>, u64)> {
    let mut rows = Vec::new();
    let mut failure = None;
    let n = task.for_each(hb, |c| {
        if failure.is_some() {
            return;
        }
        let f = Form::<i128>::new(c.map(i128::from));
        let disc_zero = f.invariants().is_none_or(|inv| inv.disc == 0);
        if disc_zero {
            return;
        }
        let found = translates_into_strip(&f).and_then(|ts| {
            for (t, hint) in ts {
                if is_canonical_with(&t, hint)? {
                    return annotate(&t, include_reducible, with_local);
                }
            }
            Ok(None)
        });
        match found {
            Ok(Some(row)) => rows.push(row),
            Ok(None) => {}
            Err(e) => failure = Some(e),
        }
    });
    match failure {
        Some(e) => Err(e),
        None => Ok((rows, n)),
    }
}

/// Put rows in table order, give them their labels and group the everywhere locally
/// soluble classes without a rational root of each pair into classes over Q (the
/// `rational` column).
pub fn order_and_label(rows: &mut [ClassRow]) -> Result<()> {
    rows.sort_by_key(ClassRow::key);
    let pairs = pair_ranges(rows);
    for range in &pairs {
        let (mut ni, mut nr) = (0, 0);
        for r in &mut rows[range.clone()] {
            let tag = if r.pattern == FactorPattern::Irreducible {
                ni += 1;
                format!("i{ni}")
            } else {
                nr += 1;
                format!("r{nr}")
            };
            r.label = format!("{}.{}.{}", r.i, r.j, tag);
        }
    }
    let groups: Vec<Result<Vec<(usize, String)>>> = pairs
        .into_par_iter()
        .map(|range| {
            let offset = range.start;
            rational_classes(&rows[range])
                .map(|g| g.into_iter().map(|(k, l)| (k + offset, l)).collect())
        })
        .collect();
    for g in groups {
        for (k, label) in g? {
            rows[k].rational = Some(label);
        }
    }
    Ok(())
}

/// The index ranges of the runs of rows with the same (I, J), in order.
pub fn pair_ranges(rows: &[ClassRow]) -> Vec<std::ops::Range<usize>> {
    let mut out = Vec::new();
    let mut start = 0;
    while start < rows.len() {
        let mut end = start + 1;
        while end < rows.len() && (rows[end].i, rows[end].j) == (rows[start].i, rows[start].j) {
            end += 1;
        }
        out.push(start..end);
        start = end;
    }
    out
}

/// Whether forms with this pattern have no rational root: irreducible, or two irreducible
/// quadratics. These are the forms whose classes over Q the `rational` column records.
pub fn without_rational_root(p: FactorPattern) -> bool {
    matches!(
        p,
        FactorPattern::Irreducible | FactorPattern::QuadraticQuadratic
    )
}

/// The classes over Q of the everywhere locally soluble rows without a rational root
/// (irreducible, or `2+2` in tables with reducible classes) of one pair, as (index in
/// `rows`, label of the first row of its class). Rows without local data get none.
pub fn rational_classes(rows: &[ClassRow]) -> Result<Vec<(usize, String)>> {
    let members: Vec<usize> = (0..rows.len())
        .filter(|&k| rows[k].grouped_over_q())
        .collect();
    match members.as_slice() {
        [] => return Ok(Vec::new()),
        [k] => return Ok(vec![(*k, rows[*k].label.clone())]),
        _ => {}
    }
    let (i, j) = (
        Integer::from(rows[members[0]].i),
        Integer::from(rows[members[0]].j),
    );
    let algebra = Algebra::new(&i, &j)?;
    let elements = members
        .iter()
        .map(|&k| algebra.element(&Form::<Integer>::from_i64(rows[k].form)))
        .collect::<Result<Vec<_>>>()?;
    let classes = algebra.classes(&elements)?;
    let mut first: Vec<usize> = Vec::new();
    Ok(members
        .iter()
        .zip(classes)
        .map(|(&k, c)| {
            if c == first.len() {
                first.push(k);
            }
            (k, rows[first[c]].label.clone())
        })
        .collect())
}

/// Every class with `H < height` (irreducible, or all with `include_reducible`), in table
/// order. Runs on the current rayon pool; `progress` advances once per task.
pub fn enumerate_classes(params: &Params, progress: Option<&ProgressBar>) -> Result<Enumeration> {
    enumerate_classes_with(params, progress, true)
}

/// [`enumerate_classes`] with the local data left out when `with_local` is false (rows
/// with an empty `local`; for benchmarks — such rows do not make a valid table).
pub fn enumerate_classes_with(
    params: &Params,
    progress: Option<&ProgressBar>,
    with_local: bool,
) -> Result<Enumeration> {
    let hb = HeightBound::new(params.height)?;
    let tasks = Task::all(&hb, params.include_reducible);
    if let Some(p) = progress {
        p.set_length(tasks.len() as u64);
    }
    let parts: Vec<Result<(Vec<ClassRow>, u64)>> = tasks
        .par_iter()
        .map(|t| {
            let r = run_task(t, &hb, params.include_reducible, with_local);
            if let Some(p) = progress {
                p.inc(1);
            }
            r
        })
        .collect();
    let mut rows = Vec::new();
    let mut candidates = 0;
    for part in parts {
        let (r, n) = part?;
        rows.extend(r);
        candidates += n;
    }
    order_and_label(&mut rows)?;
    Ok(Enumeration { rows, candidates })
}
