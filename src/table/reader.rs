//! Reading a finished table: read-only opening with clear errors ([`open_table`]), its
//! parameters ([`table_params`]) and the classes of one pair ([`pair_from_table`]).
//!
//! ```
//! use qorbits::table::reader::open_table;
//! let e = open_table(std::path::Path::new("no/such/table.sqlite")).unwrap_err();
//! assert!(e.to_string().contains("does not exist"));
//! ```

use crate::arith::primes::factor;
use crate::error::{Error, Result};
use crate::form::galois::FactorPattern;
use crate::form::invariants_from_ij;
use crate::form::local::LocalPlace;
use crate::table::row::{ClassRow, Pair, Params};
use crate::table::schema::{
    galois_from_name, pattern_from_name, place_from_column, signature_from_name, SCHEMA_VERSION,
};
use rug::Integer;
use rusqlite::{Connection, ErrorCode, OptionalExtension};
use std::path::Path;

/// How a connection's file is named in messages.
pub(crate) fn shown(conn: &Connection) -> String {
    match conn.path() {
        Some(p) if !p.is_empty() => p.to_string(),
        _ => "the table".to_string(),
    }
}

/// A one-line error for a failed query on a table: damage, and values of a type or size
/// the schema does not allow, are named as such.
pub(crate) fn read_error(conn: &Connection, e: rusqlite::Error) -> Error {
    use rusqlite::Error as E;
    let edited = |what: String| {
        Error::Database(format!(
            "{}: {what}; the table is damaged or was edited, verify it against its manifest",
            shown(conn)
        ))
    };
    match &e {
        E::InvalidColumnType(_, name, t) => {
            return edited(format!(
                "column {name} holds a value of type {}, which schema version {SCHEMA_VERSION} \
                 does not allow there",
                t.to_string().to_uppercase()
            ))
        }
        E::IntegralValueOutOfRange(_, v) => {
            return edited(format!(
                "a column holds {v}, outside the range of its values"
            ))
        }
        E::FromSqlConversionFailure(_, t, why) => {
            return edited(format!(
                "a column holds a {} value qorbits cannot read ({why})",
                t.to_string().to_uppercase()
            ))
        }
        _ => {}
    }
    match e.sqlite_error_code() {
        Some(ErrorCode::DatabaseCorrupt) | Some(ErrorCode::NotADatabase) => {
            Error::Database(format!(
                "{} is damaged ({e}); verify it against its manifest or rebuild it",
                shown(conn)
            ))
        }
        Some(ErrorCode::TooBig) => edited(format!(
            "a value is longer than {} bytes, which no qorbits table holds",
            crate::table::validate::MAX_VALUE_BYTES
        )),
        _ => Error::Database(format!("cannot read {}: {e}", shown(conn))),
    }
}

/// Opens a qorbits table read-only, as untrusted input: the file, its header, a hardened
/// connection (no journal or log read, `trusted_schema` and triggers off, `query_only`),
/// its schema against schema version 4 and its `meta` rows are checked before anything
/// reads it ([`crate::table::validate::open_checked`]); a refusal is one line.
pub fn open_table(path: &Path) -> Result<Connection> {
    crate::table::validate::open_checked(path).map_err(|(_, e)| e)
}

/// The classes of the pair (I, J) = (?1, ?2): found through the index of `pairs`, read as a
/// range of ids (the classes of a pair are consecutive in row order).
pub const PAIR_CLASSES_SQL: &str = "SELECT id, label, a, b, c, d, e, I, J, disc, h4, real_roots, \
     signature, factorisation, irreducible, galois, stabiliser, rational_class FROM classes \
     WHERE id BETWEEN (SELECT first_id FROM pairs WHERE I = ?1 AND J = ?2) \
     AND (SELECT first_id + classes - 1 FROM pairs WHERE I = ?1 AND J = ?2) ORDER BY id";

/// Every row of a query, mapped by `f`, with one-line errors.
fn query_all<T, P: rusqlite::Params>(
    conn: &Connection,
    sql: &str,
    params: P,
    f: impl FnMut(&rusqlite::Row<'_>) -> rusqlite::Result<T>,
) -> Result<Vec<T>> {
    (|| {
        let mut st = conn.prepare_cached(sql)?;
        let rows = st.query_map(params, f)?;
        rows.collect::<rusqlite::Result<Vec<T>>>()
    })()
    .map_err(|e| read_error(conn, e))
}

/// The value of `key` in the `meta` table.
pub fn meta_value(conn: &Connection, key: &str) -> Result<String> {
    conn.query_row("SELECT value FROM meta WHERE key = ?1", [key], |r| r.get(0))
        .optional()
        .map_err(|e| read_error(conn, e))?
        .ok_or_else(|| {
            Error::Database(format!(
                "{} has no meta row '{key}'; the table is damaged or was not written by qorbits",
                shown(conn)
            ))
        })
}

/// The parameters the table was built with (from `meta`).
pub fn table_params(conn: &Connection) -> Result<Params> {
    let bad = |key: &str, v: &str| {
        Error::Database(format!(
            "{}: meta row '{key}' has the invalid value '{v}'; the table is damaged",
            shown(conn)
        ))
    };
    let h = meta_value(conn, "height")?;
    let height = h.parse::<i128>().map_err(|_| bad("height", &h))?;
    let r = meta_value(conn, "include_reducible")?;
    let include_reducible = match r.as_str() {
        "0" => false,
        "1" => true,
        _ => return Err(bad("include_reducible", &r)),
    };
    Ok(Params {
        height,
        include_reducible,
    })
}

/// The columns of `classes` as stored, before the names are parsed.
struct StoredClass {
    id: i64,
    label: String,
    ints: [i64; 9],
    real_roots: i64,
    signature: String,
    factorisation: String,
    irreducible: i64,
    galois: Option<String>,
    stabiliser: i64,
    rational: Option<i64>,
}

impl StoredClass {
    fn into_class_row(self, conn: &Connection) -> Result<ClassRow> {
        let bad = |what: &str| {
            Error::Database(format!(
                "{}: class id {} has {what}; the table is damaged",
                shown(conn),
                self.id
            ))
        };
        let signature =
            signature_from_name(&self.signature).ok_or_else(|| bad("an unknown signature"))?;
        let pattern = pattern_from_name(&self.factorisation)
            .ok_or_else(|| bad("an unknown factorisation"))?;
        let galois = match &self.galois {
            None => None,
            Some(g) => Some(galois_from_name(g).ok_or_else(|| bad("an unknown Galois group"))?),
        };
        let irreducible = pattern == FactorPattern::Irreducible;
        if self.real_roots != i64::from(signature.real_roots())
            || self.irreducible != i64::from(irreducible)
            || irreducible != galois.is_some()
        {
            return Err(bad("inconsistent columns"));
        }
        let stabiliser =
            u8::try_from(self.stabiliser).map_err(|_| bad("an invalid stabiliser order"))?;
        let [a, b, c, d, e, i, j, disc, h4] = self.ints;
        let local = query_all(
            conn,
            "SELECT p, v_disc, pattern, soluble FROM local WHERE class_id = ?1 ORDER BY p = 0, p",
            [self.id],
            |r| Ok((r.get(0)?, r.get(1)?, r.get(2)?, r.get(3)?)),
        )?;
        let local = local
            .into_iter()
            .map(
                |(p, v_disc, pattern, soluble): (i64, Option<u32>, String, bool)| {
                    let place = place_from_column(p)
                        .ok_or_else(|| bad("a local row at an invalid place"))?;
                    Ok(LocalPlace {
                        place,
                        v_disc,
                        pattern,
                        soluble,
                    })
                },
            )
            .collect::<Result<Vec<_>>>()?;
        Ok(ClassRow {
            form: [a, b, c, d, e],
            i,
            j,
            disc,
            h4,
            signature,
            pattern,
            galois,
            stabiliser,
            label: self.label,
            rational: None,
            local,
        })
    }
}

/// The classes of the pair (I, J) = (`i`, `j`) as the table holds them (none when the pair
/// is not in it), in table order, with the grouping over Q read back from `rational_class`
/// (uses the (I, J) index).
pub fn pair_from_table(conn: &Connection, i: i64, j: i64) -> Result<Pair> {
    let stored = query_all(conn, PAIR_CLASSES_SQL, [i, j], stored_class_at)?;
    let damaged = || {
        Error::Database(format!(
            "{}: the pair ({i}, {j}) is inconsistent; the table is damaged",
            shown(conn)
        ))
    };
    let ids: Vec<i64> = stored.iter().map(|s| s.id).collect();
    let firsts: Vec<Option<i64>> = stored.iter().map(|s| s.rational).collect();
    let mut classes = stored
        .into_iter()
        .map(|s| s.into_class_row(conn))
        .collect::<Result<Vec<_>>>()?;
    let inv = invariants_from_ij(i128::from(i), i128::from(j)).ok_or_else(damaged)?;
    let disc = i64::try_from(inv.disc).map_err(|_| damaged())?;
    let h4 = i64::try_from(inv.h4).map_err(|_| damaged())?;
    // rational_class holds the id of the first class of the class over Q, in this pair.
    let mut over_q: Vec<Vec<usize>> = Vec::new();
    for (k, first) in firsts.iter().enumerate() {
        let Some(first) = first else { continue };
        let at = ids.iter().position(|id| id == first).ok_or_else(damaged)?;
        match over_q.iter_mut().find(|c| c[0] == at) {
            Some(c) => c.push(k),
            None if at == k => over_q.push(vec![k]),
            None => return Err(damaged()),
        }
    }
    for class in &over_q {
        let label = classes[class[0]].label.clone();
        for &k in class {
            classes[k].rational = Some(label.clone());
        }
    }
    let disc_factors = if classes.is_empty() {
        factor(&Integer::from(disc))
            .into_iter()
            .map(|(p, e)| (p.to_i64().expect("a factor of an i64"), e))
            .collect()
    } else {
        query_all(
            conn,
            "SELECT p, e FROM pair_primes WHERE pair_id = (SELECT id FROM pairs WHERE I = ?1 AND J = ?2) ORDER BY p",
            [i, j],
            |r| Ok((r.get(0)?, r.get(1)?)),
        )?
    };
    let pair = Pair {
        i,
        j,
        disc,
        h4,
        disc_factors,
        classes,
        over_q,
    };
    crate::table::pair_check::check_pair(&pair)
        .and_then(|()| crate::table::pair_check::check_pair_row(conn, &pair))
        .map_err(|why| {
            Error::Database(format!(
            "{}: the pair ({i}, {j}) is inconsistent: {why}; the table is damaged or was edited",
            shown(conn)
        ))
        })?;
    Ok(pair)
}

/// The columns of `classes` read by [`class_rows`] and [`for_each_class`], qualified by the
/// alias `c` (the columns of [`PAIR_CLASSES_SQL`], in the same order).
pub const CLASS_COLUMNS: &str = "c.id, c.label, c.a, c.b, c.c, c.d, c.e, c.I, c.J, c.disc, \
     c.h4, c.real_roots, c.signature, c.factorisation, c.irreducible, c.galois, c.stabiliser, \
     c.rational_class";

/// One stored class from a row selecting [`CLASS_COLUMNS`].
fn stored_class_at(r: &rusqlite::Row<'_>) -> rusqlite::Result<StoredClass> {
    let mut ints = [0i64; 9];
    for (k, v) in ints.iter_mut().enumerate() {
        *v = r.get(k + 2)?;
    }
    Ok(StoredClass {
        id: r.get(0)?,
        label: r.get(1)?,
        ints,
        real_roots: r.get(11)?,
        signature: r.get(12)?,
        factorisation: r.get(13)?,
        irreducible: r.get(14)?,
        galois: r.get(15)?,
        stabiliser: r.get(16)?,
        rational: r.get(17)?,
    })
}

/// A class read back in full: its id, the row (local data included, `rational` the label
/// of the first class of its class over Q) and `classes.rational_class` as stored.
#[derive(Clone, Debug)]
pub struct StoredRow {
    /// `classes.id`.
    pub id: i64,
    /// The class.
    pub row: ClassRow,
    /// `classes.rational_class`: the id of the first class of its class over Q.
    pub rational_id: Option<i64>,
}

/// Calls `f` on every class of a query selecting [`CLASS_COLUMNS`] first, in the query's
/// order, streaming (one class in memory at a time).
pub fn for_each_class<P: rusqlite::Params>(
    conn: &Connection,
    sql: &str,
    params: P,
    mut f: impl FnMut(StoredRow) -> Result<()>,
) -> Result<()> {
    let mut st = conn.prepare(sql).map_err(|e| read_error(conn, e))?;
    let mut rows = st.query(params).map_err(|e| read_error(conn, e))?;
    while let Some(r) = rows.next().map_err(|e| read_error(conn, e))? {
        let s = stored_class_at(r).map_err(|e| read_error(conn, e))?;
        let (id, rational_id) = (s.id, s.rational);
        let mut row = s.into_class_row(conn)?;
        if let Some(first) = rational_id {
            let label: Option<String> = conn
                .prepare_cached("SELECT label FROM classes WHERE id = ?1")
                .and_then(|mut q| q.query_row([first], |r| r.get(0)).optional())
                .map_err(|e| read_error(conn, e))?;
            row.rational = Some(label.ok_or_else(|| {
                Error::Database(format!(
                    "{}: class id {id} names a class over Q that does not exist; the table is damaged",
                    shown(conn)
                ))
            })?);
        }
        f(StoredRow {
            id,
            row,
            rational_id,
        })?;
    }
    Ok(())
}

/// Every class of a query selecting [`CLASS_COLUMNS`] first, in the query's order.
pub fn class_rows<P: rusqlite::Params>(
    conn: &Connection,
    sql: &str,
    params: P,
) -> Result<Vec<ClassRow>> {
    let mut out = Vec::new();
    for_each_class(conn, sql, params, |s| {
        out.push(s.row);
        Ok(())
    })?;
    Ok(out)
}
