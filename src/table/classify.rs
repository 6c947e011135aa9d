//! The stage between the enumerators and the table: a candidate form from either
//! enumerator is translated into the strip, kept when it is the canonical representative of
//! its class (DESIGN §3), and annotated with everything the table stores about the class.
//!
//! ```
//! use qorbits::form::Form;
//! use qorbits::table::classify::{classify, Annotation};
//! // (2, −1, −5, −8, 6) is canonical; its translate by x ↦ x + y is not, but translates back.
//! let f = Form::<i128>::new([2, -1, -5, -8, 6]);
//! let row = classify(&f, Annotation::FULL).unwrap().unwrap();
//! assert_eq!(row.form, [2, -1, -5, -8, 6]);
//! let g = f.act(&qorbits::form::Gl2::new(1, 0, 1, 1)).unwrap();
//! assert_eq!(classify(&g, Annotation::FULL).unwrap().unwrap().form, row.form);
//! ```

use crate::arith::factor64::factor_u64;
use crate::error::{Error, Result};
use crate::form::canonical::{is_canonical_with, stabiliser_near, translates_into_strip};
use crate::form::galois::{factor_pattern, galois_group_with, FactorPattern};
use crate::form::local::local_data_machine;
use crate::form::Form;
use crate::table::row::ClassRow;

/// What the stage keeps and computes.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Annotation {
    /// Keep reducible classes too (else they are dropped).
    pub include_reducible: bool,
    /// Compute the local data (benchmarks measure the build without it; such rows do not
    /// make a valid table).
    pub with_local: bool,
}

impl Annotation {
    /// Every class, with local data.
    pub const FULL: Annotation = Annotation {
        include_reducible: true,
        with_local: true,
    };
}

/// The row of the class of the candidate `f` if a translate of `f` is its canonical
/// representative (and the class is kept), else `None`. Forms with Disc = 0 are skipped.
pub fn classify(f: &Form<i128>, what: Annotation) -> Result<Option<ClassRow>> {
    if f.invariants().is_none_or(|inv| inv.disc == 0) {
        return Ok(None);
    }
    for (t, hint) in translates_into_strip(f)? {
        let point = hint.as_ref().map(|p| (p.x, p.y));
        if is_canonical_with(&t, hint)? {
            return annotate(&t, point, what);
        }
    }
    Ok(None)
}

/// The row of a canonical form (label and class over Q are filled in by the grouping).
/// `point` is the f64 covariant point of `f`, when known (it narrows the stabiliser search).
fn annotate(
    f: &Form<i128>,
    point: Option<(f64, f64)>,
    what: Annotation,
) -> Result<Option<ClassRow>> {
    let inv = f.invariants().ok_or(Error::Overflow)?;
    let pattern = factor_pattern(f)
        .or_else(|| factor_pattern(&f.to_big()))
        .expect("big integers do not overflow");
    if pattern != FactorPattern::Irreducible && !what.include_reducible {
        return Ok(None);
    }
    let galois = galois_group_with(f, pattern)
        .or_else(|| galois_group_with(&f.to_big(), pattern))
        .expect("big integers do not overflow");
    let signature = f.signature(&inv).ok_or(Error::Overflow)?;
    let stabiliser = stabiliser_near(f, point)?.len() as u8;
    let small = |v: i128| i64::try_from(v).map_err(|_| Error::Overflow);
    let local = if what.with_local {
        // The machine path: |Disc| ≤ 2⁶³ is checked by `small` below, so its primes are
        // below 2⁶³; values of the search that do not fit i128 go to big integers there.
        small(inv.disc)?;
        let factors = factor_u64(inv.disc.unsigned_abs() as u64);
        local_data_machine(f, &factors, signature)
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
