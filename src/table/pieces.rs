//! The content hash of a file in parallel (DESIGN §5). Each content statement is cut into
//! pieces by ranges of its first `ORDER BY` column; the rayon workers render the pieces,
//! each on a read-only connection of its own, and one thread hashes them in order, so
//! memory stays bounded by a window of pieces.
//!
//! The text hashed is byte for byte that of the serial reference,
//! [`render_content_in`](crate::table::hash::render_content_in). A sort term `x = 0`
//! followed by `x` (the real place last among the local rows of a class) is not left to
//! SQLite's sorter: the rows come in key order and the row with `x = 0` is held back to
//! the end of its group. Whatever this module does not expect — a statement of another
//! shape, keys that do not strictly increase, a value outside the ranges, any error —
//! is an `Err`, and the caller falls back to the serial reference, which also words the
//! error.

use crate::error::{Error, Result};
use crate::table::format::Format;
use crate::table::hash::{content_statements, hex, render_row, statement_table};
use crate::table::schema_check::{columns_in, Column};
use rayon::prelude::*;
use rusqlite::types::{Value, ValueRef};
use rusqlite::{Connection, OpenFlags};
use sha2::{Digest, Sha256};
use std::cmp::Ordering;
use std::path::Path;

/// Key values per piece: some 16 k rows of `classes`, a few MB of text.
pub const PIECE_KEYS: i64 = 16_384;

/// A content statement, as rendered here.
struct Plan {
    /// The query of one piece: the statement with `WHERE <first> BETWEEN ?1 AND ?2` when
    /// `ranged`, without the held-back term.
    sql: String,
    /// The statement's table and its schema columns.
    table: &'static str,
    cols: &'static [Column],
    /// The first `ORDER BY` column, when it is an `INTEGER` column the pieces range over.
    ranged: Option<&'static str>,
    /// Positions of the sort columns of `sql`, in order.
    order: Vec<usize>,
    /// The held-back term: how many sort columns before it make a group (a prefix of
    /// `order`), and the position of `x`.
    held: Option<(usize, usize)>,
}

fn not_expected(what: &str) -> Error {
    Error::Database(format!(
        "the parallel content rendering does not expect {what}"
    ))
}

/// The plan of a statement `SELECT * FROM <table> ORDER BY <terms>`, or `None` when it has
/// another shape.
fn plan(f: &'static Format, sql: &'static str) -> Option<Plan> {
    let table = statement_table(sql);
    let cols = columns_in(f, table)?;
    let (head, order) = sql.split_once(" ORDER BY ")?;
    if head.split_whitespace().collect::<Vec<_>>() != ["SELECT", "*", "FROM", table] {
        return None;
    }
    let position = |name: &str| cols.iter().position(|c| c.name == name);
    let terms: Vec<&str> = order.split(',').map(str::trim).collect();
    let mut kept = Vec::new();
    let mut held = None;
    for (k, t) in terms.iter().enumerate() {
        if let Some(x) = t.strip_suffix(" = 0").map(str::trim) {
            // Only `…, x = 0, x`, once, after at least the first (ranged) column.
            if held.is_some() || k == 0 || terms.get(k + 1) != Some(&x) {
                return None;
            }
            // The terms before it are kept ones, so the group is `order[..k]`.
            held = Some((k, position(x)?));
            continue;
        }
        kept.push(*t);
    }
    let order: Vec<usize> = kept.iter().map(|t| position(t)).collect::<Option<_>>()?;
    let first = &cols[order[0]];
    let ranged = first
        .decl
        .eq_ignore_ascii_case("INTEGER")
        .then_some(kept[0]);
    let filter = ranged.map_or(String::new(), |c| format!(" WHERE {c} BETWEEN ?1 AND ?2"));
    Some(Plan {
        sql: format!("SELECT * FROM {table}{filter} ORDER BY {}", kept.join(", ")),
        table,
        cols,
        ranged,
        order,
        held,
    })
}

/// A read-only connection to the file at `path`.
pub(crate) fn open(path: &Path) -> Result<Connection> {
    Connection::open_with_flags(
        path,
        OpenFlags::SQLITE_OPEN_READ_ONLY | OpenFlags::SQLITE_OPEN_NO_MUTEX,
    )
    .map_err(|e| Error::Database(format!("{}: {e}", path.display())))
}

fn db(e: rusqlite::Error) -> Error {
    Error::Database(e.to_string())
}

/// Compares two sort values: integers with integers, text with text; anything else is
/// not expected.
fn compare(a: ValueRef<'_>, b: ValueRef<'_>) -> Result<Ordering> {
    match (a, b) {
        (ValueRef::Integer(x), ValueRef::Integer(y)) => Ok(x.cmp(&y)),
        (ValueRef::Text(x), ValueRef::Text(y)) => Ok(x.cmp(y)),
        _ => Err(not_expected("a sort value other than an integer or text")),
    }
}

/// The rendering of one piece (`range` the inclusive bounds of the ranged column) and the
/// number of its rows.
fn render_piece(conn: &Connection, p: &Plan, range: Option<(i64, i64)>) -> Result<(Vec<u8>, u64)> {
    let mut st = conn.prepare_cached(&p.sql).map_err(db)?;
    let n = st.column_count();
    let mut rows = match range {
        Some((lo, hi)) => st.query([lo, hi]),
        None => st.query([]),
    }
    .map_err(db)?;
    let (mut out, mut line, mut held) = (Vec::new(), Vec::new(), Vec::new());
    // The sort values of this row and of the one before, reused from row to row.
    let (mut key, mut last): (Vec<Value>, Vec<Value>) = (Vec::new(), Vec::new());
    let mut count = 0u64;
    while let Some(r) = rows.next().map_err(db)? {
        key.clear();
        for &c in &p.order {
            key.push(r.get_ref(c).map(Value::from).map_err(db)?);
        }
        // The sort columns strictly increase: the order is total, as in the reference.
        // `first` is the first sort column that changed (0 for the first row).
        let mut first = 0;
        if count > 0 {
            let mut cmp = Ordering::Equal;
            while cmp == Ordering::Equal && first < key.len() {
                cmp = compare((&key[first]).into(), (&last[first]).into())?;
                first += usize::from(cmp == Ordering::Equal);
            }
            if cmp != Ordering::Greater {
                return Err(not_expected("sort keys that do not strictly increase"));
            }
        }
        std::mem::swap(&mut last, &mut key);
        if p.held.is_some_and(|(group, _)| first < group) {
            out.append(&mut held);
        }
        line.clear();
        render_row(r, n, p.cols, &mut line).map_err(|_| not_expected("this value"))?;
        count += 1;
        match p.held.map(|(_, x)| r.get_ref(x)) {
            None => out.extend_from_slice(&line),
            Some(Ok(ValueRef::Integer(0))) if held.is_empty() => held.extend_from_slice(&line),
            Some(Ok(ValueRef::Integer(_))) => out.extend_from_slice(&line),
            _ => return Err(not_expected("this held-back value")),
        }
    }
    out.append(&mut held);
    Ok((out, count))
}

/// SHA-256 (lowercase hex) of the content rendering of the file at `path`, of format `f`,
/// with pieces of `piece_keys` key values.
pub fn content_sha256(f: &'static Format, path: &Path, piece_keys: i64) -> Result<String> {
    let conn = open(path)?;
    let plans: Vec<Plan> = content_statements(f.content_sql)
        .map(|sql| plan(f, sql))
        .collect::<Option<_>>()
        .ok_or_else(|| not_expected("a statement of this shape"))?;
    let mut pieces: Vec<(usize, Option<(i64, i64)>)> = Vec::new();
    let mut expected = Vec::new();
    for (k, p) in plans.iter().enumerate() {
        let count = |sql: String| conn.query_row(&sql, [], |r| r.get::<_, i64>(0));
        let rows = count(format!("SELECT count(*) FROM {}", p.table)).map_err(db)?;
        expected.push(rows as u64);
        let Some(c) = p.ranged else {
            pieces.push((k, None));
            continue;
        };
        if rows == 0 {
            continue;
        }
        let (lo, hi): (i64, i64) = conn
            .query_row(
                &format!("SELECT min({c}), max({c}) FROM {}", p.table),
                [],
                |r| Ok((r.get(0)?, r.get(1)?)),
            )
            .map_err(db)?;
        let mut from = lo;
        loop {
            let to = from.saturating_add(piece_keys - 1).min(hi);
            pieces.push((k, Some((from, to))));
            if to == hi {
                break;
            }
            from = to + 1;
        }
    }
    drop(conn);
    let window = 4 * rayon::current_num_threads().max(1);
    let mut got = vec![0u64; plans.len()];
    std::thread::scope(|scope| {
        let (send, receive) = std::sync::mpsc::sync_channel::<Vec<u8>>(window);
        let hashing = scope.spawn(move || {
            let mut h = Sha256::new();
            for text in receive {
                h.update(&text);
            }
            hex(&h.finalize())
        });
        for group in pieces.chunks(window) {
            let texts: Vec<(usize, Vec<u8>, u64)> = group
                .par_iter()
                .map_init(
                    || open(path),
                    |conn, &(k, range)| {
                        let conn = conn.as_ref().map_err(|e| Error::Database(e.to_string()))?;
                        let (text, rows) = render_piece(conn, &plans[k], range)?;
                        Ok((k, text, rows))
                    },
                )
                .collect::<Result<_>>()?;
            for (k, text, rows) in texts {
                got[k] += rows;
                send.send(text)
                    .map_err(|_| Error::Io("the content hash stopped".into()))?;
            }
        }
        drop(send);
        let hash = hashing.join().expect("hashing does not panic");
        if got != expected {
            return Err(not_expected(
                "rows outside the ranges of their first sort column",
            ));
        }
        Ok(hash)
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::progress::Silent;
    use crate::table::format::TABLE;
    use crate::table::hash::content_sha256_serial;
    use crate::table::pipeline::enumerate_classes;
    use crate::table::row::Params;
    use crate::table::writer::write_table;

    #[test]
    fn pieces_hash_to_the_serial_rendering() {
        let dir = std::env::temp_dir().join(format!("qorbits-pieces-{}", std::process::id()));
        std::fs::create_dir_all(&dir).unwrap();
        let path = dir.join("t.sqlite");
        let params = Params {
            height: 20_000,
            include_reducible: true,
        };
        write_table(&path, &enumerate_classes(&params, &Silent).unwrap(), true).unwrap();
        let conn = open(&path).unwrap();
        let serial = content_sha256_serial(&TABLE, &conn).unwrap();
        // One piece per table, pieces smaller than a class's local rows, and in between:
        // every cut, including cuts inside the groups whose real place is held back.
        for keys in [i64::MAX, 1, 2, 7, 100] {
            assert_eq!(
                content_sha256(&TABLE, &path, keys).unwrap(),
                serial,
                "{keys}"
            );
        }
        // The real place really is held back: SQLite's key order alone differs.
        let local = plan(&TABLE, "SELECT * FROM local ORDER BY class_id, p = 0, p").unwrap();
        assert_eq!(
            local.sql,
            "SELECT * FROM local WHERE class_id BETWEEN ?1 AND ?2 ORDER BY class_id, p"
        );
        assert!(local.held.is_some());
        // A table edited so that a key is not an integer is left to the serial path.
        drop(conn);
        let c = Connection::open(&path).unwrap();
        c.execute("UPDATE local SET class_id = 'x' WHERE class_id = 3", [])
            .unwrap();
        drop(c);
        assert!(content_sha256(&TABLE, &path, 7).is_err());
        let _ = std::fs::remove_dir_all(&dir);
    }

    #[test]
    fn statements_of_other_shapes_are_not_planned() {
        for sql in [
            "SELECT id FROM classes ORDER BY id",
            "SELECT * FROM classes ORDER BY id DESC",
            "SELECT * FROM local ORDER BY p = 0, p",
            "SELECT * FROM local ORDER BY class_id, p = 0",
            "SELECT * FROM classes",
        ] {
            assert!(plan(&TABLE, sql).is_none(), "{sql}");
        }
    }
}
