//! The classes of one pair read back from a table, checked against what their forms imply
//! before any command shows them: a value of the right type can still mislead (a form that
//! does not have the stored invariants, a label out of its place, a stabiliser order no
//! class has, local data at the wrong places, a pattern with characters that would reach a
//! terminal). Recomputing invariants is exact (big integers).
//!
//! ```
//! use qorbits::table::pair_check::check_pair;
//! use qorbits::table::row::Pair;
//! let p = Pair { i: 10, j: -29, disc: 117, h4: 4000, disc_factors: vec![(3, 2), (13, 1)],
//!                classes: vec![], over_q: vec![] };
//! assert_eq!(check_pair(&p), Ok(()));
//! let q = Pair { disc_factors: vec![(9, 1), (13, 1)], ..p };
//! assert!(check_pair(&q).unwrap_err().contains("not a prime power"));
//! ```

use crate::arith::primes::{factor_text, is_prime};
use crate::form::Form;
use crate::table::group::label;
use crate::table::row::Pair;
use crate::table::schema_check::shown_name;
use rug::Integer;
use rusqlite::{Connection, OptionalExtension};

/// Checks the classes of a pair read back from a table against what their forms imply:
/// labels numbered in order, invariants, discriminant and height recomputed from the form,
/// stabiliser orders, the factorisation of the discriminant, the places of the local data
/// and their patterns. `Err` says what is inconsistent.
pub fn check_pair(p: &Pair) -> std::result::Result<(), String> {
    let disc = Integer::from(p.disc).abs();
    let mut product = Integer::from(1);
    for w in p.disc_factors.windows(2) {
        if w[0].0 >= w[1].0 {
            return Err("its discriminant's primes are out of order".into());
        }
    }
    for &(q, e) in &p.disc_factors {
        if e == 0 || e > 64 || !is_prime(&Integer::from(q)) {
            return Err(format!(
                "its discriminant has the factor {q}^{e}, not a prime power"
            ));
        }
        product *= rug::ops::Pow::pow(Integer::from(q), e);
    }
    if product != disc {
        return Err("its discriminant's factorisation has another product".into());
    }
    let (mut nq, mut nr) = (0, 0);
    for (k, r) in p.classes.iter().enumerate() {
        let n = if r.irreducible() {
            nq += 1;
            nq
        } else {
            nr += 1;
            nr
        };
        let name = shown_name(&r.label);
        if r.label != label(p.i, p.j, r.irreducible(), n) {
            return Err(format!(
                "class {name} does not carry the label of its place in the pair"
            ));
        }
        let inv = Form::<Integer>::from_i64(r.form)
            .invariants()
            .expect("invariants of machine-integer forms fit in big integers");
        if (inv.i, inv.j, inv.disc, inv.h4) != (r.i.into(), r.j.into(), r.disc.into(), r.h4.into())
            || (r.i, r.j, r.disc, r.h4) != (p.i, p.j, p.disc, p.h4)
        {
            return Err(format!(
                "class {name} stores a form whose invariants are not the pair's"
            ));
        }
        if k > 0 && p.classes[k - 1].form >= r.form {
            return Err(format!("class {name} is out of table order"));
        }
        if ![1, 2, 4].contains(&r.stabiliser) {
            return Err(format!(
                "class {name} has a stabiliser of order {}",
                r.stabiliser
            ));
        }
        check_local(r, &p.disc_factors).map_err(|why| format!("class {name} {why}"))?;
    }
    Ok(())
}

/// The local data of a class: the primes dividing 2·Disc in increasing order with
/// v_p(Disc), then the real place with the signature; patterns of digits, `^` and spaces.
fn check_local(
    r: &crate::table::row::ClassRow,
    disc_factors: &[(i64, u32)],
) -> std::result::Result<(), String> {
    use crate::form::local::Place;
    if r.local.is_empty() {
        return Ok(());
    }
    let mut want: Vec<(i64, u32)> = disc_factors.to_vec();
    if want.first().map(|f| f.0) != Some(2) {
        want.insert(0, (2, 0));
    }
    let (real, primes) = r.local.split_last().expect("not empty");
    let got: Vec<(i64, u32)> = primes
        .iter()
        .map(|l| match (&l.place, l.v_disc) {
            (Place::Prime(q), Some(v)) => (*q, v),
            _ => (0, u32::MAX),
        })
        .collect();
    if got != want || real.place != Place::Real || real.v_disc.is_some() {
        return Err("has local data at places other than those of its discriminant".into());
    }
    if real.pattern != r.signature.name() {
        return Err("has local data at the real place that contradicts its signature".into());
    }
    let pattern_ok = |s: &str| {
        !s.is_empty()
            && s.len() <= 64
            && s.bytes()
                .all(|b| b.is_ascii_digit() || b == b'^' || b == b' ')
    };
    if !primes.iter().all(|l| pattern_ok(&l.pattern)) {
        return Err("has a factorisation pattern mod p that no form has".into());
    }
    Ok(())
}

/// The row of `pairs` for a pair read back: its counts, discriminant, height and
/// factorisation must be those of the classes read (a pair row with no class, or counts
/// that disagree, would make a command report too few or too many classes).
pub fn check_pair_row(conn: &Connection, p: &Pair) -> std::result::Result<(), String> {
    type Row = (i64, i64, i64, i64, i64, i64, String, Option<i64>);
    let sql = "SELECT classes, irreducible, els, rational_els, disc, h4, disc_factors, reducible \
               FROM pairs WHERE I = ?1 AND J = ?2";
    let row: Option<Row> = conn
        .query_row(sql, [p.i, p.j], |r| {
            Ok((
                r.get(0)?,
                r.get(1)?,
                r.get(2)?,
                r.get(3)?,
                r.get(4)?,
                r.get(5)?,
                r.get(6)?,
                r.get(7)?,
            ))
        })
        .optional()
        .map_err(|e| format!("its row of pairs cannot be read ({e})"))?;
    let Some((classes, irreducible, els, over_q, disc, h4, factors, reducible)) = row else {
        return Ok(());
    };
    let n = p.classes.len() as i64;
    let irr = p.irreducible() as i64;
    let counts = (classes, irreducible, els, over_q, disc, h4);
    let want = (n, irr, p.els() as i64, p.over_q.len() as i64, p.disc, p.h4);
    if n == 0 || counts != want || reducible.is_some_and(|r| r != n - irr) {
        return Err(format!(
            "its row of pairs counts {classes}/{irreducible}/{els}/{over_q} classes/irreducible/\
             everywhere locally soluble/over Q, the classes read give {n}/{irr}/{}/{}",
            want.2, want.3
        ));
    }
    if factors != factor_text(&p.disc_factors) {
        return Err("its row of pairs records another factorisation of the discriminant".into());
    }
    Ok(())
}
